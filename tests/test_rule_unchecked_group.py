"""Rule unchecked-group: LEDs whose current could not be worked out are named, never dropped."""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

from linter.engine import CheckRequest, run_check
from linter.groups import Group
from linter.model import Circuit
from linter.results import Corner, GroupResult
from linter.rules.unchecked_group import UncheckedGroup

FIXTURES = Path(__file__).resolve().parent.parent / "fixtures"


def _rules(result) -> dict[str, list]:
    found: dict[str, list] = {}
    for finding in result.findings:
        found.setdefault(finding.rule, []).append(finding)
    return found


def test_led_behind_a_plain_diode_is_reported_not_judged():
    # D1 is in series with a plain diode D2, a path the solver does not model: the partial
    # network would put D1's cathode nowhere and call it dark. No current rule may judge it
    # (common practice: a verdict needs the whole path); unchecked-group names it instead.
    result = run_check(CheckRequest(FIXTURES / "topology" / "unrecognised.cir"))
    found = _rules(result)
    (finding,) = found["unchecked-group"]
    assert finding.parts == ("D1",) and finding.severity == "warning"
    assert "net m reaches D2 (diode)" in finding.message
    assert "led-undercurrent" not in found and "led-overcurrent" not in found


def test_floating_leds_are_left_to_floating_led(tmp_path):
    deck = tmp_path / "open.cir"
    # D1's cathode net goes nowhere: floating-led's case, not this rule's.
    deck.write_text("open cathode\nV5 vcc 0 DC 5\nR1 vcc a 330\nD1 a k LEDRED\n"
                    "R2 k2 0 1k\n.model LEDRED D(IS=1e-19 N=1.8 RS=2)\n.end\n")
    found = _rules(run_check(CheckRequest(deck)))
    assert "unchecked-group" not in found


@dataclass(frozen=True)
class _Context:
    groups: tuple
    circuit: Circuit = field(default_factory=lambda: Circuit("x", "spice", {}, {}))

    def severity(self, rule: Any, default: str | None = None) -> str:
        return "warning"


def _group() -> Group:
    return Group(id="G-D3", topology="resistor", leds=("D3",), strings=(("D3",),),
                 parts=("D3", "R3"), nets=("+5V", "a", "GND"), rails=("+5V", "GND"),
                 setter="R3")


def test_unsolved_group_names_the_reason():
    result = GroupResult(group=_group(), status="unsolved", reason="R3 has no value")
    (finding,) = UncheckedGroup().check(_Context((result,)))
    assert finding.message == "D3: not solved (R3 has no value); current not checked"


def test_corners_that_did_not_converge_are_counted():
    corner = Corner(scenario="on", rails={"+5V": ("min", 4.75)}, ambient_c=0.0,
                    vf={"D3": "vf_max"}, beta={}, resistors={"R3": "high"})
    solved = GroupResult(group=_group(), status="solved")
    assert list(UncheckedGroup().check(_Context((solved,)))) == []
    stuck = replace(solved, not_converged=(corner, corner))
    (finding,) = UncheckedGroup().check(_Context((stuck,)))
    assert finding.message.startswith("D3: the solver did not converge at 2 corners (first: ")
