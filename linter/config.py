"""Settings: found upward from the netlist, laid over the shipped defaults, checked with lines.

Where settings come from, lowest first:

1. the shipped defaults, ``linter/data/default_settings.toml`` (every key commented there);
2. the project's file: ``--config FILE`` if given, else the first ``ledlint.toml`` or
   ``pyproject.toml`` with a ``[tool.ledlint]`` table found walking up from the netlist's
   folder (the walk stops at a folder holding ``.git``, the top of the project);
3. ``--parts FILE`` files, in command-line order: their ``[parts."PN"]`` tables replace a
   part number's table from the settings (the command line is the most specific word).

Every value is checked where it is written: ``ledlint.toml:14: unknown key 'vf_tpy' in
[parts."LX-R0603"]; did you mean 'vf_typ'?``. Rule ids and rule options are checked against
the rule registry by :func:`check_rule_settings` (the engine calls it).
"""

from __future__ import annotations

from dataclasses import field, replace
from pathlib import Path
from typing import Any, Iterable, Mapping, Sequence

from linter.config_tables import Layer, Pulse, RuleSettings, Waiver, read_layer
from linter.errors import ConfigError, InputError, PartsError
from linter.part_specs import PartSpec, read_part_specs
from linter.partdata import Ambient, Rail
from linter.readers import decode_text
from linter.records import record
from linter.tomldoc import TomlDoc, suggestion, table_name
from linter.tomlpos import KeyLocator, load_toml
from linter.units import ValueParseError, parse_quantity

__all__ = [
    "Settings", "Derating", "Assumptions", "RuleSettings", "RuleOption", "Waiver", "Pulse",
    "PartSpec", "find_settings_file", "load_settings", "settings_from_text", "default_settings",
    "read_parts_file", "check_rule_settings", "SETTINGS_NAME",
]

SETTINGS_NAME = "ledlint.toml"
_DEFAULTS = "default_settings.toml"


@record
class Derating:
    """Share (fraction) of the temperature-derated rating worst-case dissipation may use."""

    resistor_power: float = 0.6
    transistor_power: float = 0.6


@record
class Assumptions:
    """Values assumed where the inputs say nothing: tolerance (fraction) of a rail inferred
    from its net name or a SPICE source, and of a resistor without a stated tolerance."""

    rail_tolerance: float = 0.05
    resistor_tolerance: float = 0.05


@record
class RuleOption:
    """An option a rule declares (``options = (RuleOption("ratio", "", 1.5, "..."),)``).

    ``unit`` is how the value is read: '' a plain number, '%' a fraction, 'V', 'A', 'W', 'Ω',
    's' a quantity, 'bool' true/false, 'text' a string.
    """

    name: str
    unit: str
    default: Any
    doc: str = ""


@record
class Settings:
    """Everything the settings files say, merged and checked (SI floats throughout)."""

    rails: Mapping[str, Rail] = field(default_factory=dict, hash=False)
    ambient: Ambient = Ambient()
    derating: Derating = Derating()
    rules: Mapping[str, RuleSettings] = field(default_factory=dict, hash=False)
    waivers: tuple[Waiver, ...] = ()
    parts: Mapping[str, PartSpec] = field(default_factory=dict, hash=False)
    pulsed: Mapping[str, Pulse] = field(default_factory=dict, hash=False)
    source: str | None = None
    assume: Assumptions = Assumptions()
    parts_sources: tuple[str, ...] = ()
    limits: Mapping[str, int] = field(default_factory=dict, hash=False)


def _pyproject_has_table(path: Path) -> bool:
    try:
        text = path.read_text(encoding="utf-8", errors="replace")
    except OSError:
        return False
    return "tool.ledlint" in text


def find_settings_file(start: Path) -> Path | None:
    """The settings file for a netlist in folder ``start``: ``ledlint.toml``, else a
    ``pyproject.toml`` with ``[tool.ledlint]``, in ``start`` or a folder above it.

    The walk stops after a folder holding ``.git`` (the top of the project) or at the root.
    """
    folder = start.resolve()
    for candidate in (folder, *folder.parents):
        settings = candidate / SETTINGS_NAME
        if settings.is_file():
            return settings
        pyproject = candidate / "pyproject.toml"
        if pyproject.is_file() and _pyproject_has_table(pyproject):
            return pyproject
        if (candidate / ".git").exists():
            return None
    return None


def _read_doc(path: Path, source: str, error: type[InputError]) -> TomlDoc:
    from linter.limits import read_input

    data = read_input(path, source, error)
    # a lone CR ends a line as LF does (old Mac editors); TOML itself knows only LF and CRLF
    text = decode_text(data, source, error).replace("\r\n", "\n").replace("\r", "\n")
    decoded = load_toml(text, source, error)
    if path.name == "pyproject.toml":
        table = decoded.get("tool", {}).get("ledlint")
        if not isinstance(table, dict):
            raise error(source, None, None, "no [tool.ledlint] table")
        return TomlDoc(table, source, KeyLocator(text), error, ("tool", "ledlint"))
    return TomlDoc(decoded, source, KeyLocator(text), error)


def _defaults_layer() -> Layer:
    # the package's own data folder, read as a plain file (importlib.resources would load
    # about 18 modules, zipfile and tempfile among them, on every run)
    text = (Path(__file__).parent / "data" / _DEFAULTS).read_text(encoding="utf-8")
    source = f"<ledlint>/data/{_DEFAULTS}"
    doc = TomlDoc(load_toml(text, source, ConfigError), source, KeyLocator(text), ConfigError)
    return read_layer(doc)


def merge_layers(layers: Sequence[Layer], source: str | None = None) -> Settings:
    """Later layers over earlier ones, table by table and key by key."""
    rails: dict[str, Rail] = {}
    ambient: dict[str, tuple[float, Any]] = {}
    derating: dict[str, float] = {}
    assume: dict[str, float] = {}
    rules: dict[str, RuleSettings] = {}
    parts: dict[str, PartSpec] = {}
    pulsed: dict[str, Pulse] = {}
    waivers: list[Waiver] = []
    limits: dict[str, int] = {}
    for layer in layers:
        rails.update(layer.rails)
        ambient.update(layer.ambient)
        derating.update(layer.derating)
        assume.update(layer.assume)
        parts.update(layer.parts)
        pulsed.update(layer.pulsed)
        waivers.extend(layer.waivers)
        limits.update(layer.limits)
        for rule_id, settings in layer.rules.items():
            rules[rule_id] = _merge_rule(rules.get(rule_id), settings)
    return Settings(rails=rails, ambient=_ambient(ambient), derating=Derating(**derating),
                    rules=rules, waivers=tuple(waivers), parts=parts, pulsed=pulsed,
                    source=source, assume=Assumptions(**assume), limits=limits)


def _merge_rule(base: RuleSettings | None, top: RuleSettings) -> RuleSettings:
    if base is None:
        return top
    return RuleSettings(
        severity=top.severity if top.severity is not None else base.severity,
        enabled=top.enabled if top.enabled is not None else base.enabled,
        options={**base.options, **top.options}, location=top.location or base.location,
        option_locations={**base.option_locations, **top.option_locations})


def _ambient(found: dict[str, tuple[float, Any]]) -> Ambient:
    low, low_at = found.get("min", (Ambient.min, None))
    high, high_at = found.get("max", (Ambient.max, None))
    if low > high:
        user_set = [at for at in (low_at, high_at) if at is not None and not at.file.startswith("<")]
        where = (user_set or [high_at or low_at])[0]
        raise ConfigError(where.file, where.line, None,
                          f"[ambient] min {low:g} degC lies above max {high:g} degC")
    return Ambient(min=low, max=high)


def default_settings() -> Settings:
    """The shipped defaults alone."""
    return merge_layers([_defaults_layer()])


def settings_from_text(text: str, source: str = SETTINGS_NAME, pyproject: bool = False) -> Settings:
    """Settings from the text of one file laid over the defaults (for tests and tools)."""
    decoded = load_toml(text, source, ConfigError)
    prefix: tuple[str, ...] = ()
    if pyproject:
        decoded, prefix = decoded.get("tool", {}).get("ledlint", {}), ("tool", "ledlint")
    doc = TomlDoc(decoded, source, KeyLocator(text), ConfigError, prefix)
    return merge_layers([_defaults_layer(), read_layer(doc)], source)


def read_parts_file(path: Path, source: str | None = None) -> dict[str, PartSpec]:
    """The ``[parts."PN"]`` tables of a ``--parts`` file; nothing else is allowed in it."""
    doc = _read_doc(path, source if source is not None else str(path), PartsError)
    doc.check_keys((), doc.data, ("parts",))
    return read_part_specs(doc)


def load_settings(netlist: Path, config: Path | None = None,
                  parts_files: Iterable[Path] = ()) -> Settings:
    """Defaults, then ``config`` (or the file found upward from ``netlist``), then parts files."""
    layers = [_defaults_layer()]
    path = config if config is not None else find_settings_file(netlist.parent)
    source: str | None = None
    if path is not None:
        source = str(path)
        layers.append(read_layer(_read_doc(path, source, ConfigError)))
    settings = merge_layers(layers, source)
    extra: dict[str, PartSpec] = {}
    parts_sources = tuple(str(file) for file in parts_files)
    for file in parts_files:
        extra.update(read_parts_file(file))
    if not extra:
        return replace(settings, parts_sources=parts_sources)
    return replace(settings, parts={**settings.parts, **extra}, parts_sources=parts_sources)


def check_rule_settings(settings: Settings, registry: Mapping[str, Any]) -> Settings:
    """Refuse unknown rule ids (in ``[rules.ID]`` and waivers) and undeclared options; read
    each declared option in its unit. Rules that declare no ``options`` attribute take any."""
    rules: dict[str, RuleSettings] = {}
    for rule_id, rule_settings in settings.rules.items():
        rule = registry.get(rule_id)
        if rule is None:
            _fail_at(rule_settings.location, f"unknown rule {rule_id!r} in "
                     f"{table_name(('rules', rule_id))}{suggestion(rule_id, registry)}")
        rules[rule_id] = _check_options(rule_id, rule, rule_settings)
    for waiver in settings.waivers:
        if waiver.rule not in registry:
            _fail_at(waiver.location, f"waiver names unknown rule {waiver.rule!r}"
                                      f"{suggestion(waiver.rule, registry)}")
    return replace(settings, rules=rules)


def _check_options(rule_id: str, rule: Any, rule_settings: RuleSettings) -> RuleSettings:
    declared = getattr(rule, "options", None)
    if declared is None:
        return rule_settings
    by_name = {option.name: option for option in declared}
    parsed: dict[str, Any] = {}
    for name, value in rule_settings.options.items():
        where = rule_settings.option_locations.get(name, rule_settings.location)
        option = by_name.get(name)
        if option is None:
            known = ", ".join(by_name) or "none"
            _fail_at(where, f"unknown option {name!r} for rule {rule_id}"
                            f"{suggestion(name, by_name) or f' (its options: {known})'}")
        parsed[name] = _option_value(option, value, where, rule_id)
    return replace(rule_settings, options=parsed)


def _option_value(option: RuleOption, value: Any, where: Any, rule_id: str) -> Any:
    if option.unit == "bool":
        if not isinstance(value, bool):
            _fail_at(where, f"option {option.name!r} of rule {rule_id} must be true or false")
        return value
    if option.unit == "text":
        if not isinstance(value, str):
            _fail_at(where, f"option {option.name!r} of rule {rule_id} must be text")
        return value
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return float(value) / (100.0 if option.unit == "%" and value > 1 else 1.0)
    if isinstance(value, str):
        try:
            return parse_quantity(value, option.unit) if option.unit else float(value)
        except (ValueParseError, ValueError):
            pass
    _fail_at(where, f"option {option.name!r} of rule {rule_id}: cannot read {value!r}"
                    f"{' in ' + option.unit if option.unit else ' as a number'}")


def _fail_at(where: Any, message: str) -> Any:
    if where is None:
        raise ConfigError("<settings>", None, None, message)
    raise ConfigError(where.file, where.line, None, message)
