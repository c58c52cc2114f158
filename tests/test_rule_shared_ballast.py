"""Rule shared-ballast on its golden fixtures, checked against ngspice."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from electrical_rule_kit import RULES, at_corner, check, findings, led_current, ngspice  # noqa: E402

from linter import eseries  # noqa: E402

HERE = RULES / "shared-ballast"


def test_fires_with_the_hottest_share_ngspice_agrees_with(tmp_path):
    (finding,) = findings(check(HERE / "fires.cir"), "shared-ballast")
    assert finding.severity == "error"
    assert set(finding.parts) == {"R1", "D1", "D2", "D3"}
    text = (HERE / "fires.cir").read_text()
    # one LED at vf_min, the rest at vf_max (DESIGN), rail high, resistor low
    hot = ngspice(at_corner(text, rails={"vcc": 5.25}, resistors={"R1": 56 * 0.95},
                            bins={"D1": 1.9, "D2": 2.4, "D3": 2.4}), tmp_path)
    assert finding.values["hottest_current_max_a"] == pytest.approx(led_current(hot, "D1"),
                                                                    rel=0.01)
    assert led_current(hot, "D1") > 0.025  # ngspice: above the 25 mA maximum
    # the shared resistor's most current: every LED at vf_min (Ohm's law, ngspice .op)
    cold = ngspice(at_corner(text, rails={"vcc": 5.25}, resistors={"R1": 56 * 0.95},
                             bins={"D1": 1.9, "D2": 1.9, "D3": 1.9}), tmp_path)
    total = sum(led_current(cold, ref) for ref in ("D1", "D2", "D3"))
    assert finding.values["shared_current_max_a"] == pytest.approx(total, rel=0.01)
    nominal = ngspice(at_corner(text), tmp_path)
    assert finding.values["share_nom_a"] == pytest.approx(led_current(nominal, "D1"), rel=0.01)
    assert "D1 at vf_min, the others at vf_max" in finding.message


def test_fix_resistor_per_led_is_e24_and_keeps_each_under_the_maximum(tmp_path):
    (finding,) = findings(check(HERE / "fires.cir"), "shared-ballast")
    each = finding.values["fix_ohms"]
    assert eseries.is_standard(each, "E24")  # IEC 60063, 5 % assumed
    single = ("* one LED of the split bank\nVSUP vcc 0 DC 5\nR1 vcc a 1k\nD1 a 0 LRED\n"
              ".model LRED D(IS=1e-19 N=2.0 RS=4)\n.end\n")
    worst = ngspice(at_corner(single, rails={"vcc": 5.25}, resistors={"R1": each * 0.95},
                              bins={"D1": 1.9}), tmp_path)
    assert led_current(worst, "D1") <= 0.025  # ngspice .op: under the maximum at the worst corner
    nominal = ngspice(at_corner(single, resistors={"R1": each}), tmp_path)
    assert finding.values["fix_current_nom_a"] == pytest.approx(led_current(nominal, "D1"),
                                                                rel=0.01)
    # the intended current is the nominal share: the E24 value nearest it is no further away
    assert abs(led_current(nominal, "D1") - finding.values["share_nom_a"]) < 0.003
    assert f"3 × {each:g} Ω (E24)" in finding.fix


def test_borderline_string_and_own_resistor_stay_clean():
    assert findings(check(HERE / "clean.cir"), "shared-ballast") == []
