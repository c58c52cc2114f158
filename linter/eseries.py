"""IEC 60063 preferred numbers (the E-series) for resistor values, across decades.

The base values of each series are the IEC 60063 tables of :mod:`linter.eseries_tables`
(the irregular E24 values 27, 30, 33, 36, 39, 43, 47 and the E192 value 920 included; a test
compares them with the ``eseries`` package's). This module adds what ledlint needs on top: the series that goes with a tolerance, the
nearest, next-lower and next-higher standard value of any positive value in any decade, and a
tolerant membership test for values read from netlists.

A series is named by its text name (``"E24"``). A value is a float in SI units (Ω).
"""

from __future__ import annotations

import math
from functools import lru_cache
from typing import Literal

from linter.eseries_tables import SERIES as _TABLES
from linter.eseries_tables import TOLERANCE as _TOLERANCES

__all__ = [
    "SeriesName",
    "SERIES_NAMES",
    "DEFAULT_REL_TOL",
    "series_tolerance",
    "series_for_tolerance",
    "accepted_series",
    "base_values",
    "values_between",
    "nearest",
    "below",
    "above",
    "neighbours",
    "is_standard",
]

SeriesName = Literal["E3", "E6", "E12", "E24", "E48", "E96", "E192"]

SERIES_NAMES: tuple[str, ...] = SeriesName.__args__  # type: ignore[attr-defined]
"""Every series, coarsest first."""

DEFAULT_REL_TOL = 1e-6
"""Relative distance (dimensionless) within which a value counts as equal to a series value.

Large enough to absorb binary rounding of values such as ``4k7`` read as ``4.7 * 1000``,
small enough that no two distinct E192 values (about 1 % apart) are confused.
"""

_SERIES_FOR_TOLERANCE: tuple[tuple[float, str], ...] = (
    (0.20, "E6"), (0.10, "E12"), (0.05, "E24"), (0.02, "E48"), (0.01, "E96"), (0.005, "E192"),
)
"""(tolerance, series), loosest first: IEC 60063 pairs each series with a tolerance."""

_PRECISION_ALSO = "E24"
"""Precision ranges (2 % and tighter) are also stocked in the E24 values (common practice)."""


def _key(series: str) -> str:
    if series not in _TABLES:
        raise ValueError(f"unknown E-series {series!r}; known: {', '.join(SERIES_NAMES)}")
    return series


def series_tolerance(series: str) -> float:
    """The tolerance (fraction) IEC 60063 pairs with ``series``.

    >>> series_tolerance("E96")
    0.01
    """
    return _TOLERANCES[_key(series)]


def series_for_tolerance(tolerance: float) -> str:
    """The series whose values are made at ``tolerance`` (fraction).

    The loosest series whose own tolerance is no looser than ``tolerance``: 20 % and looser
    → E6, 10 % → E12, 5 % → E24, 2 % → E48, 1 % → E96, 0.5 % and tighter → E192; a
    tolerance between two steps takes the tighter series (3 % → E48).

    >>> series_for_tolerance(0.05), series_for_tolerance(0.01), series_for_tolerance(0.001)
    ('E24', 'E96', 'E192')
    """
    if not (tolerance > 0 and math.isfinite(tolerance)):
        raise ValueError(f"tolerance must be a positive fraction, got {tolerance!r}")
    slack = 1e-9  # so that 0.05 read as 5/100 still means E24
    for step, series in _SERIES_FOR_TOLERANCE:
        if tolerance >= step - slack:
            return series
    return "E192"


def accepted_series(tolerance: float) -> tuple[str, ...]:
    """The series whose values are stocked at ``tolerance``: its own, plus E24 at 2 % and tighter.

    Precision resistor ranges offer the E24 values as well as their own series (common
    practice), so a 1 % 1.2 kΩ part is standard although 120 is not an E96 value.

    >>> accepted_series(0.05), accepted_series(0.01)
    (('E24',), ('E96', 'E24'))
    """
    own = series_for_tolerance(tolerance)
    if SERIES_NAMES.index(own) > SERIES_NAMES.index(_PRECISION_ALSO):
        return (own, _PRECISION_ALSO)
    return (own,)


@lru_cache(maxsize=None)
def base_values(series: str) -> tuple[float, ...]:
    """The values of ``series`` in the decade [1, 10), ascending.

    >>> base_values("E6")
    (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)
    """
    raw = _TABLES[_key(series)]
    digits = len(str(raw[0]))  # 10 for E3–E24, 100 for E48–E192
    scale = 10.0 ** (digits - 1)
    return tuple(value / scale for value in raw)


_LOOKUPS_KEPT = 1 << 16
"""Answers each lookup (nearest, below, above, is_standard) remembers by its arguments: a
board repeats a few hundred values many thousands of times."""

_VALUE_RANGE = (1e-100, 1e100)
"""Values this module handles (Ω or any unit); far wider than any real part."""


def _check_value(value: float) -> None:
    if not (_VALUE_RANGE[0] <= value <= _VALUE_RANGE[1]):
        raise ValueError(f"E-series values lie between {_VALUE_RANGE[0]:g} and "
                         f"{_VALUE_RANGE[1]:g}, got {value!r}")


def _in_decade(mantissa: float, decade: int) -> float:
    """``mantissa · 10**decade`` rounded once, so that 4.7 in decade 3 is exactly 4700.0."""
    integer = round(mantissa * 1000)  # every base value has at most three significant digits
    exponent = decade - 3
    return integer * 10.0**exponent if exponent >= 0 else integer / 10.0**-exponent


@lru_cache(maxsize=None)
def _decade_values(series: str, decade: int) -> tuple[float, ...]:
    """The values of ``series`` in one decade, each made by :func:`_in_decade` once."""
    return tuple(_in_decade(mantissa, decade) for mantissa in base_values(series))


def _candidates(value: float, series: str) -> tuple[float, ...]:
    """Series values of the decade holding ``value`` and of its two neighbour decades."""
    decade = math.floor(math.log10(value))
    return (_decade_values(series, decade - 1) + _decade_values(series, decade)
            + _decade_values(series, decade + 1))


def values_between(series: str, low: float, high: float) -> tuple[float, ...]:
    """Every value of ``series`` in the closed range [low, high], ascending, across decades.

    >>> values_between("E6", 1000.0, 10000.0)
    (1000.0, 1500.0, 2200.0, 3300.0, 4700.0, 6800.0, 10000.0)
    """
    _check_value(low)
    _check_value(high)
    if low > high:
        raise ValueError(f"empty range: {low!r} > {high!r}")
    found: list[float] = []
    for decade in range(math.floor(math.log10(low)) - 1, math.floor(math.log10(high)) + 2):
        found.extend(v for v in _decade_values(series, decade) if low <= v <= high)
    return tuple(found)


@lru_cache(maxsize=_LOOKUPS_KEPT)
def nearest(value: float, series: str) -> float:
    """The value of ``series`` closest to ``value`` (absolute difference; ties go down).

    >>> nearest(90.0, "E24"), nearest(1050.0, "E24"), nearest(0.33, "E12")
    (91.0, 1000.0, 0.33)
    """
    _check_value(value)
    return min(_candidates(value, series), key=lambda v: (abs(v - value), v))


@lru_cache(maxsize=_LOOKUPS_KEPT)
def below(value: float, series: str, rel_tol: float = DEFAULT_REL_TOL) -> float:
    """The largest value of ``series`` at or below ``value`` (within ``rel_tol`` counts as at).

    >>> below(1050.0, "E24"), below(1000.0, "E24")
    (1000.0, 1000.0)
    """
    _check_value(value)
    return max(v for v in _candidates(value, series) if v <= value * (1 + rel_tol))


@lru_cache(maxsize=_LOOKUPS_KEPT)
def above(value: float, series: str, rel_tol: float = DEFAULT_REL_TOL) -> float:
    """The smallest value of ``series`` at or above ``value`` (within ``rel_tol`` counts as at).

    >>> above(90.0, "E24"), above(91.0, "E24")
    (91.0, 91.0)
    """
    _check_value(value)
    return min(v for v in _candidates(value, series) if v >= value * (1 - rel_tol))


def neighbours(value: float, series: str) -> tuple[float, float]:
    """The standard values just below and just above ``value`` (the same twice when standard).

    >>> neighbours(1050.0, "E24")
    (1000.0, 1100.0)
    """
    return below(value, series), above(value, series)


@lru_cache(maxsize=_LOOKUPS_KEPT)
def is_standard(value: float, series: str, rel_tol: float = DEFAULT_REL_TOL) -> bool:
    """True when ``value`` is a value of ``series`` within ``rel_tol`` (relative).

    >>> is_standard(4700.0, "E12"), is_standard(1050.0, "E24")
    (True, False)
    """
    _check_value(value)
    closest = nearest(value, series)
    return abs(closest - value) <= rel_tol * closest
