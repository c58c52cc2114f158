"""led-overcurrent asks its fix search with the follower's signature taken from its
template's question (``fix_search.follower_signature``); the key must be the follower's own
plain signature, and the findings those of the plain path.

Expected values: ``fix_search.signature_plain`` of the follower's own question and the
findings on ``analyse(..., memoise=False)`` results (no followers), the plain paths of our
own code, on generated boards (bench/gen_board.py) whose LEDs run over their limit in many
followers.
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

from linter import fix_search  # noqa: E402
from linter.analysis import analyse as solve_groups  # noqa: E402
from linter.engine import CheckRequest, load_inputs  # noqa: E402
from linter.rulekit import forget_board  # noqa: E402
from linter.rules import all_rules  # noqa: E402
from linter.topology import find_groups  # noqa: E402


def _solved(context, memoise):
    groups = find_groups(context.circuit, context.rails, context.part_data)
    return replace(context, groups=solve_groups(groups, context.circuit, context.part_data,
                                                context.rails, context.settings.ambient,
                                                memoise=memoise))


def test_follower_keys_are_their_plain_signatures(tmp_path, monkeypatch):
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate, write_all

    write_all(generate(3000, 1), tmp_path)  # (a board with 35 follower findings)
    loaded = load_inputs(CheckRequest(tmp_path / "board.edif", bom=tmp_path / "bom.csv"))
    context = _solved(loaded, memoise=True)
    asked = []
    plain_search = fix_search.resistor_for_max

    def recorded(context, result, ref, leds, limit, key=None):
        asked.append((result, fix_search.resistor_for_max_question(ref, leds, limit), key))
        return plain_search(context, result, ref, leds, limit, key)

    monkeypatch.setattr(fix_search, "resistor_for_max", recorded)
    rule = all_rules()["led-overcurrent"]()
    fix_search._ANSWERS.clear()
    try:
        fast = list(rule.check(context))
    finally:
        forget_board()
    followers = [(r, q, k) for r, q, k in asked if r.origin is not None]
    assert len(followers) > 20
    for result, question, key in followers:
        assert key == fix_search.signature_plain(context, result, question)
    fix_search._ANSWERS.clear()
    try:
        plain = list(rule.check(_solved(loaded, memoise=False)))
    finally:
        forget_board()
    assert [repr(f) for f in fast] == [repr(f) for f in plain]
