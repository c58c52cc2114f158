"""Numbers the way SPICE reads them.

SPICE (ngspice, SPICE3) reads a number, an optional exponent, an optional scale suffix and
ignores any letters after it. The suffixes, matched without regard to case::

    t 1e12   g 1e9   meg 1e6   k 1e3   mil 25.4e-6   m 1e-3   u (or µ) 1e-6
    n 1e-9   p 1e-12   f 1e-15

So ``M`` is milli, not mega (``1M`` is 1 mΩ), ``10kohm`` is 10 kΩ and ``4k7`` is 4 kΩ: the
``7`` after the suffix is ignored like a unit. ngspice also takes a Fortran ``d`` exponent
(``1d2`` is 100). These readings were checked against ngspice 39 (``V1 n 0 DC <text>``).
"""

from __future__ import annotations

import math
import re

from linter.units import pick_scale

__all__ = ["SPICE_SCALES", "SpiceNumberError", "read_spice_number", "is_spice_number", "spice_spelling"]

SPICE_SCALES: dict[str, float] = {
    "t": 1e12, "g": 1e9, "meg": 1e6, "k": 1e3, "mil": 25.4e-6, "m": 1e-3,
    "u": 1e-6, "µ": 1e-6, "μ": 1e-6, "n": 1e-9, "p": 1e-12, "f": 1e-15,
}
"""SPICE scale suffixes (lower case) and their factors (SPICE3 and ngspice manuals)."""

_NUMBER = re.compile(r"(?P<mantissa>[+-]?(?:\d+\.?\d*|\.\d+))(?:[eEdD](?P<exponent>[+-]?\d+))?")
_DECADES = {"t": 12, "g": 9, "meg": 6, "k": 3, "m": -3, "u": -6, "µ": -6, "μ": -6, "n": -9,
            "p": -12, "f": -15}


class SpiceNumberError(ValueError):
    """A text SPICE cannot read as a number."""

    def __init__(self, text: str) -> None:
        super().__init__(text)
        self.text = text

    def __str__(self) -> str:
        return f"cannot read {self.text!r} as a SPICE number"


def _suffix(rest: str) -> tuple[str, str]:
    """The suffix (lower case, '' for none) at the start of ``rest`` and what follows it."""
    lowered = rest.casefold()
    for suffix in ("meg", "mil"):
        if lowered.startswith(suffix):
            return suffix, rest[len(suffix):]
    if lowered[:1] in SPICE_SCALES:
        return lowered[:1], rest[1:]
    return "", rest


_SATURATED_EXPONENT = 10**10
"""A decimal exponent beyond any float (IEEE 754 doubles end near 1e308 and 1e-324); a
longer written exponent is read as this, keeping its sign (the value is then infinite, or
0)."""


def _exponent(text: str | None) -> int:
    """The written exponent as an int, without converting thousands of digits (Python
    refuses to: a located error, not a crash)."""
    if not text:
        return 0
    digits = text.lstrip("+-").lstrip("0") or "0"
    sign = -1 if text.startswith("-") else 1
    if len(digits) > 10:
        return sign * _SATURATED_EXPONENT
    return sign * int(digits)


def read_spice_number(text: str) -> float:
    """Read ``text`` as SPICE does and return the value as a float.

    Letters and digits after the number and its suffix are ignored (a unit, or the ``7`` of
    ``4k7``); any other character after the number is an error.

    >>> read_spice_number("1M"), read_spice_number("1meg"), read_spice_number("4k7")
    (0.001, 1000000.0, 4000.0)
    >>> read_spice_number("10kohm"), read_spice_number("2.2uF")
    (10000.0, 2.2e-06)
    """
    match = _NUMBER.match(text)
    if match is None:
        raise SpiceNumberError(text)
    suffix, tail = _suffix(text[match.end():])
    if tail and not tail.isalnum():
        raise SpiceNumberError(text)
    exponent = _exponent(match["exponent"])
    if suffix == "mil":
        value = float(f"{match['mantissa']}e{exponent}") * SPICE_SCALES["mil"]
    else:  # shift the decimal exponent so that 10u is exactly float("1e-5")
        value = float(f"{match['mantissa']}e{exponent + _DECADES.get(suffix, 0)}")
    if not math.isfinite(value):
        raise SpiceNumberError(text)
    return value


def is_spice_number(text: str) -> bool:
    """True when :func:`read_spice_number` can read ``text``."""
    try:
        read_spice_number(text)
    except SpiceNumberError:
        return False
    return True


_SPELLING_SCALES = ((1e12, "t"), (1e9, "g"), (1e6, "meg"), (1e3, "k"), (1.0, ""), (1e-3, "m"),
                    (1e-6, "u"), (1e-9, "n"), (1e-12, "p"), (1e-15, "f"))


def spice_spelling(value: float) -> str:
    """A spelling of ``value`` that every SPICE reads the same way (``4.7k``, ``1meg``).

    >>> spice_spelling(4700.0), spice_spelling(1e6), spice_spelling(0.0)
    ('4.7k', '1meg', '0')
    """
    if value == 0 or not math.isfinite(value):
        return f"{value:g}"
    scale, suffix = pick_scale(value, _SPELLING_SCALES)
    return f"{value / scale:.6g}{suffix}"
