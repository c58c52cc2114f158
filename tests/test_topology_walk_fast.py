"""The topology's one-loop chain walk gives the chains of its plain twin.

Expected values: the plain path of our own code, ``walk_chain_plain`` (one ``_extend`` walk
each way, every node asked of ``CircuitIndex.series_pins``), compared chain by chain with
``==`` from every two-pin series part. Inputs: the demo (EDIF and SPICE), the topology
fixtures, generated boards (flat and hierarchical EDIF, SPICE), hand-made odd nodes (a
capacitor or a part the Circuit does not have on a two-pin net, a net the Circuit does not
list, an unconnected pin, a ring of resistors) and random small circuits (hypothesis).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.engine import CheckRequest, load_inputs
from linter.model import Circuit, Net, Part, Pin, SourceLocation
from linter.partdata import McuData, Rail
from linter.topology_index import CircuitIndex
from linter.topology_walk import walk_chain, walk_chain_plain

from test_topology_quick import RAILS, SPICE_RAILS, _circuit, _part, board_context

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"
FIXTURES = ROOT / "fixtures" / "topology"
HERE = SourceLocation("t", 1, 1)


def _assert_same_chains(circuit: Circuit, rails, part_data) -> int:
    """Every series part's chain both ways; returns how many were compared."""
    count = 0
    index = CircuitIndex(circuit, rails, part_data)
    for ref in circuit.parts:
        if index.role(ref) != "series":
            continue
        assert walk_chain(index, ref) == walk_chain_plain(index, ref), ref
        count += 1
    return count


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo(netlist: str) -> None:
    context = load_inputs(CheckRequest(DEMO / netlist, bom=DEMO / "bom.csv"))
    assert _assert_same_chains(context.circuit, context.rails, context.part_data) > 10


@pytest.mark.parametrize("path", sorted(FIXTURES.glob("*.cir")), ids=lambda p: p.name)
def test_topology_fixture(path: Path) -> None:
    from linter.readers.spice import read_spice

    circuit = read_spice(path.read_text(), path.name, path=path, root=FIXTURES, opaque={"MCU8"})
    assert _assert_same_chains(circuit, SPICE_RAILS, {"U1": McuData(supply_pins=("VDD",))}) >= 1


@pytest.mark.parametrize("parts, seed", [(300, 4), (1200, 5), (3000, 6)])
@pytest.mark.parametrize("role", ["edif", "edif_hier", "spice"])
def test_generated_board(tmp_path: Path, parts: int, seed: int, role: str) -> None:
    context = board_context(write_all(generate(parts, seed), tmp_path), role)
    assert _assert_same_chains(context.circuit, context.rails, context.part_data) > 50


def _two_pin(ref: str, kind: str, one: str | None, other: str | None) -> Part:
    return Part(ref, kind, None, (Pin("1", one), Pin("2", other)), HERE)


def test_odd_nodes() -> None:
    parts = {
        "R1": _two_pin("R1", "resistor", "V", "M"),
        "D1": _two_pin("D1", "led", "M", "C"),       # C: D1, R2 and a capacitor
        "C1": _two_pin("C1", "capacitor", "C", "G"),
        "R2": _two_pin("R2", "resistor", "C", "X"),  # X: R2 and a part not in the Circuit
        "R3": _two_pin("R3", "resistor", "Y", "U"),  # Y: listed by no net (from the pins)
        "D2": _two_pin("D2", "led", "Y", None),      # an unconnected pin
        "R4": _two_pin("R4", "resistor", "K1", "K2"),  # a ring of three resistors
        "R5": _two_pin("R5", "resistor", "K2", "K3"),
        "R6": _two_pin("R6", "resistor", "K3", "K1"),
        "R7": _two_pin("R7", "resistor", "T", "G"),  # T: R7 and a transistor
        "Q1": Part("Q1", "npn", None, (Pin("C", "T"), Pin("B", "B1"), Pin("E", "G")), HERE),
    }
    nets = {
        "V": Net("V", (("R1", "1"),), HERE),
        "M": Net("M", (("R1", "2"), ("D1", "1")), HERE),
        "C": Net("C", (("D1", "2"), ("C1", "1"), ("R2", "1")), HERE),
        "X": Net("X", (("R2", "2"), ("GHOST", "1")), HERE),
        "U": Net("U", (("R3", "2"),), HERE),
        "K1": Net("K1", (("R4", "1"), ("R6", "2")), HERE),
        "K2": Net("K2", (("R4", "2"), ("R5", "1")), HERE),
        "K3": Net("K3", (("R5", "2"), ("R6", "1")), HERE),
        "T": Net("T", (("R7", "1"), ("Q1", "C")), HERE),
    }
    circuit = Circuit("t", "spice", parts, nets)
    rails = {"G": Rail("G", 0.0, 0.0, 0.0), "V": Rail("V", 5.0, 5.0, 5.0)}
    assert _assert_same_chains(circuit, rails, {}) == 9
    index = CircuitIndex(circuit, rails, {})
    # by the series-node rule: C joins D1 and R2 (the capacitor is open), X reaches a part
    # the Circuit does not have (left out, as capacitors are), the ring stops where it began
    assert walk_chain(index, "D1").parts in (("R1", "D1", "R2"), ("R2", "D1", "R1"))
    assert set(walk_chain(index, "R5").parts) == {"R4", "R5", "R6"}


@settings(max_examples=400, deadline=None)
@given(specs=st.lists(_part, min_size=1, max_size=10))
def test_random_small_circuits(specs: list[tuple]) -> None:
    circuit, data = _circuit(specs)
    _assert_same_chains(circuit, RAILS, data)
