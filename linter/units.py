"""Reading and writing engineering values.

Spellings accepted (engineering convention, not SPICE's; the SPICE reader has its own):

* plain and SI-prefixed numbers: ``4700``, ``4.7k``, ``2.2M`` (mega), ``100n``, ``10µ``;
* IEC 60062 RKM code, the letter standing for the decimal point: ``4k7``, ``2R2``, ``R47``,
  ``1M0``, ``330R``;
* a unit after the number: ``10kOhm``, ``150 Ω``, ``0.1 W``, ``20 mA``, ``5 V``;
* fractions of a watt: ``1/4W``; percentages: ``60%`` (read as 0.6); temperatures ``-10 degC``;
* a tolerance after a value: ``5 V ±5%``, ``12 V +/-10%``.

Plain numbers and simple SI prefixes take a regular-expression fast path that never touches
pint: a 100,000-part netlist must not pay pint per value. Anything else goes through one
shared pint registry (:func:`registry`), created on first use.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    import pint

__all__ = [
    "ValueParseError",
    "PREFIXES",
    "parse_number",
    "number_or_none",
    "parse_quantity",
    "parse_with_tolerance",
    "parse_fraction",
    "parse_temperature",
    "pick_scale",
    "format_si",
    "registry",
]


class ValueParseError(ValueError):
    """A value text that is not a number of the expected kind; ``str()`` says which text."""

    def __init__(self, text: str, expected: str = "a number") -> None:
        super().__init__(text, expected)
        self.text = text
        self.expected = expected

    def __str__(self) -> str:
        return f"cannot read {self.text!r} as {self.expected}"


PREFIXES: dict[str, float] = {
    "p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "μ": 1e-6, "m": 1e-3,
    "": 1.0, "k": 1e3, "K": 1e3, "M": 1e6, "G": 1e9, "T": 1e12,
}
"""Engineering SI prefixes. ``M`` is mega here (SPICE reads it as milli; see readers.spice)."""

_UNIT_ALIASES: dict[str, str] = {
    "": "", "ohm": "Ω", "ohms": "Ω", "Ω": "Ω", "Ω": "Ω", "r": "Ω",
    "v": "V", "a": "A", "w": "W", "f": "F", "h": "H", "hz": "Hz", "s": "s",
    "v/k": "V/K",
}
"""Unit spellings the fast path understands, mapped to the canonical symbol."""

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
_FAST = re.compile(
    rf"^\s*(?P<num>{_NUMBER})\s*(?P<prefix>[pnuµμmkKMGT]?)\s*(?P<unit>[A-Za-zΩΩ]*(?:/[A-Za-z]+)?)\s*$"
)
_NUMBER_FIRST = re.compile(r"\s*[+-]?\s*\.?[0-9]")
"""Every spelling above starts with a number (RKM codes such as ``R47`` take the fast path):
a text that does not (a colour ``RED``, a part number ``LB0603BL``) is no number, and is
refused without loading pint."""
_RKM = re.compile(r"^\s*(?P<int>\d*)(?P<letter>[RKMGTrkmgtpnuµμ])(?P<frac>\d*)\s*(?P<unit>[A-Za-zΩΩ]*)\s*$")
_RKM_LETTER: dict[str, float] = {"R": 1.0, "r": 1.0, "K": 1e3, "k": 1e3, "M": 1e6, "G": 1e9,
                                 "T": 1e12, "m": 1e-3, "u": 1e-6, "µ": 1e-6, "μ": 1e-6,
                                 "n": 1e-9, "p": 1e-12, "g": 1e9, "t": 1e12}
_FRACTION = re.compile(rf"^\s*(?P<num>\d+)\s*/\s*(?P<den>\d+)\s*(?P<unit>[A-Za-zΩΩ]*)\s*$")
_TOLERANCE = re.compile(r"^(?P<value>.*?)\s*(?:±|\+/-|\+-)\s*(?P<tol>[0-9]+(?:\.[0-9]*)?|\.[0-9]+)\s*%\s*$")
_PERCENT = re.compile(rf"^\s*(?P<num>{_NUMBER})\s*%\s*$")
_TEMPERATURE = re.compile(rf"^\s*(?P<num>{_NUMBER})\s*(?:°C|degC|deg C|C|celsius)\s*$", re.IGNORECASE)


@lru_cache(maxsize=1)
def registry() -> "pint.UnitRegistry":
    """The one pint registry ledlint uses (created on first call, then cached)."""
    import pint

    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    ureg.define("Ω = ohm")
    return ureg


def _unit_ok(found: str, unit: str | None) -> bool:
    canonical = _UNIT_ALIASES.get(found.casefold() if found not in ("Ω", "Ω") else found)
    if canonical is None:
        return False
    return canonical == "" or unit is None or canonical == unit or (unit == "Ω" and canonical == "Ω")


def _finite(value: float, text: str, expected: str) -> float:
    if not math.isfinite(value):
        raise ValueParseError(text, expected)
    return value


def parse_number(text: str, unit: str | None = None) -> float:
    """Read an engineering value as an SI float; ``unit`` ('Ω', 'V', 'A', 'W'…) is the expected unit.

    A unit written in the text must agree with ``unit``; a bare number is taken in ``unit``.

    >>> parse_number("4k7")
    4700.0
    >>> parse_number("2R2", "Ω")
    2.2
    >>> parse_number("20 mA", "A")
    0.02
    >>> parse_number("1/4W", "W")
    0.25
    """
    known = _READ.get((text, unit))
    if known is None:
        known = _READ[(text, unit)] = _read_number(text, unit)
        if len(_READ) > _READ_SIZE:
            _READ.clear()
    if isinstance(known, float):
        return known
    raise ValueParseError(text, known)


def number_or_none(text: str, unit: str | None = None) -> float | None:
    """:func:`parse_number`, with None for a text that is not a value (no exception raised).

    >>> number_or_none("4k7"), number_or_none("LX-R0603")
    (4700.0, None)
    """
    known = _READ.get((text, unit))
    if known is None:
        known = _READ[(text, unit)] = _read_number(text, unit)
        if len(_READ) > _READ_SIZE:
            _READ.clear()
    return known if isinstance(known, float) else None


_READ: dict[tuple[str, str | None], float | str] = {}
"""Readings of (text, unit) already made: the float, or the ``expected`` text of the refusal.
A board repeats few value texts many times (E-series values, part numbers read as values)."""
_READ_SIZE = 4096
"""Entries kept before :data:`_READ` starts over (it only saves time)."""


def _read_number(text: str, unit: str | None) -> float | str:
    """:func:`parse_number` without the memo: the float, or the ``expected`` text of the refusal."""
    expected = f"a value in {unit}" if unit else "a number"
    try:
        return _read_uncached(text, unit, expected)
    except ValueParseError as exc:
        return exc.expected


def _read_uncached(text: str, unit: str | None, expected: str) -> float:
    match = _FAST.match(text)
    if match and _unit_ok(match["unit"], unit):
        return _finite(float(match["num"]) * PREFIXES[match["prefix"]], text, expected)
    match = _RKM.match(text)
    if match and (match["int"] or match["frac"]) and _unit_ok(match["unit"], unit):
        digits = f"{match['int'] or '0'}.{match['frac'] or '0'}"
        return float(digits) * _RKM_LETTER[match["letter"]]
    match = _FRACTION.match(text)
    if match and _unit_ok(match["unit"], unit) and int(match["den"]) != 0:
        return int(match["num"]) / int(match["den"])
    if _NUMBER_FIRST.match(text) is None:
        raise ValueParseError(text, expected)
    return _parse_with_pint(text, unit, expected)


_PINT_MAX_LENGTH = 100
"""Longest text handed to pint; values are short, and pint's evaluator recurses."""
_PINT_REFUSED = frozenset("*^()[]{}±%")
"""Operators pint would evaluate (``9**9**9`` is a number too large to compute, deep
parentheses exhaust its recursion): a value never needs them."""


def _parse_with_pint(text: str, unit: str | None, expected: str) -> float:
    import pint

    if len(text) > _PINT_MAX_LENGTH or not _PINT_REFUSED.isdisjoint(text):
        raise ValueParseError(text, expected)
    ureg = registry()
    try:
        quantity = ureg.Quantity(text.strip().replace("Ω", "Ω"))
    except Exception:  # pint tokenises with Python's tokenize: any text can fail in many ways
        raise ValueParseError(text, expected) from None
    if isinstance(quantity, (int, float)):
        return _finite(float(quantity), text, expected)
    try:
        if unit:
            magnitude = quantity.to(_PINT_UNITS.get(unit, unit)).magnitude
        elif quantity.dimensionless:
            magnitude = quantity.to("").magnitude
        else:
            magnitude = quantity.to_base_units().magnitude
    except pint.errors.PintError:
        raise ValueParseError(text, expected) from None
    if not isinstance(magnitude, (int, float)):
        raise ValueParseError(text, expected)
    return _finite(float(magnitude), text, expected)


_PINT_UNITS = {"Ω": "ohm", "°C": "degC", "degC": "degC"}


def parse_fraction(text: str) -> float:
    """Read a share such as ``60%`` or ``0.6`` as a fraction.

    >>> parse_fraction("60%")
    0.6
    """
    match = _PERCENT.match(text)
    if match:
        return _finite(float(match["num"]) / 100.0, text, "a percentage")
    return parse_number(text)


def parse_temperature(text: str) -> float:
    """Read a temperature in degrees Celsius (``-10 degC``, ``60 °C``, ``25``).

    >>> parse_temperature("-10 degC")
    -10.0
    """
    match = _TEMPERATURE.match(text)
    if match:
        return _finite(float(match["num"]), text, "a temperature")
    match = _FAST.match(text)
    if match and not match["prefix"] and not match["unit"]:
        return _finite(float(match["num"]), text, "a temperature")
    raise ValueParseError(text, "a temperature")


def parse_quantity(text: str, unit: str) -> float:
    """Read a value of a given unit: 'Ω', 'V', 'A', 'W', '%' (as a fraction) or '°C'."""
    if unit == "%":
        return parse_fraction(text)
    if unit == "°C":
        return parse_temperature(text)
    return parse_number(text, unit)


def parse_with_tolerance(text: str, unit: str) -> tuple[float, float | None]:
    """Read ``value ±tol%`` as (value, tolerance fraction), the tolerance None when absent.

    >>> parse_with_tolerance("5 V ±5%", "V")
    (5.0, 0.05)
    """
    match = _TOLERANCE.match(text)
    if match:
        return parse_number(match["value"], unit), float(match["tol"]) / 100.0
    return parse_number(text, unit), None


def pick_scale(value: float, scales: tuple[tuple[float, str], ...]) -> tuple[float, str]:
    """The largest (scale, prefix) of ``scales`` (largest first) that ``value`` reaches,
    counting 999.5 as 1 k (it rounds up at three figures); the smallest when none does.

    >>> pick_scale(4700.0, ((1e3, "k"), (1.0, "")))
    (1000.0, 'k')
    """
    magnitude = abs(value)
    for scale, prefix in scales:
        if magnitude >= scale * 0.9995:
            return scale, prefix
    return scales[-1]


_FORMAT_PREFIXES = ((1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ"),
                    (1e-9, "n"), (1e-12, "p"))


def format_si(value: float, unit: str, digits: int = 3) -> str:
    """Write an SI float with a prefix and ``digits`` significant figures.

    >>> format_si(0.0199, "A")
    '19.9 mA'
    >>> format_si(4700.0, "Ω")
    '4.7 kΩ'
    >>> format_si(0.0, "V")
    '0 V'
    """
    if value == 0 or not math.isfinite(value):  # -0.0 stays "-0": never remembered
        return f"{value:g} {unit}"
    return _format_finite(value, unit, digits)


_FORMATS_KEPT = 1 << 16
"""Texts :func:`format_si` remembers: a board repeats the same figures channel after channel."""


@lru_cache(maxsize=_FORMATS_KEPT)
def _format_finite(value: float, unit: str, digits: int) -> str:
    """:func:`format_si` of a finite value other than zero."""
    scale, prefix = pick_scale(value, _FORMAT_PREFIXES)
    number = f"{value / scale:.{digits}g}"
    if "e" in number:
        number = f"{value / scale:.{digits}f}".rstrip("0").rstrip(".")
    return f"{number} {prefix}{unit}"
