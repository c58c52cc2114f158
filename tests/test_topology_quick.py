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
from linter.partdata import BjtData, McuData, MosfetData, Rail
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


def board_context(files: dict[str, Path], role: str):
    """The loaded inputs of a generated board's netlist ``role`` (edif, edif_hier, spice)
    with the BOM that goes with it."""
    bom = files["bom_hier"] if role == "edif_hier" else files["bom"]
    return load_inputs(CheckRequest(files[role], bom=bom))


@pytest.mark.parametrize("size", [(400, 1), (900, 2), (2500, 3), (1500, 7)])
@pytest.mark.parametrize("role", ["edif", "edif_hier", "spice"])
def test_generated_board(boards, size: tuple[int, int], role: str) -> None:
    context = board_context(boards[size], role)
    assert _assert_same(context.circuit, context.rails, context.part_data) > 20


# -- random small circuits ---------------------------------------------------------------

RAILS = {"V5": Rail("V5", 5.0, 5.0, 5.0), "V12": Rail("V12", 12.0, 12.0, 12.0),
         "V5B": Rail("V5B", 5.0, 5.0, 5.0), "GND": Rail("GND", 0.0, 0.0, 0.0),
         "NEG": Rail("NEG", -5.0, -5.0, -5.0)}
PIN_NETS = ("P1", "P2", "P3")
NETS = tuple(RAILS) + PIN_NETS + ("N1", "N2", "N3", "N4", "N5")
LED_PINS = (("A", "K"), ("K", "A"), ("ANODE", "CATHODE"), ("1", "2"), ("+", "-"))
TRANSISTOR_PINS = (("C", "B", "E"), ("E", "B", "C"), ("D", "G", "S"), ("S", "G", "D"),
                   ("1", "2", "3"), ("C", "C", "E"))
KINDS = ("led", "led", "led", "resistor", "resistor", "link", "capacitor", "diode",
         "npn", "pnp", "nmos", "pmos")

_part = st.tuples(st.sampled_from(KINDS), st.sampled_from(LED_PINS),
                  st.sampled_from(TRANSISTOR_PINS), st.sampled_from(NETS + (None,)),
                  st.sampled_from(NETS), st.sampled_from(NETS))


def _circuit(specs: list[tuple]) -> tuple[Circuit, dict]:
    """The parts of ``specs``, two microcontrollers, and the part data that says what is what."""
    parts: dict[str, Part] = {}
    data: dict = {"U1": McuData(), "U2": McuData()}
    counts: dict[str, int] = {}
    prefixes = {"led": "D", "resistor": "R", "link": "J", "capacitor": "C", "diode": "V",
                "npn": "Q", "pnp": "Q", "nmos": "M", "pmos": "M"}
    for kind, led_pins, transistor_pins, one, other, third in specs:
        prefix = prefixes[kind]
        counts[prefix] = counts.get(prefix, 0) + 1
        ref = f"{prefix}{counts[prefix] * 3 % 17 + counts[prefix]}"
        if prefix in "QM":
            # a transistor: kind ``transistor`` with its polarity in the part data (pin names
            # of the other family, numbers or a repeat are not recognised)
            names = transistor_pins
            pins = tuple(Pin(name, net) for name, net in zip(names, (one, other, third)))
            parts[ref] = Part(ref, "transistor", None, pins, HERE)
            data[ref] = BjtData(kind) if prefix == "Q" else MosfetData(kind)
            continue
        pin_names = led_pins if kind == "led" else ("1", "2")
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
                   {name: Net(name, tuple(pins), HERE) for name, pins in nets.items()}), data


@settings(max_examples=600, deadline=None)
@given(specs=st.lists(_part, min_size=1, max_size=10))
def test_random_small_circuits(specs: list[tuple]) -> None:
    circuit, data = _circuit(specs)
    if not circuit.leds():
        return
    _assert_same(circuit, RAILS, data)


def _two(kind: str, one: str | None, other: str, pins: tuple = LED_PINS[0]) -> tuple:
    """A two-pin part's spec (its transistor pin names are not used)."""
    return (kind, pins, TRANSISTOR_PINS[0], one, other, other)


def _three(kind: str, nets: tuple, pins: tuple) -> tuple:
    """A transistor's spec: ``nets`` in the order of ``pins``."""
    return (kind, LED_PINS[0], pins, *nets)


BJT, FET = TRANSISTOR_PINS[0], TRANSISTOR_PINS[2]

# One circuit of each group kind the quick path labels, and some it hands back.
CASES = {
    "resistor": [_two("resistor", "V5", "N1"), _two("led", "N1", "GND")],
    "string": [_two("resistor", "V12", "N1"), _two("led", "N2", "N1", LED_PINS[1]),
               _two("led", "N2", "GND")],
    "pin-source": [_two("led", "N1", "GND", LED_PINS[2]), _two("resistor", "N1", "P1")],
    "pin-sink": [_two("led", "N1", "P3", LED_PINS[4]), _two("resistor", "V5", "N1")],
    "npn-sink": [_two("led", "V12", "N1"), _three("npn", ("N1", "N2", "N3"), BJT),
                 _two("resistor", "N3", "GND"), _two("resistor", "V5", "N2"),
                 _two("resistor", "N2", "GND")],
    "pnp-source": [_two("led", "N1", "GND"), _three("pnp", ("N1", "N2", "N3"), BJT),
                   _two("resistor", "N3", "V12"), _two("resistor", "V12", "N2"),
                   _two("resistor", "N2", "GND")],
    "low-side-switch": [_two("resistor", "V5", "N4"), _two("led", "N4", "N1"),
                        _three("nmos", ("N1", "N2", "GND"), FET),
                        _two("resistor", "P1", "N2")],
    "high-side-switch": [_two("led", "N1", "GND"), _three("pmos", ("N1", "P3", "V5"), FET)],
    "parallel": [_two("led", "N1", "GND"), _two("resistor", "V5", "N1"),
                 _two("led", "N1", "GND", LED_PINS[2]), _two("led", "GND", "N1", LED_PINS[1])],
    "parallel (strings)": [_two("led", "N1", "N2"), _two("led", "N2", "GND"),
                           _two("resistor", "N1", "V12"), _two("led", "N1", "N3"),
                           _two("led", "N3", "GND")],
    "resistor (each its own, fed through a link)": [
        _two("led", "N2", "GND"), _two("resistor", "N1", "N2"), _two("link", "V5", "N1"),
        _two("resistor", "N1", "N3"), _two("led", "N3", "GND")],
    "reversed": [_two("resistor", "V5", "N1"), _two("led", "N1", "GND", LED_PINS[1])],
    "across-rails": [_two("led", "V5", "GND")],
    "unrecognised": [_two("resistor", "V5", "N1"), _two("led", "N1", "V5B")],
}


@st.composite
def _mutated_case(draw) -> list[tuple]:
    """One of :data:`CASES`, changed in up to three places, with up to two parts added."""
    specs = [list(spec) for spec in CASES[draw(st.sampled_from(sorted(CASES)))]]
    for _ in range(draw(st.integers(0, 3))):
        spec = specs[draw(st.integers(0, len(specs) - 1))]
        field = draw(st.integers(0, 5))
        spec[field] = draw(st.sampled_from(
            [KINDS, LED_PINS, TRANSISTOR_PINS, NETS + (None,), NETS, NETS][field]))
    return [tuple(spec) for spec in specs] + draw(st.lists(_part, max_size=2))


@settings(max_examples=800, deadline=None)
@given(specs=_mutated_case())
def test_changed_circuits_of_each_kind(specs: list[tuple]) -> None:
    circuit, data = _circuit(specs)
    if not circuit.leds():
        return
    _assert_same(circuit, RAILS, data)


def test_each_case_reaches_the_quick_path_or_its_fallback(monkeypatch) -> None:
    # the quick path answers for the kinds it labels and hands the others back
    import linter.topology as topology

    answered: list[str] = []

    def counted(*args):
        group = quick(*args)
        if group is not None:
            answered.append(group.topology)
        return group

    quick = topology.quick_group
    monkeypatch.setattr(topology, "quick_group", counted)
    quick_labels = ("resistor", "string", "pin-source", "pin-sink", "npn-sink", "pnp-source",
                    "low-side-switch", "high-side-switch", "parallel")
    for name, specs in CASES.items():
        topology = name.split(" (")[0]
        circuit, data = _circuit(specs)
        _assert_same(circuit, RAILS, data)
        answered.clear()
        assert find_groups(circuit, RAILS, data)[0].topology == topology, name
        assert answered == ([topology] if topology in quick_labels else []), name
