"""A follower's lazily built result (linter.result_rename.FollowerResult) against eager builds.

Expected values: the plain path of our own code — :meth:`Template.renamed` (every record
built at once) and ``analyse(..., memoise=False)`` (every group solved on its own) — compared
field by field; never stored figures. The laziness itself (records absent until read) is
checked through :func:`linter.result_rename.built_fields`.
"""

from __future__ import annotations

import copy
import dataclasses
import pickle
import sys
from dataclasses import replace
from pathlib import Path

import pytest

from linter import analysis
from linter.engine import CheckRequest, load_inputs
from linter.partdata import LedData
from linter.result_rename import FollowerResult, Template, built_fields
from linter.results import GroupResult
from linter.topology import find_groups
from test_analysis_memo import _plain  # every compared field as plain data
from test_result_rename import REFS, _follower_group, _template

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate  # noqa: E402
from bench.write_edif import write_flat_edif  # noqa: E402
from bench.write_tables import write_settings  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"
RECORDS = ("leds", "resistors", "transistors", "pins", "not_converged")
FIELDS = [f.name for f in dataclasses.fields(GroupResult)]


def _pair():
    """(lazy follower, eager twin) of the hand-made template of test_result_rename (every
    kind of record, a not-converged corner, notes)."""
    result, notes = _template()
    template = Template(result, notes)
    group = _follower_group(result.group)
    return template.follower(group, REFS), template.renamed(group, REFS)


def _analysed(context, part_data=None):
    data = context.part_data if part_data is None else part_data
    groups = find_groups(context.circuit, context.rails, data)
    args = (groups, context.circuit, data, context.rails, context.settings.ambient)
    return analysis.analyse(*args), analysis.analyse(*args, memoise=False)


def _assert_lazy_equals_plain(memo, plain) -> int:
    """Every follower of ``memo`` is unbuilt, then equals field by field both its template
    renamed eagerly and the plain path's result; returns the number of followers."""
    followers = [r for r in memo if type(r) is FollowerResult]
    assert all(built_fields(r) == () for r in followers)        # nobody has read them
    compiled: dict[int, Template] = {}
    for lazy, alone in zip(memo, plain):
        if type(lazy) is not FollowerResult:
            assert built_fields(lazy) == RECORDS + ("notes",)
            continue
        template, refs = lazy.origin
        eager = lazy._template.renamed(lazy.group, refs)
        assert type(eager) is GroupResult and lazy._template.result is template
        assert lazy.converged == eager.converged == alone.converged   # before building
        for name in FIELDS:
            assert _plain(getattr(lazy, name)) == _plain(getattr(eager, name)), name
            if dataclasses.fields(GroupResult)[FIELDS.index(name)].compare:
                assert _plain(getattr(lazy, name)) == _plain(getattr(alone, name)), name
        assert built_fields(lazy) == RECORDS + ("notes",)
        assert lazy == eager and eager == lazy and lazy == alone and not lazy != alone
        assert hash(lazy) == hash(eager) and repr(lazy) == repr(eager)
        assert lazy.as_dict() == eager.as_dict()
        compiled.setdefault(id(template), lazy._template)
    assert len(compiled) < len(followers)   # one Template serves many followers
    return len(followers)


@pytest.mark.parametrize("seed", [3, 11, 29])
@pytest.mark.parametrize("with_data", [True, False])
def test_lazy_followers_equal_eager_builds_on_generated_boards(tmp_path: Path, seed: int,
                                                               with_data: bool) -> None:
    board = generate(400, seed)
    write_flat_edif(board, tmp_path / "board.edif")
    write_settings(board, tmp_path / "ledlint.toml")
    context = load_inputs(CheckRequest(tmp_path / "board.edif"))
    data = None if with_data else {   # generic figures but the LEDs: notes naming parts
        ref: d for ref, d in context.part_data.items() if isinstance(d, LedData)}
    memo, plain = _analysed(context, data)
    assert _assert_lazy_equals_plain(memo, plain) > len(memo) / 3
    if not with_data:
        assert any(r.notes for r in memo if type(r) is FollowerResult)


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_lazy_followers_equal_eager_builds_on_the_demo(netlist: str) -> None:
    context = load_inputs(CheckRequest(DEMO / netlist, bom=DEMO / "bom.csv"))
    memo, plain = _analysed(context)
    followers = [r for r in memo if type(r) is FollowerResult]
    if followers:
        _assert_lazy_equals_plain(memo, plain)
    assert [_plain(r) for r in memo] == [_plain(r) for r in plain]


def test_reading_one_record_builds_the_records_not_the_notes() -> None:
    lazy, eager = _pair()
    assert built_fields(lazy) == ()
    assert lazy.id == eager.id and lazy.status == eager.status and lazy.rail == eager.rail
    assert lazy.converged is eager.converged is False   # the template's failed corners
    assert built_fields(lazy) == ()
    assert _plain(lazy.pins) == _plain(eager.pins)
    assert built_fields(lazy) == RECORDS
    assert lazy.notes == eager.notes == ("D11: generic rs",)
    assert built_fields(lazy) == RECORDS + ("notes",)
    first = lazy.leds
    assert lazy.leds is first                          # built once, then kept
    # the records quote one table, as the eager build's do
    assert lazy.leds[0].current is lazy.leds[1].vf is lazy.resistors[0].current
    assert lazy.leds[0].current.at_min is lazy.transistors[0].saturated_at


def test_notes_alone_leave_the_records_unbuilt() -> None:
    lazy, eager = _pair()
    assert lazy.notes == eager.notes
    assert built_fields(lazy) == ("notes",)


def test_a_lazy_follower_behaves_as_its_eager_twin() -> None:
    lazy, eager = _pair()
    assert isinstance(lazy, GroupResult) and lazy.origin == eager.origin
    assert lazy == eager and hash(lazy) == hash(eager) and {lazy: 1}[eager] == 1
    assert repr(lazy) == repr(eager) and repr(lazy).startswith("GroupResult(")
    assert lazy.as_dict() == eager.as_dict()
    assert lazy.led("D12") == eager.led("D12") and lazy.transistor("Q11") == eager.transistor("Q11")
    assert lazy != replace(eager, corners=3) and replace(eager, corners=3) != lazy
    with pytest.raises(dataclasses.FrozenInstanceError):
        lazy.leds = ()   # type: ignore[misc]


def test_replace_copy_and_pickle_of_an_unbuilt_follower() -> None:
    lazy, eager = _pair()
    changed = replace(lazy, corners=3)
    assert changed == replace(eager, corners=3) and changed.origin == eager.origin
    lazy, _ = _pair()
    assert replace(lazy, pins=()) == replace(eager, pins=())
    for made in (pickle.loads(pickle.dumps(_pair()[0], protocol=pickle.HIGHEST_PROTOCOL)),
                 copy.copy(_pair()[0]), copy.deepcopy(_pair()[0])):
        assert made == eager and _plain(made) == _plain(eager)
        assert made.origin[1] == REFS and made.converged is False


def test_a_pickled_follower_unpickles_unbuilt_with_its_template() -> None:
    lazy, eager = _pair()
    template = lazy.origin[0]
    other = lazy._template.follower(replace(lazy.group, id="G-D21"), REFS)
    made_template, made, made_other = pickle.loads(pickle.dumps(
        [template, lazy, other], protocol=pickle.HIGHEST_PROTOCOL))
    assert built_fields(made) == built_fields(made_other) == ()
    assert made.origin[0] is made_template is made_other.origin[0]   # shared, as before
    assert made._template is made_other._template                   # one Template pickled
    assert made == eager and _plain(made) == _plain(eager)
    # built before pickling: still pickled by its Template, equal after
    assert lazy.leds and pickle.loads(pickle.dumps(lazy)) == eager
    # made by replace: no Template, pickled field by field
    changed = replace(lazy, corners=3)
    again = pickle.loads(pickle.dumps(changed))
    assert again == changed and built_fields(again) == RECORDS + ("notes",)


_SLOTS = ("group", "status", "rail", "corners", "scheme", "reason", "origin", "_template")


def test_followers_made_together_equal_followers_made_one_by_one() -> None:
    # the plain reference: Template.follower, once per group
    result, notes = _template()
    template = Template(result, notes)
    group = _follower_group(result.group)
    other = replace(group, id="G-other")
    refs = [REFS, dict(REFS), {**REFS}]
    made = template.followers([group, other, group], refs)
    alone = [template.follower(g, r) for g, r in zip([group, other, group], refs)]
    assert [type(x) for x in made] == [FollowerResult] * 3
    for at, (together, one) in enumerate(zip(made, alone)):
        for name in _SLOTS:
            got, want = getattr(together, name), getattr(one, name)
            assert got == want, name
            if name in ("group", "_template"):
                assert got is want, name
        assert together.origin[0] is result and together.origin[1] is refs[at]
        assert built_fields(together) == ()   # made unbuilt, as one by one
        assert together == one and _plain(together) == _plain(one)
    assert template.followers([], []) == []
