"""sink-compliance looks only at the groups whose template has a transistor out of
regulation at a known rail; the findings must be the plain loop's over every solved group.

Expected values: ``check(context, by_template=False)``, the plain loop of our own code, on
the demo (EDIF and SPICE), the rule fixtures and generated boards (bench/gen_board.py),
and on those boards with a rail lowered under the sinks' needs (so that they fire, many in
followers).
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent

from linter.engine import CheckRequest, analyse, load_inputs  # noqa: E402
from linter.rulekit import forget_board  # noqa: E402
from linter.rules import all_rules  # noqa: E402


def _netlists():
    demo = ROOT / "fixtures" / "demo"
    yield demo / "dust_extractor_panel.edif", demo / "bom.csv"
    yield demo / "dust_extractor_panel.cir", demo / "bom.csv"
    for deck in sorted((ROOT / "fixtures" / "rules").glob("*/*.cir")):
        yield deck, None


def _both(context) -> tuple[list, list]:
    rule = all_rules()["sink-compliance"]()
    try:
        return list(rule.check(context)), list(rule.check(context, by_template=False))
    finally:
        forget_board()


@pytest.mark.parametrize("netlist, bom", list(_netlists()))
def test_fixtures_same_both_ways(netlist, bom):
    fast, plain = _both(analyse(load_inputs(CheckRequest(netlist, bom=bom))))
    assert [repr(f) for f in fast] == [repr(f) for f in plain]


def test_generated_boards_same_both_ways_with_rails_lowered(tmp_path):
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate, write_all

    fired = 0
    for parts, seed in ((1500, 2), (3000, 1)):
        folder = tmp_path / f"b{parts}_{seed}"
        folder.mkdir()
        write_all(generate(parts, seed), folder)
        context = analyse(load_inputs(CheckRequest(folder / "board.edif",
                                                   bom=folder / "bom.csv")))
        fast, plain = _both(context)
        assert [repr(f) for f in fast] == [repr(f) for f in plain]
        lowered = {name: replace(rail, min=rail.min * 0.5)
                   for name, rail in context.rails.items()}
        fast, plain = _both(replace(context, rails=lowered))
        assert [repr(f) for f in fast] == [repr(f) for f in plain]
        fired += len(plain)
    assert fired > 10
