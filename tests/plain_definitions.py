"""Plain definitions the fast paths of the topology index and of the natural sort key are held
to, written out once for every test that compares with them (our own former code, one part or
one name at a time).
"""

from __future__ import annotations

import re

from linter.model import Part
from linter.partdata import BjtData, McuData, MosfetData
from linter.topology_index import DC_OPEN_KINDS, SERIES_KINDS

_DIGIT_RUNS = re.compile(r"(\d+)")


def plain_kind(part: Part, data) -> str:
    """A part's kind as the index defines it: a transistor takes its data's polarity, any
    part whose data is a microcontroller's is ``mcu``."""
    if part.kind == "transistor" and isinstance(data, (BjtData, MosfetData)):
        return data.polarity
    if part.kind != "mcu" and isinstance(data, McuData):
        return "mcu"
    return part.kind


def plain_role(kind: str, pins: int) -> str:
    """A kind's role in a path: open, series (two pins only), transistor, mcu or foreign."""
    if kind in DC_OPEN_KINDS:
        return "open"
    if kind in SERIES_KINDS:
        return "series" if pins == 2 else "foreign"
    if kind in ("npn", "pnp", "nmos", "pmos"):
        return "transistor"
    return "mcu" if kind == "mcu" else "foreign"


def plain_key(ref: str) -> tuple[tuple[str | tuple[int, str], ...], str]:
    """The natural sort key: split on digit runs, each run keyed by its length without
    leading zeros and its digits, each text casefolded; the name itself breaks ties."""
    def number(digits: str) -> tuple[int, str]:
        significant = digits.lstrip("0")
        return len(significant), significant
    chunks = _DIGIT_RUNS.split(ref)
    return tuple(number(chunk) if index % 2 else chunk.casefold()
                 for index, chunk in enumerate(chunks)), ref
