"""Rule ``led-reverse`` on its golden fixtures: the reverse voltage ngspice finds."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from rule_fixture_kit import check, corner, deck_text, ngspice_op, of_rule  # noqa: E402

RULE = "led-reverse"
VR_MAX = 3.5          # ledlint.toml


def test_fires_with_the_reverse_voltage_ngspice_finds():
    (finding,) = of_rule(check(RULE, "fires.cir"), RULE)
    op = ngspice_op(deck_text(RULE, "fires.cir"))
    reverse = op["k"] - op["0"]            # cathode above anode (on ground)
    assert reverse == pytest.approx(3.6, abs=1e-3)   # leakage drops almost nothing in 1 kΩ
    assert finding.values["reverse_v"] == pytest.approx(reverse, abs=1e-3)
    assert finding.values["vr_max_v"] == VR_MAX
    assert finding.severity == "error" and finding.parts == ("D1",)
    assert "3.6 V reverse" in finding.message and "above its 3.5 V rating" in finding.message
    assert "anode on the lower rail" in finding.message
    assert finding.fix.startswith("turn D1 round") and "anti-parallel" in finding.fix


def test_borderline_stays_clean():
    result = check(RULE, "clean.cir")
    # 3.3 V + 5 % = 3.465 V at most: ngspice at that rail.
    op = ngspice_op(corner(deck_text(RULE, "clean.cir"), {"V33": 3.465}))
    assert 3.4 < op["k"] < VR_MAX
    assert of_rule(result, RULE) == []
    (group,) = result.groups
    assert group.led("D1").reverse_v == pytest.approx(op["k"], abs=1e-3)


def test_bicolour_partner_clamps():
    # A bicolour pair between pins: the lit LED's forward voltage is its partner's reverse
    # voltage, about 2 V (common practice), far inside a 5 V rating.
    from linter.engine import CheckRequest, run_check

    demo = Path(__file__).resolve().parent.parent / "fixtures" / "demo"
    result = run_check(CheckRequest(netlist=demo / "dust_extractor_panel.cir"))
    assert [f for f in of_rule(result, RULE) if set(f.parts) & {"D5", "D6"}] == []
    (pair,) = [g for g in result.groups if "D5" in g.group.leds]
    assert 1.5 < pair.led("D6").reverse_v < 3.0
