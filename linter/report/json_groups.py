"""One solved group as one line of JSON: the data of ``GroupResult.as_dict()``, written directly.

:func:`group_line` gives, for a :class:`~linter.results.GroupResult`, exactly
``json.dumps(plain_data(group.as_dict()), ensure_ascii=False, allow_nan=False)`` (default
separators ``", "`` and ``": "``), without building the dict tree: a 100k-part board has
about 26,000 groups and 200,000 corner records, and the tree costs more than the text. A
corner record is written once per :class:`~linter.corners.Corner` object and reused for
every LED, resistor and transistor of the group that quotes it (a :class:`CornerTexts`
lives for one group: the analysis makes each group's corners for that group, so little is
lost, and memory stays bounded). Anything else (a stand-in record with ``as_dict()`` only) takes the plain path.
The tests hold both paths to the same bytes on every fixture and on hand-made odd values.
"""

from __future__ import annotations

import json
import math
from typing import Any, Iterable

from linter.corners import Corner
from linter.report.common import plain_data
from linter.report.json_layout import compact_json
from linter.results import GroupResult, LedResult, PinResult, ResistorResult, Span, TransistorResult

__all__ = ["CornerTexts", "group_line"]

_TEXT = json.encoder.encode_basestring  # the C version when available
_FLOAT_REPR = float.__repr__
_INT_REPR = int.__repr__
_ISFINITE = math.isfinite


FLOAT_TEXTS_MAX = 1 << 16
"""Float texts remembered at most (then the memory starts again): about 5 MiB."""
_FLOAT_TEXTS: dict[float, str] = {}
"""``repr`` of floats already written. A board's figures repeat (identical channels solve
to the same numbers: 958,085 floats of a 100k-part board hold 7,626 values), and a float's
shortest repr costs several times a dict lookup. Equal floats print alike except 0.0 and
-0.0, so zeros are never kept; NaN equals nothing, so it is never kept either."""


def _float(value: float) -> str:
    """A float as ``json.dumps(plain_data(value))`` writes it (not finite → null)."""
    text = _FLOAT_TEXTS.get(value)
    if text is None:
        text = _FLOAT_REPR(value) if _ISFINITE(value) else "null"
        if value != 0.0 and value == value:
            if len(_FLOAT_TEXTS) >= FLOAT_TEXTS_MAX:
                _FLOAT_TEXTS.clear()
            _FLOAT_TEXTS[value] = text
    return text


def _value(value: Any) -> str:
    """A scalar as :func:`plain_data` and ``json.dumps`` would write it (not finite → null)."""
    kind = type(value)
    if kind is float:
        return _float(value)
    if kind is str:
        return _TEXT(value)
    if value is None:
        return "null"
    if value is True:
        return "true"
    if value is False:
        return "false"
    if kind is int:
        return _INT_REPR(value)
    return compact_json(plain_data(value))  # numpy scalars, subclasses: the plain path


def _strings(values: Iterable[Any]) -> str:
    """A list of scalars (reference lists, notes)."""
    return "[" + ", ".join([_value(value) for value in values]) + "]"


def _mapping(mapping: Any) -> str:
    """A flat mapping of scalars, keys as text."""
    return "{" + ", ".join([_TEXT(str(key)) + ": " + _value(item)
                            for key, item in mapping.items()]) + "}"


def _span(span: Span) -> str:
    nom, low, high = span.nom, span.min, span.max
    if type(nom) is float and type(low) is float and type(high) is float:
        return '{"nom": ' + _float(nom) + ', "min": ' + _float(low) + ', "max": ' + _float(high) + "}"
    return '{"nom": ' + _value(nom) + ', "min": ' + _value(low) + ', "max": ' + _value(high) + "}"


class CornerTexts:
    """The JSON text of each corner record, made once per :class:`Corner` object.

    Keyed by identity; the corner is kept with its text, so that an id is never reused
    while the cache lives (one group).
    """

    def __init__(self) -> None:
        self._texts: dict[int, tuple[Corner, str]] = {}

    def text(self, corner: Corner) -> str:
        """``compact_json(plain_data(corner.as_dict()))``."""
        known = self._texts.get(id(corner))
        if known is not None:
            return known[1]
        text = _corner(corner)
        self._texts[id(corner)] = (corner, text)
        return text

    def extremes(self, span: Span) -> str:
        """``Span.corners_dict()``: ``{"min": corner, "max": corner}``, each when known."""
        pieces = [f'"{name}": ' + self.text(corner)
                  for name, corner in (("min", span.at_min), ("max", span.at_max))
                  if corner is not None]
        return "{" + ", ".join(pieces) + "}"


def _corner(corner: Corner) -> str:
    rails = ", ".join([_TEXT(str(name)) + ': {"level": ' + _value(level) + ', "v": '
                       + _value(volts) + "}" for name, (level, volts) in corner.rails.items()])
    return ('{"scenario": ' + _value(corner.scenario) + ', "rails": {' + rails
            + '}, "ambient_c": ' + _value(corner.ambient_c) + ', "vf": ' + _mapping(corner.vf)
            + ', "beta": ' + _mapping(corner.beta) + ', "resistors": '
            + _mapping(corner.resistors) + "}")


def _led(led: LedResult, corners: CornerTexts) -> str:
    return ('{"ref": ' + _value(led.ref) + ', "part": ' + _value(led.part_number)
            + ', "current_a": ' + _span(led.current) + ', "vf_v": ' + _span(led.vf)
            + ', "power_w": ' + _span(led.power) + ', "lit_scenarios": '
            + _strings(led.lit_scenarios) + ', "reverse_v_max": ' + _value(led.reverse_v)
            + ', "di_dvf_a_per_v": ' + _value(led.di_dvf) + ', "assumed": '
            + _strings(led.assumed) + ', "corners": {"current_a": '
            + corners.extremes(led.current) + "}}")


def _resistor(resistor: ResistorResult, corners: CornerTexts) -> str:
    return ('{"ref": ' + _value(resistor.ref) + ', "ohms": ' + _value(resistor.ohms)
            + ', "tolerance": ' + _value(resistor.tolerance) + ', "current_a": '
            + _span(resistor.current) + ', "power_w": ' + _span(resistor.power)
            + ', "rating_w": ' + _value(resistor.rating_w) + ', "package": '
            + _value(resistor.package) + ', "corners": {"power_w": '
            + corners.extremes(resistor.power) + "}}")


def _transistor(transistor: TransistorResult, corners: CornerTexts) -> str:
    extra = ""
    if transistor.saturated_at is not None:
        extra += ', "saturated": ' + corners.text(transistor.saturated_at)
    if transistor.rail_min_at is not None:
        extra += ', "rail_min": ' + corners.text(transistor.rail_min_at)
    text = ('{"ref": ' + _value(transistor.ref) + ', "kind": ' + _value(transistor.kind)
            + ', "vce_v": ' + _span(transistor.vce) + ', "current_a": '
            + _span(transistor.current) + ', "power_w": ' + _span(transistor.power)
            + ', "saturated": ' + _value(transistor.saturated)
            + ', "current_when_saturated_a": ' + _value(transistor.current_when_saturated)
            + ', "rail_min_v": ' + _value(transistor.rail_min) + ', "headroom_rail": '
            + _value(transistor.headroom_rail) + ', "vce_sat_v": '
            + _value(transistor.vce_sat) + ', "corners": {"power_w": '
            + corners.extremes(transistor.power) + extra + "}")
    if transistor.vgs is not None:
        text += ', "vgs_v": ' + _span(transistor.vgs) + ', "vgs_th_v": ' + _value(transistor.vgs_th)
    return text + "}"


def _pin(pin: PinResult, corners: CornerTexts) -> str:
    return ('{"id": ' + _value(pin.id) + ', "net": ' + _value(pin.net) + ', "current_a": '
            + _span(pin.current) + ', "sourcing": ' + _value(pin.sourcing) + ', "rating_a": '
            + _value(pin.current_max) + ', "corners": {"current_a": '
            + corners.extremes(pin.current) + "}}")


def _records(records: Iterable[Any], write: Any, corners: CornerTexts) -> str:
    return "[" + ", ".join([write(record, corners) for record in records]) + "]"


def group_line(group: Any) -> str:
    """The JSON ``groups`` entry of one group, on one line (see the module docstring)."""
    if not isinstance(group, GroupResult):
        return compact_json(plain_data(group.as_dict()))
    corners = CornerTexts()
    shape = group.group
    return ('{"id": ' + _value(shape.id) + ', "topology": ' + _value(shape.topology)
            + ', "rail": ' + _value(group.rail) + ', "parts": ' + _strings(shape.parts)
            + ', "setter": ' + _value(shape.setter) + ', "status": ' + _value(group.status)
            + ', "reason": ' + _value(group.reason)
            + ', "leds": ' + _records(group.leds, _led, corners)
            + ', "resistors": ' + _records(group.resistors, _resistor, corners)
            + ', "transistors": ' + _records(group.transistors, _transistor, corners)
            + ', "pins": ' + _records(group.pins, _pin, corners)
            + ', "corners": ' + _value(group.corners) + ', "scheme": ' + _value(group.scheme)
            + ', "converged": ' + _value(group.converged) + ', "not_converged": '
            + "[" + ", ".join([corners.text(corner) for corner in group.not_converged]) + "]"
            + ', "notes": ' + _strings(group.notes) + "}")
