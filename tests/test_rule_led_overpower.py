"""Rule ``led-overpower`` on its golden fixtures: ngspice power against the derated pd_max."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from rule_fixture_kit import check, corner, deck_text, ngspice_op, of_rule, shockley_is  # noqa: E402

RULE = "led-overpower"
ALLOWED = 0.075 * (150.0 - 60.0) / (150.0 - 25.0) * 0.6
"""pd_max 75 mW derated linearly from 25 °C to zero at 150 °C, at 60 °C, 60 % share
(common practice)."""


def worst_power(deck: str, ohms: float) -> float:
    """The largest I·Vf over the Vf bins at 5.25 V (5 V + 5 %) and R − 5 % (ngspice .op)."""
    powers = []
    for vf in (1.95, 2.35):
        op = ngspice_op(corner(deck_text(RULE, deck), {"V5": 5.25, "R1": ohms * 0.95},
                               shockley_is(vf)))
        current = (op["v5"] - op["a"]) / (ohms * 0.95)   # Ohm's law
        powers.append(current * op["a"])
    return max(powers)


def test_fires_with_ngspice_power_and_a_solved_fix():
    (finding,) = of_rule(check(RULE, "fires.cir"), RULE)
    assert finding.values["power_max_w"] == pytest.approx(worst_power("fires.cir", 82.0),
                                                          rel=0.02)
    assert finding.values["allowed_w"] == pytest.approx(ALLOWED, rel=1e-9)
    assert finding.severity == "error" and finding.parts == ("D1",)
    assert "above the 32.4 mW allowed" in finding.message
    # IEC 60063 E24: ... 200, 220, 240 ... The fix's value keeps ngspice's worst case within
    # the allowance; the E24 value below it does not.
    assert finding.values["fix_ohms"] == 240.0 and "make R1 240 Ω (E24)" in finding.fix
    assert worst_power("fires.cir", 240.0) <= ALLOWED < worst_power("fires.cir", 220.0)


def test_borderline_stays_clean():
    result = check(RULE, "clean.cir")
    expected = worst_power("clean.cir", 240.0)
    assert 0.9 * ALLOWED < expected < ALLOWED
    assert of_rule(result, RULE) == []


def test_no_pd_max_no_verdict(tmp_path):
    text = (Path(__file__).resolve().parent.parent / "fixtures" / "rules" / RULE /
            "ledlint.toml").read_text(encoding="utf-8")
    config = tmp_path / "ledlint.toml"
    config.write_text(text.replace('pd_max = "75 mW"\n', ""), encoding="utf-8")
    assert of_rule(check(RULE, "fires.cir", config=config), RULE) == []
