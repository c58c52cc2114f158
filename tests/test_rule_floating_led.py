"""Rule ``floating-led`` on its golden fixtures and on an unconnected pin."""

from __future__ import annotations

import sys
from dataclasses import dataclass
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from rule_fixture_kit import check, of_rule  # noqa: E402

from linter.model import Circuit, Net, Part, Pin, SourceLocation
from linter.rules import all_rules

RULE = "floating-led"


def test_fires_with_the_reason():
    (finding,) = of_rule(check(RULE, "fires.cir"), RULE)
    assert finding.severity == "warning" and finding.parts == ("D1",)
    assert finding.message == "D1: cathode net led_k has no path to a rail or sink"
    assert finding.location.line == 5


def test_connected_stays_clean():
    assert of_rule(check(RULE, "clean.cir"), RULE) == []


@dataclass
class StandIn:
    circuit: Circuit
    groups: tuple = ()

    def severity(self, rule):
        return rule.default_severity


def test_unconnected_pin_outside_any_group():
    here = SourceLocation("board.cir", 3, 1)
    led = Part("D9", "led", "RED", (Pin("A", "a"), Pin("K", None)), here)
    resistor = Part("R9", "resistor", "330", (Pin("1", "v5"), Pin("2", "a")), here)
    nets = {"a": Net("a", (("D9", "A"), ("R9", "2")), here), "v5": Net("v5", (("R9", "1"),), here)}
    circuit = Circuit("board.cir", "spice", {"D9": led, "R9": resistor}, nets)
    (finding,) = all_rules()[RULE]().check(StandIn(circuit))
    assert finding.message == "D9: pin K is not connected" and finding.parts == ("D9",)
