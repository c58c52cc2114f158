"""The demo board's two netlists describe one board (fixtures/demo/BOARD.md says so).

``dust_extractor_panel.edif`` and ``dust_extractor_panel.cir`` must read to the same parts
(references, kinds, part numbers, pin names) and the same connectivity: nets compared as sets
of (reference, pin) sets and by name. The SPICE-only parts are left out: the sources V12 and
V5 (kind ``source``) and the MOSFET bulk pins ``B`` (SPICE needs them; the board has none).
SPICE's ground net ``0`` is the board's ``GND`` through its alias. The SPICE deck is read as
the engine reads it: KM8C28 kept whole because the demo settings give it kind ``mcu``.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.model import Circuit
from linter.readers import read_netlist

DEMO = Path(__file__).resolve().parents[1] / "fixtures" / "demo"
EDIF = DEMO / "dust_extractor_panel.edif"
SPICE = DEMO / "dust_extractor_panel.cir"
MCU_PART_NUMBERS = frozenset({"KM8C28"})
"""From fixtures/demo/ledlint.toml: ``[parts."KM8C28"] kind = "mcu"``."""


def _board_pins(circuit: Circuit) -> dict[tuple[str, str], str]:
    """(ref, pin) → net name, without SPICE sources and MOSFET bulk pins."""
    joined: dict[tuple[str, str], str] = {}
    for ref, part in circuit.parts.items():
        if part.kind == "source":
            continue
        for pin in part.pins:
            if part.kind in ("nmos", "pmos") and pin.name == "B":
                continue
            assert pin.net is not None, f"{ref}.{pin.name} is unconnected"
            joined[(ref, pin.name)] = pin.net
    return joined


def _board_table() -> dict[str, dict[str, str]]:
    """BOARD.md's parts table: ref → {pin: net}, read from its last column (``A:RUN_A K:GND``)."""
    table: dict[str, dict[str, str]] = {}
    for line in (DEMO / "BOARD.md").read_text().splitlines():
        cells = [cell.strip() for cell in line.strip().strip("|").split("|")]
        if len(cells) == 6 and ":" in cells[5] and cells[0] not in ("ref", ""):
            table[cells[0]] = dict(pair.split(":", 1) for pair in cells[5].split())
    return table


def test_spice_deck_is_the_board_of_board_md(twins: tuple[Circuit, Circuit]) -> None:
    _, spice = twins
    wanted = {(ref, pin): net for ref, pins in _board_table().items() for pin, net in pins.items()}
    found = {ref_pin: "GND" if net == "0" else net for ref_pin, net in _board_pins(spice).items()}
    assert found == wanted


def _net_sets(joined: dict[tuple[str, str], str]) -> set[frozenset[tuple[str, str]]]:
    by_net: dict[str, set[tuple[str, str]]] = {}
    for ref_pin, net in joined.items():
        by_net.setdefault(net, set()).add(ref_pin)
    return {frozenset(members) for members in by_net.values()}


@pytest.fixture(scope="module")
def twins() -> tuple[Circuit, Circuit]:
    if not EDIF.exists():
        pytest.fail(f"{EDIF} is missing: the demo board needs both netlists")
    edif = read_netlist(EDIF)
    spice = read_netlist(SPICE, opaque=MCU_PART_NUMBERS)
    return edif, spice


def test_same_parts(twins: tuple[Circuit, Circuit]) -> None:
    edif, spice = twins
    board_parts = {ref for ref, part in spice.parts.items() if part.kind != "source"}
    assert board_parts == set(edif.parts)
    assert board_parts == set(_board_table())  # the parts table of BOARD.md
    assert {ref for ref, part in spice.parts.items() if part.kind == "source"} == {"V12", "V5"}
    for ref in board_parts:
        ours, theirs = spice.parts[ref], edif.parts[ref]
        assert ours.kind == theirs.kind, ref
        assert ours.part_number == theirs.part_number, ref


def test_same_connectivity_as_pin_sets(twins: tuple[Circuit, Circuit]) -> None:
    edif, spice = twins
    assert _net_sets(_board_pins(spice)) == _net_sets(_board_pins(edif))


def test_same_connectivity_by_net_name(twins: tuple[Circuit, Circuit]) -> None:
    edif, spice = twins
    spice_pins, edif_pins = _board_pins(spice), _board_pins(edif)
    assert set(spice_pins) == set(edif_pins)
    for ref_pin, net in spice_pins.items():
        names = {net, *spice.nets[net].aliases}
        assert edif_pins[ref_pin] in names, ref_pin


def test_spice_ground_is_the_board_gnd(twins: tuple[Circuit, Circuit]) -> None:
    _, spice = twins
    assert spice.nets["0"].aliases == ("GND",)
