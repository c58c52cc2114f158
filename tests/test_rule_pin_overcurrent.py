"""Rule ``pin-overcurrent`` on its golden fixtures: pin and package currents from ngspice."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from rule_fixture_kit import check, corner, deck_text, ngspice_op, of_rule, shockley_is  # noqa: E402

RULE = "pin-overcurrent"
PIN_MAX = 0.020       # ledlint.toml pin_current_max
PACKAGE_MAX = 0.050   # ledlint.toml package_current_max


def worst_currents(deck: str, **ohms: float) -> dict[str, float]:
    """Resistor currents (Ohm's law) at 5.25 V (5 V + 5 %), every resistor 5 % low, LEDs at
    vf_min 1.95 V (ngspice .op of the same deck)."""
    low = {ref: value * 0.95 for ref, value in ohms.items()}
    op = ngspice_op(corner(deck_text(RULE, deck), {"V5": 5.25, **low}, shockley_is(1.95)))
    ends = {"R1": ("pa0", "a1"), "R2": ("pa1", "a2"), "R3": ("v5", "a3")}
    return {ref: (op[ends[ref][0]] - op[ends[ref][1]]) / value for ref, value in low.items()}


def test_pin_and_package_fire_with_ngspice_currents():
    findings = of_rule(check(RULE, "fires.cir"), RULE)
    currents = worst_currents("fires.cir", R1=100.0, R2=150.0, R3=150.0)
    (pin,) = [f for f in findings if "U1.PA0" in f.message and f.parts != ("U1",)]
    assert pin.values["current_max_a"] == pytest.approx(currents["R1"], rel=0.02)
    assert pin.values["limit_a"] == PIN_MAX and pin.severity == "error"
    assert pin.parts == ("U1", "D1") and pin.nets == ("pa0",)
    # The fix's E24 value (IEC 60063: 120, 150) keeps ngspice's worst case within the pin
    # rating; the value below it does not.
    assert pin.values["fix_ohms"] == 150.0 and "make R1 150 Ω (E24)" in pin.fix
    assert worst_currents("fires.cir", R1=150.0)["R1"] <= PIN_MAX \
        < worst_currents("fires.cir", R1=120.0)["R1"]
    (package,) = [f for f in findings if f.parts == ("U1",)]
    total = sum(currents.values())     # every LED on at once
    assert package.values["current_total_a"] == pytest.approx(total, rel=0.02)
    assert "U1.PA0–U1.PA2" in package.message and "50 mA package rating" in package.message
    assert package.values["excess_a"] == pytest.approx(total - PACKAGE_MAX, rel=0.05)


def test_borderline_stays_clean():
    result = check(RULE, "clean.cir")
    current = worst_currents("clean.cir", R2=160.0)["R2"]
    assert 0.9 * PIN_MAX < current < PIN_MAX
    assert of_rule(result, RULE) == []
