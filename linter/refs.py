"""Reference designators for people: natural order and folded runs (``D1–D4, R6``).

Designators are compared the way an engineer reads them, numbers as numbers (``D2`` before
``D10``), and a run of three or more consecutive numbers with the same prefix is written as a
range with an en dash (``D7–D10``). A run of two stays a list (``D1, D2``): a range of two
saves nothing and hides a part.
"""

from __future__ import annotations

import re
from typing import Iterable

__all__ = ["natural_key", "split_key", "natural_sorted", "fold_refs", "RANGE_DASH", "MIN_RUN"]

RANGE_DASH = "\u2013"
"""The en dash between the ends of a folded run (``D1–D12``)."""

MIN_RUN = 3
"""The shortest run of consecutive designators that is folded into a range."""

_ASCII_DIGITS = "0123456789"
_CHUNKS = re.compile(r"(\d+)")
_SPLIT = _CHUNKS.split
_TRAILING_NUMBER = re.compile(r"^(?P<prefix>.*?)(?P<number>[1-9]\d*|0)$")


def natural_key(ref: str) -> tuple[tuple[str | tuple[int, str], ...], str]:
    """Sort key reading digit runs as numbers, letters without case; the text breaks ties.

    A digit run is compared by its length without leading zeros, then its digits: the order
    of the numbers, without converting them (a run of thousands of digits is no error). The
    common designator (letters, then ASCII digits) is read with two string methods (letters
    are never digits, so what ``rstrip`` leaves is the text before the only digit run); a name
    with one or two numbers (``+5V``, ``U1_PA4``, ``G12_N1``) from its split without a loop;
    any other name in one loop over its chunks (the same key each way:
    ``tests/test_refs_key.py``). One split is the only regular expression a name meets.

    >>> sorted(["D10", "D2", "d1", "R1"], key=natural_key)
    ['d1', 'D2', 'D10', 'R1']
    """
    letters = ref.rstrip(_ASCII_DIGITS)
    if letters.isalpha() and len(letters) < len(ref):  # letters (no digit among them), digits
        digits = ref[len(letters):]
        significant = digits.lstrip("0")
        return (letters.casefold(), (len(significant), significant), ""), ref
    chunks = _SPLIT(ref)  # text, digits, text, … (always an odd count)
    count = len(chunks)
    if count == 3:  # one number (a net such as ``G12_NB``, ``+5V``, ``U_1``): unrolled
        before, digits, after = chunks
        significant = digits.lstrip("0")
        return (before.casefold(), (len(significant), significant), after.casefold()), ref
    if count == 5:  # two numbers (``G12_N1``): unrolled
        first, digits, middle, more, last = chunks
        one, two = digits.lstrip("0"), more.lstrip("0")
        return (first.casefold(), (len(one), one), middle.casefold(), (len(two), two),
                last.casefold()), ref
    out: list[str | tuple[int, str]] = []
    number = False
    for chunk in chunks:
        if number:
            significant = chunk.lstrip("0")
            out.append((len(significant), significant))
        else:
            out.append(chunk.casefold())
        number = not number
    return tuple(out), ref


def split_key(name: str) -> tuple[tuple[str | tuple[int, str], ...], str]:
    """:func:`natural_key` of ``name``, read from its split first: for names that seldom are
    letters then digits (nets such as ``G12_N1``, ``U1_PA4``, ``+5V``), which
    :func:`natural_key` would try the designator's road on before splitting them. The same
    key (``tests/test_refs_key.py``)."""
    chunks = _SPLIT(name)
    count = len(chunks)
    if count == 5:  # two numbers
        first, digits, middle, more, last = chunks
        one, two = digits.lstrip("0"), more.lstrip("0")
        return (first.casefold(), (len(one), one), middle.casefold(), (len(two), two),
                last.casefold()), name
    if count == 3:  # one number
        before, digits, after = chunks
        significant = digits.lstrip("0")
        return (before.casefold(), (len(significant), significant), after.casefold()), name
    return natural_key(name)


def natural_sorted(refs: Iterable[str]) -> list[str]:
    """The designators without repeats, in natural order.

    >>> natural_sorted(["S2/R7", "S1/R7", "R10", "R9", "R9"])
    ['R9', 'R10', 'S1/R7', 'S2/R7']
    """
    return sorted(set(refs), key=natural_key)


def _split(ref: str) -> tuple[str, int] | None:
    """``("S2/R", 7)`` for ``S2/R7``; None where the designator does not end in a plain number."""
    match = _TRAILING_NUMBER.match(ref)
    if match is None or not match.group("prefix") or match.group("prefix")[-1].isdigit():
        return None
    return match.group("prefix"), int(match.group("number"))


def _runs(refs: list[str]) -> list[list[str]]:
    """Consecutive designators (same prefix, numbers one apart) gathered into runs."""
    runs: list[list[str]] = []
    previous: tuple[str, int] | None = None
    for ref in refs:
        parts = _split(ref)
        if runs and parts is not None and previous is not None and \
                parts[0] == previous[0] and parts[1] == previous[1] + 1:
            runs[-1].append(ref)
        else:
            runs.append([ref])
        previous = parts
    return runs


def fold_refs(refs: Iterable[str], separator: str = ", ") -> str:
    """The designators in natural order, runs of :data:`MIN_RUN` or more folded to ranges.

    >>> fold_refs(["D3", "D1", "D2", "R6", "D10", "D9"])
    'D1–D3, D9, D10, R6'
    >>> fold_refs([])
    ''
    """
    pieces: list[str] = []
    for run in _runs(natural_sorted(refs)):
        if len(run) >= MIN_RUN:
            pieces.append(f"{run[0]}{RANGE_DASH}{run[-1]}")
        else:
            pieces.extend(run)
    return separator.join(pieces)
