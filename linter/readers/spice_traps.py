"""Values SPICE reads differently from what an engineer means (rule ``spice-scale-trap``).

The engineering reading used here: a number, then at most one SI prefix (``M`` mega, ``m``
milli, ``k``/``K`` kilo, ``u``/``µ`` micro, ``n``, ``p``, ``f``, ``G``, ``T``; case matters),
then the element's unit (Ω ``ohm`` for R, ``F`` for C, ``H`` for L, ``V`` for V, ``A`` for I);
or an IEC 60062 RKM code where the letter stands for the decimal point (``4k7``, ``2R2``,
``1M5``, ``4u7``, and ``3V3`` on a voltage source). SPICE reads ``M`` as milli and ignores what
follows the suffix, so ``1M`` is 1 mΩ, ``4k7`` is 4 kΩ and ``1F`` on a capacitor is 1 fF. Where
the two readings differ the reader keeps the SPICE reading (the simulation used it) and
notes both.
"""

from __future__ import annotations

import math
import re

from linter.model import ReaderNote
from linter.readers.spice_expr import strip_braces
from linter.readers.spice_flatten import FlatElement
from linter.readers.spice_numbers import spice_spelling
from linter.units import format_si

__all__ = ["engineering_reading", "scale_trap_note", "UNITS"]

UNITS: dict[str, str] = {"R": "Ω", "C": "F", "L": "H", "V": "V", "I": "A"}
"""The unit of each element letter's value."""

_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")
_PREFIXES = {"f": 1e-15, "p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "μ": 1e-6, "m": 1e-3,
             "k": 1e3, "K": 1e3, "M": 1e6, "G": 1e9, "T": 1e12}
_UNIT_WORDS = {"R": {"", "ohm", "ohms", "Ohm", "Ohms", "OHM", "Ω", "Ω"}, "C": {"", "F"},
               "L": {"", "H"}, "V": {"", "V"}, "I": {"", "A"}}
_RKM = re.compile(r"(\d*)([^\d.])(\d+)")
_RKM_POINT = {"R": {"R": 1.0, "r": 1.0}, "V": {"V": 1.0, "v": 1.0}}


def _with_prefix(rest: str, letter: str) -> float | None:
    words = _UNIT_WORDS[letter]
    if rest[:1] in _PREFIXES and rest[1:] in words:
        return _PREFIXES[rest[:1]]
    if rest in words:
        return 1.0
    return None


def engineering_reading(text: str, letter: str) -> float | None:
    """What an engineer reads in ``text`` on an element of ``letter``, or None when unclear.

    >>> engineering_reading("1M", "R"), engineering_reading("4k7", "R"), engineering_reading("3V3", "V")
    (1000000.0, 4700.0, 3.3)
    >>> engineering_reading("1meg", "R") is None
    True
    """
    if letter not in _UNIT_WORDS:
        return None
    rkm = _RKM.fullmatch(text)
    if rkm is not None and (rkm[1] or rkm[3]):
        scale = {**{k: v for k, v in _PREFIXES.items() if k != "f"},
                 **_RKM_POINT.get(letter, {})}.get(rkm[2])
        if scale is not None:
            return float(f"{rkm[1] or '0'}.{rkm[3]}") * scale
    number = _NUMBER.match(text)
    if number is None:
        return None
    scale = _with_prefix(text[number.end():], letter)
    return None if scale is None else float(number.group()) * scale


def scale_trap_note(element: FlatElement, ref: str,
                    readings: dict[tuple[str, str], float | None] | None = None) -> ReaderNote | None:
    """A ``spice-scale-trap`` note when the element's literal value reads two ways, else None.

    ``readings`` remembers :func:`engineering_reading` by (text, letter) within one deck.
    """
    token, spice = element.value_token, element.value_si
    if token is None or spice is None or element.letter not in UNITS:
        return None
    text = token.text.split("=", 1)[1] if "=" in token.text else token.text
    if strip_braces(text) is not None:
        return None
    if readings is None:
        meant = engineering_reading(text, element.letter)
    else:
        key = (text, element.letter)
        if key in readings:
            meant = readings[key]
        else:
            meant = readings[key] = engineering_reading(text, element.letter)
    if meant is None or math.isclose(meant, spice, rel_tol=1e-9, abs_tol=0.0):
        return None
    unit = UNITS[element.letter]
    message = (f"{ref}: SPICE reads {text!r} as {format_si(spice, unit)}, an engineer reads "
               f"{format_si(meant, unit)}; write {spice_spelling(meant)} if "
               f"{format_si(meant, unit)} is meant, or {spice_spelling(spice)} if not")
    return ReaderNote(rule="spice-scale-trap", parts=(ref,), message=message, location=token.location,
                      values={"spice_reading": spice, "engineering_reading": meant})
