"""Rule led-undercurrent on its golden fixtures, checked against ngspice at the same corner."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from electrical_rule_kit import RULES, at_corner, check, findings, led_current, ngspice  # noqa: E402

HERE = RULES / "led-undercurrent"


def test_fires_at_the_low_rail_with_vf_max(tmp_path):
    (finding,) = findings(check(HERE / "fires.cir"), "led-undercurrent")
    assert finding.severity == "warning" and set(finding.parts) == {"D1", "D2", "D3"}
    deck = at_corner((HERE / "fires.cir").read_text(), rails={"vled": 8.1},
                     resistors={"R1": 105.0}, bins={"D1": 3.4, "D2": 3.4, "D3": 3.4})
    expected = led_current(ngspice(deck, tmp_path), "D3")
    # ngspice .op: 8.1 V is about the string's forward voltage at vf_max (3 × 3.4 V at 20 mA)
    assert expected < 0.5e-3
    assert finding.values["current_min_a"] == pytest.approx(expected, rel=0.02, abs=1e-6)
    assert "below the 500 µA visible floor at vled min (8.1 V), LEDs at vf_max" in finding.message


def test_rail_fix_lights_the_string_at_the_floor(tmp_path):
    (finding,) = findings(check(HERE / "fires.cir"), "led-undercurrent")
    needed = finding.values["fix_rail_min_v"]
    assert 8.1 < needed < 9.9
    text = (HERE / "fires.cir").read_text()
    bins = {"D1": 3.4, "D2": 3.4, "D3": 3.4}
    at_fix = led_current(ngspice(at_corner(text, rails={"vled": needed}, resistors={"R1": 105.0},
                                           bins=bins), tmp_path), "D3")
    # ngspice .op at the proposed rail minimum: the floor, within the search's resolution
    assert at_fix == pytest.approx(0.5e-3, rel=0.02)
    assert "keep vled at or above" in finding.fix


def test_dark_at_nominal_is_an_error(tmp_path):
    config = tmp_path / "ledlint.toml"
    config.write_text((HERE / "ledlint.toml").read_text()
                      + '\n[rules.led-undercurrent]\nvisible_floor = "6 mA"\n')
    (finding,) = findings(check(HERE / "fires.cir", config), "led-undercurrent")
    nominal = led_current(ngspice(at_corner((HERE / "fires.cir").read_text()), tmp_path), "D3")
    # ngspice .op at nominal: about 5 mA, under a 6 mA floor
    assert nominal < 0.006
    assert finding.severity == "error" and "the nominal corner" in finding.message
    assert finding.values["current_nom_a"] == pytest.approx(nominal, rel=0.01)


def test_borderline_stays_clean(tmp_path):
    assert findings(check(HERE / "clean.cir"), "led-undercurrent") == []
    deck = at_corner((HERE / "clean.cir").read_text(), rails={"vled": 8.1},
                     resistors={"R1": 3300 * 1.05}, bins={"D1": 3.4, "D2": 3.4})
    # ngspice .op at the darkest corner: just over the 0.5 mA floor
    assert 0.5e-3 < led_current(ngspice(deck, tmp_path), "D1") < 1e-3
