"""Reading each table of one settings file into a partial layer of :class:`linter.config.Settings`.

A layer holds only what its file says; :func:`linter.config.merge_layers` lays the user's layer
over the shipped defaults. Every value is checked here, where the file and line are known.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import field
from typing import Any

from linter.findings import SEVERITIES
from linter.model import SourceLocation
from linter.part_specs import PartSpec, read_part_specs
from linter.partdata import Rail
from linter.records import record
from linter.tomldoc import TomlDoc, table_name
from linter.units import ValueParseError, parse_temperature, parse_with_tolerance

__all__ = ["Layer", "RuleSettings", "Waiver", "Pulse", "read_layer", "TOP_LEVEL_TABLES"]

TOP_LEVEL_TABLES = ("rails", "ambient", "derating", "assume", "rules", "waive", "parts", "pulsed",
                    "limits")


@record
class RuleSettings:
    """``[rules.ID]``: severity override, on/off, and the rule's options as written
    (checked against the rule's declared options by :func:`linter.config.check_rule_settings`)."""

    severity: str | None = None
    enabled: bool | None = None
    options: dict[str, Any] = field(default_factory=dict, hash=False)
    location: SourceLocation | None = None
    option_locations: dict[str, SourceLocation] = field(default_factory=dict, hash=False)


@record
class Waiver:
    """``[[waive]]``: an accepted finding of ``rule`` on ``parts``, with the reason, until a date."""

    rule: str
    parts: tuple[str, ...]
    reason: str
    until: dt.date | None = None
    location: SourceLocation | None = None


@record
class Pulse:
    """``[pulsed."NET"]``: the net is driven in pulses of ``duty`` (fraction) every ``period`` s."""

    net: str
    duty: float
    period: float | None = None
    location: SourceLocation | None = None


@record
class Layer:
    """What one settings file says, checked; the ``located`` entries keep where values were."""

    source: str
    rails: dict[str, Rail] = field(default_factory=dict)
    ambient: dict[str, tuple[float, SourceLocation]] = field(default_factory=dict)
    derating: dict[str, float] = field(default_factory=dict)
    assume: dict[str, float] = field(default_factory=dict)
    rules: dict[str, RuleSettings] = field(default_factory=dict)
    waivers: tuple[Waiver, ...] = ()
    parts: dict[str, PartSpec] = field(default_factory=dict)
    pulsed: dict[str, Pulse] = field(default_factory=dict)
    limits: dict[str, int] = field(default_factory=dict)


def read_layer(doc: TomlDoc) -> Layer:
    """Check every table of a settings file and read it into a :class:`Layer`."""
    doc.check_keys((), doc.data, TOP_LEVEL_TABLES)
    return Layer(
        source=doc.source,
        rails=_rails(doc),
        ambient=_ambient(doc),
        derating=_fractions(doc, "derating", ("resistor_power", "transistor_power")),
        assume=_fractions(doc, "assume", ("rail_tolerance", "resistor_tolerance")),
        rules=_rules(doc),
        waivers=_waivers(doc),
        parts=read_part_specs(doc),
        pulsed=_pulsed(doc),
        limits=_limits(doc),
    )


def _limits(doc: TomlDoc) -> dict[str, int]:
    """``[limits]``: input limits (:mod:`linter.limits`); the environment overrides them."""
    from linter.limits import ENVIRONMENT, parse_limit

    table = doc.table(("limits",), doc.data.get("limits", {}))
    doc.check_keys(("limits",), table, tuple(ENVIRONMENT))
    found: dict[str, int] = {}
    for key, value in table.items():
        try:
            found[key] = parse_limit(key, value)
        except ValueError as exc:
            doc.fail(("limits", key), f"[limits] {exc}")
    return found


_RAIL_LIMIT_V = 10_000.0
"""Largest rail magnitude read (beyond any LED board; a rail of 1e308 V breaks the arithmetic)."""
_AMBIENT_RANGE_C = (-100.0, 300.0)
"""Ambient temperatures read, in degC (far outside any rating; -273 degC and below is no
temperature)."""


def _rails(doc: TomlDoc) -> dict[str, Rail]:
    rails: dict[str, Rail] = {}
    for name, value in doc.table(("rails",), doc.data.get("rails", {})).items():
        path = ("rails", name)
        nom, low, high = _rail_values(doc, path, value)
        if max(abs(low), abs(high)) > _RAIL_LIMIT_V:
            doc.fail(path, f"rail {name!r}: {max(abs(low), abs(high)):g} V is beyond "
                           f"±{_RAIL_LIMIT_V:g} V")
        try:
            rails[name] = Rail(name, nom, low, high, inferred=False,
                               origin=f"settings {doc.source}:{doc.location(path).line}")
        except ValueError:
            doc.fail(path, f"rail {name!r}: need min <= nom <= max, got min {low:g} V, "
                           f"nom {nom:g} V, max {high:g} V")
    return rails


def _rail_values(doc: TomlDoc, path: tuple[str, ...], value: Any) -> tuple[float, float, float]:
    """(nom, min, max) in V from ``"5 V ±5%"``, a bare number, or ``{min, nom, max}``."""
    if isinstance(value, dict):
        doc.check_keys(path, value, ("min", "nom", "max"))
        if "nom" not in value:
            doc.fail(path, f"rail {path[-1]!r} needs nom (and optionally min, max)")
        nom = doc.quantity((*path, "nom"), value["nom"], "V")
        low = doc.quantity((*path, "min"), value["min"], "V") if "min" in value else nom
        high = doc.quantity((*path, "max"), value["max"], "V") if "max" in value else nom
        return nom, low, high
    if isinstance(value, str):
        try:
            nom, tolerance = parse_with_tolerance(value, "V")
        except ValueParseError as exc:
            doc.fail(path, f"rail {path[-1]!r}: {exc} (write it as '5 V ±5%')")
        if tolerance is not None and not 0.0 <= tolerance <= 1.0:
            doc.fail(path, f"rail {path[-1]!r}: tolerance ±{tolerance * 100:g}% lies outside "
                           "0% to 100%")
        spread = abs(nom) * (tolerance or 0.0)
        return nom, nom - spread, nom + spread
    nom = doc.quantity(path, value, "V")
    return nom, nom, nom


def _ambient(doc: TomlDoc) -> dict[str, tuple[float, SourceLocation]]:
    table = doc.table(("ambient",), doc.data.get("ambient", {}))
    doc.check_keys(("ambient",), table, ("min", "max"))
    found: dict[str, tuple[float, SourceLocation]] = {}
    for key, value in table.items():
        path = ("ambient", key)
        if isinstance(value, bool) or not isinstance(value, (int, float, str)):
            doc.fail(path, f"{key!r} in [ambient]: expected a temperature such as '40 degC'")
        try:
            found[key] = (parse_temperature(str(value)), doc.location(path))
            if not _AMBIENT_RANGE_C[0] <= found[key][0] <= _AMBIENT_RANGE_C[1]:
                doc.fail(path, f"{key!r} in [ambient]: {found[key][0]:g} degC lies outside "
                               f"{_AMBIENT_RANGE_C[0]:g} to {_AMBIENT_RANGE_C[1]:g} degC")
        except ValueParseError as exc:
            doc.fail(path, f"{key!r} in [ambient]: {exc}")
    return found


def _fractions(doc: TomlDoc, name: str, keys: tuple[str, ...]) -> dict[str, float]:
    table = doc.table((name,), doc.data.get(name, {}))
    doc.check_keys((name,), table, keys)
    found: dict[str, float] = {}
    for key, value in table.items():
        share = doc.quantity((name, key), value, "%")
        if not 0.0 <= share <= 1.0:
            doc.fail((name, key), f"{key!r} in [{name}]: must lie between 0% and 100%")
        found[key] = share
    return found


def _rules(doc: TomlDoc) -> dict[str, RuleSettings]:
    rules: dict[str, RuleSettings] = {}
    for rule_id, table in doc.table(("rules",), doc.data.get("rules", {})).items():
        path = ("rules", rule_id)
        table = doc.table(path, table)
        severity = table.get("severity")
        if severity is not None and severity not in SEVERITIES:
            doc.fail((*path, "severity"), f"severity in {table_name(path)} must be one of "
                                          f"{', '.join(SEVERITIES)}, not {severity!r}")
        enabled = table.get("enabled")
        if enabled is not None and not isinstance(enabled, bool):
            doc.fail((*path, "enabled"), f"enabled in {table_name(path)} must be true or false")
        options = {key: value for key, value in table.items() if key not in ("severity", "enabled")}
        rules[rule_id] = RuleSettings(severity, enabled, options, doc.location(path),
                                      {key: doc.location((*path, key)) for key in options})
    return rules


def _waivers(doc: TomlDoc) -> tuple[Waiver, ...]:
    entries = doc.data.get("waive", [])
    if not isinstance(entries, list):
        doc.fail(("waive",), "waivers are written as [[waive]] tables")
    return tuple(_waiver(doc, ("waive", index), entry) for index, entry in enumerate(entries))


def _waiver(doc: TomlDoc, path: tuple[Any, ...], entry: Any) -> Waiver:
    table = doc.table(path, entry)
    doc.check_keys(path, table, ("rule", "parts", "reason", "until"))
    for required in ("rule", "parts", "reason"):
        if required not in table or table[required] in ("", []):
            doc.fail(path, f"waiver needs {required} = ..." + (
                " (say why the finding is accepted)" if required == "reason" else ""))
    until = table.get("until")
    if isinstance(until, str):
        try:
            until = dt.date.fromisoformat(until.strip())
        except ValueError:
            doc.fail((*path, "until"), f"until {until!r}: expected a date such as 2026-06-30")
    elif until is not None and (not isinstance(until, dt.date) or isinstance(until, dt.datetime)):
        doc.fail((*path, "until"), "until: expected a date such as 2026-06-30")
    return Waiver(doc.text((*path, "rule"), table["rule"]), doc.texts((*path, "parts"), table["parts"]),
                  doc.text((*path, "reason"), table["reason"]), until, doc.location(path))


def _pulsed(doc: TomlDoc) -> dict[str, Pulse]:
    pulses: dict[str, Pulse] = {}
    for net, table in doc.table(("pulsed",), doc.data.get("pulsed", {})).items():
        path = ("pulsed", net)
        table = doc.table(path, table)
        doc.check_keys(path, table, ("duty", "period"))
        if "duty" not in table:
            doc.fail(path, f"{table_name(path)} needs duty = ... (such as '10%')")
        duty = doc.quantity((*path, "duty"), table["duty"], "%")
        if not 0.0 < duty <= 1.0:
            doc.fail((*path, "duty"), f"duty in {table_name(path)} must lie above 0% and up to 100%")
        period = doc.quantity((*path, "period"), table["period"], "s") if "period" in table else None
        pulses[net] = Pulse(net, duty, period, doc.location(path))
    return pulses
