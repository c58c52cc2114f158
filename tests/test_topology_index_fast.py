"""The topology index's quicker look-ups give what the plain definitions give.

The expected values are the plain definitions themselves, written out here (the fast code
must not change a single kind or role; the natural sort key is tested in test_refs_key.py).
"""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from linter.config import load_settings
from linter.model import Circuit, Part, Pin, SourceLocation
from linter.partdata import BjtData, McuData, MosfetData
from linter.parts import resolve_part_data
from linter.rails import resolve_rails
from linter.readers import read_netlist
from linter.topology_index import LED_ANODE_NAMES, LED_CATHODE_NAMES, CircuitIndex
from plain_definitions import plain_kind, plain_role

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"


def _plain_led_pins(part: Part) -> tuple[Pin, Pin] | None:
    anodes = [pin for pin in part.pins if pin.name.casefold() in LED_ANODE_NAMES]
    cathodes = [pin for pin in part.pins if pin.name.casefold() in LED_CATHODE_NAMES]
    if len(part.pins) != 2 or len(anodes) != 1 or len(cathodes) != 1:
        return None
    return anodes[0], cathodes[0]


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_kinds_roles_and_led_pins_of_the_demo(netlist: str) -> None:
    path = DEMO / netlist
    settings_ = load_settings(path, None, ())
    circuit, part_data = resolve_part_data(read_netlist(path), settings_)
    index = CircuitIndex(circuit, resolve_rails(circuit, settings_), part_data)
    for ref, part in circuit.parts.items():
        kind = plain_kind(index.circuit.parts[ref], index.part_data.get(ref))
        assert index.kind(ref) == kind
        assert index.role(ref) == plain_role(kind, len(part.pins))
        if part.kind == "led":
            assert index.led_pins(ref) == _plain_led_pins(part)


_PIN_NAMES = st.sampled_from(["A", "K", "a", "k", "C", "+", "-", "1", "2", "anode", "CATHODE"])


@given(names=st.lists(_PIN_NAMES, min_size=0, max_size=3))
def test_led_pins_by_name(names: list[str]) -> None:
    here = SourceLocation("t", 1, 1)
    pins = tuple(Pin(name, f"N{i}") for i, name in enumerate(names))
    part = Part("D1", "led", None, pins, here)
    circuit = Circuit("t", "spice", {"D1": part}, {})
    assert CircuitIndex(circuit, {}, {}).led_pins("D1") == _plain_led_pins(part)


def test_kind_with_part_data_of_each_sort() -> None:
    here = SourceLocation("t", 1, 1)
    two = (Pin("1", "a"), Pin("2", "b"))
    parts = {ref: Part(ref, kind, None, two, here) for ref, kind in
             [("Q1", "transistor"), ("Q2", "transistor"), ("U1", "ic"), ("U2", "mcu"),
              ("C1", "capacitor"), ("R1", "resistor"), ("X1", "transistor")]}
    data = {"Q1": BjtData(polarity="npn"), "Q2": MosfetData(polarity="pmos"),
            "U1": McuData(), "U2": McuData(), "X1": McuData(), "GONE": McuData()}
    index = CircuitIndex(Circuit("t", "spice", parts, {}), {}, data)
    # by the definitions: polarity from transistor data, microcontroller data makes an mcu
    assert {ref: index.kind(ref) for ref in parts} == {
        "Q1": "npn", "Q2": "pmos", "U1": "mcu", "U2": "mcu", "C1": "capacitor",
        "R1": "resistor", "X1": "mcu"}
    assert {ref: index.role(ref) for ref in parts} == {
        "Q1": "transistor", "Q2": "transistor", "U1": "mcu", "U2": "mcu", "C1": "open",
        "R1": "series", "X1": "mcu"}


def test_release_drops_every_cached_answer() -> None:
    path = DEMO / "dust_extractor_panel.cir"
    settings_ = load_settings(path, None, ())
    circuit, part_data = resolve_part_data(read_netlist(path), settings_)
    index = CircuitIndex(circuit, resolve_rails(circuit, settings_), part_data)
    net = next(iter(circuit.nets))
    index.pins_on(net), index.split(net), index.sort_key(net)
    memos = [index.sort_key.__self__, index.pins_on.__self__, index.split.__self__]
    assert all(memos)
    index.release()
    assert not any(memos)  # emptied at once, not left to the garbage collector
