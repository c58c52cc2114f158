"""Topology's quick paths give the groups its general path gives.

Expected values: the plain path of our own code, ``find_groups(..., quick=False)`` (every group
labelled by the general path: cluster, strands, bank, draft), compared group by group with
``==`` and by ``repr`` (which also holds the order of a scenario's pin levels). Never stored
figures. Inputs: the demo (EDIF and SPICE), the topology fixtures, generated boards (several
seeds and sizes, flat and hierarchical EDIF, SPICE) and random small circuits of series parts
between rails and microcontroller pins (hypothesis), which reach the cases the quick path
hands back to the general one (an end on no rail or pin, both ends on one net, LEDs facing
opposite ways or with numbered pins, no resistor, a reversed LED, rails of one voltage).
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
from linter.topology import find_groups

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"
FIXTURES = ROOT / "fixtures" / "topology"
HERE = SourceLocation("t", 1, 1)


def _assert_same(circuit, rails, part_data) -> int:
    quick = find_groups(circuit, rails, part_data)
    plain = find_groups(circuit, rails, part_data, quick=False)
    assert len(quick) == len(plain)
    for fast, slow in zip(quick, plain):
        assert fast == slow
        assert repr(fast) == repr(slow)
    return len(quick)


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo(netlist: str) -> None:
    context = load_inputs(CheckRequest(DEMO / netlist, bom=DEMO / "bom.csv"))
    assert _assert_same(context.circuit, context.rails, context.part_data) > 5


SPICE_RAILS = {name: Rail(name, volts, volts, volts)
               for name, volts in (("vcc12", 12.0), ("vcc5", 5.0), ("vcc3", 3.3), ("0", 0.0))}


@pytest.mark.parametrize("path", sorted(FIXTURES.glob("*.cir")), ids=lambda p: p.name)
def test_topology_fixture(path: Path) -> None:
    from linter.readers.spice import read_spice

    circuit = read_spice(path.read_text(), path.name, path=path, root=FIXTURES, opaque={"MCU8"})
    assert _assert_same(circuit, SPICE_RAILS, {"U1": McuData(supply_pins=("VDD",))}) >= 1


@pytest.fixture(scope="module")
def boards(tmp_path_factory) -> dict[tuple[int, int], dict[str, Path]]:
    made = {}
    for parts, seed in ((400, 1), (900, 2), (2500, 3), (1500, 7)):
        made[parts, seed] = write_all(generate(parts, seed),
                                      tmp_path_factory.mktemp(f"b{parts}_{seed}"))
    return made


@pytest.mark.parametrize("size", [(400, 1), (900, 2), (2500, 3), (1500, 7)])
@pytest.mark.parametrize("role", ["edif", "edif_hier", "spice"])
def test_generated_board(boards, size: tuple[int, int], role: str) -> None:
    files = boards[size]
    bom = files["bom_hier"] if role == "edif_hier" else files["bom"]
    context = load_inputs(CheckRequest(files[role], bom=bom))
    assert _assert_same(context.circuit, context.rails, context.part_data) > 20


# -- random small circuits ---------------------------------------------------------------

RAILS = {"V5": Rail("V5", 5.0, 5.0, 5.0), "V12": Rail("V12", 12.0, 12.0, 12.0),
         "V5B": Rail("V5B", 5.0, 5.0, 5.0), "GND": Rail("GND", 0.0, 0.0, 0.0),
         "NEG": Rail("NEG", -5.0, -5.0, -5.0)}
PIN_NETS = ("P1", "P2", "P3")
NETS = tuple(RAILS) + PIN_NETS + ("N1", "N2", "N3", "N4", "N5")
LED_PINS = (("A", "K"), ("K", "A"), ("ANODE", "CATHODE"), ("1", "2"), ("+", "-"))

_part = st.tuples(st.sampled_from(["led", "led", "resistor", "link", "capacitor", "diode"]),
                  st.sampled_from(LED_PINS),
                  st.sampled_from(NETS + (None,)), st.sampled_from(NETS))


def _circuit(specs: list[tuple]) -> Circuit:
    parts: dict[str, Part] = {}
    counts: dict[str, int] = {}
    prefixes = {"led": "D", "resistor": "R", "link": "J", "capacitor": "C", "diode": "V"}
    for kind, names, one, other in specs:
        counts[kind] = counts.get(kind, 0) + 1
        ref = f"{prefixes[kind]}{counts[kind] * 3 % 17 + counts[kind]}"
        pin_names = names if kind == "led" else ("1", "2")
        parts[ref] = Part(ref, kind, None, (Pin(pin_names[0], one), Pin(pin_names[1], other)),
                          HERE)
    # U1 drives P1 and P2, U2 drives P3 (VDD on V5 for U1; U2 has no supply pin)
    parts["U1"] = Part("U1", "mcu", None, (Pin("PA0", "P1"), Pin("PA1", "P2"),
                                           Pin("VDD", "V5")), HERE)
    parts["U2"] = Part("U2", "mcu", None, (Pin("PB0", "P3"),), HERE)
    nets: dict[str, list[tuple[str, str]]] = {}
    for ref, part in parts.items():
        for pin in part.pins:
            if pin.net is not None:
                nets.setdefault(pin.net, []).append((ref, pin.name))
    return Circuit("t", "spice", parts,
                   {name: Net(name, tuple(pins), HERE) for name, pins in nets.items()})


@settings(max_examples=400, deadline=None)
@given(specs=st.lists(_part, min_size=1, max_size=9))
def test_random_small_circuits(specs: list[tuple]) -> None:
    circuit = _circuit(specs)
    if not circuit.leds():
        return
    _assert_same(circuit, RAILS, {"U1": McuData(), "U2": McuData()})


def test_random_circuits_reach_the_quick_path_and_its_fallbacks(monkeypatch) -> None:
    # a chain of each kind the quick path labels, and some it hands back
    import linter.topology as topology

    answered: list[str] = []

    def counted(*args):
        group = quick(*args)
        if group is not None:
            answered.append(group.topology)
        return group

    quick = topology.quick_group
    monkeypatch.setattr(topology, "quick_group", counted)
    cases = {
        "resistor": [("resistor", LED_PINS[0], "V5", "N1"), ("led", LED_PINS[0], "N1", "GND")],
        "string": [("resistor", LED_PINS[0], "V12", "N1"), ("led", LED_PINS[1], "N2", "N1"),
                   ("led", LED_PINS[0], "N2", "GND")],
        "pin-source": [("led", LED_PINS[2], "N1", "GND"), ("resistor", LED_PINS[0], "N1", "P1")],
        "pin-sink": [("led", LED_PINS[4], "N1", "P3"), ("resistor", LED_PINS[0], "V5", "N1")],
        "reversed": [("resistor", LED_PINS[0], "V5", "N1"), ("led", LED_PINS[1], "N1", "GND")],
        "across-rails": [("led", LED_PINS[0], "V5", "GND")],
        "unrecognised": [("resistor", LED_PINS[0], "V5", "N1"), ("led", LED_PINS[0], "N1", "V5B")],
    }
    for topology, specs in cases.items():
        circuit = _circuit(specs)
        _assert_same(circuit, RAILS, {"U1": McuData(), "U2": McuData()})
        answered.clear()
        assert find_groups(circuit, RAILS, {"U1": McuData(), "U2": McuData()})[0].topology \
            == topology
        quick_labels = ("resistor", "string", "pin-source", "pin-sink")
        assert answered == ([topology] if topology in quick_labels else []), topology
