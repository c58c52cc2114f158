"""The corner scheme bounds the truth: 10,000 random points inside the tolerance box per
fixture never put an LED current outside the reported min–max.

Each draw puts every parameter anywhere in its range (rails, resistors, each LED's Vf,
ambient, β) uniformly; the solver is the same, so this checks the corner scheme (vertices
for few axes, sensitivity-chosen vertices for many). Expected bound: the reported span
itself (monotonic currents, from memory), with 1 nA of numerical slack.
"""

from __future__ import annotations

import numpy as np
import pytest

from circuit_kit import circuit
from linter.analysis import analyse
from linter.batchsolve import RowPlan, run
from linter.groups import Group, PinDrive, Scenario
from linter.netbuild import build_model
from linter.partdata import Ambient, BjtData, LedData, McuData, Rail, ResistorData

DRAWS = 10_000
GND = Rail("GND", 0.0, 0.0, 0.0)
V5 = Rail("V5", 5.0, 4.75, 5.25)
AMBIENT = Ambient(-10.0, 60.0)


def led(vf: float) -> LedData:
    return LedData(color="red", vf_typ=vf, vf_min=vf - 0.2, vf_max=vf + 0.4, vf_test_current=0.02)


def _parallel():
    refs = ("D7", "D8", "D9", "D10")
    parts = [("R6", "resistor", {"1": "V5", "2": "BAR"}, 39.0)] + [
        (r, "led", {"A": "BAR", "K": "GND"}, None) for r in refs]
    group = Group("G-D7", "parallel", refs, tuple((r,) for r in refs), ("R6", *refs),
                  ("V5", "BAR", "GND"), ("V5", "GND"), "R6")
    data = {**{r: led(2.0) for r in refs}, "R6": ResistorData(39.0, 0.05)}
    return group, circuit(parts), data, {"V5": V5, "GND": GND}


def _sink():
    leds = ("D11", "D12", "D13", "D14")
    nets = ("V12", "B1", "B2", "B3", "BC")
    parts = [(r, "led", {"A": nets[i], "K": nets[i + 1]}, None) for i, r in enumerate(leds)] + [
        ("Q1", "npn", {"C": "BC", "B": "BB", "E": "BE"}, None),
        ("R9", "resistor", {"1": "BE", "2": "GND"}, 91.0),
        ("R10", "resistor", {"1": "V5", "2": "BB"}, 1000.0),
        ("R11", "resistor", {"1": "BB", "2": "GND"}, 1000.0)]
    group = Group("G-D11", "npn-sink", leds, (leds,), (*leds, "Q1", "R9", "R10", "R11"),
                  (*nets, "BB", "BE", "V5", "GND"), ("V12", "V5", "GND"), "Q1")
    data = {**{r: led(2.0) for r in leds},
            "Q1": BjtData("npn", hfe_min=80.0, hfe_typ=250.0, vbe=0.65, vbe_current=0.01)}
    # a 10 V rail: at some corners the sink leaves regulation (both regimes are drawn)
    return group, circuit(parts), data, {"V12": Rail("V12", 10.0, 9.0, 11.0), "V5": V5,
                                         "GND": GND}


def _pins():
    parts = [("U1", "mcu", {"VDD": "V5", "PA4": "PA", "PA5": "PB"}, None),
             ("R5", "resistor", {"1": "PA", "2": "M"}, 220.0),
             ("D5", "led", {"A": "M", "K": "PB"}, None),
             ("D6", "led", {"A": "PB", "K": "M"}, None)]
    group = Group("G-D5", "pin-bicolour", ("D5", "D6"), (("D5",), ("D6",)),
                  ("U1", "R5", "D5", "D6"), ("PA", "M", "PB"), (), "R5",
                  (PinDrive("U1", "PA4", "PA"), PinDrive("U1", "PA5", "PB")),
                  (Scenario("red", {"U1.PA4": "high", "U1.PA5": "low"}, ("D5",)),
                   Scenario("green", {"U1.PA4": "low", "U1.PA5": "high"}, ("D6",))))
    data = {"D5": led(2.0), "D6": led(2.9), "R5": ResistorData(220.0, 0.05),
            "U1": McuData(output_resistance=25.0, supply_pins=("VDD",))}
    return group, circuit(parts), data, {"V5": V5, "GND": GND}


@pytest.mark.parametrize("fixture", [_parallel, _sink, _pins], ids=["parallel", "sink", "pins"])
def test_random_draws_stay_inside_reported_span(fixture) -> None:
    group, circ, data, rails = fixture()
    (result,) = analyse([group], circ, data, rails, AMBIENT)
    model = build_model(group, circ, data, rails)
    rng = np.random.default_rng(20240601)
    low = np.array([a.extremes[0] for a in model.axes], float)
    high = np.array([a.extremes[1] for a in model.axes], float)
    codes = (low + (high - low) * rng.random((DRAWS, len(model.axes))))[None]
    out = run([model], RowPlan(codes, np.zeros(DRAWS), np.zeros(DRAWS, bool)), AMBIENT)
    assert out["converged"].all()
    for i, ref in enumerate(r for r in group.leds):
        span = result.led(ref).current
        lit = model.lit[:, i]
        drawn = out["led_i"][0][lit][..., i]
        slack = 1e-9 + 1e-9 * abs(span.max)
        assert drawn.min() >= span.min - slack, ref
        assert drawn.max() <= span.max + slack, ref
        # the draws do explore the box: they reach well into the reported range
        assert drawn.max() - drawn.min() > 0.5 * (span.max - span.min), ref


def test_sink_fixture_uses_the_sensitivity_scheme() -> None:
    group, circ, data, rails = _sink()
    (result,) = analyse([group], circ, data, rails, AMBIENT)
    assert result.scheme == "sensitivity"
    assert result.transistor("Q1").saturated
