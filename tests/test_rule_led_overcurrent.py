"""Rule led-overcurrent on its golden fixtures, checked against ngspice at the same corner."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from electrical_rule_kit import (RULES, at_corner, check, corner_args, findings,  # noqa: E402
                              led_current, ngspice)

from linter import eseries  # noqa: E402

HERE = RULES / "led-overcurrent"
VF = {"vf_min": 1.9, "vf_max": 2.4}
"""The fixture's ledlint.toml bins (V at 20 mA)."""


def test_fires_with_the_worst_corner_ngspice_agrees_with(tmp_path):
    (finding,) = findings(check(HERE / "fires.cir"), "led-overcurrent")
    assert finding.severity == "error" and finding.parts == ("D1",)
    assert finding.values["limit_a"] == pytest.approx(0.025)  # the fixture's if_max
    corner = check(HERE / "fires.cir").groups[0].led("D1").current.at_max
    # the worst corner is the rail high, the resistor low, the LED at vf_min (Ohm's law)
    assert corner.rails["vcc"] == ("max", pytest.approx(5.25))
    assert corner.resistors["R1"] == "low" and corner.vf["D1"] == "vf_min"
    text = (HERE / "fires.cir").read_text()
    expected = led_current(ngspice(at_corner(text, **corner_args(corner, {"R1": 100.0}, VF)),
                                   tmp_path), "D1")
    assert finding.values["current_max_a"] == pytest.approx(expected, rel=0.01)  # ngspice .op
    assert "at vcc max (5.25 V), LEDs at vf_min" in finding.message
    assert "above its 25 mA maximum" in finding.message


def test_fix_is_the_smallest_e24_value_that_keeps_the_worst_case_under(tmp_path):
    (finding,) = findings(check(HERE / "fires.cir"), "led-overcurrent")
    fix_ohms = finding.values["fix_ohms"]
    assert eseries.is_standard(fix_ohms, "E24")  # IEC 60063, 5 % → E24
    text = (HERE / "fires.cir").read_text()
    worst = dict(rails={"vcc": 5.25}, bins={"D1": 1.9})

    def worst_current(ohms: float) -> float:
        deck = at_corner(text, resistors={"R1": ohms * 0.95}, **worst)
        return led_current(ngspice(deck, tmp_path), "D1")

    # ngspice at the worst corner: the fix is under 25 mA, the E24 value below it is not
    assert worst_current(fix_ohms) <= 0.025
    lower = eseries.below(fix_ohms / 1.001, "E24")
    assert worst_current(lower) > 0.025
    assert finding.values["fix_current_max_a"] == pytest.approx(worst_current(fix_ohms), rel=0.01)
    assert f"make R1 {fix_ohms:g} Ω (E24)" in finding.fix


def test_above_the_recommended_range_is_a_warning(tmp_path):
    (finding,) = findings(check(HERE / "warns.cir"), "led-overcurrent")
    assert finding.severity == "warning" and finding.parts == ("D1",)
    deck = at_corner((HERE / "warns.cir").read_text(), rails={"vcc": 5.25},
                     resistors={"R1": 120 * 0.95}, bins={"D1": 1.9})
    expected = led_current(ngspice(deck, tmp_path), "D1")
    # ngspice .op: between the 20 mA recommended top and the 30 mA maximum of LREC
    assert 0.020 < expected < 0.030
    assert finding.values["current_max_a"] == pytest.approx(expected, rel=0.01)
    assert "recommended maximum" in finding.message
    assert finding.values["fix_current_max_a"] <= 0.020


def test_borderline_stays_clean(tmp_path):
    assert findings(check(HERE / "clean.cir"), "led-overcurrent") == []
    deck = at_corner((HERE / "clean.cir").read_text(), rails={"vcc": 5.25},
                     resistors={"R1": 150 * 0.95}, bins={"D1": 1.9})
    # ngspice .op at the worst corner: close to, but under, the 25 mA maximum
    assert 0.022 < led_current(ngspice(deck, tmp_path), "D1") < 0.025


def test_pulsed_groups_are_left_to_pulse_overstress():
    # The pulse-overstress fixture drives D1 at a peak above its 30 mA if_max on a net declared
    # pulsed; a peak rating applies there (common practice: peak ratings are for short pulses
    # at low duty), so only pulse-overstress judges it.
    fixture = RULES / "pulse-overstress" / "fires.cir"
    result = check(fixture)
    peak = result.groups[0].led("D1").current.max
    assert peak > 0.030  # the fixture's if_max: led-overcurrent would fire if not pulsed
    assert not findings(result, "led-overcurrent")
    assert findings(result, "pulse-overstress")
