"""JSON written in pieces, indented down to a chosen depth and one line per entry below it.

The reports' layout: the top levels indented by two spaces, so that a reader finds the
summary at a glance; each container at ``compact_depth`` (a report's groups and findings) on
one line, written by the standard library's C encoder, so that a changed group is one
changed line in a diff. With ``compact_depth=math.inf`` the text is exactly
``json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False)``.

The text comes as an iterator of pieces (:func:`layered_chunks`), so that a large report can
be written as it is made. A :class:`Lines` value stands for an array whose entries are
already JSON text (one line each); it is consumed once, when the writer reaches it, and
must sit above ``compact_depth`` (inside an indented level).
"""

from __future__ import annotations

import json
import math
from itertools import islice
from typing import Any, Iterable, Iterator

from linter.records import record

__all__ = ["Lines", "INDENT", "layered_chunks", "compact_json", "plain_json"]

INDENT = "  "
"""One level of indentation."""

_TEXT = json.encoder.encode_basestring  # the C version when available


def compact_json(data: Any) -> str:
    """Plain data as one line: the C encoder (``json.dumps`` without indent), default
    separators ``", "`` and ``": "``, non-ASCII kept, NaN and infinity refused."""
    return json.dumps(data, ensure_ascii=False, allow_nan=False)


def _plain_default(value: Any) -> Any:
    from linter.report.common import plain_data

    return plain_data(value)


_RAW_ENCODER = json.JSONEncoder(ensure_ascii=False, allow_nan=False, default=_plain_default)


def plain_json(data: Any) -> str:
    """``compact_json(plain_data(data))`` without copying ``data`` first: the C encoder
    writes tuples as lists and asks :func:`~linter.report.common.plain_data` for any other
    type; a number that is not finite (null in plain data) sends the record the plain way.
    For records whose keys are text (plain data turns other keys into text)."""
    try:
        return _RAW_ENCODER.encode(data)
    except ValueError:
        from linter.report.common import plain_data

        return compact_json(plain_data(data))


@record
class Lines:
    """A JSON array given as the texts of its entries, written one entry a line."""

    entries: Iterable[str]


def layered_chunks(data: Any, compact_depth: float = math.inf, level: int = 0) -> Iterator[str]:
    """The JSON text of plain ``data`` (dict, list, str, int, float, bool, None, :class:`Lines`)
    in pieces: non-empty containers shallower than ``compact_depth`` indented, the rest one
    line each. ``level`` is the depth at which ``data`` itself sits (its indentation).

    Raises ValueError for a number that is not finite and TypeError for another type or a
    key that is not text, as ``json.dumps`` does.
    """
    yield from _chunks(data, level, compact_depth, "\n" + INDENT * level)


def _chunks(value: Any, depth: int, compact_depth: float, newline: str) -> Iterator[str]:
    if type(value) is Lines:
        yield from _lines(value, newline)
        return
    kind = type(value)
    if not (kind is dict or kind is list) or not value or depth >= compact_depth:
        yield compact_json(value)
        return
    inner = newline + INDENT
    separator = inner
    if kind is dict:
        yield "{"
        for key, item in value.items():
            if type(key) is not str:
                raise TypeError(f"keys must be str, not {type(key).__name__}")
            yield separator + _TEXT(key) + ": "
            yield from _chunks(item, depth + 1, compact_depth, inner)
            separator = "," + inner
        yield newline + "}"
    else:
        yield "["
        for item in value:
            yield separator
            yield from _chunks(item, depth + 1, compact_depth, inner)
            separator = "," + inner
        yield newline + "]"


BLOCK = 16
"""Entries given to the writer in one piece: fewer, larger writes (a 100k-part report has
48,000 lines of 1-7 kB); small enough that a piece stays below the allocator's large-block
size."""


def _lines(lines: Lines, newline: str) -> Iterator[str]:
    """``[`` then each entry on its own line, one level deeper, then ``]``; ``[]`` if empty.
    Entries come :data:`BLOCK` to a piece."""
    separator = "," + newline + INDENT
    entries = iter(lines.entries)
    block = list(islice(entries, BLOCK))
    if not block:
        yield "[]"
        return
    block[0] = "[" + newline + INDENT + block[0]
    while block:
        yield separator.join(block)
        block = list(islice(entries, BLOCK))
        block.insert(0, "")  # the separator before the block's first entry
        if len(block) == 1:
            break
    yield newline + "]"
