"""Rule ``resistor-overload`` on its golden fixtures, against ngspice and the derating curve."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from rule_fixture_kit import check, corner, deck_text, ngspice_op, of_rule, shockley_is  # noqa: E402

RULE = "resistor-overload"
AMBIENT_MAX = 85.0          # the fixtures' ledlint.toml
SHARE = 0.6                 # [derating] resistor_power default, common practice
FACTOR = (155.0 - AMBIENT_MAX) / (155.0 - 70.0)   # linear 70 °C -> 155 °C, common practice
CHIPS = [("0201", 0.050), ("0402", 0.063), ("0603", 0.100), ("0805", 0.125),
         ("1206", 0.250), ("1210", 0.500), ("2010", 0.750), ("2512", 1.000)]
"""Chip ratings at 70 °C (common practice, from memory: DESIGN.md)."""


def worst_power(deck: str, ohms: float) -> float:
    """P = V²/R across the resistor at 12.6 V (12 V + 5 %), R − 5 %, LED at vf_min 1.95 V
    (ngspice .op of the same deck at that corner)."""
    low = ohms * 0.95
    op = ngspice_op(corner(deck_text(RULE, deck), {"V12": 12.6, "R1": low},
                           shockley_is(1.95)))
    return (op["v12"] - op["a"]) ** 2 / low


def test_fires_with_ngspice_power_and_derated_rating():
    (finding,) = of_rule(check(RULE, "fires.cir", "fires_bom.csv"), RULE)
    expected = worst_power("fires.cir", 470.0)
    allowed = 0.125 * FACTOR * SHARE          # 0805 rated 125 mW in the BOM
    assert finding.values["power_max_w"] == pytest.approx(expected, rel=0.02)
    assert finding.values["allowed_w"] == pytest.approx(allowed, rel=1e-9)
    assert finding.severity == "error" and finding.parts == ("R1",)
    assert f"above the {allowed * 1e3:.3g} mW allowed" in finding.message
    assert "v12 max (12.6 V)" in finding.message and "85 °C" in finding.message
    # The smallest chip whose derated share covers the worst case (common-practice table).
    package, rating = next((p, r) for p, r in CHIPS if r * FACTOR * SHARE >= expected)
    assert f"{package}, {rating * 1e3:g} mW" in finding.fix
    assert finding.location.line == 4


def test_borderline_stays_clean():
    result = check(RULE, "clean.cir", "clean_bom.csv")
    expected = worst_power("clean.cir", 510.0)
    allowed = 0.5 * FACTOR * SHARE            # 1210 rated 500 mW in the BOM
    assert 0.9 * allowed < expected < allowed  # borderline: within 10 % of the limit
    assert of_rule(result, RULE) == []
    (group,) = result.groups
    assert group.resistor("R1").power.max == pytest.approx(expected, rel=0.02)


def test_unknown_rating_is_not_judged():
    # Without the BOM the resistor has no package or rating: nothing is guessed.
    assert of_rule(check(RULE, "fires.cir"), RULE) == []
