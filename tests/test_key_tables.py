"""The keys of :class:`linter.key_tables.GroupKeys` against the plain key.

Expected values: the plain path of our own code. ``group_key_plain`` (one encoder call per
name) is the reference: two groups of one analysis must get equal GroupKeys keys exactly when
their plain keys are equal, and the references must come in the plain key's order.
"""

from __future__ import annotations

import dataclasses
from dataclasses import replace
from pathlib import Path

import pytest

from linter.engine import CheckRequest, load_inputs
from linter.group_key import group_key_plain
from linter.groups import Scenario
from linter.key_tables import GroupKeys
from circuit_kit import circuit
from linter.model import DeviceModel, Pin
from linter.partdata import LedData, Rail, ResistorData
from linter.topology import find_groups
from test_analysis_memo import DEMO, _board, _changes, _channels, _data, _with_part


def _partition(keys) -> list[int]:
    """Each key replaced by the position of the first equal key."""
    first: dict = {}
    return [first.setdefault(key, at) for at, key in enumerate(keys)]


def _check(groups, c, data, rails) -> list[int]:
    """Asserts GroupKeys partitions ``groups`` as the plain key does, with the same
    references; returns that partition."""
    keyed = GroupKeys(c, data, rails).key
    fast = [keyed(g) for g in groups]
    plain = [group_key_plain(g, c, data, rails) for g in groups]
    assert [refs for _, refs in fast] == [refs for _, refs in plain]
    found = _partition([key for key, _ in fast])
    assert found == _partition([key for key, _ in plain])
    return found


@pytest.mark.parametrize("seed", [11, 29])
@pytest.mark.parametrize("with_data", [True, False])
def test_keys_partition_generated_boards_as_the_plain_key(tmp_path: Path, seed: int,
                                                          with_data: bool) -> None:
    context = _board(tmp_path, seed)
    data = context.part_data
    if not with_data:   # generic figures everywhere but the LEDs
        data = {ref: d for ref, d in data.items() if isinstance(d, LedData)}
    groups = find_groups(context.circuit, context.rails, data)
    found = _check(groups, context.circuit, data, context.rails)
    assert len(set(found)) < len(found)       # repeated channels share keys
    assert any(g.pins for g in groups)


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_keys_partition_the_demo_as_the_plain_key(netlist: str) -> None:
    context = load_inputs(CheckRequest(DEMO / netlist, bom=DEMO / "bom.csv"))
    groups = find_groups(context.circuit, context.rails, context.part_data)
    _check(groups, context.circuit, context.part_data, context.rails)


@pytest.mark.parametrize("what, change", _changes(), ids=[w for w, _ in _changes()])
def test_each_input_separates_keys_as_the_plain_key_does(what: str, change) -> None:
    # the change touches channel 0 (or both channels alike: rails, the microcontroller)
    groups, c, data, rails = change(*_channels(2))
    found = _check(groups, c, data, rails)
    plain = [group_key_plain(g, c, data, rails)[0] for g in groups]
    assert (found == [0, 0]) == (plain[0] == plain[1]), what


def test_keys_of_odd_groups_partition_as_the_plain_key() -> None:
    # pins of one microcontroller driving several groups, a pin named twice, a part named
    # twice, a part missing from the circuit, a string end outside the parts, an LED lit
    # that is no part, a setter that is no part, a rail without figures, a shared model
    groups, c, data, rails = _channels(3)
    pin = groups[1].pins[0]
    odd = [replace(groups[0], pins=groups[0].pins + (pin, pin)),
           replace(groups[1], parts=groups[1].parts + ("X9", "R1")),
           replace(groups[2], parts=tuple(p for p in groups[2].parts if p != "D2")),
           replace(groups[2], setter="U1.PA2", scenarios=(Scenario("on", {}, ("D2", "Z1")),)),
           replace(groups[1], setter="Z9", strings=(("D1",), ())),
           replace(groups[2], setter=None, parts=groups[2].parts + ("RB1",)),
           replace(groups[0], strings=(("D0", "R0"), ())),
           replace(groups[0], strings=(("D0",), ("R0",))),
           replace(groups[0], parts=("R0", "R0", "D0"))]   # as many references with U1
    model = DeviceModel("LX", "D", {"IS": 1e-18, "N": 2.0})
    same_model = DeviceModel("LY", "D", {"IS": 1e-18, "N": 2.0})
    with_models = _with_part(_with_part(c, "D0", model=model), "D1", model=same_model)
    data_without_mcu = {k: v for k, v in data.items() if k != "U1"}
    for circuit_ in (c, with_models):
        for table in (data, data_without_mcu, _data(data, "R1", note="R1: noted")):
            for rail_table in (rails, {**rails, "A0": None, "P1": Rail("P1", 3.3, 3.3, 3.3)}):
                _check(groups + odd, circuit_, table, rail_table)


def test_keys_of_equal_channels_are_equal_and_differ_from_changed_ones() -> None:
    groups, c, data, rails = _channels(3)
    data = {**data, "R2": ResistorData(160.0, 0.01, 0.1, "0603")}
    assert _check(groups, c, data, rails) == [0, 0, 2]
    # a pin's name alone (same nets, same order), a link's nets
    renamed = _with_part(c, "D0", pins=(Pin("ANODE", "A0"), Pin("K", "C0")))
    assert _check(groups, renamed, data, rails) == [0, 1, 2]
    linked = circuit([(p.ref, p.kind, {x.name: x.net for x in p.pins}, p.value_si)
                      for p in c.parts.values()]
                     + [(f"L{i}", "link", {"1": f"E{i}", "2": "GND" if i else "V5"}, 0.0)
                        for i in range(2)])
    with_links = [replace(g, parts=g.parts + (f"L{i}",)) for i, g in enumerate(groups[:2])]
    assert _check(with_links, linked, data, rails) == [0, 1]
    # the same nets in the same order, split between two links one pin later
    split = circuit([(p.ref, p.kind, {x.name: x.net for x in p.pins}, p.value_si)
                     for p in c.parts.values()]
                    + [("LA0", "link", {"1": "E0"}, 0.0),
                       ("LB0", "link", {"1": "X0", "2": "GND"}, 0.0),
                       ("LA1", "link", {"1": "E1", "2": "X1"}, 0.0),
                       ("LB1", "link", {"1": "GND"}, 0.0)])
    with_split = [replace(g, parts=g.parts + (f"LA{i}", f"LB{i}"))
                  for i, g in enumerate(groups[:2])]
    assert _check(with_split, split, data, rails) == [0, 1]


def test_unhashable_part_data_raises_type_error() -> None:
    # analyse then builds the group on its own (tests/test_analysis_memo.py)
    @dataclasses.dataclass(frozen=True)
    class Listed(ResistorData):
        extra: list = dataclasses.field(default_factory=list, hash=False)

    groups, c, data, rails = _channels(1)
    data = {**data, "R0": Listed(150.0, 0.01, 0.1, "0603")}
    with pytest.raises(TypeError):
        GroupKeys(c, data, rails).key(groups[0])
