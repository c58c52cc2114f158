"""Oracle: LED currents from ngspice's DC operating point of the decks in fixtures/solve/.

Each deck carries SPICE .model cards (invented figures); the same figures go into the part
data given to the analysis, so both sides solve the same equations (Shockley diode with RS,
Ebers–Moll transport BJT, level-1 MOSFET). ngspice runs at TEMP = TNOM = 25 °C.
Expected values come from ngspice itself (run here, never pasted); the agreement asked is
1 % or 10 µA at nominal, 2 % at the corner (every rail at its minimum, every LED at vf_max:
the deck's IS shifted by the Shockley equation so that each LED passes through vf_max at
its test current). A missing ngspice is a failure, not a skip.
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path

import pytest
from scipy import constants

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from circuit_kit import circuit  # noqa: E402
from linter.analysis import operating_point
from linter.groups import Group, PinDrive, Scenario
from linter.partdata import BjtData, LedData, McuData, Rail

pytestmark = pytest.mark.oracle

DECKS = Path(__file__).resolve().parents[2] / "fixtures" / "solve"
GND = Rail("0", 0.0, 0.0, 0.0)
TEST_CURRENT = 0.020
MODELS = {  # name: (IS, N, RS, vf_max at 20 mA) — the decks' cards; vf_max invented
    "LRED": (1e-19, 2.0, 4.0, 2.4), "LWHT": (1e-17, 3.2, 8.0, 3.4),
    "LYLA": (3e-19, 2.0, 5.0, 2.3), "LYLB": (1e-19, 2.0, 5.0, 2.4),
    "LGRN": (1e-18, 3.0, 8.0, 3.4), "LBLU": (5e-18, 3.0, 10.0, 3.5),
}
NPN = BjtData("npn", hfe_min=100.0, hfe_typ=200.0, vce_sat=0.2, spice_is=2e-14, spice_bf=200.0,
              spice_br=2.0)
PNP = BjtData("pnp", hfe_min=80.0, hfe_typ=150.0, vce_sat=0.2, spice_is=2e-14, spice_bf=150.0,
              spice_br=2.0)
MCU = McuData(output_resistance=25.0, supply_pins=("VDD",))


def led(model: str) -> LedData:
    i_s, n, rs, vf_max = MODELS[model]
    return LedData(color="red", spice_is=i_s, ideality=n, rs=rs, vf_max=vf_max,
                   vf_test_current=TEST_CURRENT)


def rail(name: str, nom: float, tol: float) -> Rail:
    return Rail(name, nom, nom * (1 - tol), nom * (1 + tol))


@dataclass
class Case:
    deck: str
    parts: list
    group: Group
    data: dict
    rails: dict
    models: dict            # LED ref -> model name
    scenario: str = "on"


def _grp(gid, topology, leds, strings, parts, nets, rails, setter=None, pins=(), scenarios=None):
    return Group(gid, topology, leds, strings, parts, nets, rails, setter, pins,
                 scenarios or (Scenario("on"),))


def _cases() -> list[Case]:
    v5, v12 = rail("v5", 5.0, 0.05), rail("v12", 12.0, 0.10)
    mcu = ("U1", "mcu", {"VDD": "v5", "VSS": "0"}, None)
    cases = [
        Case("resistor", [("R1", "resistor", {"1": "v5", "2": "a"}, 150.0),
                          ("D1", "led", {"A": "a", "K": "0"}, None)],
             _grp("G-D1", "resistor", ("D1",), (("D1",),), ("R1", "D1"), ("v5", "a", "0"),
                  ("v5", "0"), "R1"), {"D1": led("LRED")}, {"v5": v5, "0": GND}, {"D1": "LRED"}),
        Case("string", [("R13", "resistor", {"1": "v12", "2": "l1"}, 150.0),
                        ("D16", "led", {"A": "l1", "K": "l2"}, None),
                        ("D17", "led", {"A": "l2", "K": "l3"}, None),
                        ("D18", "led", {"A": "l3", "K": "0"}, None)],
             _grp("G-D16", "string", ("D16", "D17", "D18"), (("D16", "D17", "D18"),),
                  ("R13", "D16", "D17", "D18"), ("v12", "l1", "l2", "l3", "0"), ("v12", "0"),
                  "R13"), {r: led("LWHT") for r in ("D16", "D17", "D18")},
             {"v12": v12, "0": GND}, {r: "LWHT" for r in ("D16", "D17", "D18")}),
        Case("low_current", [("R40", "resistor", {"1": "v5", "2": "lo"}, 6200.0),
                             ("D40", "led", {"A": "lo", "K": "0"}, None)],
             _grp("G-D40", "resistor", ("D40",), (("D40",),), ("R40", "D40"), ("v5", "lo", "0"),
                  ("v5", "0"), "R40"), {"D40": led("LRED")}, {"v5": v5, "0": GND},
             {"D40": "LRED"}),
    ]
    bar = {"D7": "LYLA", "D8": "LYLB", "D9": "LYLA", "D10": "LYLB"}
    cases.append(Case(
        "parallel", [("R6", "resistor", {"1": "v5", "2": "bar"}, 39.0)]
        + [(r, "led", {"A": "bar", "K": "0"}, None) for r in bar],
        _grp("G-D7", "parallel", tuple(bar), tuple((r,) for r in bar), ("R6", *bar),
             ("v5", "bar", "0"), ("v5", "0"), "R6"),
        {r: led(m) for r, m in bar.items()}, {"v5": v5, "0": GND}, bar))
    for deck, nom in (("npn_sink", 12.0), ("npn_sink_low_rail", 9.0)):
        leds = ("D11", "D12", "D13", "D14")
        nets = ("v12", "bag1", "bag2", "bag3", "bagc")
        cases.append(Case(
            deck, [(r, "led", {"A": nets[i], "K": nets[i + 1]}, None) for i, r in enumerate(leds)]
            + [("Q1", "npn", {"C": "bagc", "B": "bagb", "E": "bage"}, None),
               ("R9", "resistor", {"1": "bage", "2": "0"}, 91.0),
               ("R10", "resistor", {"1": "v5", "2": "bagb"}, 1000.0),
               ("R11", "resistor", {"1": "bagb", "2": "0"}, 1000.0)],
            _grp("G-D11", "npn-sink", leds, (leds,), (*leds, "Q1", "R9", "R10", "R11"),
                 (*nets, "bagb", "bage", "v5", "0"), ("v12", "v5", "0"), "Q1"),
            {**{r: led("LRED") for r in leds}, "Q1": NPN},
            {"v12": rail("v12", nom, 0.10), "v5": v5, "0": GND}, {r: "LRED" for r in leds}))
    cases.append(Case(
        "pnp_source", [("R20", "resistor", {"1": "v12", "2": "pe"}, 100.0),
                       ("Q4", "pnp", {"C": "pc", "B": "pb", "E": "pe"}, None),
                       ("R21", "resistor", {"1": "v12", "2": "pb"}, 2200.0),
                       ("R22", "resistor", {"1": "pb", "2": "0"}, 10000.0),
                       ("D20", "led", {"A": "pc", "K": "g1"}, None),
                       ("D21", "led", {"A": "g1", "K": "0"}, None)],
        _grp("G-D20", "pnp-source", ("D20", "D21"), (("D20", "D21"),),
             ("R20", "Q4", "R21", "R22", "D20", "D21"), ("v12", "pe", "pb", "pc", "g1", "0"),
             ("v12", "0"), "Q4"),
        {"D20": led("LGRN"), "D21": led("LGRN"), "Q4": PNP}, {"v12": v12, "0": GND},
        {"D20": "LGRN", "D21": "LGRN"}))
    cases += _pin_cases(v5, mcu)
    return cases


def _pin_cases(v5: Rail, mcu: tuple) -> list[Case]:
    rails = {"v5": v5, "0": GND}
    u1 = lambda **pins: ("U1", "mcu", {**mcu[2], **pins}, None)  # noqa: E731
    return [
        Case("nmos_switch", [u1(PA6="en"), ("R7", "resistor", {"1": "en", "2": "gate"}, 100.0),
                             ("R8", "resistor", {"1": "gate", "2": "0"}, 100e3),
                             ("R30", "resistor", {"1": "v5", "2": "la"}, 100.0),
                             ("D30", "led", {"A": "la", "K": "ld"}, None),
                             ("M2", "nmos", {"D": "ld", "G": "gate", "S": "0"}, None,
                              {"VTO": 1.6, "KP": 0.4})],
             _grp("G-D30", "low-side-switch", ("D30",), (("D30",),),
                  ("U1", "R7", "R8", "R30", "D30", "M2"), ("en", "gate", "v5", "la", "ld", "0"),
                  ("v5", "0"), "R30", (PinDrive("U1", "PA6", "en"),),
                  (Scenario("on", {"U1.PA6": "high"}, ("D30",)),)),
             {"D30": led("LRED"), "U1": MCU}, rails, {"D30": "LRED"}),
        Case("pin_source", [u1(PA0="run"), ("R1", "resistor", {"1": "run", "2": "runa"}, 330.0),
                            ("D1", "led", {"A": "runa", "K": "0"}, None)],
             _grp("G-D1", "pin-source", ("D1",), (("D1",),), ("U1", "R1", "D1"),
                  ("run", "runa", "0"), ("0",), "R1", (PinDrive("U1", "PA0", "run"),),
                  (Scenario("on", {"U1.PA0": "high"}, ("D1",)),)),
             {"D1": led("LGRN"), "U1": MCU}, rails, {"D1": "LGRN"}),
        Case("pin_sink", [u1(PA3="remk"), ("R4", "resistor", {"1": "v5", "2": "rema"}, 100.0),
                          ("D4", "led", {"A": "rema", "K": "remk"}, None)],
             _grp("G-D4", "pin-sink", ("D4",), (("D4",),), ("U1", "R4", "D4"),
                  ("v5", "rema", "remk"), ("v5",), "R4", (PinDrive("U1", "PA3", "remk"),),
                  (Scenario("on", {"U1.PA3": "low"}, ("D4",)),)),
             {"D4": led("LBLU"), "U1": MCU}, rails, {"D4": "LBLU"}),
        Case("bicolour", [u1(PA4="bia", PA5="bib"),
                          ("R5", "resistor", {"1": "bia", "2": "bim"}, 220.0),
                          ("D5", "led", {"A": "bim", "K": "bib"}, None),
                          ("D6", "led", {"A": "bib", "K": "bim"}, None)],
             _grp("G-D5", "pin-bicolour", ("D5", "D6"), (("D5",), ("D6",)),
                  ("U1", "R5", "D5", "D6"), ("bia", "bim", "bib"), (), "R5",
                  (PinDrive("U1", "PA4", "bia"), PinDrive("U1", "PA5", "bib")),
                  (Scenario("red", {"U1.PA4": "high", "U1.PA5": "low"}, ("D5",)),
                   Scenario("green", {"U1.PA4": "low", "U1.PA5": "high"}, ("D6",)))),
             {"D5": led("LRED"), "D6": led("LGRN"), "U1": MCU}, rails,
             {"D5": "LRED", "D6": "LGRN"}, scenario="red"),
    ]


CASES = _cases()


def run_ngspice(text: str, tmp_path: Path) -> dict[str, float]:
    """Every ``name = value`` line of ``print all`` after ``op``."""
    ngspice = shutil.which("ngspice")
    assert ngspice is not None, "ngspice is required for the oracle tests (apt install ngspice)"
    deck = tmp_path / "deck.cir"
    deck.write_text(text)
    done = subprocess.run([ngspice, "-b", str(deck)], capture_output=True, text=True, timeout=60)
    # batch mode with a .control block exits 1 ("no simulations run" outside it): judge by output
    values = {m.group(1): float(m.group(2)) for m in
              re.finditer(r"^(\S+) = (\S+)$", done.stdout, re.MULTILINE)}
    assert values and "error" not in done.stderr.lower(), done.stderr
    return values


def corner_deck(text: str, case: Case) -> str:
    """Every rail source at its minimum; each LED model's IS moved to hit vf_max at 20 mA
    (Shockley: IS = I / (exp((Vf − I·RS)/(N·Vt)) − 1), Vt = k·T/q at 25 °C, scipy.constants)."""
    vt = constants.k * (25.0 + constants.zero_Celsius) / constants.e

    def rail_min(match: re.Match) -> str:
        rail_ = case.rails.get(match.group(2))
        return match.group(0) if rail_ is None else f"{match.group(1)} {match.group(2)} 0 DC {rail_.min}"

    text = re.sub(r"^(V\w+) (\S+) 0 DC (\S+)$", rail_min, text, flags=re.MULTILINE)
    for name in set(case.models.values()):
        i_s, n, rs, vf_max = MODELS[name]
        shifted = TEST_CURRENT / math.expm1((vf_max - TEST_CURRENT * rs) / (n * vt))
        text = re.sub(rf"(\.model {name} D\(IS=)\S+?( )", rf"\g<1>{shifted:.6e}\2", text)
    return text


def ours(case: Case, levels: dict | None = None) -> dict[str, float]:
    got = operating_point(case.group, circuit(case.parts), case.data, case.rails, levels=levels)
    return got[case.scenario]


@pytest.mark.parametrize("case", CASES, ids=[c.deck for c in CASES])
def test_nominal_led_currents_agree_with_ngspice(case: Case, tmp_path: Path) -> None:
    spice = run_ngspice((DECKS / f"{case.deck}.cir").read_text(), tmp_path)
    mine = ours(case)
    for ref in case.models:
        expected = spice[f"vam_{ref.lower()}#branch"]          # ngspice .op
        assert mine[ref] == pytest.approx(expected, rel=0.01, abs=10e-6), ref


@pytest.mark.parametrize("case", CASES, ids=[c.deck for c in CASES])
def test_corner_led_currents_agree_with_ngspice(case: Case, tmp_path: Path) -> None:
    text = corner_deck((DECKS / f"{case.deck}.cir").read_text(), case)
    spice = run_ngspice(text, tmp_path)
    levels = {("rail", name): -1 for name, r in case.rails.items() if r.min < r.max}
    levels.update({("vf", ref): 1 for ref in case.models})
    mine = ours(case, levels)
    for ref in case.models:
        expected = spice[f"vam_{ref.lower()}#branch"]          # ngspice .op, corner deck
        assert mine[ref] == pytest.approx(expected, rel=0.02, abs=10e-6), ref


def test_corner_deck_really_moves_the_operating_point(tmp_path: Path) -> None:
    case = next(c for c in CASES if c.deck == "resistor")
    text = (DECKS / "resistor.cir").read_text()
    nominal = run_ngspice(text, tmp_path)["vam_d1#branch"]
    corner = run_ngspice(corner_deck(text, case), tmp_path)["vam_d1#branch"]
    # rail 5 % low and Vf at its maximum must lower the current (Ohm's law)
    assert corner < 0.95 * nominal
