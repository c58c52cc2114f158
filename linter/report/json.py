"""The JSON report (schema ``ledlint-report/1``, see DESIGN.md): stable, sorted, SI floats.

The shape is described by ``linter/data/report.schema.json`` (JSON Schema draft 2020-12),
which the tests hold every fixture's report to. The same input gives the same bytes: no
timestamps, findings and groups in a fixed order, keys in a fixed order.
"""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import TYPE_CHECKING, Any, Mapping

from linter import __version__
from linter.findings import Finding
from linter.report import Reporter
from linter.report.common import (finding_location, ordered_findings, plain_data,
                                  severity_counts, sorted_groups)

if TYPE_CHECKING:
    from linter.engine import CheckResult
    from linter.model import Circuit

__all__ = ["JsonReporter", "SCHEMA_ID", "SCHEMA_FILE", "report_dict", "indented_json"]

SCHEMA_ID = "ledlint-report/1"
"""The ``schema`` field: changes only when a consumer would have to change."""
SCHEMA_FILE = Path(__file__).resolve().parents[1] / "data" / "report.schema.json"
"""The JSON Schema (draft 2020-12) of this report, shipped with the package."""


def _si_values(values: Mapping[str, float]) -> dict[str, float | None]:
    """Values by sorted key as floats; a figure that is not finite is unknown (None)."""
    out: dict[str, float | None] = {}
    for key, value in sorted(values.items()):
        number = float(value)
        out[str(key)] = number if math.isfinite(number) else None
    return out


def _finding_dict(finding: Finding, circuit: "Circuit") -> dict[str, Any]:
    location = finding_location(finding, circuit)
    return {
        "rule": finding.rule,
        "severity": finding.severity,
        "parts": list(finding.parts),
        "nets": list(finding.nets),
        "group": finding.group,
        "message": finding.message,
        "values": _si_values(finding.values),
        "fix": finding.fix,
        "fingerprint": finding.fingerprint,
        "location": None if location is None else
        {"file": location.file, "line": location.line, "column": location.column},
    }


def _inputs(result: "CheckResult") -> dict[str, Any]:
    request = result.request
    return {
        "netlist": str(request.netlist),
        "format": result.circuit.format,
        "bom": None if request.bom is None else str(request.bom),
        "config": None if request.config is None else str(request.config),
        "parts": [str(path) for path in request.parts_files],
    }


def report_dict(result: "CheckResult") -> dict[str, Any]:
    """The report as plain Python data, ready for :func:`json.dumps`."""
    groups = sorted_groups(result.groups)
    return {
        "schema": SCHEMA_ID,
        "tool": {"name": "ledlint", "version": __version__},
        "inputs": _inputs(result),
        "summary": {
            "parts": len(result.circuit.parts),
            "nets": len(result.circuit.nets),
            "led_groups": len(groups),
            "findings": severity_counts(result.findings),
            "waived": len(result.waived),
            "baselined": len(result.baselined),
        },
        "groups": groups,
        "findings": [_finding_dict(finding, result.circuit)
                     for finding in ordered_findings(result.findings)],
    }


class JsonReporter(Reporter):
    """Byte-identical output for the same input: sorted findings, no timestamps."""

    def render(self, result: "CheckResult") -> str:
        data = report_dict(result)
        groups = data["groups"]  # plain already (sorted_groups): not walked twice
        data["groups"] = []
        plain = plain_data(data)
        plain["groups"] = groups
        return indented_json(plain) + "\n"


_ENCODE_TEXT = json.encoder.encode_basestring  # the C version when available
_INDENT = "  "
_CHUNK_DEPTH = 2
"""Containers this deep (a report's groups and findings) are joined to one string each."""


def indented_json(data: Any) -> str:
    """``json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False)``, byte for byte,
    for plain data (dict, list, str, int, float, bool, None; :func:`plain_data` output).

    The standard library falls back to its pure-Python encoder whenever ``indent`` is set;
    this writer does the same work with fewer calls per value. Raises ValueError for a
    number that is not finite and TypeError for any other type. Recursion depth is the
    nesting depth of the report (a handful of levels).
    """
    out: list[str] = []
    _write(data, "\n", out)
    return "".join(out)


def _scalar(value: Any) -> str | None:
    """The JSON text of a scalar, or None for a container."""
    kind = type(value)
    if kind is str:
        return _ENCODE_TEXT(value)
    if kind is float:
        if not math.isfinite(value):
            raise ValueError(f"Out of range float values are not JSON compliant: {value!r}")
        return float.__repr__(value)
    if value is None:
        return "null"
    if value is True:
        return "true"
    if value is False:
        return "false"
    if kind is int:
        return int.__repr__(value)
    if kind is dict or kind is list:
        return None
    raise TypeError(f"Object of type {kind.__name__} is not JSON serializable")


def _write(value: Any, newline: str, out: list[str]) -> None:
    """Append ``value``'s JSON text; ``newline`` is the line break and indent it starts at."""
    text = _scalar(value)
    if text is not None:
        out.append(text)
        return
    if not value:
        out.append("{}" if type(value) is dict else "[]")
        return
    inner = newline + _INDENT
    chunked = len(inner) <= _CHUNK_DEPTH * len(_INDENT) + 1
    is_dict = type(value) is dict
    out.append("{" if is_dict else "[")
    separator = inner
    for key, item in (value.items() if is_dict else zip(value, value)):
        if is_dict:
            if type(key) is not str:
                raise TypeError(f"keys must be str, not {type(key).__name__}")
            lead = separator + _ENCODE_TEXT(key) + ": "
        else:
            lead = separator
        kind = type(item)
        if kind is float and math.isfinite(item):
            out.append(lead + float.__repr__(item))
        elif kind is str:
            out.append(lead + _ENCODE_TEXT(item))
        else:
            text = _scalar(item)
            if text is not None:
                out.append(lead + text)
            elif chunked:
                pieces: list[str] = [lead]
                _write(item, inner, pieces)
                out.append("".join(pieces))   # one string per group: few pieces alive at once
            else:
                out.append(lead)
                _write(item, inner, out)
        separator = "," + inner
    out.append(newline + ("}" if is_dict else "]"))
