"""One finding as one line of JSON, written directly: the report's ``findings`` entry.

:func:`finding_line` gives exactly ``plain_json(finding_dict(finding, circuit))`` (the C
encoder over the plain record, :func:`linter.report.json_layout.plain_json`) without
building the dict: a 100k-part board has about 21,000 findings holding 320,000 floats, and
a float's shortest ``repr`` costs more than looking up one already written (the figures of
renamed groups repeat: :func:`linter.report.json_groups._float`). :func:`finding_dict` is
the plain record; tests/test_report_json_findings.py holds both to the same bytes.
:func:`finding_lines` writes a report's findings with one writer that keeps what they share
(tests/test_report_json_finding_lines.py holds it to :func:`finding_line`).
"""

from __future__ import annotations

import hashlib
import math
from operator import attrgetter, itemgetter
from typing import TYPE_CHECKING, Any, Iterable, Iterator, Mapping

from linter import model
from linter.findings import Finding
from linter.model import Part, stored_location_getter
from linter.report.common import finding_location
from linter.report.json_groups import _FLOAT_TEXTS, _TEXT, _float, _value
from linter.report.json_layout import plain_json

if TYPE_CHECKING:
    from linter.model import Circuit

__all__ = ["finding_dict", "finding_line", "finding_lines", "si_values"]


def si_values(values: Mapping[str, float]) -> dict[str, float | None]:
    """Values by sorted key as floats; a figure that is not finite is unknown (None)."""
    out: dict[str, float | None] = {}
    for key, value in sorted(values.items()):
        number = float(value)
        out[str(key)] = number if math.isfinite(number) else None
    return out


def finding_dict(finding: Finding, circuit: "Circuit") -> dict[str, Any]:
    """The finding's JSON entry as plain Python data (the plain path)."""
    location = finding_location(finding, circuit)
    return {
        "rule": finding.rule,
        "severity": finding.severity,
        "parts": list(finding.parts),
        "nets": list(finding.nets),
        "group": finding.group,
        "message": finding.message,
        "values": si_values(finding.values),
        "fix": finding.fix,
        "fingerprint": finding.fingerprint,
        "location": None if location is None else
        {"file": location.file, "line": location.line, "column": location.column},
    }


KEY_FORMS_MAX = 1024
"""Key sets remembered at most (then the memory starts again)."""
_KEY_FORMS: dict[tuple, tuple[Any, str] | None] = {}
"""Per tuple of a values mapping's keys (in its order): a getter of the values in sorted key
order (a tuple) and the mapping's text with ``%s`` for each value; None where a key is not
text (the plain path). A rule writes the same keys for each finding: a board's 21,000
findings hold 8 key sets."""


def _key_form(keys: tuple) -> tuple[Any, str] | None:
    form = _KEY_FORMS.get(keys, False)
    if form is False:
        if all(type(key) is str for key in keys):
            order = sorted(keys)
            text = "{" + ", ".join([_TEXT(key).replace("%", "%%") + ": %s"
                                    for key in order]) + "}"
            if len(order) == 1:
                only = order[0]
                form = ((lambda values: (values[only],)), text)
            else:
                form = (itemgetter(*order) if order else (lambda values: ()), text)
        else:
            form = None
        if len(_KEY_FORMS) >= KEY_FORMS_MAX:
            _KEY_FORMS.clear()
        _KEY_FORMS[keys] = form
    return form


def _values_text(values: Mapping[str, float]) -> str:
    """``si_values(values)`` as JSON: keys sorted as text, each value ``float(value)`` as
    its ``repr`` (remembered, :func:`~linter.report.json_groups._float`), unknown as null.

    A value's text is looked up by ``float(value)``: the one float it stands for, written
    as :func:`_float` writes it (equal floats print alike; zeros and NaN are never
    remembered, so they are written each time)."""
    form = _key_form(tuple(values)) if type(values) is dict else None
    if form is None:
        return "{" + ", ".join([_TEXT(key) + ": " + ("null" if number is None
                                                     else _float(number))
                                for key, number in si_values(values).items()]) + "}"
    getter, text = form
    numbers = tuple(map(float, getter(values)))
    key = (text, numbers)
    known = _VALUES_TEXTS.get(key)
    if known is not None:
        return known
    texts = tuple(map(_FLOAT_TEXTS.get, numbers))
    if None in texts:
        texts = tuple([known or _float(number) for known, number in zip(texts, numbers)])
    written = text % texts
    if 0.0 not in numbers:  # 0.0 == -0.0: a key holding a zero may stand for either
        if len(_VALUES_TEXTS) >= VALUES_TEXTS_MAX:
            _VALUES_TEXTS.clear()
        _VALUES_TEXTS[key] = written
    return written


VALUES_TEXTS_MAX = 4096
"""Values texts remembered at most (then the memory starts again)."""
_VALUES_TEXTS: dict[tuple[str, tuple[float, ...]], str] = {}
"""The text of a values mapping by its form's text (the sorted keys) and its numbers in that
order: a board's findings repeat their figures (the 21,000 findings of a 100k-part board
hold 258 different values mappings). Equal numbers print alike but 0.0 and -0.0, so a key
holding a zero is never kept; NaN equals nothing (a key holding it is found only with the
very same NaN object, written null either way)."""


_LINE = ('{"rule": %s, "severity": %s, "parts": [%s], "nets": [%s], "group": %s, '
         '"message": %s, "values": %s, "fix": %s, "fingerprint": %s, "location": %s}')
"""A finding's line with a ``%s`` for each field's JSON text."""

_WHERE = '{"file": %s, "line": %d, "column": %d}'
_WHERE_ANY = '{"file": %s, "line": %s, "column": %s}'


_FILE_TEXTS: dict[str, str] = {}
"""The JSON text of each source file name met (a board has one or a few)."""
FILE_TEXTS_MAX = 64


def _location_text(location: Any) -> str:
    if location is None:
        return "null"
    file, line, column = location.file, location.line, location.column
    if type(file) is not str or type(line) is not int or type(column) is not int:
        return _WHERE_ANY % (_value(file), _value(line), _value(column))
    text = _FILE_TEXTS.get(file)
    if text is None:
        if len(_FILE_TEXTS) >= FILE_TEXTS_MAX:
            _FILE_TEXTS.clear()
        text = _FILE_TEXTS[file] = _TEXT(file)
    return _WHERE % (text, line, column)


def finding_line(finding: Finding, circuit: "Circuit") -> str:
    """``plain_json(finding_dict(finding, circuit))``, written directly (a field that is not
    text where text is expected: the plain path)."""
    try:
        group, fix = finding.group, finding.fix
        return _LINE % (
            _TEXT(finding.rule), _TEXT(finding.severity), ", ".join(map(_TEXT, finding.parts)),
            ", ".join(map(_TEXT, finding.nets)), "null" if group is None else _TEXT(group),
            _TEXT(finding.message), _values_text(finding.values),
            "null" if fix is None else _TEXT(fix), _TEXT(finding.fingerprint),
            _location_text(finding_location(finding, circuit)))
    except TypeError:
        return plain_json(finding_dict(finding, circuit))



_FIELDS = attrgetter("rule", "severity", "parts", "nets", "group", "message", "values", "fix",
                     "location")
_STORED_LOCATION = stored_location_getter(Part)
_FILE_BITS, _FILE_MASK, _COLUMN_MASK = model._FILE_BITS, model._FILE_MASK, model._COLUMN_MASK
_LINE_SHIFT = model._FILE_BITS + model._COLUMN_BITS
_SHA256, _UTF8 = hashlib.sha256, str.encode


def finding_lines(findings: Iterable[Finding], circuit: "Circuit") -> Iterator[str]:
    """``map(finding_line, findings, repeat(circuit))``: the same lines, each made by one
    call of a writer that keeps what findings share (:class:`_LineWriter`)."""
    return map(_LineWriter(circuit).line, findings)


class _LineWriter:
    """:func:`finding_line` for the findings of one report, keeping for its length what
    they share: each ``values`` mapping's text by the mapping object (a 100k-part board's
    21,000 findings hold 7,500 mappings; each kept with its text, so no id is reused), the
    opening text of each rule and severity, each source file's location form. A finding
    without its own location that names a part of the circuit first points at that part's
    place, read as stored (:func:`~linter.model.stored_location_getter`) and, if packed,
    written from its line, column and file number without making the SourceLocation.
    A field that is not text where text is expected (a TypeError): :func:`finding_line`."""

    __slots__ = ("circuit", "parts_of", "values_texts", "heads", "file_forms")

    def __init__(self, circuit: "Circuit") -> None:
        self.circuit = circuit
        parts = circuit.parts
        self.parts_of = parts.get if type(parts) is dict else None
        self.values_texts: dict[int, tuple[Any, str]] = {}
        self.heads: dict[tuple[str, str], str] = {}
        self.file_forms: list[str] = []

    def line(self, finding: Finding) -> str:
        """The finding's line, as :func:`finding_line` writes it."""
        try:
            rule, severity, parts, nets, group, message, values, fix, location = \
                _FIELDS(finding)
            head = self.heads.get((rule, severity))
            if head is None:
                head = self._head(rule, severity)
            known = self.values_texts.get(id(values))
            if known is None or known[0] is not values:
                known = self.values_texts[id(values)] = (values, _values_text(values))
            if location is None and parts and self.parts_of is not None \
                    and type(part := self.parts_of(parts[0])) is Part:
                place = _STORED_LOCATION(part, Part)
                if type(place) is int and (place & _FILE_MASK) < len(self.file_forms):
                    where = self.file_forms[place & _FILE_MASK] % (
                        place >> _LINE_SHIFT, place >> _FILE_BITS & _COLUMN_MASK)
                else:
                    where = self._place(place) if type(place) is int else _location_text(place)
            else:
                where = _location_text(finding_location(finding, self.circuit))
            if nets:
                key = "\x1f".join((rule, ",".join(sorted(parts)), ",".join(sorted(nets))))
                nets = ", ".join(map(_TEXT, nets))
            else:  # the same key: the empty nets' text ends it
                key = f"{rule}\x1f{','.join(sorted(parts))}\x1f"
                nets = ""
            return (f'{head}{", ".join(map(_TEXT, parts))}], "nets": [{nets}], "group": '
                    f'{"null" if group is None else _TEXT(group)}, "message": {_TEXT(message)}'
                    f', "values": {known[1]}, "fix": {"null" if fix is None else _TEXT(fix)}'
                    f', "fingerprint": "{_SHA256(_UTF8(key)).hexdigest()[:16]}", "location": '
                    f'{where}}}')
        except TypeError:
            return finding_line(finding, self.circuit)

    def _head(self, rule: str, severity: str) -> str:
        head = self.heads[(rule, severity)] = \
            '{"rule": ' + _TEXT(rule) + ', "severity": ' + _TEXT(severity) + ', "parts": ['
        return head

    def _place(self, place: int) -> str:
        """``_location_text`` of the SourceLocation a packed place stands for."""
        forms, number = self.file_forms, place & _FILE_MASK
        if number >= len(forms):
            forms[:] = [_WHERE_FORM % _TEXT(file).replace("%", "%%")
                        for file in model._PLACE_FILES]
        return forms[number] % (place >> _LINE_SHIFT, place >> _FILE_BITS & _COLUMN_MASK)


_WHERE_FORM = '{"file": %s, "line": %%d, "column": %%d}'
""":data:`_WHERE` with the file's text filled in first."""
