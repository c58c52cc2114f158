"""Generic part figures: what ledlint assumes where part data is missing (always reported).

Every figure here is a typical value of the trade, written from memory (not from one
datasheet); :mod:`linter.parts` names each use in the part's ``assumed`` and ``note`` so that
``unknown-part`` reports it. Currents in A, voltages in V, power in W, tempco in V/K.
"""

from __future__ import annotations

import re
from typing import Iterable

from linter.records import record

__all__ = [
    "GenericLed", "GENERIC_LEDS", "UNKNOWN_COLOR_LED", "LED_TEST_CURRENT", "LED_VR_MAX",
    "RESISTOR_POWER_BY_CHIP", "AXIAL_POWER", "GENERIC_BJT", "GENERIC_MOSFET", "GENERIC_MCU",
    "color_from_texts", "chip_size", "is_axial",
]

LED_TEST_CURRENT = 0.020
"""A (from memory): the current indicator-LED datasheets quote Vf at."""

LED_VR_MAX = 5.0
"""V (from memory): the usual reverse-voltage rating of indicator LEDs."""


@record
class GenericLed:
    """Typical figures of one LED colour at 20 mA and 25 °C (from memory)."""

    name: str
    vf_typ: float
    vf_min: float
    vf_max: float
    if_max: float
    tempco: float


GENERIC_LEDS: dict[str, GenericLed] = {
    # AlInGaP / GaAsP colours: about -2 mV/K (from memory)
    "red": GenericLed("red", 2.0, 1.8, 2.4, 0.020, -0.002),
    "orange": GenericLed("orange", 2.0, 1.8, 2.4, 0.020, -0.002),
    "amber": GenericLed("amber", 2.0, 1.8, 2.4, 0.020, -0.002),
    "yellow": GenericLed("yellow", 2.0, 1.8, 2.4, 0.020, -0.002),
    "yellow-green": GenericLed("yellow-green", 2.1, 1.9, 2.5, 0.020, -0.002),
    # green spans GaP (about 2.1 V) and InGaN (about 3.0 V): the range covers both
    "green": GenericLed("green", 3.0, 2.0, 3.4, 0.020, -0.003),
    # InGaN colours: about -3 mV/K (from memory)
    "blue": GenericLed("blue", 3.1, 2.8, 3.5, 0.020, -0.003),
    "royal-blue": GenericLed("royal blue", 3.1, 2.8, 3.5, 0.020, -0.003),
    "white": GenericLed("white", 3.1, 2.8, 3.5, 0.020, -0.003),
    "uv": GenericLed("UV", 3.4, 3.1, 3.8, 0.020, -0.003),
    # GaAs infrared emitters (from memory)
    "ir": GenericLed("IR", 1.3, 1.1, 1.6, 0.050, -0.0015),
}
"""Colour → typical figures at 20 mA (from memory)."""

UNKNOWN_COLOR_LED = GenericLed("LED of unknown colour", 2.6, 1.8, 3.4, 0.020, -0.0025)
"""Where not even the colour is known: a Vf range from red (1.8 V) to blue (3.4 V), its middle
as typical, and the lowest common if_max. Wide on purpose: every result is in doubt."""

RESISTOR_POWER_BY_CHIP: dict[str, float] = {
    "0201": 0.05, "0402": 0.063, "0603": 0.1, "0805": 0.125, "1206": 0.25, "1210": 0.5,
    "2010": 0.75, "2512": 1.0,
}
"""Chip size (imperial code) → rated power in W at 70 °C (common practice, from memory)."""

AXIAL_POWER = 0.25
"""W (common practice): a leaded resistor whose rating is not given."""

GENERIC_BJT: dict[str, float] = {
    "hfe_min": 100.0, "hfe_typ": 200.0, "vbe": 0.65, "vbe_current": 0.010, "vce_sat": 0.2,
    "vce_max": 40.0, "ic_max": 0.2, "pd_max": 0.25,
}
"""A small-signal NPN or PNP in SOT-23 (from memory); magnitudes, sign by polarity."""

GENERIC_MOSFET: dict[str, dict[str, float]] = {
    "nmos": {"vgs_th": 1.5, "rds_on": 1.0, "rds_on_vgs": 4.5, "vds_max": 30.0, "id_max": 0.3,
             "pd_max": 0.3},
    "pmos": {"vgs_th": -1.5, "rds_on": 2.0, "rds_on_vgs": -4.5, "vds_max": 30.0, "id_max": 0.3,
             "pd_max": 0.3},
}
"""Small-signal MOSFETs in SOT-23 (from memory). Gate voltages of a P-MOSFET are negative,
as datasheets write them; ratings are magnitudes."""

GENERIC_MCU: dict[str, float] = {
    "pin_current_max": 0.020, "package_current_max": 0.100, "output_resistance": 25.0,
}
"""A small 8-bit microcontroller's output pins at 5 V (from memory)."""

_COLOR_PHRASES: tuple[tuple[str, str], ...] = (
    ("yellow-green", "yellow-green"), ("yellow green", "yellow-green"),
    ("royal-blue", "royal-blue"), ("royal blue", "royal-blue"),
    ("infrared", "ir"), ("ultraviolet", "uv"),
)
_COLOR_WORDS = {"red": "red", "orange": "orange", "amber": "amber", "yellow": "yellow",
                "green": "green", "blue": "blue", "white": "white", "ir": "ir", "uv": "uv"}
_CHIP = re.compile(r"(?<!\d)(0201|0402|0603|0805|1206|1210|2010|2512)(?!\d)")


def color_from_texts(texts: Iterable[str | None]) -> str | None:
    """The first LED colour named in the texts (value, part number, description…), or None.

    >>> color_from_texts(["LED_0603", "Royal Blue"]), color_from_texts(["IRF540"])
    ('royal-blue', None)
    """
    for text in texts:
        if not text:
            continue
        folded = text.casefold().replace("_", " ")
        for phrase, color in _COLOR_PHRASES:
            if phrase in folded:
                return color
        for word in re.findall(r"[a-z]+", folded):
            if word in _COLOR_WORDS:
                return _COLOR_WORDS[word]
    return None


def chip_size(package: str | None) -> str | None:
    """The imperial chip code in a package name (``R_0603_1608Metric`` → ``0603``), or None."""
    if not package:
        return None
    match = _CHIP.search(package)
    return match.group(1) if match else None


def is_axial(package: str | None) -> bool:
    """True for a leaded (through-hole) resistor package name."""
    return bool(package) and bool(re.search(r"axial|tht|through|din0207|mini-?melf", package,
                                            re.IGNORECASE))
