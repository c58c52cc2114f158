"""unchecked-group looks only at the groups whose template did not converge when every
group of the board is recognised and solved; the findings must be the plain loop's.

Expected values: ``check(context, by_template=False)``, the plain loop of our own code, on
the demo (EDIF and SPICE; it has unrecognised groups, so the plain loop is taken), the rule
fixtures, generated boards (bench/gen_board.py, every group solved) and a generated board
whose templates are made not to converge (a corner named in ``not_converged``).
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
from linter.rules.unchecked_group import _all_solved  # noqa: E402


def _netlists():
    demo = ROOT / "fixtures" / "demo"
    yield demo / "dust_extractor_panel.edif", demo / "bom.csv"
    yield demo / "dust_extractor_panel.cir", demo / "bom.csv"
    for deck in sorted((ROOT / "fixtures" / "rules").glob("*/*.cir")):
        yield deck, None


def _both(context) -> tuple[list, list]:
    rule = all_rules()["unchecked-group"]()
    try:
        return list(rule.check(context)), list(rule.check(context, by_template=False))
    finally:
        forget_board()


@pytest.mark.parametrize("netlist, bom", list(_netlists()))
def test_fixtures_same_both_ways(netlist, bom):
    fast, plain = _both(analyse(load_inputs(CheckRequest(netlist, bom=bom))))
    assert [repr(f) for f in fast] == [repr(f) for f in plain]


@pytest.fixture(scope="module")
def board(tmp_path_factory):
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate, write_all

    folder = tmp_path_factory.mktemp("b1500")
    write_all(generate(1500, 2), folder)
    return analyse(load_inputs(CheckRequest(folder / "board.edif", bom=folder / "bom.csv")))


def test_a_generated_board_is_all_solved_and_the_same(board):
    assert _all_solved(board.groups)
    fast, plain = _both(board)
    assert [repr(f) for f in fast] == [repr(f) for f in plain]


def test_templates_that_did_not_converge_are_found_with_their_followers(board):
    templates = [r for r in board.groups if r.origin is None and r.leds]
    touched = templates[::3]
    swapped = {id(r): replace(r, not_converged=(r.leds[0].current.at_max,)) for r in touched}
    groups = []
    for result in board.groups:
        if id(result) in swapped:
            groups.append(swapped[id(result)])
        elif result.origin is not None and id(result.origin[0]) in swapped:
            groups.append(replace(result, origin=(swapped[id(result.origin[0])],
                                                  result.origin[1])))
        else:
            groups.append(result)
    context = replace(board, groups=tuple(groups))
    fast, plain = _both(context)
    assert [repr(f) for f in fast] == [repr(f) for f in plain]
    assert len(plain) > len(touched)  # followers too
