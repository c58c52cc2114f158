"""resistor-overload and transistor-overload write a follower's finding from its template
part's name-free pieces, worked out once per part record (``kept``); the findings must be
the plain path's (``check(context, keep=False)``: every finding written from the figures).

Expected values: the plain path of our own code, on the demo (EDIF and SPICE), both rules'
fixtures and generated boards (bench/gen_board.py) whose repeated channels overload
resistors and transistors in many followers.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent

from linter.engine import CheckRequest, analyse, load_inputs  # noqa: E402
from linter.rulekit import forget_board  # noqa: E402
from linter.rules import all_rules  # noqa: E402

RULES = ("resistor-overload", "transistor-overload")


def _netlists(tmp_path):
    demo = ROOT / "fixtures" / "demo"
    yield demo / "dust_extractor_panel.edif", demo / "bom.csv"
    yield demo / "dust_extractor_panel.cir", demo / "bom.csv"
    for rule in RULES:
        for deck in sorted((ROOT / "fixtures" / "rules" / rule).glob("*.cir")):
            yield deck, None
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate, write_all

    for parts, seed in ((1500, 2), (3000, 3)):
        folder = tmp_path / f"b{parts}_s{seed}"
        folder.mkdir()
        write_all(generate(parts, seed), folder)
        yield folder / "board.edif", folder / "bom.csv"


@pytest.mark.parametrize("rule_id", RULES)
def test_kept_pieces_give_the_plain_findings(rule_id, tmp_path):
    found = followers = 0
    for netlist, bom in _netlists(tmp_path):
        context = analyse(load_inputs(CheckRequest(netlist, bom=bom)))
        rule = all_rules()[rule_id]()
        try:
            kept = list(rule.check(context))
            plain = list(rule.check(context, keep=False))
        finally:
            forget_board()
        assert [repr(f) for f in kept] == [repr(f) for f in plain]
        for a, b in zip(kept, plain):
            assert list(a.values.items()) == list(b.values.items())
            assert a.values is not b.values
        groups = {r.id: r for r in context.groups}
        found += len(plain)
        followers += sum(groups[f.group].origin is not None for f in plain)
    assert found > 20 and followers > 10  # the kept pieces serve followers


def test_findings_of_one_template_do_not_share_their_values(tmp_path):
    for netlist, bom in _netlists(tmp_path):
        context = analyse(load_inputs(CheckRequest(netlist, bom=bom)))
        for rule_id in RULES:
            findings = list(all_rules()[rule_id]().check(context))
            assert len({id(f.values) for f in findings}) == len(findings)
            forget_board()
