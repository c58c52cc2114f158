"""The rules' per-question memos give exactly what the plain path gives.

Expected values here are the plain path of our own code (the same function run with its
memo empty, or the phrase built from scratch), never pasted output.
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from electrical_rule_kit import RULES, check  # noqa: E402

from linter import rulekit  # noqa: E402
from linter.corners import Corner, Levels  # noqa: E402
from linter.rules import all_rules  # noqa: E402

all_rules()
string_headroom = sys.modules["linter.rules.string_headroom"]


def _headroom_findings(path: Path) -> list:
    return [f for f in check(path).findings if f.rule == "string-headroom"]


def test_string_headroom_fix_memo_matches_an_empty_memo():
    fixtures = sorted((RULES / "string-headroom").glob("*.cir"))
    assert fixtures
    cold = []
    for path in fixtures:
        string_headroom._ANSWERS.clear()
        cold.append(_headroom_findings(path))
    warm = [_headroom_findings(path) for path in fixtures]  # answers kept from the runs above
    assert any(cold)
    assert warm == cold
    assert [[f.values for f in run] for run in warm] == [[f.values for f in run] for run in cold]


def _question(**changes) -> string_headroom.FixQuestion:
    # a 12 V ±10 % rail, 5 V ±2 % reference, two white LEDs at 20 mA (from memory)
    base = string_headroom.FixQuestion("+12V", 10.8, 12.0, 13.2, "+5V", 4.9, 5.0, 5.1, 0.05,
                                       5.8, 6.8, 3.4, 0.02, 2, 1.5)
    return replace(base, **changes)


def test_fix_answer_names_the_setter_where_the_plain_text_does():
    answer = string_headroom.fix_answer(_question())
    text = answer.text("R7")
    assert text.startswith("replace R7 by an NPN sink below the string")
    assert "\0" not in text
    assert answer.text("R8") == text.replace("R7", "R8", 1)


def test_fix_question_keys_tell_every_field_apart():
    base = _question()
    changed = [_question(**{name: value}) for name, value in (
        ("rail_name", "+12V_B"), ("rail_min", 10.9), ("rail_nom", 12.1), ("rail_max", 13.3),
        ("reference_name", "+5V_B"), ("reference_min", 4.8), ("reference_nom", 5.01),
        ("reference_max", 5.2), ("tolerance", 0.01), ("vf_min", 5.7), ("vf_max", 6.9),
        ("vf_max_each", 3.5), ("current_nom", 0.021), ("leds", 3), ("limit", 1.6))]
    keys = {q.key() for q in changed} | {base.key()}
    assert len(keys) == len(changed) + 1
    assert _question(limit=0.0).key() != _question(limit=-0.0).key()
    assert _question(limit="1.5").key() is None


def _corner(rails: dict, bins: tuple[str, ...], ambient: float = 25.0) -> Corner:
    return Corner("on", rails, ambient, Levels(tuple(f"D{i}" for i in range(len(bins))), bins))


def _plain_phrase(corner: Corner, rail: str, focus=()) -> str:
    """at_corner's words built from scratch (no memo), as the function's body writes them."""
    ordered = [(rail, corner.rails[rail])] if rail in corner.rails else []
    ordered += [(n, lv) for n, lv in corner.rails.items() if n != rail and lv[0] != "nom"]
    return rulekit._phrase(ordered, corner, focus)


def test_at_corner_memo_matches_the_plain_phrase():
    from types import SimpleNamespace

    rulekit.forget_board()
    rails = {"+12V": ("max", 13.2), "+5V": ("min", 4.9)}
    group = SimpleNamespace(rail="+12V")
    other = SimpleNamespace(rail="+5V")
    corners = [_corner(rails, ("vf_min", "vf_min")), _corner(rails, ("vf_max", "vf_max")),
               _corner(rails, ("vf_min", "vf_max")), _corner(rails, ("vf_min",), 0.0),
               _corner(rails, ("vf_min",), -0.0), _corner(rails, ("vf_min",), 60.0),
               _corner(rails, ()), _corner({"+12V": ("max", 13.2), "+5V": ("nom", 5.0)},
                                           ("vf_min",))]
    for _ in range(2):  # second pass answered from the memo
        for corner in corners:
            for result in (group, other):
                for focus in ((), ("D1",)):
                    assert rulekit.at_corner(corner, result, focus) == \
                        _plain_phrase(corner, result.rail, focus)
    assert rulekit.at_corner(corners[3], group) != rulekit.at_corner(corners[4], group)


def test_shared_ballast_hottest_is_the_plain_sorted_maximum():
    from types import SimpleNamespace

    from linter.refs import natural_key

    hottest = sys.modules["linter.rules.shared_ballast"]._hottest

    def led(ref, amps):
        return SimpleNamespace(ref=ref, current=SimpleNamespace(max=amps))

    def plain(leds):  # the definition the rule used before: natural order, then max
        return max(sorted(leds, key=lambda x: natural_key(x.ref)),
                   key=lambda x: round(x.current.max * 1e9))

    # currents in A (invented); ties within a nanoampere, names out of natural order
    cases = [[led("D10", 0.02), led("D9", 0.02), led("D2", 0.0199999999)],
             [led("D3", 0.01), led("D1", 0.03), led("D2", 0.02)],
             [led("D7", 0.02)],
             [led("LED2", 0.02), led("D2", 0.02), led("D02", 0.02)]]
    for leds in cases:
        assert hottest(leds) is plain(leds)



def test_nonstandard_verdicts_kept_by_value_match_the_plain_check():
    from linter.model import Part, Pin
    from linter.partdata import ResistorData

    module = sys.modules["linter.rules.nonstandard_value"]
    # values in Ω and tolerances invented; E24/E96 membership decided by eseries itself
    cases = [(120.0, 0.05), (120.0, 0.01), (121.0, 0.01), (121.0, 0.05), (1234.0, 0.05),
             (120.0, 0.05), (1234.0, 0.05), (4.7e3, 0.1), (4.75e3, 0.1), (4.75e3, 0.01)]
    kept: dict = {}
    for index, (ohms, tolerance) in enumerate(cases * 2):
        part = Part(f"R{index}", "resistor", str(ohms), (Pin("1", "a"), Pin("2", "b")), ohms)
        data = ResistorData(ohms=ohms, tolerance=tolerance)
        assert module._check_resistor(part, data, "nonstandard-value", "info", kept) == \
            module._check_resistor(part, data, "nonstandard-value", "info")
    assert len(kept) == len(set(cases))


def test_resistor_allowances_kept_by_rating_match_the_plain_allowance():
    from linter.dissipation import resistor_allowance

    module = sys.modules["linter.rules.resistor_overload"]
    kept: dict = {}
    # ratings in W, ambient 85 °C, share 0.6 (invented)
    for rating in (0.1, 0.25, 0.1, 0.0, -0.0, 1, 0.25):
        assert module._allowance(rating, 85.0, 0.6, kept) == resistor_allowance(rating, 85.0, 0.6)
    assert sorted(kept) == [0.1, 0.25]


def test_fix_search_group_text_is_the_text_of_the_copy_without_id():
    from linter import fix_search
    from linter.engine import CheckRequest, analyse, load_inputs

    root = RULES.parent
    compared = 0
    for netlist in [root / "demo" / "dust_extractor_panel.cir",
                    *sorted(RULES.glob("*/*.cir"))[:30]]:
        context = analyse(load_inputs(CheckRequest(netlist, None), all_rules()))
        for result in context.groups:
            assert fix_search._group_text(result.group) == repr(replace(result.group, id=""))
            compared += 1
    assert compared > 30
