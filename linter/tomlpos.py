"""TOML with positions: decode with located errors, and find the line where a key was written.

The standard library's :mod:`tomllib` gives no positions for keys, so :class:`KeyLocator`
scans the text itself: table headers (``[parts."LX-R0603"]``, ``[[waive]]``) and the keys
below them (``vf_typ = ...``, dotted keys too). It is a line scanner, not a second parser:
it is used only to point messages at a line, and falls back to the nearest enclosing table.
"""

from __future__ import annotations

import re
import tomllib
from typing import Any

from linter.errors import InputError

__all__ = ["KeyPath", "load_toml", "KeyLocator", "split_dotted"]

KeyPath = tuple[str | int, ...]
"""A key's place in the document: table names, array-of-table indexes, the key itself."""

_AT = re.compile(r"\s*\(at line (?P<line>\d+), column (?P<column>\d+)\)\s*$")
_AT_END = re.compile(r"\s*\(at end of document\)\s*$")
_KEY_PART = r'(?:"(?:[^"\\]|\\.)*"|\'[^\']*\'|[A-Za-z0-9_\-]+)'
_DOTTED = re.compile(rf"^\s*(?P<key>{_KEY_PART}(?:\s*\.\s*{_KEY_PART})*)\s*=")
_HEADER = re.compile(rf"^\s*(?P<open>\[\[?)\s*(?P<key>{_KEY_PART}(?:\s*\.\s*{_KEY_PART})*)\s*\]")


TOML_MAX_DEPTH = 100
"""Deepest nesting of arrays and inline tables read; the decoder recurses, so deeper text is
refused at the bracket that goes too deep (settings nest three or four levels)."""
_TOML_PIECES = re.compile(r'"""[\s\S]*?"""|\'\'\'[\s\S]*?\'\'\'|"(?:\\.|[^"\\\n])*"|\'[^\'\n]*\'|#[^\n]*|[\[\]{}]')


def _too_deep(text: str) -> int | None:
    """Offset of the first ``[`` or ``{`` nested deeper than :data:`TOML_MAX_DEPTH`, or None."""
    if text.count("[") + text.count("{") <= TOML_MAX_DEPTH:
        return None
    depth = 0
    for match in _TOML_PIECES.finditer(text):
        piece = match.group()
        if piece in ("[", "{"):
            depth += 1
            if depth > TOML_MAX_DEPTH:
                return match.start()
        elif piece in ("]", "}"):
            depth = max(depth - 1, 0)
    return None


def load_toml(text: str, source: str, error: type[InputError]) -> dict[str, Any]:
    """Decode TOML; a syntax error becomes ``error`` at the decoder's line and column."""
    deep = _too_deep(text)
    if deep is not None:
        line = text.count("\n", 0, deep) + 1
        raise error(source, line, deep - (text.rfind("\n", 0, deep) + 1) + 1,
                    f"invalid TOML: arrays or tables nested deeper than {TOML_MAX_DEPTH} levels")
    try:
        return tomllib.loads(text)
    except RecursionError:
        raise error(source, 1, 1, "invalid TOML: nested too deeply to read") from None
    except tomllib.TOMLDecodeError as exc:
        message = str(exc)
        match = _AT.search(message)
        if match:
            line, column = int(match["line"]), int(match["column"])
            message = message[: match.start()]
        else:
            line, column = text.count("\n") + 1, None
            message = _AT_END.sub("", message)
        raise error(source, line, column, f"invalid TOML: {message[:1].lower()}{message[1:]}") from None


def split_dotted(key: str) -> tuple[str, ...]:
    """``parts."LX-R0603"`` → ``("parts", "LX-R0603")``.

    >>> split_dotted('parts . "a.b" .c')
    ('parts', 'a.b', 'c')
    """
    pieces = re.findall(_KEY_PART, key)
    return tuple(_unquote(piece) for piece in pieces)


def _unquote(piece: str) -> str:
    if piece.startswith('"'):
        return bytes(piece[1:-1], "utf-8").decode("unicode_escape") if "\\" in piece else piece[1:-1]
    if piece.startswith("'"):
        return piece[1:-1]
    return piece


class KeyLocator:
    """Line numbers (1-based) of the tables and keys of a TOML text.

    >>> locator = KeyLocator('[rails]\\n"+5V" = "5 V"\\n[[waive]]\\nrule = "x"\\n')
    >>> locator.line_of(("rails", "+5V")), locator.line_of(("waive", 0, "rule"))
    (2, 4)
    """

    def __init__(self, text: str) -> None:
        self._lines: dict[KeyPath, int] = {}
        table: KeyPath = ()
        counts: dict[tuple[str, ...], int] = {}
        for number, line in enumerate(text.splitlines(), start=1):
            header = _HEADER.match(line)
            if header:
                names = split_dotted(header["key"])
                if header["open"] == "[[":
                    index = counts.get(names, -1) + 1
                    counts[names] = index
                    table = (*names, index)
                else:
                    table = self._with_indexes(names, counts)
                self._lines.setdefault(table, number)
                continue
            key = _DOTTED.match(line)
            if key:
                self._lines.setdefault((*table, *split_dotted(key["key"])), number)

    @staticmethod
    def _with_indexes(names: tuple[str, ...], counts: dict[tuple[str, ...], int]) -> KeyPath:
        """``[waive.x]`` below the second ``[[waive]]`` belongs to ``("waive", 1, "x")``."""
        path: list[str | int] = []
        for depth, name in enumerate(names):
            path.append(name)
            index = counts.get(names[: depth + 1])
            if index is not None and depth + 1 < len(names):
                path.append(index)
        return tuple(path)

    def line_of(self, path: KeyPath) -> int | None:
        """The line of ``path``, else of its nearest enclosing table written in the text."""
        for end in range(len(path), 0, -1):
            line = self._lines.get(path[:end])
            if line is not None:
                return line
        return None
