"""fix_search.follower_signature: a follower's signature taken from its template's when its
text is the template's with the names changed, else worked out; always the plain digest.

Expected values: ``fix_search.signature_plain`` of the follower's own question, the plain
path of our own code. Channels invented (tests/test_fix_search_memo.py's), generated boards
from bench/gen_board.py, the demo.
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path
from types import SimpleNamespace

import pytest

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(Path(__file__).resolve().parent))

from test_fix_search_memo import _channel, _Context  # noqa: E402

from linter import fix_search  # noqa: E402
from linter.model import Circuit  # noqa: E402
from linter.partdata import Rail  # noqa: E402
from linter.results import GroupResult  # noqa: E402

RAILS = {"+5V": Rail("+5V", 5.0, 4.75, 5.25), "0": Rail("0", 0.0, 0.0, 0.0)}


def _board(*channels):
    """A context and a GroupResult per channel (r, d, node[, ohms]), each its own."""
    parts, data, results = {}, {}, []
    for line, (r, d, node, *ohms) in enumerate(channels, 1):
        p, group, d_ = _channel(r, d, node, line, *ohms)
        parts.update(p)
        data.update(d_)
        results.append(GroupResult(group, "solved"))
    return _Context(Circuit("board.cir", "spice", parts, {}), data, RAILS), results


def _follower(template, result, refs):
    """``result`` as a follower of ``template`` (what follower_signature reads of it)."""
    return SimpleNamespace(group=result.group, origin=(template, refs))


def _question(result):
    return ("split", result.group.setter, 180.0, 0.05)


@pytest.fixture(autouse=True)
def _fresh():
    fix_search.forget_board()
    yield
    fix_search.forget_board()


def _counting(monkeypatch):
    calls = []
    plain = fix_search.signature

    def counted(*args):
        calls.append(args[1])
        return plain(*args)
    monkeypatch.setattr(fix_search, "signature", counted)
    return calls


def test_a_channel_differing_in_names_only_takes_the_templates_signature(monkeypatch):
    context, (template, other) = _board(("R1", "D1", "N1"), ("R7", "D7", "N7"))
    follower = _follower(template, other, {"R1": "R7", "D1": "D7"})
    calls = _counting(monkeypatch)
    for _ in range(2):
        key = fix_search.follower_signature(context, follower, _question(other),
                                            _question(template))
        assert key == fix_search.signature_plain(context, other, _question(other))
    assert key == fix_search.signature_plain(context, template, _question(template))
    assert calls == [template]  # the template's once; the follower's text never cut


@pytest.mark.parametrize("channel,why", [
    (("R7", "D7", "N7", 560.0), "another value"),
    (("R10", "D10", "D9"), "names in another natural order (plain order kept)"),
    (("R2", "d2", "N2"), "names in another plain order"),
    (("R7", "D7", "N7"), "a name that is a quoted text of the template (a note)"),
    (("R7", "D7", "N'7"), "a name that cannot be made neutral"),
    (("R7", "D7", "N\t7"), "a name repr escapes"),
])
def test_any_other_difference_is_worked_out(channel, why, monkeypatch):
    context, (template, other) = _board(("R1", "D1", "D2"), channel)
    if "note" in why:  # both notes read N7: a quoted text of the template, a name of the other
        data = context.part_data
        context = replace(context, part_data={**data, **{
            r: replace(data[r], note="N7") for r in ("R1", "R7")}})
    follower = _follower(template, other, {"R1": channel[0], "D1": channel[1]})
    calls = _counting(monkeypatch)
    key = fix_search.follower_signature(context, follower, _question(other),
                                        _question(template))
    assert key == fix_search.signature_plain(context, other, _question(other)), why
    assert calls[-1] is follower, why  # worked out itself


def test_a_wrong_template_question_is_still_the_followers_own():
    context, (template, other) = _board(("R1", "D1", "N1"), ("R7", "D7", "N7"))
    follower = _follower(template, other, {"R1": "R7", "D1": "D7"})
    for asked in (("split", "R1", 220.0, 0.05), ("split", "R7", 180.0, 0.05), None):
        key = fix_search.follower_signature(context, follower, _question(other), asked)
        assert key == fix_search.signature_plain(context, other, _question(other))


def _boards():
    yield ROOT / "fixtures" / "demo" / "dust_extractor_panel.edif", \
        ROOT / "fixtures" / "demo" / "bom.csv"
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    import tempfile

    from bench.gen_board import generate, write_all

    for parts, seed in ((1500, 1), (3000, 3)):
        folder = Path(tempfile.mkdtemp())
        write_all(generate(parts, seed), folder)
        yield folder / "board.edif", folder / "bom.csv"
        yield folder / "board.cir", folder / "bom.csv"


def test_every_follower_of_generated_boards_gets_its_plain_signature(monkeypatch):
    from linter.engine import CheckRequest, analyse, load_inputs
    from linter.rulekit import figures_of, solved_groups

    followers = worked_out = 0
    calls = _counting(monkeypatch)
    for netlist, bom in _boards():
        context = analyse(load_inputs(CheckRequest(netlist=netlist, bom=bom)))
        fix_search.forget_board()
        for result in solved_groups(context):
            template = figures_of(result)[0]
            for ohms in (100.0, 0.0, -0.0):
                question = ("split", result.group.setter, ohms, 0.05)
                asked = ("split", template.group.setter, ohms, 0.05)
                calls.clear()
                key = fix_search.follower_signature(context, result, question, asked)
                assert key == fix_search.signature_plain(context, result, question)
                if result.origin is not None:
                    followers += 1
                    worked_out += any(call is result for call in calls)
    assert followers > 1000
    assert worked_out < followers / 2  # most followers take their template's


def test_part_texts_are_the_records_reprs():
    # expected: repr of fix_search._part_record, the plain path of our own code
    from dataclasses import dataclass

    from linter.engine import CheckRequest, load_inputs
    from linter.model import Part, Pin, SourceLocation

    @dataclass(frozen=True)
    class OddPin:  # not a Pin: written by repr
        name: str
        net: str | None

    here = SourceLocation("board.cir", 1, 1)
    parts = [Part("R'1", "resistor", "4k7", (), here, value_si=4700.0),
             Part("D1", "led", None, (Pin("A", "n\\1"),), here, value_si=-0.0),
             Part("Q1", "npn", "x", (Pin("C", None), Pin("B", "b"), Pin("E", "0")), here),
             Part("U1", "mcu", "m", (Pin("P1", "a"), OddPin("P2", "b")), here)]
    for netlist, bom in _boards():
        parts += list(load_inputs(CheckRequest(netlist=netlist, bom=bom)).circuit.parts.values())
    assert any(p.model is not None for p in parts)  # SPICE models among them
    for part in parts:
        assert fix_search._part_text(part) == repr(fix_search._part_record(part))
