"""Rule ``nonstandard-value``: a resistor value outside the E-series made at its tolerance."""

from __future__ import annotations

from itertools import compress, repeat
from operator import attrgetter, eq
from typing import Any, Iterable

from linter import eseries
from linter.findings import Finding
from linter.model import Part
from linter.partdata import ResistorData
from linter.rules import Rule, register
from linter.units import format_si

DEFAULT_TOLERANCE = 0.05
"""Resistor tolerance (fraction) taken when neither BOM nor part data gives one (DESIGN)."""


@register
class NonstandardValue(Rule):
    """A resistor value that is not in the E-series made at its tolerance.

    IEC 60063 pairs each preferred-number series with a tolerance: E6 with 20 %, E12 with
    10 %, E24 with 5 %, E48 with 2 %, E96 with 1 %, E192 with 0.5 % and tighter. Precision
    ranges stock the E24 values as well (common practice), so at 2 % and tighter an E24 value
    is standard too. A value outside its series is hard to buy, is often a typing slip
    (``1k05`` for ``1k5``), or was computed and never rounded; the current it sets may then
    not be the current the parts on the board will set. The value is taken from the part
    data (BOM) where known, else from the netlist; the tolerance from the part data, else 5 %.

    **Anti-pattern**

    ``R7 led1 n7 1.05k`` with a 5 % part: 1.05 kΩ is no E24 value.

    **Best practice**

    ``R7 led1 n7 1k`` (or ``1.1k``), recomputing the LED current with the value you can buy;
    or a 1 % part if the exact value matters (1.05 kΩ is an E96 value).
    """

    id = "nonstandard-value"
    default_severity = "info"

    def check(self, context: Any, screen: bool = True) -> Iterable[Finding]:
        """``screen``: first ask :func:`may_flag` (False: the plain loop only)."""
        severity = context.severity(self)
        standard: dict[tuple[float, float], bool] = {}  # by (Ω, tolerance): board's values repeat
        if screen and not may_flag(context.circuit.parts.values(), context.part_data, standard):
            return
        for part in context.circuit.parts.values():
            if part.kind != "resistor":
                continue
            finding = _check_resistor(part, context.part_data.get(part.ref), self.id, severity,
                                      standard)
            if finding is not None:
                yield finding


_KIND = attrgetter("kind")
_REF = attrgetter("ref")
_VALUE = attrgetter("value_si")


def may_flag(parts: Iterable[Part], part_data: Any,
             standard: dict[tuple[float, float], bool] | None = None) -> bool:
    """False only when no resistor of ``parts`` has a finding. A resistor's verdict reads
    nothing but its ``value_si`` and its part-data record (:func:`_flags`), and a board has
    few distinct pairs of them (records are shared by equal readings): each distinct pair
    (the value by its type and value, the record by identity) is judged once. Values equal
    but differently written (``0.0``, ``-0.0``) both give no finding. ``standard``: as for
    :func:`_check_resistor`."""
    parts = tuple(parts)
    resistors = tuple(compress(parts, map(eq, map(_KIND, parts), repeat("resistor"))))
    values = tuple(map(_VALUE, resistors))
    records = tuple(map(part_data.get, map(_REF, resistors)))
    by_id = dict(zip(map(id, records), records))
    try:
        pairs = set(zip(map(type, values), values, map(id, records)))
    except TypeError:  # a value that cannot be a set member: judged part by part
        return True
    return any(_flags(value, by_id[key], standard) for _, value, key in pairs)


def _flags(value_si: Any, data: Any, standard: dict[tuple[float, float], bool] | None) -> bool:
    """Whether :func:`_check_resistor` gives a finding for a resistor of this ``value_si``
    and part data (the same steps up to its verdict)."""
    ohms, tolerance, _ = _ohms_tolerance(value_si, data)
    if ohms is None or ohms <= 0 or tolerance <= 0:
        return False
    return not _is_standard(ohms, tolerance, standard)


def _is_standard(ohms: float, tolerance: float,
                 standard: dict[tuple[float, float], bool] | None) -> bool:
    """Whether ``ohms`` is in a series accepted at ``tolerance``; ``standard`` keeps the
    verdicts of (Ω, tolerance) pairs of floats met before."""
    key = (ohms, tolerance) if type(ohms) is float and type(tolerance) is float else None
    known = None if standard is None or key is None else standard.get(key)
    if known is None:
        known = any(eseries.is_standard(ohms, series)
                    for series in eseries.accepted_series(tolerance))
        if standard is not None and key is not None:
            standard[key] = known
    return known


def _ohms_and_tolerance(part: Part, data: Any) -> tuple[float | None, float, bool]:
    """(value in Ω, tolerance fraction, whether the tolerance was assumed)."""
    return _ohms_tolerance(part.value_si, data)


def _ohms_tolerance(value_si: Any, data: Any) -> tuple[float | None, float, bool]:
    """:func:`_ohms_and_tolerance` of a part whose ``value_si`` is given."""
    record = data if isinstance(data, ResistorData) else None
    ohms = record.ohms if record is not None and record.ohms is not None else value_si
    if record is None or record.tolerance is None:
        return ohms, DEFAULT_TOLERANCE, True
    return ohms, record.tolerance, "tolerance" in record.assumed


def _percent(fraction: float) -> str:
    return f"{fraction * 100:g} %"


def _tighter_home(ohms: float, series: str) -> str | None:
    """``"buy 1.05 kΩ at 1 % (E96)"`` when a tighter series holds the value, else None."""
    for tighter in eseries.SERIES_NAMES[eseries.SERIES_NAMES.index(series) + 1:]:
        if eseries.is_standard(ohms, tighter):
            tolerance = _percent(eseries.series_tolerance(tighter))
            return f"buy {format_si(ohms, 'Ω')} at {tolerance} ({tighter})"
    return None


def _check_resistor(part: Part, data: Any, rule: str, severity: str,
                    standard: dict[tuple[float, float], bool] | None = None) -> Finding | None:
    """The finding for one resistor, or None when its value is standard or unknown.
    ``standard`` keeps the verdicts of (Ω, tolerance) pairs met before (both positive
    floats, so each key stands for one value)."""
    ohms, tolerance, assumed = _ohms_and_tolerance(part, data)
    if ohms is None or ohms <= 0 or tolerance <= 0:
        return None  # a link, or a value nobody knows: other rules report those
    if _is_standard(ohms, tolerance, standard):
        return None
    accepted = eseries.accepted_series(tolerance)
    own = accepted[0]
    low, high = eseries.neighbours(ohms, own)
    names = " or ".join(accepted)
    stated = f"{_percent(tolerance)} tolerance{', assumed' if assumed else ''}"
    pair = f"{format_si(low, 'Ω')} or {format_si(high, 'Ω')}"
    message = (f"{part.ref}: {format_si(ohms, 'Ω', digits=6)} is not an {names} value ({stated}); "
               f"nearest {own}: {pair}")
    fix = f"use {pair} ({own}) and recheck the current it sets"
    elsewhere = _tighter_home(ohms, own)
    if elsewhere is not None:
        fix += f", or {elsewhere}"
    values = {"ohms": ohms, "tolerance": tolerance, "nearest_below_ohms": low,
              "nearest_above_ohms": high}
    return Finding(rule=rule, severity=severity, message=message, parts=(part.ref,),
                   values=values, fix=fix, location=part.location)
