"""From hand-built groups to solved results (expected values: common practice, Ohm's law)."""

from __future__ import annotations

import pytest

from circuit_kit import circuit
from linter.analysis import analyse, operating_point
from linter.groups import Group, PinDrive, Scenario
from linter.partdata import Ambient, BjtData, LedData, McuData, Rail, ResistorData

GND = Rail("GND", 0.0, 0.0, 0.0)
RED = LedData(color="red", vf_typ=2.0, vf_min=1.8, vf_max=2.4, vf_test_current=0.020)
TN = BjtData("npn", hfe_min=100.0, hfe_typ=200.0, vbe=0.65, vbe_current=0.010, vce_sat=0.2)


def one_led(ohms: float, volts: float = 5.0):
    c = circuit([("R1", "resistor", {"1": "VCC", "2": "A"}, ohms),
                 ("D1", "led", {"A": "A", "K": "GND"}, None)])
    g = Group("G-D1", "resistor", ("D1",), (("D1",),), ("R1", "D1"), ("VCC", "A", "GND"),
              ("VCC", "GND"), "R1")
    rails = {"VCC": Rail("VCC", volts, volts * 0.95, volts * 1.05), "GND": GND}
    data = {"D1": RED, "R1": ResistorData(ohms, 0.01, 0.1, "0603")}
    return g, c, data, rails


def test_150_ohm_from_5v_gives_20ma() -> None:
    # common practice: (5 V − 2.0 V) / 150 Ω = 20 mA
    (result,) = analyse([one_led(150.0)[0]], *one_led(150.0)[1:])
    assert result.led("D1").current.nom == pytest.approx(0.020, rel=0.01)
    assert result.resistor("R1").power.nom == pytest.approx(0.020 ** 2 * 150, rel=0.02)


def test_180_ohm_gives_about_16_7_ma() -> None:
    # common practice: (5 V − 2.0 V) / 180 Ω ≈ 16.7 mA (Vf a little lower at the lower current)
    g, c, data, rails = one_led(180.0)
    (result,) = analyse([g], c, data, rails)
    assert result.led("D1").current.nom == pytest.approx(0.0167, rel=0.03)


def test_extremes_sit_at_the_expected_corners() -> None:
    # Ohm's law: most current at the high rail, low resistor, low Vf; least at the opposite
    g, c, data, rails = one_led(150.0)
    (result,) = analyse([g], c, data, rails, Ambient(-10.0, 60.0))
    span = result.led("D1").current
    assert span.min < span.nom < span.max
    assert span.at_max.rails["VCC"] == ("max", pytest.approx(5.25))
    assert span.at_max.vf["D1"] == "vf_min" and span.at_max.resistors["R1"] == "low"
    assert span.at_min.rails["VCC"][0] == "min" and span.at_min.vf["D1"] == "vf_max"
    assert span.at_max.ambient_c == 60.0      # Vf falls as the LED warms (negative tempco)
    assert "VCC max (5.25 V)" in span.at_max.label()
    # a resistor string passes a Vf shift into the current at about −1/R
    assert result.led("D1").di_dvf == pytest.approx(-1 / 150, rel=0.1)


def test_four_leds_on_one_resistor_sum_through_it() -> None:
    # common practice: LEDs sharing one resistor put the sum of their currents through it
    refs = ("D7", "D8", "D9", "D10")
    c = circuit([("R6", "resistor", {"1": "VCC", "2": "BAR"}, 39.0)]
                + [(r, "led", {"A": "BAR", "K": "GND"}, None) for r in refs])
    g = Group("G-D7", "parallel", refs, tuple((r,) for r in refs), ("R6", *refs),
              ("VCC", "BAR", "GND"), ("VCC", "GND"), "R6")
    data = {**{r: RED for r in refs}, "R6": ResistorData(39.0, 0.05, 0.125, "0805")}
    (result,) = analyse([g], c, data, {"VCC": Rail("VCC", 5.0, 4.75, 5.25), "GND": GND})
    total = sum(result.led(r).current.nom for r in refs)
    assert result.resistor("R6").current.nom == pytest.approx(total, rel=1e-6)
    # the largest share: that LED at vf_min, the others at vf_max
    top = result.led("D8").current.at_max
    assert top.vf["D8"] == "vf_min" and all(top.vf[r] == "vf_max" for r in refs if r != "D8")
    assert result.scheme == "vertices"     # 7 axes: every vertex of the box


def sink(rail_volts: float):
    leds = ("D11", "D12", "D13", "D14")
    nets = ("VLED", "B1", "B2", "B3", "BC")
    c = circuit([(r, "led", {"A": nets[i], "K": nets[i + 1]}, None) for i, r in enumerate(leds)]
                + [("Q1", "npn", {"C": "BC", "B": "BB", "E": "BE"}, None),
                   ("R9", "resistor", {"1": "BE", "2": "GND"}, 91.0),
                   ("R10", "resistor", {"1": "V5", "2": "BB"}, 1000.0),
                   ("R11", "resistor", {"1": "BB", "2": "GND"}, 1000.0)])
    g = Group("G-D11", "npn-sink", leds, (leds,), (*leds, "Q1", "R9", "R10", "R11"),
              (*nets, "BB", "BE", "V5", "GND"), ("VLED", "V5", "GND"), "Q1")
    data = {**{r: RED for r in leds}, "Q1": TN}
    rails = {"VLED": Rail("VLED", rail_volts, rail_volts * 0.9, rail_volts * 1.1),
             "V5": Rail("V5", 5.0, 4.75, 5.25), "GND": GND}
    return g, c, data, rails


def test_divider_and_91_ohm_set_about_20ma() -> None:
    # common practice: a base at half of 5 V puts about 1.8 V on the emitter; 91 Ω sets 19–20 mA
    g, c, data, rails = sink(12.0)
    (result,) = analyse([g], c, data, rails)
    assert 0.019 <= result.led("D11").current.nom <= 0.020
    q1 = result.transistor("Q1")
    assert q1.current.nom == pytest.approx(result.led("D14").current.nom, rel=1e-3)


def test_four_red_leds_need_about_10v_and_collapse_at_8v() -> None:
    # common practice: four red LEDs need about 8 V plus the emitter voltage plus Vce_sat
    g, c, data, rails = sink(12.0)
    (result,) = analyse([g], c, data, rails)
    q1 = result.transistor("Q1")
    assert q1.rail_min is not None and q1.rail_min >= 10.0
    assert q1.headroom_rail == "VLED"
    assert q1.rail_min_at.vf["D11"] == "vf_max"
    g8, c8, data8, rails8 = sink(8.0)
    at_8v = operating_point(g8, c8, data8, rails8)["on"]["D11"]
    assert at_8v < 0.5 * result.led("D11").current.nom
    (low,) = analyse([g8], c8, data8, rails8)
    assert low.transistor("Q1").saturated and low.transistor("Q1").current_when_saturated < 0.01


def test_pin_groups_report_pin_current_and_scenarios() -> None:
    c = circuit([("U1", "mcu", {"VDD": "V5", "VSS": "GND", "PA4": "PA", "PA5": "PB"}, None),
                 ("R5", "resistor", {"1": "PA", "2": "M"}, 220.0),
                 ("D5", "led", {"A": "M", "K": "PB"}, None),
                 ("D6", "led", {"A": "PB", "K": "M"}, None)])
    g = Group("G-D5", "pin-bicolour", ("D5", "D6"), (("D5",), ("D6",)), ("U1", "R5", "D5", "D6"),
              ("PA", "M", "PB"), (), "R5",
              (PinDrive("U1", "PA4", "PA"), PinDrive("U1", "PA5", "PB")),
              (Scenario("red", {"U1.PA4": "high", "U1.PA5": "low"}, ("D5",)),
               Scenario("green", {"U1.PA4": "low", "U1.PA5": "high"}, ("D6",))))
    data = {"D5": RED, "D6": RED, "U1": McuData(pin_current_max=0.02, output_resistance=25.0,
                                                supply_pins=("VDD",))}
    (result,) = analyse([g], c, data, {"V5": Rail("V5", 5.0, 4.75, 5.25), "GND": GND})
    d5 = result.led("D5")
    assert d5.lit_scenarios == ("red",)
    # Ohm's law: (5 V − 2.0 V) / (220 + 25 + 25) Ω ≈ 11 mA
    assert d5.current.nom == pytest.approx(3.0 / 270, rel=0.03)
    assert d5.reverse_v == pytest.approx(result.led("D6").vf.max, rel=0.05)
    pin = next(p for p in result.pins if p.id == "U1.PA4")
    assert pin.current.max == pytest.approx(result.led("D5").current.max, rel=0.01)
    doc = result.as_dict()
    assert doc["leds"][0]["current_a"].keys() == {"nom", "min", "max"}
    assert doc["pins"][0]["rating_a"] == 0.02


def test_missing_resistance_is_unsolved_not_guessed() -> None:
    c = circuit([("R1", "resistor", {"1": "VCC", "2": "A"}, None),
                 ("D1", "led", {"A": "A", "K": "GND"}, None)])
    g = one_led(150.0)[0]
    (result,) = analyse([g], c, {"D1": RED}, {"VCC": Rail("VCC", 5, 5, 5), "GND": GND})
    assert result.status == "unsolved" and "R1" in result.reason


def test_groups_of_the_same_shape_batch_and_keep_their_own_values() -> None:
    values = (150.0, 330.0, 1000.0)
    parts, groups, data = [], [], {}
    for i, ohms in enumerate(values, 1):
        parts += [(f"R{i}", "resistor", {"1": "VCC", "2": f"A{i}"}, ohms),
                  (f"D{i}", "led", {"A": f"A{i}", "K": "GND"}, None)]
        groups.append(Group(f"G-D{i}", "resistor", (f"D{i}",), ((f"D{i}",),), (f"R{i}", f"D{i}"),
                            ("VCC", f"A{i}", "GND"), ("VCC", "GND"), f"R{i}"))
        data[f"D{i}"] = RED
        data[f"R{i}"] = ResistorData(ohms, 0.01)
    results = analyse(groups, circuit(parts), data, {"VCC": Rail("VCC", 5.0, 4.75, 5.25),
                                                      "GND": GND})
    for result, ohms in zip(results, values):
        # Ohm's law with Vf near 2 V (lower at a few mA): each group keeps its own current
        assert result.leds[0].current.nom == pytest.approx(3.0 / ohms, rel=0.08)


def test_scenario_names_are_each_groups_own() -> None:
    # two bicolour LEDs on different pins: same structure, scenarios named after their own pins
    # (expected: the scenario names given to each group here)
    parts = [("U1", "mcu", {"VDD": "V5", "VSS": "GND", "PA4": "PA", "PA5": "PB",
                            "PA6": "PC", "PA7": "PD"}, None)]
    groups = []
    for n, (a, b, na, nb) in enumerate((("PA4", "PA5", "PA", "PB"), ("PA6", "PA7", "PC", "PD"))):
        r, d1, d2, m = f"R{n}", f"D{2 * n}", f"D{2 * n + 1}", f"M{n}"
        parts += [(r, "resistor", {"1": na, "2": m}, 220.0),
                  (d1, "led", {"A": m, "K": nb}, None), (d2, "led", {"A": nb, "K": m}, None)]
        up, down = f"U1.{a}", f"U1.{b}"
        groups.append(Group(
            f"G-{d1}", "pin-bicolour", (d1, d2), ((d1,), (d2,)), ("U1", r, d1, d2),
            (na, m, nb), (), r, (PinDrive("U1", a, na), PinDrive("U1", b, nb)),
            (Scenario(f"{up} high", {up: "high", down: "low"}, (d1,)),
             Scenario(f"{down} high", {up: "low", down: "high"}, (d2,)))))
    data = {**{f"D{i}": RED for i in range(4)},
            "U1": McuData(output_resistance=25.0, supply_pins=("VDD",))}
    rails = {"V5": Rail("V5", 5.0, 4.75, 5.25), "GND": GND}
    for memoise in (True, False):
        first, second = analyse(groups, circuit(parts), data, rails, memoise=memoise)
        assert first.led("D0").lit_scenarios == ("U1.PA4 high",)
        assert second.led("D2").lit_scenarios == ("U1.PA6 high",)
        assert second.led("D3").lit_scenarios == ("U1.PA7 high",)
