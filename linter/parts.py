"""Part data for every part that needs it, from settings, parts files, SPICE models and generics.

:func:`resolve_part_data` looks each part up by part number (then by value, then by SPICE
model name, as netlists often carry the part number there), lets the part data change the
part's kind (a SPICE diode whose data says ``kind = "led"`` becomes an LED), reads SPICE
``.model`` figures, and fills every missing figure from :mod:`linter.generic_parts`. Each
fallback is named in the record's ``assumed`` and described in its ``note``; the
``unknown-part`` rule reports them. Kinds that need no figures (capacitors, connectors, plain
diodes, links) get no record.
"""

from __future__ import annotations

import math
from dataclasses import replace
from functools import cached_property
from itertools import compress, count
from operator import attrgetter, itemgetter
from typing import TYPE_CHECKING, Any, Mapping

from linter.generic_parts import (AXIAL_POWER, GENERIC_BJT, GENERIC_LEDS, GENERIC_MCU,
                                  GENERIC_MOSFET, LED_TEST_CURRENT, LED_VR_MAX,
                                  RESISTOR_POWER_BY_CHIP, UNKNOWN_COLOR_LED, GenericLed,
                                  chip_size, color_from_texts, is_axial)
from linter.model import Circuit, Part, stored_location
from linter.part_specs import PartSpec
from linter.partdata import BjtData, LedData, McuData, MosfetData, PartData, ResistorData
from linter.units import ValueParseError, format_si, parse_fraction, parse_number

if TYPE_CHECKING:
    from linter.config import Settings

__all__ = ["resolve_part_data", "find_spec", "folded_specs", "led_data", "resistor_data", "SPICE_TNOM_K",
           "describe_assumptions", "MCU_SUPPLY_PINS", "MCU_GROUND_PINS"]

SPICE_TNOM_K = 300.15
"""K: the temperature SPICE model parameters are measured at by default (TNOM = 27 °C)."""

MCU_SUPPLY_PINS = ("VDD", "VCC", "AVDD", "VDDA", "DVDD")
MCU_GROUND_PINS = ("VSS", "GND", "AVSS", "VSSA", "DVSS")


def find_spec(part: Part, specs: Mapping[str, PartSpec],
              folded: Mapping[str, PartSpec] | None = None) -> PartSpec | None:
    """The part data of ``part``: by part number, then value, then model name (any case).

    ``folded`` is :func:`folded_specs` of ``specs`` when the caller looks up many parts.
    """
    if folded is None:
        folded = folded_specs(specs)
    model = part.model.name if part.model is not None else None
    for key in (part.part_number, part.value, model):
        if key and key.casefold() in folded:
            return folded[key.casefold()]
    return None


def folded_specs(specs: Mapping[str, PartSpec]) -> dict[str, PartSpec]:
    """Part data by case-folded part number (the look-up table :func:`find_spec` uses)."""
    return {number.casefold(): spec for number, spec in specs.items()}


def resolve_part_data(circuit: Circuit, settings: "Settings", *, fresh: bool = False,
                      ) -> tuple[Circuit, dict[str, PartData]]:
    """A Circuit with kinds and part numbers from part data applied, and part data by ref.

    Everything but the note is worked out once per *reading*: the part's kind, value and its
    reading, part number, cell, properties (by content) and model (everything
    :func:`find_spec` and the records read but the reference and, for a microcontroller, the
    pins: its record is made once per reading and pin names); a record whose note names the
    part is renamed for each. The readings are gathered in C-level passes over the parts and
    the records handed out in bulk. ``fresh=True`` says the circuit's Part objects are the
    caller's alone (just read, seen by nothing else): a changed kind or part number is then
    stored into the part in place. :func:`resolve_part_data_plain` is the same, part by part.
    """
    parts = circuit.parts
    refs = list(parts)
    held = list(parts.values())
    keys = [(part.kind, part.value, part.value_si, part.part_number, part.cell,  # (one pass)
             id(part.properties), id(part.model)) for part in held]
    readings = _readings(dict(zip(keys, held)), settings)
    per_part = list(map(readings.__getitem__, keys))
    changed: dict[str, Part] | None = None
    for index in compress(count(), map(_CHANGES, per_part)):
        part, (_, kind, number, *_) = held[index], per_part[index]
        if fresh:
            _SET_KIND(part, kind)
            _SET_NUMBER(part, number)
            continue
        if changed is None:
            changed = dict(parts)
        held[index] = changed[refs[index]] = Part(
            part.ref, kind, part.value, part.pins, stored_location(part), part.value_si,
            part.path, part.cell, number, part.properties, part.model)  # (replace, in short)
    data = dict(compress(zip(refs, map(_RECORD, per_part)), map(_HAS_DATA, per_part)))
    mcus: dict[tuple, tuple[PartData, str | None]] = {}
    for index in compress(count(), map(_SPECIAL, per_part)):
        ref, (spec, kind, _, record, note, *_) = refs[index], per_part[index]
        if record is _MCU:  # (its record reads the pins: made once per reading and pin names)
            part = held[index]
            key = (id(spec), part.part_number, tuple(map(_NAME, part.pins)))
            made = mcus.get(key)
            if made is None:
                made = mcus[key] = _without_ref(_mcu_data(part, spec), part.ref)
            record, note = made
            data[ref] = record if note is None else _renamed(record, f"{ref}: {note}")
        else:
            data[ref] = _renamed(record, f"{ref}: {note}")
    return (replace(circuit, parts=parts if changed is None else changed),
            data)  # type: ignore[return-value]


def _readings(firsts: Mapping[tuple, Part], settings: "Settings") -> dict[tuple, tuple]:
    """For each reading key (see :func:`resolve_part_data`) and a part that has it: the
    :func:`_reading` of that part (its record :data:`_MCU` for a microcontroller), then
    whether the part's kind or part number changes, whether its record must be made or
    renamed for it (a microcontroller, a note naming it) and whether it has a record.
    Keys whose properties mappings are equal share one reading."""
    folded = folded_specs(settings.parts)
    tolerance = settings.assume.resistor_tolerance
    by_content: dict[tuple, tuple] = {}
    readings: dict[tuple, tuple] = {}
    for key, part in firsts.items():
        content = key
        try:
            content = (*key[:5], tuple(part.properties.items()), key[6])
            hash(content)
        except TypeError:  # (a property value that is no hash key: by identity)
            content = key
        reading = by_content.get(content)
        if reading is None:
            spec, kind, number, record, note = _reading(part, settings, folded, tolerance)
            mcu = record is None and kind == "mcu"
            reading = by_content[content] = (
                spec, kind, number, _MCU if mcu else record, note,
                kind != part.kind or number != part.part_number,
                note is not None or mcu, record is not None or mcu)
        readings[key] = reading
    return readings


def _without_ref(record: PartData, ref: str) -> tuple[PartData, str | None]:
    """``record`` and its note without the ``"{ref}: "`` it starts with (None when it does
    not start so: the record is then the part's as it is)."""
    note = getattr(record, "note", None)
    prefix = f"{ref}: "
    if note is None or not note.startswith(prefix):
        return record, None
    return record, note[len(prefix):]


_NAME = attrgetter("name")
_RECORD = itemgetter(3)
_CHANGES = itemgetter(5)
_SPECIAL = itemgetter(6)
_HAS_DATA = itemgetter(7)
_MCU: Any = object()
"""Stands for a microcontroller's record (made for each part) until it is made."""
_SET_KIND = Part.__dict__["kind"].__set__
_SET_NUMBER = Part.__dict__["part_number"].__set__


def _reading(part: Part, settings: "Settings", folded: Mapping[str, PartSpec], tolerance: float,
             ) -> tuple[PartSpec | None, str, str | None, PartData | None, str | None]:
    """For one reading (see :func:`resolve_part_data`): the part data found, the kind and part
    number the part then has, its record (None for a microcontroller or a kind without one),
    and the record's note without the part's name (None when the note does not name it)."""
    spec = find_spec(part, settings.parts, folded)
    kind, number = part.kind, part.part_number
    if spec is not None:
        number = part.part_number or spec.part_number
        if part.kind != spec.kind or part.part_number != number:
            part = replace(part, kind=spec.kind, part_number=number)
            kind = part.kind
    if kind == "mcu":
        return spec, kind, number, None, None
    record = _plain_record(part, spec, tolerance)
    note = getattr(record, "note", None)
    prefix = f"{part.ref}: "
    if note is None or not note.startswith(prefix):
        return spec, kind, number, record, None
    return spec, kind, number, record, note[len(prefix):]


def _renamed(record: PartData, note: str) -> PartData:
    """``dataclasses.replace(record, note=note)``: for a record of :func:`linter.records.record`
    that keeps its fields in its ``__dict__`` (no slots, no ``__post_init__``), the
    dictionary copied in field order with the note replaced (what its ``__init__`` stores)."""
    kind = type(record)
    if kind in _DICT_RECORDS:
        made = object.__new__(kind)
        fields = made.__dict__
        fields.update(record.__dict__)
        fields["note"] = note
        return made
    return replace(record, note=note)


_DICT_RECORDS = frozenset(kind for kind in (LedData, ResistorData, BjtData, MosfetData, McuData)
                          if "__slots__" not in kind.__dict__
                          and not hasattr(kind, "__post_init__")
                          and "note" in kind.__dataclass_fields__
                          and not any(isinstance(value, cached_property)
                                      for value in vars(kind).values()))


def _plain_record(part: Part, spec: PartSpec | None, default_tolerance: float) -> PartData | None:
    """The part's record, made for it alone (no sharing)."""
    if part.kind == "led":
        return led_data(part, spec)
    if part.kind == "resistor":
        return resistor_data(part, spec, default_tolerance)
    if part.kind in ("npn", "pnp"):
        return _bjt_data(part, spec)
    if part.kind in ("nmos", "pmos"):
        return _mosfet_data(part, spec)
    if part.kind == "mcu":
        return _mcu_data(part, spec)
    return None


def resolve_part_data_plain(circuit: Circuit, settings: "Settings",
                            ) -> tuple[Circuit, dict[str, PartData]]:
    """:func:`resolve_part_data` part by part, nothing shared: the reference for its tests."""
    parts = dict(circuit.parts)
    data: dict[str, PartData] = {}
    for ref, part in circuit.parts.items():
        spec = find_spec(part, settings.parts)
        if spec is not None:
            number = part.part_number or spec.part_number
            if part.kind != spec.kind or part.part_number != number:
                part = parts[ref] = replace(part, kind=spec.kind, part_number=number)
        record = _plain_record(part, spec, settings.assume.resistor_tolerance)
        if record is not None:
            data[ref] = record
    return replace(circuit, parts=parts), data


def _model_params(part: Part) -> Mapping[str, float]:
    return part.model.params if part.model is not None else {}


def _shockley_vf(current: float, saturation: float, ideality: float, series: float) -> float:
    """Forward voltage in V at ``current`` A: V = n·Vt·ln(I/Is + 1) + I·Rs, Vt = k·T/q at TNOM."""
    from scipy.constants import Boltzmann, elementary_charge

    thermal = Boltzmann * SPICE_TNOM_K / elementary_charge
    return ideality * thermal * math.log(current / saturation + 1.0) + current * series


def led_data(part: Part, spec: PartSpec | None) -> LedData:
    """An LED's figures: its part data, its SPICE model, then its colour's generic figures."""
    given: dict[str, Any] = dict(spec.figures) if spec is not None else {}
    params = _model_params(part)
    color = given.get("color") or color_from_texts(
        (part.properties.get("color"), part.value, part.part_number,
         part.properties.get("description"), part.cell))
    generic = GENERIC_LEDS.get(color or "", UNKNOWN_COLOR_LED)
    assumed: list[str] = [] if color else ["color"]
    test_current = _take(given, "vf_test_current", LED_TEST_CURRENT, assumed)
    if "vf_typ" not in given and "IS" in params:
        given["vf_typ"] = _shockley_vf(test_current, params["IS"], params.get("N", 1.0),
                                       params.get("RS", 0.0))
    vf_typ = _take(given, "vf_typ", generic.vf_typ, assumed)
    figures = {name: given.get(name) for name in
               ("if_recommended", "if_peak", "if_peak_pulse", "if_peak_duty", "pd_max")}
    record = LedData(
        color=color, vf_typ=vf_typ, vf_test_current=test_current,
        vf_min=_take(given, "vf_min", vf_typ - (generic.vf_typ - generic.vf_min), assumed),
        vf_max=_take(given, "vf_max", vf_typ + (generic.vf_max - generic.vf_typ), assumed),
        if_max=_take(given, "if_max", generic.if_max, assumed),
        vr_max=_take(given, "vr_max", LED_VR_MAX, assumed),
        tempco=_take(given, "tempco", generic.tempco, assumed),
        ideality=params.get("N"), rs=params.get("RS"), spice_is=params.get("IS"),
        part_number=part.part_number, **figures)
    return replace(record, assumed=tuple(assumed),
                   note=_note(part, spec, assumed, _led_summary(record, generic)))


def _take(given: Mapping[str, Any], name: str, fallback: Any, assumed: list[str]) -> Any:
    """``given[name]``, else ``fallback`` with ``name`` recorded as assumed."""
    if name in given and given[name] is not None:
        return given[name]
    assumed.append(name)
    return fallback


def _led_summary(record: LedData, generic: GenericLed) -> str:
    kind = "LED of unknown colour" if generic is UNKNOWN_COLOR_LED else f"{generic.name} LED"
    return (f"generic {kind} assumed (vf {record.vf_typ:.3g} V typ, {record.vf_min:.3g}–"
            f"{record.vf_max:.3g} V at {format_si(record.vf_test_current or 0.0, 'A')}; "
            f"if_max {format_si(record.if_max or 0.0, 'A')})")


def describe_assumptions(assumed: tuple[str, ...] | list[str], spec: PartSpec | None,
                         summary: str) -> str:
    """What was assumed, in words, without the reference (shared by parts of one number)."""
    if spec is None:
        return f"no part data; {summary}"
    return f"part data {spec.part_number} lacks {', '.join(assumed)}; {summary}"


def _note(part: Part, spec: PartSpec | None, assumed: list[str], summary: str) -> str | None:
    if not assumed:
        return None
    return f"{part.ref}: {describe_assumptions(assumed, spec, summary)}"


def _fraction(text: str | None) -> float | None:
    if not text:
        return None
    try:
        return parse_fraction(text.replace("±", "").replace("+/-", "").strip())
    except ValueParseError:
        return None


def _power(text: str | None) -> float | None:
    if not text:
        return None
    try:
        return parse_number(text, "W")
    except ValueParseError:
        return None


def resistor_data(part: Part, spec: PartSpec | None, default_tolerance: float) -> ResistorData:
    """A resistor's value, tolerance and rating: part data, then BOM, then package, then generic."""
    given = spec.figures if spec is not None else {}
    ohms = part.value_si
    if ohms is None and part.value:
        try:
            ohms = parse_number(part.value, "Ω")
        except ValueParseError:
            ohms = None
    assumed: list[str] = []
    tolerance = given.get("tolerance", _fraction(part.properties.get("tolerance")))
    if tolerance is None:
        tolerance = default_tolerance
        assumed.append("tolerance")
    package = part.properties.get("package") or part.properties.get("footprint")
    power, source = _rating(given, part, package)
    pieces = [f"tolerance {default_tolerance * 100:g} % assumed"] if assumed else []
    if power is None:
        pieces.append("power rating unknown (no rating, no chip size)")
    note = f"{part.ref}: {'; '.join(pieces)}" if pieces else None
    return ResistorData(ohms=ohms, tolerance=tolerance, power=power, package=package,
                        power_source=source, part_number=part.part_number,
                        assumed=tuple(assumed), note=note)


def _rating(given: Mapping[str, Any], part: Part, package: str | None) -> tuple[float | None, str | None]:
    if given.get("power") is not None:
        return given["power"], "part data"
    bom_power = _power(part.properties.get("power"))
    if bom_power is not None:
        return bom_power, "BOM"
    chip = chip_size(package)
    if chip is not None:
        return RESISTOR_POWER_BY_CHIP[chip], f"{chip} chip size"
    if is_axial(package):
        return AXIAL_POWER, "axial package"
    return None, None


def _fill(given: Mapping[str, Any], generic: Mapping[str, float]) -> tuple[dict[str, Any], list[str]]:
    figures: dict[str, Any] = {}
    assumed: list[str] = []
    for name, fallback in generic.items():
        figures[name] = _take(given, name, fallback, assumed)
    return figures, assumed


def _bjt_data(part: Part, spec: PartSpec | None) -> BjtData:
    given = dict(spec.figures) if spec is not None else {}
    params = _model_params(part)
    if "hfe_typ" not in given and "BF" in params:
        given["hfe_typ"] = params["BF"]
    figures, assumed = _fill(given, GENERIC_BJT)
    summary = (f"generic small-signal {part.kind.upper()} assumed (hfe {figures['hfe_min']:g}–"
               f"{figures['hfe_typ']:g}, vce_sat {figures['vce_sat']:g} V, "
               f"pd_max {format_si(figures['pd_max'], 'W')})")
    return BjtData(polarity=part.kind, spice_is=params.get("IS"), spice_bf=params.get("BF"),
                   spice_br=params.get("BR"), part_number=part.part_number,
                   assumed=tuple(assumed), note=_note(part, spec, assumed, summary), **figures)


def _mosfet_data(part: Part, spec: PartSpec | None) -> MosfetData:
    given = dict(spec.figures) if spec is not None else {}
    params = _model_params(part)
    if "vgs_th" not in given and "VTO" in params:
        given["vgs_th"] = params["VTO"]
    figures, assumed = _fill(given, GENERIC_MOSFET[part.kind])
    summary = (f"generic small {'N' if part.kind == 'nmos' else 'P'}-MOSFET assumed (vgs_th "
               f"{figures['vgs_th']:g} V, rds_on {figures['rds_on']:g} Ω at "
               f"{figures['rds_on_vgs']:g} V)")
    return MosfetData(polarity=part.kind, spice_vto=params.get("VTO"), spice_kp=params.get("KP"),
                      part_number=part.part_number, assumed=tuple(assumed),
                      note=_note(part, spec, assumed, summary), **figures)


def _pins_named(part: Part, names: tuple[str, ...]) -> tuple[str, ...]:
    wanted = {name.casefold() for name in names}
    return tuple(pin.name for pin in part.pins if pin.name.casefold() in wanted)


def _mcu_data(part: Part, spec: PartSpec | None) -> McuData:
    given = dict(spec.figures) if spec is not None else {}
    figures, assumed = _fill(given, GENERIC_MCU)
    supply = _take(given, "supply_pins", _pins_named(part, MCU_SUPPLY_PINS), assumed)
    ground = _take(given, "ground_pins", _pins_named(part, MCU_GROUND_PINS), assumed)
    summary = (f"generic microcontroller pins assumed (pin_current_max "
               f"{format_si(figures['pin_current_max'], 'A')}, package_current_max "
               f"{format_si(figures['package_current_max'], 'A')}, output_resistance "
               f"{figures['output_resistance']:g} Ω; supply from pins {', '.join(supply) or 'none found'})")
    return McuData(supply_pins=tuple(supply), ground_pins=tuple(ground),
                   supply_voltage=given.get("supply_voltage"), part_number=part.part_number,
                   assumed=tuple(assumed), note=_note(part, spec, assumed, summary), **figures)
