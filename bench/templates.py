"""Channel templates: the small LED circuits the synthetic board is built from.

A template is one LED group (or one filler part) as a tiny schematic sheet: leaf parts named
``R1``, ``D1``, ``Q1``, ``C1`` whose pins join local nets. Local nets named in
:data:`PORTS` are the sheet's ports (``VIN`` the supply rail, ``V5`` the +5 V rail, ``GND``,
``DRV`` a microcontroller pin); the others (``N1``, ``NB``…) stay inside the sheet.

Values are chosen from a :class:`random.Random` so that each seed gives a different but
sensible board: currents of a few to 20 mA, resistors snapped to the E24 series
(IEC 60063), resistor packages with about three times the nominal dissipation as rating.
All part numbers and figures are invented.
"""

from __future__ import annotations

import math
import random
from dataclasses import dataclass
from typing import Literal

__all__ = [
    "PORTS", "RAILS", "LedType", "LED_TYPES", "NPN", "NMOS", "MCU", "LeafPart", "Template",
    "make_templates", "nearest_e24", "rkm",
]

PORTS = ("VIN", "V5", "GND", "DRV")
"""Local net names that are sheet ports; every other local net is internal."""

RAILS: dict[str, float] = {"+12V": 12.0, "+5V": 5.0}
"""Supply rails of the synthetic board and their nominal voltages (V); ground is ``GND``."""

E24 = (10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75,
       82, 91)
"""The E24 series of preferred values, IEC 60063."""

PIN_RESISTANCE = 25.0
"""Output resistance of the invented microcontroller's pins (Ω), as in the demo board."""

_PACKAGES = (("0402", 0.063), ("0603", 0.100), ("0805", 0.125), ("1206", 0.250),
             ("2010", 0.750))
"""Chip resistor sizes and ratings (W), common practice."""


@dataclass(frozen=True)
class LedType:
    """An invented LED part: colour word (the netlist value), part number, Vf figures (V)."""

    color: str
    part_number: str
    package: str
    vf_min: float
    vf_typ: float
    vf_max: float
    spice_n: float
    spice_rs: float
    tempco_mv: float


LED_TYPES: tuple[LedType, ...] = (
    LedType("RED", "LB0603RD", "0603", 1.8, 2.0, 2.4, 2.0, 5.0, -2.0),
    LedType("YELLOW", "LB0603YE", "0603", 1.9, 2.1, 2.5, 2.0, 5.0, -2.0),
    LedType("GREEN", "LB0603GN", "0603", 2.0, 2.2, 2.6, 2.0, 5.0, -2.0),
    LedType("BLUE", "LB0603BL", "0603", 2.8, 3.0, 3.4, 3.0, 8.0, -3.0),
    LedType("WHITE", "LB0805WH", "0805", 2.8, 3.0, 3.4, 3.0, 8.0, -3.0),
)
"""Invented LEDs; Vf at 20 mA and its temperature coefficient (mV/K), figures of the usual
size for these colours (from memory)."""

NPN = "BN45"
"""Part number of the invented NPN transistor (also its SPICE model name)."""
NMOS = "BF30"
"""Part number of the invented N-MOSFET (also its SPICE model name)."""
MCU = "BM32"
"""Part number of the invented microcontroller (also its EDIF cell and SPICE subcircuit)."""

Kind = Literal["resistor", "parallel", "string", "npn-sink", "low-side-switch", "pin-source",
               "pin-sink", "decoupling"]


@dataclass(frozen=True)
class LeafPart:
    """One part of a template: leaf name, library cell, values and ``(pin, local net)`` pairs."""

    name: str
    cell: str
    value: str
    pins: tuple[tuple[str, str], ...]
    part_number: str | None = None
    package: str | None = None
    power: str | None = None
    tolerance: str | None = None
    spice_value: str | None = None

    @property
    def prefix(self) -> str:
        """The reference letters (``R`` of ``R2``)."""
        return self.name.rstrip("0123456789")


@dataclass(frozen=True)
class Template:
    """A channel sheet: its kind (a topology name of :mod:`linter.groups`, or ``decoupling``).

    ``rails`` maps the ports ``VIN`` / ``V5`` / ``GND`` to board nets; ``drive`` is the pin
    level the sheet needs on ``DRV`` (``high``, ``low``) or None when it has no ``DRV`` port.
    """

    name: str
    kind: Kind
    parts: tuple[LeafPart, ...]
    rails: tuple[tuple[str, str], ...]
    drive: Literal["high", "low"] | None = None

    @property
    def leds(self) -> int:
        """Number of LEDs in the sheet."""
        return sum(1 for part in self.parts if part.cell == "LED")

    @property
    def ports(self) -> tuple[str, ...]:
        """The sheet's ports in :data:`PORTS` order."""
        used = {net for part in self.parts for _, net in part.pins}
        return tuple(port for port in PORTS if port in used)


def nearest_e24(ohms: float) -> float:
    """The E24 value (IEC 60063) nearest to ``ohms`` on a logarithmic scale (Ω)."""
    decade = 10.0 ** math.floor(math.log10(ohms))
    candidates = [value * decade / 10 for value in E24] + [10 * decade]
    return min(candidates, key=lambda c: abs(math.log(c / ohms)))


def rkm(value: float, unit: str = "") -> str:
    """IEC 60062 letter-and-numeral code: 4700 → ``4k7``, 330 → ``330``, 1e-7 F → ``100n``."""
    for scale, letter in ((1e6, "M"), (1e3, "k"), (1.0, unit or ""), (1e-6, "u"), (1e-9, "n")):
        if value >= scale * 0.999:
            number = round(value / scale, 3)
            whole = int(number)
            fraction = round((number - whole) * 10)
            if fraction and letter:
                return f"{whole}{letter}{fraction}"
            return f"{number:g}{letter}"
    return f"{value:g}"


def spice_number(value: float) -> str:
    """A SPICE value with a scale ngspice reads unambiguously (4700 → ``4.7k``, 1e6 → ``1meg``)."""
    for scale, letter in ((1e6, "meg"), (1e3, "k"), (1.0, ""), (1e-6, "u"), (1e-9, "n")):
        if value >= scale * 0.999:
            return f"{round(value / scale, 3):g}{letter}"
    return f"{value:g}"


def _resistor(name: str, ohms: float, current: float, a: str, b: str, tol: str = "5%") -> LeafPart:
    """A chip resistor sized so its rating is at least three times I²·R (W)."""
    watts = current * current * ohms
    package, rating = next(((p, r) for p, r in _PACKAGES if r >= 3 * watts), _PACKAGES[-1])
    return LeafPart(name, "RES", rkm(ohms), (("1", a), ("2", b)), package=package,
                    power=f"{rating:g}W", tolerance=tol, spice_value=spice_number(ohms))


def _led(name: str, led: LedType, anode: str, cathode: str) -> LeafPart:
    return LeafPart(name, "LED", led.color, (("A", anode), ("K", cathode)),
                    part_number=led.part_number, package=led.package)


def _chain(first: int, leds: list[LedType], top: str, bottom: str) -> list[LeafPart]:
    """LEDs in series from net ``top`` to net ``bottom``, joined by nets ``N2``, ``N3``…"""
    nets = [top] + [f"N{i + 2}" for i in range(len(leds) - 1)] + [bottom]
    return [_led(f"D{first + i}", led, nets[i], nets[i + 1]) for i, led in enumerate(leds)]


def _fitting(rng: random.Random, count: int, volts: float) -> LedType:
    """An LED type of which ``count`` in series use at most 70 % of ``volts`` (typical Vf)."""
    choices = [led for led in LED_TYPES if count * led.vf_typ <= 0.7 * volts]
    return rng.choice(choices)


def _ballast(rng: random.Random, drop: float, current: float) -> float:
    return nearest_e24(max(drop, 0.1) / current)


def _resistor_led(rng: random.Random, name: str) -> Template:
    rail = rng.choice(tuple(RAILS))
    led = _fitting(rng, 1, RAILS[rail])
    current = rng.choice((0.005, 0.010, 0.015, 0.020))
    ohms = _ballast(rng, RAILS[rail] - led.vf_typ, current)
    parts = (_resistor("R1", ohms, current, "VIN", "N1"), _led("D1", led, "N1", "GND"))
    return Template(name, "resistor", parts, (("VIN", rail), ("GND", "GND")))


def _parallel(rng: random.Random, name: str) -> Template:
    rail = rng.choice(tuple(RAILS))
    led = _fitting(rng, 1, RAILS[rail])
    count = rng.randint(2, 4)
    current = rng.choice((0.005, 0.010, 0.015))
    ohms = _ballast(rng, RAILS[rail] - led.vf_typ, count * current)
    parts = [_resistor("R1", ohms, count * current, "VIN", "N1")]
    parts += [_led(f"D{i + 1}", led, "N1", "GND") for i in range(count)]
    return Template(name, "parallel", tuple(parts), (("VIN", rail), ("GND", "GND")))


def _string(rng: random.Random, name: str) -> Template:
    count = rng.randint(2, 4)
    leds = [_fitting(rng, count, 12.0)] * count
    current = rng.choice((0.005, 0.010, 0.015, 0.020))
    ohms = _ballast(rng, 12.0 - count * leds[0].vf_typ, current)
    parts = [_resistor("R1", ohms, current, "VIN", "N1"), *_chain(1, leds, "N1", "GND")]
    return Template(name, "string", tuple(parts), (("VIN", "+12V"), ("GND", "GND")))


_DIVIDERS = ((1000.0, 1000.0), (10_000.0, 10_000.0), (4700.0, 2200.0), (2200.0, 1000.0))
"""Base dividers from +5 V (top, bottom) in Ω."""


def _npn_sink(rng: random.Random, name: str) -> Template:
    count = rng.randint(1, 3)
    leds = [_fitting(rng, count, 12.0)] * count
    top, bottom = rng.choice(_DIVIDERS)
    emitter_volts = 5.0 * bottom / (top + bottom) - 0.7  # Thevenin voltage less Vbe (V)
    current = rng.choice((0.010, 0.015, 0.020))
    emitter_ohms = nearest_e24(emitter_volts / current)
    parts = [*_chain(1, leds, "VIN", "NC"),
             LeafPart("Q1", "NPN", NPN, (("C", "NC"), ("B", "NB"), ("E", "NE")),
                      part_number=NPN, package="SOT-23"),
             _resistor("R1", top, 0.001, "V5", "NB"),
             _resistor("R2", bottom, 0.001, "NB", "GND"),
             _resistor("R3", emitter_ohms, current, "NE", "GND", tol="1%")]
    return Template(name, "npn-sink", tuple(parts),
                    (("VIN", "+12V"), ("V5", "+5V"), ("GND", "GND")))


def _low_side_switch(rng: random.Random, name: str) -> Template:
    rail = rng.choice(tuple(RAILS))
    count = rng.randint(1, 3) if rail == "+12V" else 1
    leds = [_fitting(rng, count, RAILS[rail])] * count
    current = rng.choice((0.010, 0.015, 0.020))
    ohms = _ballast(rng, RAILS[rail] - count * leds[0].vf_typ, current)
    parts = [_resistor("R1", ohms, current, "VIN", "N1"), *_chain(1, leds, "N1", "ND"),
             LeafPart("Q1", "NMOS", NMOS, (("D", "ND"), ("G", "NG"), ("S", "GND")),
                      part_number=NMOS, package="SOT-23"),
             _resistor("R2", rng.choice((100.0, 220.0)), 0.0, "DRV", "NG"),
             _resistor("R3", rng.choice((47_000.0, 100_000.0)), 0.0, "NG", "GND")]
    return Template(name, "low-side-switch", tuple(parts), (("VIN", rail), ("GND", "GND")),
                    drive="high")


def _pin_ohms(rng: random.Random, led: LedType) -> tuple[float, float]:
    """Current (A) and resistor (Ω) for an LED on a 5 V pin with its 25 Ω output resistance."""
    current = rng.choice((0.004, 0.006, 0.008, 0.010))
    return current, nearest_e24(max((5.0 - led.vf_typ) / current - PIN_RESISTANCE, 10.0))


def _pin_source(rng: random.Random, name: str) -> Template:
    led = rng.choice(LED_TYPES)
    current, ohms = _pin_ohms(rng, led)
    parts = (_resistor("R1", ohms, current, "DRV", "N1"), _led("D1", led, "N1", "GND"))
    return Template(name, "pin-source", parts, (("GND", "GND"),), drive="high")


def _pin_sink(rng: random.Random, name: str) -> Template:
    led = rng.choice(LED_TYPES)
    current, ohms = _pin_ohms(rng, led)
    parts = (_resistor("R1", ohms, current, "VIN", "N1"), _led("D1", led, "N1", "DRV"))
    return Template(name, "pin-sink", parts, (("VIN", "+5V"),), drive="low")


_CAPACITORS = ((1e-7, "0402"), (1e-6, "0603"), (1e-5, "0805"))


def _decoupling(rng: random.Random, name: str) -> Template:
    rail = rng.choice(tuple(RAILS))
    farads, package = rng.choice(_CAPACITORS)
    cap = LeafPart("C1", "CAP", rkm(farads), (("1", "VIN"), ("2", "GND")), package=package,
                   spice_value=spice_number(farads))
    return Template(name, "decoupling", (cap,), (("VIN", rail), ("GND", "GND")))


BUILDERS = {
    "resistor": _resistor_led, "parallel": _parallel, "string": _string,
    "npn-sink": _npn_sink, "low-side-switch": _low_side_switch, "pin-source": _pin_source,
    "pin-sink": _pin_sink, "decoupling": _decoupling,
}
"""Template builder by kind."""


def make_templates(rng: random.Random, variants: int) -> tuple[Template, ...]:
    """``variants`` templates of every kind, named ``CH01_RESISTOR``…, values drawn from ``rng``."""
    templates = []
    for kind, build in BUILDERS.items():
        for _ in range(variants):
            name = f"CH{len(templates) + 1:02d}_{kind.replace('-', '_').upper()}"
            templates.append(build(rng, name))
    return tuple(templates)
