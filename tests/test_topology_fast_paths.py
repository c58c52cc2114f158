"""The topology's quicker paths give what the plain definitions give.

Expected values are the plain definitions written out here: ``sorted(..., key=natural_key)``
for natural order, the series-node rule of :meth:`CircuitIndex.is_series_node` for
``series_pins``, and ``sorted(groups, key=natural order of the first LED)`` for the order of
the groups (find_groups no longer sorts them at the end; they must already be in order).
"""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.config import load_settings
from linter.model import Circuit, Net, Part, Pin, SourceLocation
from linter.partdata import Rail
from linter.parts import resolve_part_data
from linter.rails import resolve_rails
from linter.readers import read_netlist
from linter.refs import natural_key
from linter.topology import find_groups
from linter.topology_index import CircuitIndex

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"
HERE = SourceLocation("t", 1, 1)


def _demo(netlist: str) -> tuple[Circuit, dict, dict]:
    path = DEMO / netlist
    settings_ = load_settings(path, None, ())
    circuit, part_data = resolve_part_data(read_netlist(path), settings_)
    return circuit, resolve_rails(circuit, settings_), part_data


@settings(max_examples=300, deadline=None)
@given(names=st.sets(st.text(alphabet="aZ09_/.+-Dr7\u0661", max_size=8), max_size=12),
       rails=st.sets(st.sampled_from(["+5V", "GND", "0", "N1", "a10"]), max_size=3))
def test_natural_sorted_is_sorted_by_the_natural_key(names: set[str], rails: set[str]) -> None:
    index = CircuitIndex(Circuit("t", "spice", {}, {}), {net: Rail(net, 5.0, 5.0, 5.0) for net in rails},
                         {})
    names |= rails
    assert index.natural_sorted(names) == sorted(names, key=natural_key)


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.cir", "dust_extractor_panel.edif"])
def test_series_pins_follow_the_series_node_rule(netlist: str) -> None:
    circuit, rails, part_data = _demo(netlist)
    index = CircuitIndex(circuit, rails, part_data)
    for net in circuit.nets:
        pins = index.pins_on(net)
        plain = (net not in rails and len(pins) == 2
                 and all(index.role(ref) == "series" for ref, _ in pins))
        assert index.series_pins(net) == (pins if plain else None), net
        assert index.is_series_node(net) == plain


def test_a_capacitor_on_a_two_part_node_leaves_a_series_node() -> None:
    def part(ref: str, kind: str, nets: tuple[str, str]) -> Part:
        return Part(ref, kind, None, (Pin("1", nets[0]), Pin("2", nets[1])), HERE)

    parts = {"R1": part("R1", "resistor", ("V", "M")), "D1": part("D1", "led", ("M", "G")),
             "C1": part("C1", "capacitor", ("M", "G")), "R2": part("R2", "resistor", ("V", "G"))}
    nets = {"M": Net("M", (("R1", "2"), ("D1", "1"), ("C1", "1")), HERE),
            "V": Net("V", (("R1", "1"), ("R2", "1")), HERE)}
    index = CircuitIndex(Circuit("t", "spice", parts, nets), {}, {})
    # by the rule: capacitors are left out of nets, so M joins R1 and D1 only
    assert index.series_pins("M") == (("R1", "2"), ("D1", "1"))
    assert index.series_pins("V") == (("R1", "1"), ("R2", "1"))  # two resistors: series
    # a net the Circuit does not list, found from the pins: D1 and R2 (C1 open at DC)
    assert index.series_pins("G") == (("D1", "2"), ("R2", "2"))
    assert index.pins_on("G") == (("D1", "2"), ("R2", "2"))


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.cir", "dust_extractor_panel.edif"])
def test_groups_come_in_the_natural_order_of_their_ids(netlist: str) -> None:
    groups = find_groups(*_demo(netlist))
    assert len(groups) > 1
    assert list(groups) == sorted(groups, key=lambda group: natural_key(group.id[2:]))
    for group in groups:  # the id is the group's first LED in natural order
        assert group.id == f"G-{min(group.leds, key=natural_key)}"
