"""LED group recognition (linter.topology).

Each circuit below is drawn in its comment; the expected group (topology, setter, strings,
scenarios) follows from that drawing by the circuit's shape as an engineer names it
(common practice), never from ledlint's output.
"""

from __future__ import annotations

import random
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.groups import TOPOLOGIES, Group
from linter.model import Circuit, Net, Part, Pin, SourceLocation
from linter.partdata import BjtData, McuData, Rail
from linter.refs import natural_key
from linter.topology import find_groups

HERE = SourceLocation("test", 1, 1)

RAILS = {
    "+12V": Rail("+12V", 12.0, 10.8, 13.2),
    "+5V": Rail("+5V", 5.0, 4.75, 5.25),
    "GND": Rail("GND", 0.0, 0.0, 0.0),
}


def build(*specs: str) -> Circuit:
    """A Circuit from lines ``REF KIND PIN:NET PIN:NET…`` (``PIN:`` alone is unconnected)."""
    parts: dict[str, Part] = {}
    nets: dict[str, list[tuple[str, str]]] = {}
    for spec in specs:
        ref, kind, *pins = spec.split()
        made = []
        for item in pins:
            name, net = item.split(":", 1)
            made.append(Pin(name, net or None))
            if net:
                nets.setdefault(net, []).append((ref, name))
        parts[ref] = Part(ref, kind, None, tuple(made), HERE)
    return Circuit("test", "spice", parts,
                   {name: Net(name, tuple(pins), HERE) for name, pins in nets.items()})


def only(circuit: Circuit, rails=RAILS, part_data=None) -> Group:
    groups = find_groups(circuit, rails, part_data or {})
    assert len(groups) == 1, groups
    return groups[0]


MCU = "U1 mcu VDD:+5V VSS:GND PA0:P0 PA1:P1 PA2:P2 PA3:P3"


# -- passive groups ----------------------------------------------------------------------

def test_resistor_above_led():
    # +5V -R1- A1 -D1>|- GND: one LED on its own resistor from a rail.
    group = only(build("R1 resistor 1:+5V 2:A1", "D1 led A:A1 K:GND"))
    assert (group.id, group.topology, group.setter) == ("G-D1", "resistor", "R1")
    assert group.strings == (("D1",),)
    assert group.parts == ("D1", "R1")
    assert group.nets == ("+5V", "A1", "GND")
    assert group.rails == ("+5V", "GND")
    assert group.scenarios[0].lit == ("D1",) and not group.scenarios[0].levels
    assert group.transistor is None and group.reason is None


def test_resistor_below_led():
    # +5V -D1>|- K1 -R1- GND: the resistor on the cathode side sets the current just the same.
    group = only(build("D1 led K:K1 A:+5V", "R1 resistor 1:K1 2:GND"))
    assert (group.topology, group.setter) == ("resistor", "R1")


def test_string_is_ordered_anode_to_cathode():
    # +12V -R1- S1 -D3>|- S2 -D2>|- S3 -D1>|- GND, parts listed cathode end first.
    group = only(build("D1 led K:GND A:S3", "D2 led K:S3 A:S2", "D3 led A:S1 K:S2",
                       "R1 resistor 1:S1 2:+12V"))
    assert (group.topology, group.setter) == ("string", "R1")
    assert group.strings == (("D3", "D2", "D1"),)
    assert group.leds == ("D1", "D2", "D3")  # netlist order


def test_parallel_leds_share_one_resistor():
    # +5V -R6- BAR -[D7 | D8 | D9]>|- GND
    group = only(build("R6 resistor 1:+5V 2:BAR", "D7 led A:BAR K:GND", "D8 led A:BAR K:GND",
                       "D9 led A:BAR K:GND"))
    assert (group.topology, group.setter) == ("parallel", "R6")
    assert group.strings == (("D7",), ("D8",), ("D9",))


def test_parallel_leds_each_on_own_resistor_through_a_shared_link():
    # +5V -FB1- V -R1-D1- GND and V -R2-D2- GND: no shared resistor, each LED its own.
    group = only(build("FB1 link 1:+5V 2:V", "R1 resistor 1:V 2:A1", "D1 led A:A1 K:GND",
                       "R2 resistor 1:V 2:A2", "D2 led A:A2 K:GND"))
    assert (group.topology, group.setter) == ("resistor", None)
    assert "R1" in group.reason and "R2" in group.reason


def test_reversed_led():
    # +5V -R1- K1 -|<D1- GND: the anode is on GND, the cathode towards +5V.
    group = only(build("R1 resistor 1:+5V 2:K1", "D1 led K:K1 A:GND"))
    assert group.topology == "reversed"
    assert group.scenarios[0].lit == ()


def test_led_across_rails():
    # +5V -D1>|- GND with nothing in series.
    group = only(build("D1 led A:+5V K:GND"))
    assert (group.topology, group.setter) == ("across-rails", None)


# -- microcontroller pins ----------------------------------------------------------------

def test_pin_source():
    # U1.PA0 -R1- A1 -D1>|- GND, pin driven high.
    group = only(build(MCU, "R1 resistor 1:P0 2:A1", "D1 led A:A1 K:GND"))
    assert (group.topology, group.setter) == ("pin-source", "R1")
    assert [pin.id for pin in group.pins] == ["U1.PA0"]
    assert group.pins[0].supply == "+5V"  # U1's VDD pin is on +5V, as drawn
    assert dict(group.scenarios[0].levels) == {"U1.PA0": "high"}
    assert "U1" in group.parts and "+5V" in group.rails


def test_pin_sink():
    # +5V -R4- A4 -D4>|- U1.PA3, pin driven low.
    group = only(build(MCU, "R4 resistor 1:+5V 2:A4", "D4 led A:A4 K:P3"))
    assert (group.topology, group.setter) == ("pin-sink", "R4")
    assert dict(group.scenarios[0].levels) == {"U1.PA3": "low"}


def test_pin_source_without_resistor_is_limited_by_the_pin():
    group = only(build(MCU, "D1 led A:P0 K:GND"))
    assert (group.topology, group.setter) == ("pin-source", "U1.PA0")
    assert "output resistance" in group.reason


def test_mcu_known_by_part_data():
    # U1 is an "ic" in the netlist; its part data says it is a microcontroller.
    circuit = build("U1 ic VDD:+5V PA0:P0", "R1 resistor 1:P0 2:A1", "D1 led A:A1 K:GND")
    group = only(circuit, part_data={"U1": McuData(supply_pins=("VDD",))})
    assert group.topology == "pin-source"


def test_pin_bicolour_pair():
    # U1.PA1 -R5- M; D5 M>|B; D6 B>|M; B is U1.PA2: each LED lights in one direction.
    group = only(build(MCU, "R5 resistor 1:P1 2:M", "D5 led A:M K:P2", "D6 led A:P2 K:M"))
    assert (group.topology, group.setter) == ("pin-bicolour", "R5")
    by_lit = {scenario.lit: dict(scenario.levels) for scenario in group.scenarios}
    assert by_lit == {("D5",): {"U1.PA1": "high", "U1.PA2": "low"},
                      ("D6",): {"U1.PA2": "high", "U1.PA1": "low"}}


def test_leds_on_one_pin_are_separate_groups():
    # Pins are the edge of a group: two LEDs on PA0, each with its own resistor.
    circuit = build(MCU, "R1 resistor 1:P0 2:A1", "D1 led A:A1 K:GND",
                    "R2 resistor 1:P0 2:A2", "D2 led A:A2 K:GND")
    groups = find_groups(circuit, RAILS, {})
    assert [g.id for g in groups] == ["G-D1", "G-D2"]
    assert all(g.pins[0].id == "U1.PA0" for g in groups)


# -- transistors -------------------------------------------------------------------------

SINK = ("D11 led A:+12V K:B1", "D12 led A:B1 K:B2", "D13 led A:B2 K:BC",
        "Q1 npn C:BC B:BB E:BE", "R9 resistor 1:BE 2:GND")


def test_npn_sink_with_divider():
    # +12V -D11-D12-D13- Q1.C; Q1.E -R9- GND; base from +5V -R10- BB -R11- GND.
    group = only(build(*SINK, "R10 resistor 1:+5V 2:BB", "R11 resistor 1:BB 2:GND"))
    assert (group.topology, group.setter, group.transistor) == ("npn-sink", "Q1", "Q1")
    assert group.drive == "divider"
    assert group.strings == (("D11", "D12", "D13"),)
    assert set(group.parts) == {"D11", "D12", "D13", "Q1", "R9", "R10", "R11"}
    assert set(group.rails) == {"+12V", "+5V", "GND"}
    assert {"BB", "BE", "BC"} <= set(group.nets)


def test_npn_sink_from_pin_through_resistor():
    group = only(build(MCU, *SINK, "R10 resistor 1:P0 2:BB"))
    assert (group.topology, group.drive) == ("npn-sink", "pin")
    assert dict(group.scenarios[0].levels) == {"U1.PA0": "high"}
    assert "U1" in group.parts


def test_npn_sink_from_diode_reference():
    # Two diodes from the base to ground, biased from +5V through R10.
    group = only(build(*SINK, "R10 resistor 1:+5V 2:BB", "DA diode A:BB K:DM",
                       "DB diode A:DM K:GND"))
    assert (group.topology, group.drive) == ("npn-sink", "reference")
    assert {"DA", "DB", "R10"} <= set(group.parts)


def test_several_strings_on_one_sink():
    group = only(build(*SINK, "D14 led A:+12V K:C1", "D15 led A:C1 K:BC",
                       "R10 resistor 1:+5V 2:BB", "R11 resistor 1:BB 2:GND"))
    assert (group.topology, group.setter) == ("npn-sink", "Q1")
    assert group.strings == (("D11", "D12", "D13"), ("D14", "D15"))


def test_pnp_source():
    # +12V -R9- Q1.E; Q1.C -D1-D2- GND; base from a divider: the mirror of the sink.
    group = only(build("R9 resistor 1:+12V 2:E", "Q1 pnp E:E B:B C:C", "D1 led A:C K:M",
                       "D2 led A:M K:GND", "R1 resistor 1:+12V 2:B", "R2 resistor 1:B 2:GND"))
    assert (group.topology, group.setter, group.drive) == ("pnp-source", "Q1", "divider")
    assert group.strings == (("D1", "D2"),)


def test_low_side_nmos_switch_with_gate_network():
    # +5V -R1- A -D1>|- K -Q2(D,S)- GND; gate: U1.PA0 -R7- G -R8- GND; bulk B tied to S.
    group = only(build(MCU, "R1 resistor 1:+5V 2:A", "D1 led A:A K:K",
                       "Q2 nmos D:K G:G S:GND B:GND",
                       "R7 resistor 1:P0 2:G", "R8 resistor 1:G 2:GND"))
    assert (group.topology, group.setter, group.transistor) == ("low-side-switch", "R1", "Q2")
    assert group.drive == "pin"
    assert {"R7", "R8", "U1", "Q2"} <= set(group.parts)
    assert dict(group.scenarios[0].levels) == {"U1.PA0": "high"}


def test_saturated_npn_switch():
    # No emitter resistor: the NPN is a switch and R1 sets the current. S is SPICE's
    # optional substrate node, ignored.
    group = only(build(MCU, "R1 resistor 1:+12V 2:A", "D1 led A:A K:K",
                       "Q3 npn C:K B:B E:GND S:GND", "R2 resistor 1:P0 2:B"))
    assert (group.topology, group.setter) == ("low-side-switch", "R1")


def test_high_side_pmos_switch():
    # +5V -Q1(S,D)- A -R1- A1 -D1>|- GND; gate pulled up by R2, driven by U1.PA0 (low = on).
    group = only(build(MCU, "Q1 pmos S:+5V D:A G:G", "R1 resistor 1:A 2:A1",
                       "D1 led A:A1 K:GND", "R2 resistor 1:+5V 2:G", "R3 resistor 1:G 2:P0"))
    assert (group.topology, group.setter) == ("high-side-switch", "R1")
    assert dict(group.scenarios[0].levels) == {"U1.PA0": "low"}


def test_parallel_bank_behind_switch_is_labelled_parallel():
    group = only(build(MCU, "R6 resistor 1:+5V 2:BA", "D7 led A:BA K:BK", "D8 led A:BA K:BK",
                       "Q2 nmos D:BK G:P0 S:GND"))
    assert (group.topology, group.setter, group.transistor) == ("parallel", "R6", "Q2")


def test_sinks_sharing_one_bias_divider_are_separate_groups_with_a_note():
    circuit = build("D1 led A:+12V K:C1", "Q1 npn C:C1 B:BB E:E1", "R1 resistor 1:E1 2:GND",
                    "D2 led A:+12V K:C2", "Q2 npn C:C2 B:BB E:E2", "R2 resistor 1:E2 2:GND",
                    "R10 resistor 1:+5V 2:BB", "R11 resistor 1:BB 2:GND")
    first, second = find_groups(circuit, RAILS, {})
    assert (first.topology, first.transistor, second.transistor) == ("npn-sink", "Q1", "Q2")
    assert {"R10", "R11"} <= set(first.parts) and {"R10", "R11"} <= set(second.parts)
    assert first.reason == "Q1 shares its bias with Q2"


def test_transistor_polarity_from_part_data():
    circuit = build(*SINK, "R10 resistor 1:+5V 2:BB", "R11 resistor 1:BB 2:GND")
    parts = dict(circuit.parts)
    parts["Q1"] = Part("Q1", "transistor", None, parts["Q1"].pins, HERE)
    unknown = Circuit("test", "spice", parts, circuit.nets)
    assert only(unknown).topology == "unrecognised"
    assert "polarity" in only(unknown).reason
    assert only(unknown, part_data={"Q1": BjtData("npn")}).topology == "npn-sink"


# -- unrecognised --------------------------------------------------------------------------

@pytest.mark.parametrize(("specs", "words"), [
    # The cathode net goes nowhere.
    (("R1 resistor 1:+5V 2:A9", "D9 led A:A9 K:LED_K", "R2 resistor 1:LED_K 2:X"),
     "R2: net X (pin 2) has no path to a rail or sink"),
    (("R1 resistor 1:+5V 2:A9", "D9 led A:A9 K:LED_K", "C1 capacitor 1:LED_K 2:GND"),
     "D9: cathode net LED_K has no path to a rail or sink"),
    # A supply net without a voltage.
    (("J3 connector 1:VLED 2:GND", "R1 resistor 1:VLED 2:A1", "D1 led A:A1 K:GND"),
     "rail of net VLED has no known voltage"),
    # An unconnected pin.
    (("R1 resistor 1:+5V 2:A1", "D1 led A:A1 K:"), "D1: pin K is not connected"),
    # Numbered LED pins do not say which is the anode.
    (("R1 resistor 1:+5V 2:A1", "D1 led 1:A1 2:GND"), "do not say which is the anode"),
    # Two LEDs facing each other in one series path.
    (("R1 resistor 1:+5V 2:A1", "D1 led A:A1 K:M", "D2 led K:M A:GND"),
     "face opposite ways"),
    # A diode in series is not modelled.
    (("R1 resistor 1:+5V 2:A1", "D1 led A:A1 K:M", "D2 diode A:M K:GND"),
     "D2 (diode), which is not modelled"),
    # Both ends on one rail.
    (("R1 resistor 1:+5V 2:A1", "D1 led A:A1 K:+5V"), "both ends of its path are on net +5V"),
    # A MOSFET with a source resistor.
    (("R1 resistor 1:+5V 2:A1", "D1 led A:A1 K:K", "Q1 nmos D:K G:+5V S:S",
      "R2 resistor 1:S 2:GND"), "MOSFET with source resistor R2"),
    # An NPN whose base has no drive.
    (("D1 led A:+12V K:C", "Q1 npn C:C B:B E:E", "R9 resistor 1:E 2:GND",
      "R2 resistor 1:B 2:X"), "no path to a rail or pin"),
    # Two transistors in one path.
    (("R1 resistor 1:+5V 2:A1", "D1 led A:A1 K:K", "Q1 npn C:K B:+5V E:M",
      "Q2 npn C:M B:+5V E:GND"), "several transistors: Q1, Q2"),
])
def test_odd_circuits_are_unrecognised_with_a_reason(specs, words):
    groups = find_groups(build(*specs), RAILS, {})
    odd = [g for g in groups if g.topology == "unrecognised"]
    assert len(odd) == 1
    assert words in odd[0].reason


def test_two_rails_at_one_voltage_are_unrecognised():
    rails = {**RAILS, "VCC": Rail("VCC", 5.0, 4.75, 5.25)}
    group = only(build("R1 resistor 1:+5V 2:A1", "D1 led A:A1 K:VCC"), rails=rails)
    assert group.topology == "unrecognised"
    assert "both ends reach rails at 5 V (+5V, VCC)" in group.reason


def test_supply_without_voltage_is_the_edge_of_each_group():
    # J3 feeds VLED, whose voltage is not given: each LED branch is its own group.
    circuit = build("J3 connector 1:VLED 2:GND", "R1 resistor 1:VLED 2:A1", "D1 led A:A1 K:GND",
                    "R2 resistor 1:VLED 2:A2", "D2 led A:A2 K:GND")
    groups = find_groups(circuit, RAILS, {})
    assert [(g.id, g.topology) for g in groups] == [("G-D1", "unrecognised"),
                                                     ("G-D2", "unrecognised")]
    assert all("rail of net VLED has no known voltage" in g.reason for g in groups)


def test_led_with_three_pins_is_unrecognised():
    # An RGB-style package: three pins where two are expected.
    group = only(build("R1 resistor 1:+5V 2:A1", "D1 led A:A1 K:GND K2:GND"))
    assert group.topology == "unrecognised"
    assert group.reason.startswith("D1: an LED with 3 pins (A, K, K2) is not recognised")


def test_unrecognised_group_still_lists_its_parts():
    group = only(build("R1 resistor 1:+5V 2:A9", "D9 led A:A9 K:LED_K",
                       "C1 capacitor 1:LED_K 2:GND"))
    assert group.topology == "unrecognised"
    assert (group.id, group.leds, group.parts) == ("G-D9", ("D9",), ("D9", "R1"))


# -- order, determinism, completeness --------------------------------------------------------

def test_groups_in_natural_order_of_first_led():
    circuit = build("R10 resistor 1:+5V 2:A10", "D10 led A:A10 K:GND",
                    "R2 resistor 1:+5V 2:A2", "D2 led A:A2 K:GND")
    assert [g.id for g in find_groups(circuit, RAILS, {})] == ["G-D2", "G-D10"]


def test_result_does_not_depend_on_netlist_order():
    specs = [MCU, *SINK, "R10 resistor 1:+5V 2:BB", "R11 resistor 1:BB 2:GND",
             "R6 resistor 1:+5V 2:BA", "D7 led A:BA K:BK", "D8 led A:BA K:BK",
             "Q2 nmos D:BK G:P0 S:GND", "R5 resistor 1:P1 2:M", "D5 led A:M K:P2",
             "D6 led A:P2 K:M"]
    reference = find_groups(build(*specs), RAILS, {})
    shuffled = specs[:]
    random.Random(7).shuffle(shuffled)
    again = find_groups(build(*shuffled), RAILS, {})

    def strip(groups):  # leds and lit are in netlist order by contract: compare them as sets
        return [(g.id, g.topology, g.setter, g.strings, g.parts, g.nets, g.rails, g.pins,
                 set(g.leds), [(set(s.lit), dict(s.levels)) for s in g.scenarios])
                for g in groups]

    assert strip(reference) == strip(again)
    assert find_groups(build(*specs), RAILS, {}) == reference


_KINDS = ("led", "led", "led", "led3", "resistor", "resistor", "link", "capacitor", "npn", "nmos",
          "pmos", "diode", "mcu")
_NETS = ("+5V", "GND", "+12V", "N1", "N2", "N3", "N4", "N5")


@st.composite
def random_boards(draw):
    count = draw(st.integers(1, 14))
    specs = []
    for number in range(count):
        kind = draw(st.sampled_from(_KINDS))
        names = {"led": "A K", "led3": "A K K2", "resistor": "1 2", "link": "1 2", "capacitor": "1 2",
                 "diode": "A K", "npn": "C B E", "nmos": "D G S", "pmos": "D G S",
                 "mcu": "PA0 PA1 VDD"}[kind].split()
        nets = [draw(st.sampled_from(_NETS + ("",))) for _ in names]
        kind = "led" if kind == "led3" else kind
        specs.append(f"X{number} {kind} " + " ".join(f"{n}:{net}" for n, net in zip(names, nets)))
    return build(*specs)


@settings(max_examples=300, deadline=None)
@given(random_boards())
def test_every_led_in_exactly_one_group(circuit):
    groups = find_groups(circuit, RAILS, {})
    placed = [led for group in groups for led in group.leds]
    assert sorted(placed) == sorted(part.ref for part in circuit.leds())
    for group in groups:
        assert group.topology in TOPOLOGIES
        assert set(group.leds) <= set(group.parts)
        assert set(group.rails) <= set(group.nets)
        if group.topology == "unrecognised":
            assert group.reason
        assert group.id == "G-" + min(group.leds, key=natural_key)


# -- the demo board ------------------------------------------------------------------------

DEMO_EDIF = Path(__file__).parent.parent / "fixtures" / "demo" / "dust_extractor_panel.edif"

# Rails and parts from fixtures/demo/BOARD.md; U1 is a microcontroller by its part data.
DEMO_RAILS = {"+12V": Rail("+12V", 12.0, 10.8, 13.2), "+5V": Rail("+5V", 5.0, 4.75, 5.25),
              "GND": Rail("GND", 0.0, 0.0, 0.0)}
DEMO_PART_DATA = {"U1": McuData(supply_pins=("VDD",))}

# (first LED, topology, setter, strings, pin levels per scenario) from BOARD.md's table and
# its notes. D7-D10 share R6 behind the low-side switch Q2: labelled "parallel" (sharing is
# what the rules must see), with Q2 as the group's transistor.
DEMO_EXPECTED = [
    ("D1", "pin-source", "R1", (("D1",),), [{"U1.PA0": "high"}]),
    ("D2", "pin-source", "R2", (("D2",),), [{"U1.PA1": "high"}]),
    ("D3", "pin-source", "R3", (("D3",),), [{"U1.PA2": "high"}]),
    ("D4", "pin-sink", "R4", (("D4",),), [{"U1.PA3": "low"}]),
    ("D5", "pin-bicolour", "R5", (("D5",), ("D6",)),
     [{"U1.PA4": "high", "U1.PA5": "low"}, {"U1.PA5": "high", "U1.PA4": "low"}]),
    ("D7", "parallel", "R6", (("D7",), ("D8",), ("D9",), ("D10",)), [{"U1.PA6": "high"}]),
    ("D11", "npn-sink", "Q1", (("D11", "D12", "D13", "D14"),), [{}]),
    ("D15", "resistor", "R12", (("D15",),), [{}]),
    ("D16", "string", "R13", (("D16", "D17", "D18"),), [{}]),
]


@pytest.fixture(scope="module")
def demo_groups():
    """Read once: the groups are not modified by the tests."""
    from linter.readers import read_netlist

    circuit = read_netlist(DEMO_EDIF)
    return circuit, find_groups(circuit, DEMO_RAILS, DEMO_PART_DATA)


def test_demo_board_groups(demo_groups):
    _, groups = demo_groups
    found = [(g.id[2:], g.topology, g.setter, g.strings, [dict(s.levels) for s in g.scenarios])
             for g in groups]
    assert found == DEMO_EXPECTED


def test_demo_board_group_contents(demo_groups):
    circuit, groups = demo_groups
    by_id = {g.id: g for g in groups}
    # D19 is a plain diode (BOARD.md): no group holds it.
    assert all("D19" not in g.parts for g in groups)
    assert sorted(led for g in groups for led in g.leds) == sorted(p.ref for p in circuit.leds())
    bar = by_id["G-D7"]
    assert (bar.transistor, bar.drive) == ("Q2", "pin")
    assert set(bar.parts) == {"R6", "D7", "D8", "D9", "D10", "Q2", "R7", "R8", "U1"}
    assert set(bar.nets) >= {"+5V", "BAR_A", "BAR_K", "BAR_G", "BAR_EN", "GND"}
    bag = by_id["G-D11"]
    assert (bag.transistor, bag.drive) == ("Q1", "divider")
    assert set(bag.parts) == {"D11", "D12", "D13", "D14", "Q1", "R9", "R10", "R11"}
    assert set(bag.rails) == {"+12V", "+5V", "GND"}
    bicolour = by_id["G-D5"]
    assert [scenario.lit for scenario in bicolour.scenarios] == [("D5",), ("D6",)]


# -- the SPICE fixtures, one per group kind ----------------------------------------------------

FIXTURES = Path(__file__).parent.parent / "fixtures" / "topology"

# Rails as the decks' V sources give them; U1 is the MCU8 subcircuit, kept whole.
SPICE_RAILS = {name: Rail(name, volts, volts, volts)
               for name, volts in (("vcc12", 12.0), ("vcc5", 5.0), ("vcc3", 3.3), ("0", 0.0))}

# (file, [(first LED, topology, setter, strings, transistor, drive, levels per scenario)]),
# each as drawn and described in the deck's comment lines.
SPICE_EXPECTED = [
    ("resistor.cir", [("D1", "resistor", "R1", (("D1",),), None, None, [{}]),
                      ("D2", "resistor", "R2", (("D2",),), None, None, [{}])]),
    ("string.cir", [("D16", "string", "R13", (("D16", "D17", "D18"),), None, None, [{}])]),
    ("parallel.cir", [("D7", "parallel", "R6", (("D7",), ("D8",), ("D9",), ("D10",)),
                       None, None, [{}])]),
    ("npn_sink.cir", [("D11", "npn-sink", "Q1", (("D11", "D12", "D13", "D14"),), "Q1",
                       "divider", [{}])]),
    ("npn_sink_reference.cir", [("D1", "npn-sink", "Q1", (("D1", "D2"),), "Q1", "reference",
                                 [{}])]),
    ("pnp_source.cir", [("D1", "pnp-source", "Q1", (("D1", "D2"),), "Q1", "divider", [{}])]),
    ("low_side_switch.cir", [("D1", "low-side-switch", "R1", (("D1",),), "M2", "pin",
                              [{"U1.PA0": "high"}])]),
    ("high_side_switch.cir", [("D1", "high-side-switch", "R1", (("D1",),), "M1", "pin",
                               [{"U1.PA2": "low"}])]),
    ("pin_source.cir", [("D1", "pin-source", "R1", (("D1",),), None, None,
                         [{"U1.PA0": "high"}])]),
    ("pin_sink.cir", [("D4", "pin-sink", "R4", (("D4",),), None, None, [{"U1.PA3": "low"}])]),
    ("pin_bicolour.cir", [("D5", "pin-bicolour", "R5", (("D5",), ("D6",)), None, None,
                           [{"U1.PA1": "high", "U1.PA2": "low"},
                            {"U1.PA2": "high", "U1.PA1": "low"}])]),
    ("reversed.cir", [("D1", "reversed", None, (("D1",),), None, None, [{}])]),
    ("across_rails.cir", [("D1", "across-rails", None, (("D1",),), None, None, [{}])]),
    ("unrecognised.cir", [("D1", "unrecognised", None, (("D1",),), None, None, [{}])]),
]


@pytest.mark.parametrize(("name", "expected"), SPICE_EXPECTED, ids=[n for n, _ in SPICE_EXPECTED])
def test_spice_fixture(name, expected):
    from linter.readers.spice import read_spice

    path = FIXTURES / name
    circuit = read_spice(path.read_text(), name, path=path, root=FIXTURES, opaque={"MCU8"})
    groups = find_groups(circuit, SPICE_RAILS, {"U1": McuData(supply_pins=("VDD",))})
    found = [(g.id[2:], g.topology, g.setter, g.strings, g.transistor, g.drive,
              [dict(s.levels) for s in g.scenarios]) for g in groups]
    assert found == expected


def test_every_spice_fixture_is_checked():
    assert sorted(p.name for p in FIXTURES.glob("*.cir")) == sorted(n for n, _ in SPICE_EXPECTED)


def test_demo_board_groups_from_spice():
    # The same board as a SPICE deck (BOARD.md: both files describe exactly this board);
    # U1's subcircuit KM8C28 is kept whole, ground is the net "0".
    from linter.readers.spice import read_spice

    path = DEMO_EDIF.with_suffix(".cir")
    circuit = read_spice(path.read_text(), path.name, path=path, root=path.parent,
                         opaque={"KM8C28"})
    rails = {**DEMO_RAILS, "0": Rail("0", 0.0, 0.0, 0.0)}
    groups = find_groups(circuit, rails, DEMO_PART_DATA)
    found = [(g.id[2:], g.topology, g.setter, g.strings, [dict(s.levels) for s in g.scenarios])
             for g in groups]
    assert found == DEMO_EXPECTED
