"""Rule ``transistor-overload`` on its golden fixtures: ngspice dissipation, derated pd_max."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from rule_fixture_kit import check, deck_text, ngspice_op, of_rule  # noqa: E402

RULE = "transistor-overload"
ALLOWED = 0.25 * (150.0 - 50.0) / (150.0 - 25.0) * 0.6
"""pd_max 250 mW derated linearly from 25 °C to zero at 150 °C, at 50 °C, 60 % share
(common practice)."""


def q1_power(text: str, collector: str = "c") -> float:
    """Ic·Vce + Ib·Vbe of Q1 from ngspice's .op: Ie = Ve/R9 (91 Ω), Ib from the 1k/1k
    divider by Kirchhoff's current law, Ic = Ie − Ib."""
    op = ngspice_op(text)
    ie = op["e"] / 91.0
    ib = (op["v5"] - op["b"]) / 1000.0 - op["b"] / 1000.0
    ic = ie - ib
    return ic * (op[collector] - op["e"]) + ib * (op["b"] - op["e"])


def test_fires_with_ngspice_dissipation():
    (finding,) = of_rule(check(RULE, "fires.cir"), RULE)
    assert finding.values["power_nom_w"] == pytest.approx(q1_power(deck_text(RULE, "fires.cir")),
                                                          rel=0.02)
    assert finding.values["allowed_w"] == pytest.approx(ALLOWED, rel=1e-9)
    assert finding.values["power_max_w"] > finding.values["power_nom_w"] > ALLOWED
    assert finding.severity == "error" and finding.parts == ("Q1",)
    assert "above the 120 mW allowed (pd_max 250 mW derated to 50 °C" in finding.message
    # pd_max a replacement needs: P_max / (derating factor · share).
    assert finding.values["fix_pd_max_w"] == pytest.approx(
        finding.values["power_max_w"] / (0.8 * 0.6), rel=1e-9)


def test_collector_resistor_fix_brings_ngspice_dissipation_down():
    (finding,) = of_rule(check(RULE, "fires.cir"), RULE)
    ohms = finding.values["fix_collector_ohms"]
    # IEC 60063 E24 mantissas.
    e24 = [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3,
           4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1]
    assert any(abs(ohms - m * 100.0) < 1e-9 for m in e24)
    assert f"put {ohms:g} Ω (E24) in series with the collector of Q1" in finding.fix
    deck = deck_text(RULE, "fires.cir").replace("Q1 c b e QN", f"RFIX c cq {ohms!r}\nQ1 cq b e QN")
    assert q1_power(deck, "cq") < ALLOWED          # ngspice, nominal corner, with the resistor in


def test_borderline_stays_clean():
    result = check(RULE, "clean.cir")
    assert of_rule(result, RULE) == []
    (group,) = result.groups
    q1 = group.transistor("Q1")
    assert q1.power.nom == pytest.approx(q1_power(deck_text(RULE, "clean.cir")), rel=0.02)
    assert 0.5 * ALLOWED < q1.power.max < ALLOWED
