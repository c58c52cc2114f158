"""The report orders of findings and groups, sorted by one short text per name.

:func:`~linter.report.common.ordered_findings` and
:func:`~linter.report.common.sorted_records` sort by :func:`~linter.refs.natural_key`
tuples: a few small objects per name, held for every finding while the sort runs (about
17 MiB for the 21,000 findings of a 100k-part board, 7 MiB for its 27,000 groups, the
largest allocations of the report stage). Here each name's key is written as one string
that compares as the tuple does (:func:`name_text`), so that the sort holds a string per
finding instead; the order is the same, element for element (tests/test_report_lean_order.py
holds both to the plain functions).

How a key ``(chunks, name)`` is written, ``chunks`` being text, (length, digits), text, …:
each text chunk followed by ``\\x00``; each number as ``chr(3 + length)`` then its digits;
the end of the chunks ``\\x01``; then the name and ``\\x00``. A list of names is each name's
text after ``\\x02``, then ``\\x01``. Read from the left, the kind of every position is
fixed by what comes before it, so the first difference between two texts falls on the
same element of both keys, and each marker sorts below whatever it is compared with there
(a shorter text or list is the smaller, as in tuple order).

Guard: a name holding a character below ``\\x03`` (casefolding never makes one, tested over
every code point) or a digit run too long for one character sends the whole list the plain
way.

Findings are sorted by their first part's text and the rest of their parts compared only
when the first parts are the same (:func:`_finding_key_first`, :class:`_Rest`): the same
order (tests/test_report_lean_order_first.py), a third of the names written.
"""

from __future__ import annotations

import re
from typing import Any, Iterable, Sequence

from linter.findings import SEVERITIES, Finding, severity_rank
from linter.gc_pause import paused_gc
from linter.refs import natural_key
from linter.report.common import _record_id, ordered_findings, sorted_records

__all__ = ["name_text", "names_text", "lean_ordered_findings", "lean_sorted_records"]

_LOW = re.compile("[\x00-\x02]").search
_LONGEST_RUN = 0x10FFFF - 3
_DESIGNATOR = re.compile("([^\x00-\x02\\d]*)(\\d+)").fullmatch
"""The common designator: text without a digit or a marker, then one number (the names
:func:`~linter.refs.natural_key` reads with its first match)."""


class _Plain(Exception):
    """A name the short text cannot stand for."""


def name_text(name: str) -> str:
    """One string comparing as ``natural_key(name)`` does (see the module docstring).

    Raises _Plain for a name it cannot write."""
    simple = _DESIGNATOR(name)
    if simple is not None:  # natural_key: ((prefix folded, (length, digits), ""), name)
        prefix, digits = simple.groups()
        significant = digits.lstrip("0")
        if len(significant) > _LONGEST_RUN:
            raise _Plain(name)
        return _SIMPLE % (prefix.casefold(), chr(3 + len(significant)), significant, name)
    if _LOW(name) is not None:
        raise _Plain(name)
    chunks, _ = natural_key(name)
    out = []
    for index, chunk in enumerate(chunks):
        if index & 1:
            length, digits = chunk
            if length > _LONGEST_RUN:
                raise _Plain(name)
            out.append(chr(3 + length) + digits)
        else:
            out.append(chunk + "\x00")
    out.append("\x01" + name + "\x00")
    return "".join(out)


_SIMPLE = "%s\x00%s%s\x00\x01%s\x00"
"""A common designator's text: its prefix folded, its number's length character and
significant digits, the end of the chunks, the name."""


_LISTED_SIMPLE = "\x02" + _SIMPLE
"""A common designator's text as a list entry (after ``\\x02``)."""


def names_text(names: Iterable[str]) -> str:
    """One string comparing as ``tuple(natural_key(n) for n in names)`` does."""
    out = []
    for name in names:  # name_text's common case written in place
        simple = _DESIGNATOR(name)
        if simple is None:
            out.append("\x02" + name_text(name))
            continue
        prefix, digits = simple.groups()
        significant = digits.lstrip("0")
        if len(significant) > _LONGEST_RUN:
            raise _Plain(name)
        out.append(_LISTED_SIMPLE % (prefix.casefold(), chr(3 + len(significant)),
                                     significant, name))
    out.append("\x01")
    return "".join(out)


_RANKS = {severity: -severity_rank(severity) for severity in SEVERITIES}


def _finding_key(finding: Finding) -> tuple:
    """:func:`linter.report.common._order` with the names' tuples written as text."""
    severity = finding.severity
    rank = _RANKS[severity] if severity in _RANKS else -severity_rank(severity)
    nets = finding.nets  # most findings name no net: names_text(()) is "\x01"
    return (rank, finding.rule, names_text(finding.parts), names_text(nets) if nets else "\x01",
            finding.message)


class _Rest(tuple):
    """A finding's parts after the first, compared only when the first parts are the same
    (rarely: the text of each is made then, :func:`names_text` of ``self[1:]``)."""

    __slots__ = ()

    def _text(self) -> str:
        return names_text(self[1:])

    def __eq__(self, other: object) -> bool:
        return self._text() == other._text()  # type: ignore[attr-defined]

    def __ne__(self, other: object) -> bool:
        return self._text() != other._text()  # type: ignore[attr-defined]

    def __lt__(self, other: "_Rest") -> bool:  # type: ignore[override]
        return self._text() < other._text()

    def __le__(self, other: "_Rest") -> bool:  # type: ignore[override]
        return self._text() <= other._text()

    def __gt__(self, other: "_Rest") -> bool:  # type: ignore[override]
        return self._text() > other._text()

    def __ge__(self, other: "_Rest") -> bool:  # type: ignore[override]
        return self._text() >= other._text()

    __hash__ = None  # type: ignore[assignment]


_ALONE = _Rest(("",))
"""The rest of a list of one name or none: nothing (its text is ``\x01``)."""


def _finding_key_first(finding: Finding) -> tuple:
    """A key ordering as :func:`_finding_key` does, with the parts' text split in two: the
    first part's (``\x02`` and its :func:`name_text`; ``\x01`` for no part), then the rest
    as a :class:`_Rest`. The list text is the first name's text followed by the rest's, and
    no name's text begins another's (the module docstring), so the pair compares as the
    whole text does; a tie on the first part (same name) falls to the rest's texts."""
    severity = finding.severity
    rank = _RANKS[severity] if severity in _RANKS else -severity_rank(severity)
    parts, nets = finding.parts, finding.nets
    if not parts:
        first = "\x01"
    else:
        name = parts[0]
        simple = _DESIGNATOR(name)
        if simple is None:
            first = "\x02" + name_text(name)
        else:
            prefix, digits = simple.groups()
            significant = digits.lstrip("0")
            if len(significant) > _LONGEST_RUN:
                raise _Plain(name)
            first = _LISTED_SIMPLE % (prefix.casefold(), chr(3 + len(significant)),
                                      significant, name)
    return (rank, finding.rule, first, _Rest(parts) if len(parts) > 1 else _ALONE,
            names_text(nets) if nets else "\x01", finding.message)


def lean_ordered_findings(findings: Iterable[Finding], *, first: bool = True
                          ) -> list[Finding]:
    """``ordered_findings(findings)``: the same list, sorted by shorter keys
    (:func:`_finding_key_first`; ``first=False``: :func:`_finding_key`, every name's text)."""
    findings = findings if isinstance(findings, Sequence) else list(findings)
    try:
        with paused_gc():
            return sorted(findings, key=_finding_key_first if first else _finding_key)
    except _Plain:
        return ordered_findings(findings)


def lean_sorted_records(groups: Iterable[Any]) -> list[Any]:
    """``sorted_records(groups)``: the same list, sorted by shorter keys."""
    groups = groups if isinstance(groups, Sequence) else list(groups)
    try:
        with paused_gc():
            return sorted(groups, key=lambda group: name_text(_record_id(group)))
    except _Plain:
        return sorted_records(groups)
