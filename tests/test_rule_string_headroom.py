"""Rule string-headroom on its golden fixtures, checked against ngspice."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from electrical_rule_kit import RULES, at_corner, check, findings, led_current, ngspice  # noqa: E402


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


def test_no_sink_is_offered_where_the_sink_equations_rule_one_out():
    (finding,) = findings(check(HERE / "fires.cir"), "string-headroom")
    v = finding.values
    assert finding.fix.startswith("no NPN sink from vref within the search holds 1.5× "
                                  "(the closest swings ")
    assert not any(k.startswith("sink_r_") for k in v)
    # At vled min with vf_max only 0.375 V is left under the string, less than Vce_sat
    # (0.2 V, generic) plus the 0.5 V emitter floor: the search cannot lift the emitter
    # above 0.5 V, so the base sits at Vb = 0.5 + 0.7 = 1.2 V (E24 divider within 3 %).
    # Sink equation Ie = (Vb − Vbe)/Re: with vref ±2 % and Vbe 0.7 ± 0.1 V (generic, from
    # memory) Imax/Imin ≥ (Vb·1.02 − 0.6)/(Vb·0.98 − 0.8) even before the resistors'
    # tolerances, which only widen it.
    assert v["headroom_min_v"] - 0.2 < 0.5
    bound = min((vb * 1.02 - 0.6) / (vb * 0.98 - 0.8) for vb in (1.2 * 0.97, 1.2 * 1.03))
    assert bound > 1.5
    assert v["sink_best_ratio"] >= bound
    # three white LEDs at vf_max leave no room for a sink at the 10.8 V minimum: fewer do
    assert v["fix_leds_per_string"] == 2.0


def test_offered_sink_swings_within_the_limit_by_the_sink_equations():
    from linter.engine import CheckRequest, run_check

    demo = HERE.parent.parent / "demo"
    result = run_check(CheckRequest(netlist=demo / "dust_extractor_panel.edif",
                                    bom=demo / "bom.csv"))
    (finding,) = [f for f in findings(result, "string-headroom") if "R12" in f.parts]
    v = finding.values
    assert finding.fix.startswith("replace R12 by an NPN sink below the string")
    assert "(E24)" in finding.fix  # R12 is 5 %: the E24 series (IEC 60063)
    top, bottom, r_e = v["sink_r_top_ohms"], v["sink_r_bottom_ohms"], v["sink_r_emitter_ohms"]
    assert v["sink_reference_v"] == 5.0  # +5V, ±5 % in the demo's settings
    # Sink equations: Vb the divider's Thevenin voltage, Ie = (Vb − Vbe)/(Re + Rth/(β + 1)),
    # Ic = β/(β + 1)·Ie; highest current with the reference, Rb high and Rt, Re low, Vbe
    # 0.6 V and β unbounded; lowest the other way with β = hfe_min 100 (generic figures
    # from memory: Vbe 0.7 ± 0.1 V).
    t, ref = 0.05, 0.05
    vb_high = 5.0 * (1 + ref) * bottom * (1 + t) / (top * (1 - t) + bottom * (1 + t))
    i_high = (vb_high - 0.6) / (r_e * (1 - t))
    low_top, low_bottom = top * (1 + t), bottom * (1 - t)
    vb_low = 5.0 * (1 - ref) * low_bottom / (low_top + low_bottom)
    rth_low = low_top * low_bottom / (low_top + low_bottom)
    i_low = 100 / 101 * (vb_low - 0.8) / (r_e * (1 + t) + rth_low / 101)
    assert i_high / i_low <= 1.5
    assert v["sink_current_max_a"] == pytest.approx(i_high, rel=1e-9)
    assert v["sink_current_min_a"] == pytest.approx(i_low, rel=1e-9)
    assert v["sink_rail_min_v"] <= 10.8  # it regulates at the +12V minimum


def test_borderline_stays_clean(tmp_path):
    assert findings(check(HERE / "clean.cir"), "string-headroom") == []
    low, high = _swing((HERE / "clean.cir").read_text(), 510.0, {"D1": 1.9}, {"D1": 2.4},
                       tmp_path)
    assert 1.4 < high / low < 1.5  # ngspice .op: just inside the 1.5× default ratio
