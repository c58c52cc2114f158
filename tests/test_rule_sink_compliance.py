"""Rule sink-compliance on its golden fixtures, checked against ngspice."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from electrical_rule_kit import (RULES, at_corner, check, corner_args, findings,  # noqa: E402
                              led_current, ngspice)

HERE = RULES / "sink-compliance"
VF = {"vf_min": 1.9, "vf_max": 2.4}
OHMS = {"RE": 91.0, "RT": 1000.0, "RB": 1000.0}


def test_fires_where_ngspice_also_saturates(tmp_path):
    result = check(HERE / "fires.cir")
    (finding,) = findings(result, "sink-compliance")
    assert finding.severity == "error" and finding.parts[0] == "Q1"
    q1 = result.groups[0].transistor("Q1")
    deck = at_corner((HERE / "fires.cir").read_text(),
                     **corner_args(q1.saturated_at, OHMS, VF, hfe_min=100.0))
    values = ngspice(deck, tmp_path)
    # ngspice .op at the reported corner: Vce below the 0.2 V Vce_sat, and the same current
    assert values["col"] - values["emit"] < 0.2
    assert finding.values["current_when_saturated_a"] == pytest.approx(
        led_current(values, "D1"), rel=0.02)
    # rail_min = ΣVf(max) + Ie·Re + Vce_sat (DESIGN): 4 × 2.4 V, about 1.8 V, 0.2 V
    nominal = ngspice(at_corner((HERE / "fires.cir").read_text()), tmp_path)
    assert finding.values["rail_min_needed_v"] == pytest.approx(
        4 * 2.4 + nominal["emit"] + 0.2, abs=0.3)
    assert finding.values["rail_min_v"] == pytest.approx(10.8)
    assert "it needs vled ≥" in finding.message


def test_fix_fewer_leds_fit_the_rail():
    (finding,) = findings(check(HERE / "fires.cir"), "sink-compliance")
    # three LEDs: 3 × 2.4 + 1.8 + 0.2 = 9.2 V < 10.8 V (common practice arithmetic)
    assert finding.values["fix_leds_per_string"] == 3.0
    assert "3 LEDs per string" in finding.fix
    assert f"{finding.values['rail_min_needed_v']:.3g} V" in finding.fix


def test_borderline_stays_clean(tmp_path):
    result = check(HERE / "clean.cir")
    assert findings(result, "sink-compliance") == []
    deck = at_corner((HERE / "clean.cir").read_text(), rails={"vled": 10.8},
                     bins={f"D{i}": 2.4 for i in range(1, 5)})
    values = ngspice(deck, tmp_path)
    # ngspice .op at 10.8 V with vf_max: still regulating, but with well under a volt to spare
    assert 0.2 < values["col"] - values["emit"] < 1.0
