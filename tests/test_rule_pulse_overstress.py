"""Rule ``pulse-overstress`` on its golden fixtures and on its terms one by one."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from rule_fixture_kit import check, corner, deck_text, ngspice_op, of_rule, shockley_is  # noqa: E402

from linter.partdata import LedData
from linter.rules.pulse_overstress import _judge

RULE = "pulse-overstress"


def worst_peak(deck: str, source: str) -> float:
    """Peak current by Ohm's law at 5.25 V (5 V + 5 %), 56 Ω − 5 %, LED at vf_min (ngspice)."""
    op = ngspice_op(corner(deck_text(RULE, deck), {source: 5.25, "R1": 56 * 0.95},
                           shockley_is(1.95)))
    rail = "row1" if source == "VROW1" else "row2"
    return (op[rail] - op["a"]) / (56 * 0.95)


def test_fires_on_pulse_length_and_duty():
    (finding,) = of_rule(check(RULE, "fires.cir"), RULE)
    peak = worst_peak("fires.cir", "VROW1")
    assert finding.values["peak_a"] == pytest.approx(peak, rel=0.02)
    assert finding.values["pulse_s"] == pytest.approx(0.30 * 1e-3)   # duty × period
    assert finding.values["average_a"] == pytest.approx(0.30 * finding.values["peak_a"])
    assert finding.severity == "error" and finding.nets == ("row1",)
    assert "300 µs pulses (30 % of 1 ms), longer than the 100 µs" in finding.message
    assert "30 % duty, above the 10 %" in finding.message
    assert "average" not in finding.message        # 0.3 × ~58 mA is inside 30 mA
    assert "duty at most 10 %" in finding.fix


def test_borderline_stays_clean():
    result = check(RULE, "clean.cir")
    peak = worst_peak("clean.cir", "VROW2")
    assert 0.030 < peak < 0.100       # above if_max (the peak rating applies), within if_peak
    assert 0.10 * 0.9e-3 <= 100e-6   # 90 µs pulses within 100 µs; duty 10 % within 10 %
    assert of_rule(result, RULE) == []


LED = LedData(if_max=0.025, if_peak=0.1, if_peak_pulse=100e-6, if_peak_duty=0.1)
"""Invented ratings in the style of an indicator LED (100 mA at 100 µs, 1/10: common practice)."""


def test_average_above_if_max():
    verdict = _judge(0.09, 0.3, 1e-4, LED)     # 30 µs pulses, but 27 mA average > 25 mA
    assert verdict.breach and any("average 27 mA" in r for r in verdict.reasons)


def test_peak_above_if_peak():
    verdict = _judge(0.12, 0.05, 1e-3, LED)
    assert verdict.breach and any("above its 100 mA if_peak" in r for r in verdict.reasons)


def test_unknowns_are_warnings_not_guesses():
    no_period = _judge(0.05, 0.05, None, LED)
    assert not no_period.breach and any("pulse length unknown" in r for r in no_period.reasons)
    no_peak_rating = _judge(0.05, 0.05, 1e-3, LedData(if_max=0.025))
    assert not no_peak_rating.breach
    assert any("gives no if_peak" in r for r in no_peak_rating.reasons)


def test_within_if_max_nothing_to_say():
    assert _judge(0.02, 0.5, 1e-3, LED).reasons == ()
