"""Rules that work a template group's answer out once and reuse it for the groups renamed
from it (``GroupResult.origin``) give exactly what the plain path gives group by group.

Expected values here are the plain path of our own code (the same rule method run without
its memo, on the same group), never pasted output. The boards: the demo (EDIF and SPICE)
and a generated board (bench/gen_board.py), whose channels repeat, so that most of its
groups are followers of a template.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "fixtures" / "demo"

from linter.engine import CheckRequest, analyse, load_inputs  # noqa: E402
from linter.rulekit import forget_board, solved_groups  # noqa: E402
from linter.rules import all_rules  # noqa: E402


def _context(netlist: Path, bom: Path | None):
    return analyse(load_inputs(CheckRequest(netlist=netlist, bom=bom)))


@pytest.fixture(scope="module")
def boards(tmp_path_factory):
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate, write_all

    folder = tmp_path_factory.mktemp("board")
    write_all(generate(1500, 1), folder)  # has follower findings of several rules
    return [_context(DEMO / "dust_extractor_panel.edif", DEMO / "bom.csv"),
            _context(DEMO / "dust_extractor_panel.cir", DEMO / "bom.csv"),
            _context(folder / "board.cir", folder / "bom.csv")]


def _same(fast: list, plain: list) -> None:
    """Equal findings, and equal values in the same order (dict equality ignores order)."""
    assert fast == plain
    assert [list(f.values.items()) for f in fast] == [list(f.values.items()) for f in plain]


def test_the_generated_board_has_followers_that_find(boards):
    generated = boards[-1]
    followers = [r for r in solved_groups(generated) if r.origin is not None]
    assert len(followers) > 100
    rule = all_rules()["string-headroom"]()
    assert sum(1 for f in rule.check(generated) if f.group in {r.id for r in followers}) > 10
    forget_board()


def test_string_headroom_swings_kept_by_template_match_the_plain_path(boards):
    rule = all_rules()["string-headroom"]()
    reused = 0
    for context in boards:
        limit = float(context.option(rule, "ratio"))
        severity = context.severity(rule)
        swings: dict = {}
        fast, plain = [], []
        for result in solved_groups(context):
            if result.group.setter not in {r.ref for r in result.resistors}:
                continue
            if result.group.topology in sys.modules[type(rule).__module__].SKIPPED:
                continue
            before = len(swings)
            fast.append(rule._group_finding(context, result, limit, severity, swings))
            reused += len(swings) == before
            plain.append(rule._group_finding(context, result, limit, severity))
        _same([f for f in fast if f], [f for f in plain if f])
        assert fast == plain  # None for the same groups
        # the whole check gives the plain findings in the plain order
        _same(list(rule.check(context)), [f for f in plain if f])
        forget_board()
    assert reused > 50


def test_led_overcurrent_limits_kept_by_template_match_the_plain_path(boards):
    rule = all_rules()["led-overcurrent"]()
    reused = found = 0
    for context in boards:
        overs: dict = {}
        fast, plain = [], []
        for result in solved_groups(context):
            before = len(overs)
            fast.append(rule._group_finding(context, result, overs))
            reused += len(overs) == before
            found += len(overs) == before and fast[-1] is not None
            plain.append(rule._group_finding(context, result))
        _same([f for f in fast if f], [f for f in plain if f])
        assert fast == plain
        forget_board()
    assert reused > 50 and found > 0
