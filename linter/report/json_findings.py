"""One finding as one line of JSON, written directly: the report's ``findings`` entry.

:func:`finding_line` gives exactly ``plain_json(finding_dict(finding, circuit))`` (the C
encoder over the plain record, :func:`linter.report.json_layout.plain_json`) without
building the dict: a 100k-part board has about 21,000 findings holding 320,000 floats, and
a float's shortest ``repr`` costs more than looking up one already written (the figures of
renamed groups repeat: :func:`linter.report.json_groups._float`). :func:`finding_dict` is
the plain record; tests/test_report_json_findings.py holds both to the same bytes.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any, Mapping

from linter.findings import Finding
from linter.report.common import finding_location
from linter.report.json_groups import _FLOAT_TEXTS, _TEXT, _float, _value
from linter.report.json_layout import plain_json

if TYPE_CHECKING:
    from linter.model import Circuit

__all__ = ["finding_dict", "finding_line", "si_values"]


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
_KEY_FORMS: dict[tuple, tuple[tuple[str, ...], tuple[str, ...]] | None] = {}
"""Per tuple of a values mapping's keys (in its order): the keys sorted and each one's
``"key": `` text; None where a key is not text (the plain path). A rule writes the same
keys for each finding: a board's 21,000 findings hold 8 key sets."""


def _key_form(keys: tuple) -> tuple[tuple[str, ...], tuple[str, ...]] | None:
    form = _KEY_FORMS.get(keys, False)
    if form is False:
        if all(type(key) is str for key in keys):
            order = tuple(sorted(keys))
            form = (order, tuple([_TEXT(key) + ": " for key in order]))
        else:
            form = None
        if len(_KEY_FORMS) >= KEY_FORMS_MAX:
            _KEY_FORMS.clear()
        _KEY_FORMS[keys] = form
    return form


def _values_text(values: Mapping[str, float]) -> str:
    """``si_values(values)`` as JSON: keys sorted as text, each value ``float(value)`` as
    its ``repr`` (remembered, :func:`~linter.report.json_groups._float`), unknown as null."""
    form = _key_form(tuple(values)) if type(values) is dict else None
    if form is None:
        return "{" + ", ".join([_TEXT(key) + ": " + ("null" if number is None
                                                     else _float(number))
                                for key, number in si_values(values).items()]) + "}"
    known = _FLOAT_TEXTS.get
    pieces = []
    for key, prefix in zip(*form):
        value = values[key]
        text = known(value) if type(value) is float else None
        pieces.append(prefix + (text or _float(float(value))))
    return "{" + ", ".join(pieces) + "}"


def _text_or_null(value: Any) -> str:
    return "null" if value is None else _TEXT(value)


def finding_line(finding: Finding, circuit: "Circuit") -> str:
    """``plain_json(finding_dict(finding, circuit))``, written directly (a field that is not
    text where text is expected: the plain path)."""
    try:
        location = finding_location(finding, circuit)
        where = "null" if location is None else (
            '{"file": ' + _value(location.file) + ', "line": ' + _value(location.line)
            + ', "column": ' + _value(location.column) + "}")
        return ('{"rule": ' + _TEXT(finding.rule) + ', "severity": ' + _TEXT(finding.severity)
                + ', "parts": [' + ", ".join(map(_TEXT, finding.parts)) + '], "nets": ['
                + ", ".join(map(_TEXT, finding.nets)) + '], "group": '
                + _text_or_null(finding.group) + ', "message": ' + _TEXT(finding.message)
                + ', "values": ' + _values_text(finding.values) + ', "fix": '
                + _text_or_null(finding.fix) + ', "fingerprint": ' + _TEXT(finding.fingerprint)
                + ', "location": ' + where + "}")
    except TypeError:
        return plain_json(finding_dict(finding, circuit))
