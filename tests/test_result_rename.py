"""Renaming a template's result for a follower (linter.result_rename) against plain renaming.

Expected values: the plain path of our own code. The reference renaming here walks a result
with ``dataclasses.replace`` and replaces every part reference through the map (the
definition of a renamed result, :mod:`linter.result_rename`); the analysis-level equality
(memoised against ``analyse(..., memoise=False)``) is in tests/test_analysis_memo.py.
"""

from __future__ import annotations

import dataclasses
import gc
import math
import weakref
from dataclasses import replace

import pytest

from linter.corners import Corner, Levels
from linter.groups import Group, PinDrive, Scenario
from linter.result_rename import Template, _maker, renamed
from linter.results import GroupResult, LedResult, PinResult, ResistorResult, Span, TransistorResult
from test_analysis_memo import _plain  # every compared field as plain data

RAILS = {"+5V": ("max", 5.25)}


def _levels(mapping):
    return Levels(tuple(mapping), tuple(mapping.values())) if mapping else Levels((), ())


def _corner(vf=None, beta=None, resistors=None, scenario="on"):
    return Corner(scenario, RAILS, 50.0, _levels(vf or {}), _levels(beta or {}),
                  _levels(resistors or {}))


def _template():
    """A hand-made result with every kind of record: corners naming parts and corners that
    name none, a span without corners, a plain dict mapping, a transistor, a pin, a
    not-converged corner and notes."""
    named = _corner({"D1": "vf_min", "D2": "vf_max"}, {"Q1": "hfe_min"}, {"R1": "low"})
    other = _corner({"D1": "vf_max", "D2": "vf_min"}, {"Q1": "hfe_typ"}, {"R1": "high"})
    bare = _corner()                                       # names no part
    as_dict = Corner("on", RAILS, 0.0, {"D1": "vf_typ"}, {}, {})
    span = Span(0.01, 0.008, 0.012, named, other)
    group = Group("G-D1", "low-side-switch", ("D1", "D2"), (("D1", "D2"),),
                  ("D1", "D2", "R1", "Q1", "U1"), ("+5V", "A", "GND"), ("+5V", "GND"), "R1",
                  (PinDrive("U1", "PA0", "P0", "+5V"),), (Scenario("on", {"U1.PA0": "high"}),))
    leds = (LedResult("D1", "LX1", span, Span(2.0, 1.8, 2.4, bare, bare), Span(1.0, 1.0, 1.0),
                      ("on",), -1.8, as_dict, -0.003, ("rs",)),
            LedResult("D2", None, Span(0.01, 0.009, 0.011, other, bare), span, span,
                      ("on",), -1.7, None, None))
    resistors = (ResistorResult("R1", 150.0, 0.01, span, Span(0.1, 0.05, 0.2, bare, other),
                                0.1, "0603"),)
    transistors = (TransistorResult("Q1", "npn", span, span, Span(0.2, 0.1, 0.3, bare, bare),
                                    True, named, 0.011, 4.5, other, "+5V", 0.2),)
    pins = (PinResult("U1.PA0", "P0", Span(0.001, 0.0, 0.002, other, named), True, 0.02),)
    result = GroupResult(group, "solved", "+5V", leds, resistors, transistors, pins, 17,
                         "vertices", (other, bare), ("D1: generic rs",))
    return result, (("D1", "generic rs"),)


def _follower_group(group: Group) -> Group:
    return replace(group, id="G-D11", leds=("D11", "D12"), strings=(("D11", "D12"),),
                   parts=("D11", "D12", "R11", "Q11", "U1"),
                   pins=(PinDrive("U1", "PA7", "P7", "+5V"),))


REFS = {"D1": "D11", "D2": "D12", "R1": "R11", "Q1": "Q11", "U1": "U1"}


def _rename_plain(value, refs, group):
    """The reference: every record rebuilt by ``dataclasses.replace``, every part name in a
    ref field or a level mapping replaced through ``refs``."""
    if isinstance(value, Levels) or isinstance(value, dict):
        return {refs[k]: v for k, v in value.items()}
    if isinstance(value, Corner):
        return replace(value, vf=_rename_plain(value.vf, refs, group),
                       beta=_rename_plain(value.beta, refs, group),
                       resistors=_rename_plain(value.resistors, refs, group))
    if isinstance(value, Span):
        return replace(value, at_min=_rename_plain(value.at_min, refs, group),
                       at_max=_rename_plain(value.at_max, refs, group))
    if isinstance(value, (LedResult, ResistorResult, TransistorResult)):
        changes = {f.name: _rename_plain(getattr(value, f.name), refs, group)
                   for f in dataclasses.fields(value) if f.name != "ref"}
        return replace(value, ref=refs[value.ref], **changes)
    if isinstance(value, tuple):
        return tuple(_rename_plain(v, refs, group) for v in value)
    return value


def _expected(result: GroupResult, group: Group, notes) -> GroupResult:
    pins = tuple(replace(p, id=d.id, net=d.net, current=_rename_plain(p.current, REFS, group))
                 for p, d in zip(result.pins, group.pins))
    return replace(result, group=group,
                   leds=_rename_plain(result.leds, REFS, group),
                   resistors=_rename_plain(result.resistors, REFS, group),
                   transistors=_rename_plain(result.transistors, REFS, group), pins=pins,
                   not_converged=_rename_plain(result.not_converged, REFS, group),
                   notes=tuple(f"{REFS[r]}: {t}" for r, t in notes))


def test_renamed_equals_plain_renaming_field_by_field() -> None:
    result, notes = _template()
    group = _follower_group(result.group)
    made = Template(result, notes).renamed(group, REFS)
    assert _plain(made) == _plain(_expected(result, group, notes))
    assert made.origin == (result, REFS) and made.origin[0] is result
    assert _plain(renamed(result, group, REFS, notes)) == _plain(made)   # one-off form


def test_records_naming_no_part_are_the_templates_own() -> None:
    result, notes = _template()
    made = Template(result, notes).renamed(_follower_group(result.group), REFS)
    bare = result.leds[0].vf.at_min
    assert made.leds[0].vf is result.leds[0].vf            # a span at corners naming no part
    assert made.leds[0].power is result.leds[0].power      # a span without corners
    assert made.not_converged[1] is bare                   # a corner naming no part
    assert made.leds[0].current.at_max.rails is RAILS      # rail mappings shared
    assert made.leds[0].current.at_max.vf.levels is result.leds[0].current.at_max.vf.levels
    assert made.leds[0].current is not result.leds[0].current   # names parts: its own


def test_one_template_object_is_one_follower_object() -> None:
    # the template quotes one span from several records, one corner from several spans;
    # the follower does the same (one record made per distinct template record)
    result, notes = _template()
    made = Template(result, notes).renamed(_follower_group(result.group), REFS)
    assert made.leds[0].current is made.leds[1].vf is made.resistors[0].current
    assert made.leds[0].current.at_min is made.transistors[0].saturated_at
    assert made.leds[0].current.at_max.vf.names is made.leds[1].current.at_min.vf.names


def test_a_template_serves_many_followers_and_stays_unchanged() -> None:
    result, notes = _template()
    before = _plain(result)
    template = Template(result, notes)
    group = _follower_group(result.group)
    first = template.renamed(group, REFS)
    other_refs = {k: v.replace("1", "2", 1) if k != "U1" else k for k, v in REFS.items()}
    second = template.renamed(group, other_refs)
    assert _plain(result) == before
    assert _plain(first) == _plain(_expected(result, group, notes))
    assert second.leds[0].ref == "D21" and list(second.leds[0].current.at_max.vf) == ["D21",
                                                                                     "D22"]


def test_a_template_is_freed_without_the_cycle_collector() -> None:
    # the analysis runs with the collector paused: reading a template must leave no cycle
    result, notes = _template()
    template = Template(result, notes)
    gone = weakref.finalize(template, lambda: None)
    was = gc.isenabled()
    gc.disable()
    try:
        del template
        assert not gone.alive
    finally:
        if was:
            gc.enable()


def test_a_record_of_an_unknown_kind_is_refused() -> None:
    result, notes = _template()
    odd = replace(result, leds=(replace(result.leds[0], current=Span(1.0, 1.0, 1.0, "at?")),))
    with pytest.raises(TypeError):
        Template(odd, notes)


@pytest.mark.parametrize("cls", [Corner, Span, LedResult, ResistorResult, PinResult,
                                 GroupResult])
def test_maker_is_the_constructor(cls) -> None:
    # the plain reference: the dataclass's own constructor with the same values
    result, _ = _template()
    samples = {Corner: result.leds[0].current.at_min, Span: result.leds[0].current,
               LedResult: result.leds[0], ResistorResult: result.resistors[0],
               PinResult: result.pins[0], GroupResult: replace(result, origin=(result, {}))}
    record = samples[cls]
    values = [getattr(record, name) for name in cls.__slots__]
    made = _maker(cls)(*values)
    assert type(made) is cls
    assert made == cls(*values)
    assert [getattr(made, n) for n in cls.__slots__] == values
    assert [f.name for f in dataclasses.fields(cls)] == list(cls.__slots__)
    with pytest.raises(dataclasses.FrozenInstanceError):
        made.__setattr__(cls.__slots__[0], None)
    if cls is Span:
        assert math.isnan(_maker(Span)(math.nan, 0.0, 0.0, None, None).nom)


def test_names_equal_to_the_groups_leds_are_its_own_tuple() -> None:
    result, notes = _template()
    group = _follower_group(result.group)
    made = Template(result, notes).renamed(group, REFS)
    assert made.leds[0].current.at_min.vf.names is group.leds
    # a follower whose LEDs are listed in another order keeps a tuple of its own
    swapped = replace(group, leds=("D12", "D11"))
    other = Template(result, notes).renamed(swapped, REFS)
    assert other.leds[0].current.at_min.vf.names == ("D11", "D12")
    assert _plain(other) == _plain(_expected(result, swapped, notes))
