"""Part data as written in settings and parts files: ``[parts."PN"]`` tables, checked and read.

A :class:`PartSpec` holds the figures one part number's table gives, already in SI floats
(strings for ``color`` and ``description``, tuples for pin lists), and where it was written.
:mod:`linter.parts` turns specs into the records of :mod:`linter.partdata`.
"""

from __future__ import annotations

from dataclasses import field
from typing import Any, Mapping

from linter.model import SourceLocation
from linter.records import record
from linter.tomldoc import TomlDoc, suggestion, table_name

__all__ = ["PartSpec", "PART_KEYS", "SPEC_KINDS", "LED_COLORS", "normal_color", "read_part_specs"]

LED_COLORS: tuple[str, ...] = ("red", "orange", "amber", "yellow", "yellow-green", "green",
                               "blue", "royal-blue", "white", "ir", "uv")
"""The colours part data may name (``linter.partdata.LedColor``)."""

_COLOR_SYNONYMS = {"royal blue": "royal-blue", "yellow green": "yellow-green",
                   "infrared": "ir", "ultraviolet": "uv", "warm white": "white",
                   "cool white": "white", "neutral white": "white"}

_LED = {"color": "color", "vf_min": "V", "vf_typ": "V", "vf_max": "V", "vf_test_current": "A",
        "if_max": "A", "if_recommended": "A", "if_peak": "A", "if_peak_pulse": "s",
        "if_peak_duty": "%", "vr_max": "V", "pd_max": "W", "tempco": "V/K"}
_BJT = {"hfe_min": "", "hfe_typ": "", "vbe": "V", "vbe_current": "A", "vce_sat": "V",
        "vce_max": "V", "ic_max": "A", "pd_max": "W"}
_MOS = {"vgs_th": "V", "rds_on": "Ω", "rds_on_vgs": "V", "vds_max": "V", "id_max": "A",
        "pd_max": "W"}
_MCU = {"pin_current_max": "A", "package_current_max": "A", "output_resistance": "Ω",
        "supply_pins": "pins", "ground_pins": "pins", "supply_voltage": "V"}
_RESISTOR = {"power": "W", "tolerance": "%"}

PART_KEYS: dict[str, dict[str, str]] = {
    "led": _LED, "npn": _BJT, "pnp": _BJT, "nmos": _MOS, "pmos": _MOS, "mcu": _MCU,
    "resistor": _RESISTOR, "diode": {}, "link": {}, "capacitor": {}, "inductor": {}, "ic": {},
    "connector": {}, "switch": {}, "other": {},
}
"""Kind → key → unit ('' plain number, '%' fraction, 'color', 'pins' list of pin names).
Every kind also takes ``kind`` and ``description``."""

SPEC_KINDS: tuple[str, ...] = tuple(PART_KEYS)


def normal_color(text: str) -> str | None:
    """A colour word as one of :data:`LED_COLORS`, or None.

    >>> normal_color("Royal Blue"), normal_color("infrared"), normal_color("teal")
    ('royal-blue', 'ir', None)
    """
    folded = " ".join(text.casefold().replace("_", " ").split())
    folded = _COLOR_SYNONYMS.get(folded, folded)
    folded = folded.replace(" ", "-")
    return folded if folded in LED_COLORS else None


@record
class PartSpec:
    """One part number's data: its kind and figures (SI floats), and where it was written."""

    part_number: str
    kind: str
    figures: Mapping[str, Any] = field(default_factory=dict, hash=False)
    location: SourceLocation | None = None
    description: str | None = None


def read_part_specs(doc: TomlDoc) -> dict[str, PartSpec]:
    """Every ``[parts."PN"]`` table of ``doc``, checked."""
    tables = doc.table(("parts",), doc.data.get("parts", {}))
    return {number: _read_spec(doc, ("parts", number), number, table)
            for number, table in tables.items()}


def _read_spec(doc: TomlDoc, path: tuple[str, ...], number: str, table: Any) -> PartSpec:
    table = doc.table(path, table)
    kind = table.get("kind")
    if kind is None:
        doc.fail(path, f"{table_name(path)} needs kind = one of {', '.join(SPEC_KINDS)}")
    if not isinstance(kind, str) or kind not in PART_KEYS:
        doc.fail((*path, "kind"), f"unknown kind {kind!r} in {table_name(path)}"
                                  f"{suggestion(str(kind), SPEC_KINDS)}")
    units = PART_KEYS[kind]
    doc.check_keys(path, table, ("kind", "description", *units))
    figures: dict[str, Any] = {}
    for key, unit in units.items():
        if key in table:
            figures[key] = _read_figure(doc, (*path, key), table[key], unit)
    description = doc.text((*path, "description"), table["description"]) \
        if "description" in table else None
    return PartSpec(number, kind, figures, doc.location(path), description)


def _read_figure(doc: TomlDoc, path: tuple[str, ...], value: Any, unit: str) -> Any:
    if unit == "pins":
        return doc.texts(path, value)
    if unit == "color":
        color = normal_color(doc.text(path, value))
        if color is None:
            doc.fail(path, f"unknown colour {value!r} in {table_name(path[:-1])}"
                           f"{suggestion(str(value).casefold(), LED_COLORS)}")
        return color
    number = doc.quantity(path, value, unit)
    low, high, low_included = _RANGES.get(path[-1], _RANGES.get(unit, (0.0, 1e6, False)))
    if not (low <= number <= high) or (number == low and not low_included):
        bound = "from" if low_included else "above"
        shown = "" if unit == "" else f" {unit}"
        doc.fail(path, f"'{path[-1]}' in {table_name(path[:-1])}: must lie {bound} {low:g}{shown} "
                       f"up to {high:g}{shown}, got {number:g}{shown}")
    return number


_RANGES: dict[str, tuple[float, float, bool]] = {
    "V": (0.0, 1e4, False), "A": (0.0, 1e3, False), "W": (0.0, 1e4, False),
    "Ω": (0.0, 1e12, False), "s": (0.0, 1e6, False), "%": (0.0, 1.0, False),
    "": (0.0, 1e5, False), "V/K": (-0.05, 0.05, True),
    "vgs_th": (-1e3, 1e3, True), "tolerance": (0.0, 1.0, True),
}
"""(lowest, highest, lowest allowed) of a figure, by key first, then by unit: physical
figures are positive and below sizes no LED board reaches (a zero maximum power or a
current of 1e308 A would only break the arithmetic); a gate threshold may be negative
(P-channel) and a temperature coefficient lies within ±50 mV/K (LEDs: about -2 to -4 mV/K,
from memory)."""
