"""Rule string-headroom on its golden fixtures, checked against ngspice."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from electrical_rule_kit import RULES, at_corner, check, findings, led_current, ngspice  # noqa: E402

from linter import eseries  # noqa: E402

HERE = RULES / "string-headroom"
WHITE = {"D1": 3.4, "D2": 3.4, "D3": 3.4}


def _swing(text: str, ohms: float, high: dict, low: dict, tmp_path: Path) -> tuple[float, float]:
    top = ngspice(at_corner(text, rails={"vled": 13.2}, resistors={"R1": ohms * 0.95},
                            bins=high), tmp_path)
    bottom = ngspice(at_corner(text, rails={"vled": 10.8}, resistors={"R1": ohms * 1.05},
                               bins=low), tmp_path)
    return led_current(bottom, "D1"), led_current(top, "D1")


def test_fires_with_the_swing_ngspice_gives(tmp_path):
    (finding,) = findings(check(HERE / "fires.cir"), "string-headroom")
    assert finding.severity == "warning"
    assert set(finding.parts) == {"D1", "D2", "D3", "R1"}
    low, high = _swing((HERE / "fires.cir").read_text(), 150.0,
                       {r: 2.9 for r in WHITE}, WHITE, tmp_path)
    # ngspice .op at the two corners (rail and resistor extremes, Vf bins)
    assert finding.values["current_min_a"] == pytest.approx(low, rel=0.01)
    assert finding.values["current_max_a"] == pytest.approx(high, rel=0.01)
    assert finding.values["ratio"] == pytest.approx(high / low, rel=0.02)
    nominal = ngspice(at_corner((HERE / "fires.cir").read_text()), tmp_path)
    # headroom: rail − ΣVf at nominal, ΣVf from ngspice's node voltage at the string's top
    assert finding.values["headroom_nom_v"] == pytest.approx(12.0 - nominal["a"], abs=0.01)
    # dI/dVf of a resistor-fed string: −1/R per volt of string voltage, spread over three LEDs
    # moving together: −3/R (Ohm's law), minus a little for the diodes' own slope
    assert -3 / 150 < finding.values["di_dvf_a_per_v"] < -0.5 * 3 / 150


def test_sink_fix_values_follow_the_sink_formula():
    (finding,) = findings(check(HERE / "fires.cir"), "string-headroom")
    v = finding.values
    assert eseries.is_standard(v["sink_r_emitter_ohms"], "E24")  # IEC 60063, 5 %
    assert eseries.is_standard(v["sink_r_top_ohms"], "E24")
    assert v["sink_reference_v"] == 5.0  # the tightest rail of the fixture (vref, ±2 %)
    v_th = 5.0 * v["sink_r_bottom_ohms"] / (v["sink_r_top_ohms"] + v["sink_r_bottom_ohms"])
    r_th = v["sink_r_top_ohms"] * v["sink_r_bottom_ohms"] / (v["sink_r_top_ohms"]
                                                             + v["sink_r_bottom_ohms"])
    # Ic = β/(β+1)·(Vth − Vbe)/(Re + Rth/(β+1)), generic Vbe 0.7 V, β 200 (from memory)
    i_c = 200 / 201 * (v_th - 0.7) / (v["sink_r_emitter_ohms"] + r_th / 201)
    assert v["sink_current_nom_a"] == pytest.approx(i_c, rel=0.01)
    # three white LEDs at vf_max need more than the 10.8 V minimum under a sink: say so
    assert v["sink_rail_min_v"] > 10.8 and "above the 10.8 V minimum" in finding.fix
    assert v["fix_leds_per_string"] == 2.0


def test_borderline_stays_clean(tmp_path):
    assert findings(check(HERE / "clean.cir"), "string-headroom") == []
    low, high = _swing((HERE / "clean.cir").read_text(), 510.0, {"D1": 1.9}, {"D1": 2.4},
                       tmp_path)
    assert 1.4 < high / low < 1.5  # ngspice .op: just inside the 1.5× default ratio
