"""Reading typed values out of a decoded TOML document, with located, one-line errors.

A :class:`TomlDoc` is one settings or parts file: its decoded data, its name, a
:class:`linter.tomlpos.KeyLocator`, and the table prefix its settings live under (``tool.ledlint``
in a ``pyproject.toml``). Every reader method takes the key path and raises the document's
error class at the key's line: ``ledlint.toml:14: unknown key 'vf_tpy' in [parts."LX-R0603"];
did you mean 'vf_typ'?``.
"""

from __future__ import annotations

import math
import re
from typing import Any, Iterable, NoReturn

from linter.errors import InputError
from linter.model import SourceLocation
from linter.records import record
from linter.tomlpos import KeyLocator, KeyPath
from linter.units import ValueParseError, parse_number, parse_quantity

__all__ = ["TomlDoc", "table_name", "suggestion"]

_BARE = re.compile(r"^[A-Za-z0-9_\-]+$")
_QUOTED_TABLES = frozenset({"parts", "pulsed", "rails"})
"""Tables whose keys are names from the board (part numbers, nets): always quoted in messages."""


def table_name(path: KeyPath) -> str:
    """``("parts", "LX-R0603")`` → ``[parts."LX-R0603"]``; ``("waive", 0)`` → ``[[waive]] #1``."""
    pieces: list[str] = []
    suffix = ""
    for position, name in enumerate(path):
        if isinstance(name, int):
            suffix = f" #{name + 1}"
            continue
        parent = path[position - 1] if position else None
        quote = parent in _QUOTED_TABLES or not _BARE.match(name)
        pieces.append(f'"{name}"' if quote else name)
    brackets = ("[[", "]]") if suffix else ("[", "]")
    return f"{brackets[0]}{'.'.join(pieces)}{brackets[1]}{suffix}"


def suggestion(word: str, choices: Iterable[str]) -> str:
    """``"; did you mean 'vf_typ'?"`` for the closest choice, or an empty string."""
    import difflib  # only a bad settings file needs it; not loaded on every run

    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f"; did you mean {close[0]!r}?" if close else ""


@record
class TomlDoc:
    """One decoded TOML file and how to point at its keys."""

    data: dict[str, Any]
    source: str
    locator: KeyLocator
    error: type[InputError]
    prefix: tuple[str, ...] = ()

    def location(self, path: KeyPath) -> SourceLocation:
        """Where ``path`` (relative to the prefix) was written; column 1 (TOML keys have no column)."""
        return SourceLocation(self.source, self.locator.line_of((*self.prefix, *path)) or 1, 1)

    def fail(self, path: KeyPath, message: str) -> NoReturn:
        """Raise the document's error at the line of ``path``."""
        raise self.error(self.source, self.locator.line_of((*self.prefix, *path)), None, message)

    def table(self, path: KeyPath, value: Any) -> dict[str, Any]:
        """``value`` if it is a table, else a located error."""
        if not isinstance(value, dict):
            self.fail(path, f"{table_name(path)} must be a table, not {_kind(value)}")
        return value

    def check_keys(self, path: KeyPath, table: dict[str, Any], allowed: Iterable[str]) -> None:
        """Refuse a key of ``table`` that is not in ``allowed``, suggesting the closest."""
        allowed = tuple(allowed)
        for key in table:
            if key not in allowed:
                place = f"in {table_name(path)}" if path else "at the top level"
                self.fail((*path, key), f"unknown key {key!r} {place}"
                          f"{suggestion(key, allowed) or '; expected one of ' + ', '.join(allowed)}")

    def quantity(self, path: KeyPath, value: Any, unit: str) -> float:
        """A quantity written as text with a unit (``"20 mA"``) or a bare SI number."""
        if isinstance(value, bool) or not isinstance(value, (int, float, str)):
            self.fail(path, f"{_key(path)}: expected a value in {unit or 'plain numbers'} "
                            f"(such as {_EXAMPLES.get(unit, '1.5')!r}), not {_kind(value)}")
        if isinstance(value, float) and not math.isfinite(value):
            self.fail(path, f"{_key(path)}: expected a finite value, not {value!r}")
        if isinstance(value, (int, float)):
            return float(value) / (100.0 if unit == "%" and value > 1 else 1.0)
        try:
            return parse_quantity(value, unit) if unit else parse_number(value)
        except ValueParseError as exc:
            self.fail(path, f"{_key(path)}: {exc}")

    def text(self, path: KeyPath, value: Any) -> str:
        """A non-empty string."""
        if not isinstance(value, str) or not value.strip():
            self.fail(path, f"{_key(path)}: expected text, not {_kind(value)}")
        return value.strip()

    def texts(self, path: KeyPath, value: Any) -> tuple[str, ...]:
        """A list of strings (a single string is read as a list of one)."""
        if isinstance(value, str):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, str) and v.strip() for v in value):
            self.fail(path, f"{_key(path)}: expected a list of names, not {_kind(value)}")
        return tuple(v.strip() for v in value)


_EXAMPLES = {"V": "5 V", "A": "20 mA", "W": "0.25 W", "Ω": "25 Ω", "%": "60%", "s": "100 us",
             "°C": "40 degC", "V/K": "-2 mV/K"}


def _key(path: KeyPath) -> str:
    name = path[-1]
    return f"{name!r} in {table_name(path[:-1])}" if len(path) > 1 else repr(name)


def _kind(value: Any) -> str:
    if isinstance(value, bool):
        return f"the boolean {str(value).lower()}"
    if isinstance(value, str):
        return f"the text {value!r}"
    if isinstance(value, (int, float)):
        return f"the number {value!r}"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "a table"
    return type(value).__name__
