"""The JSON report (schema ``ledlint-report/1``, see DESIGN.md): stable, sorted, SI floats."""

from __future__ import annotations

import json
from typing import TYPE_CHECKING, Any

from linter import __version__
from linter.findings import SEVERITIES, Finding
from linter.report import Reporter

if TYPE_CHECKING:
    from linter.engine import CheckResult

__all__ = ["JsonReporter", "SCHEMA_ID", "report_dict"]

SCHEMA_ID = "ledlint-report/1"


def _finding_dict(finding: Finding) -> dict[str, Any]:
    location = finding.location
    return {
        "rule": finding.rule,
        "severity": finding.severity,
        "parts": list(finding.parts),
        "nets": list(finding.nets),
        "group": finding.group,
        "message": finding.message,
        "values": {key: float(value) for key, value in sorted(finding.values.items())},
        "fix": finding.fix,
        "fingerprint": finding.fingerprint,
        "location": None if location is None else
        {"file": location.file, "line": location.line, "column": location.column},
    }


def report_dict(result: "CheckResult") -> dict[str, Any]:
    """The report as plain Python data, ready for :func:`json.dumps`."""
    request = result.request
    counts = {severity: 0 for severity in SEVERITIES}
    for finding in result.findings:
        counts[finding.severity] += 1
    groups = [group.as_dict() for group in result.groups]
    return {
        "schema": SCHEMA_ID,
        "tool": {"name": "ledlint", "version": __version__},
        "inputs": {
            "netlist": str(request.netlist),
            "format": result.circuit.format,
            "bom": None if request.bom is None else str(request.bom),
            "config": None if request.config is None else str(request.config),
            "parts": [str(path) for path in request.parts_files],
        },
        "summary": {
            "parts": len(result.circuit.parts),
            "nets": len(result.circuit.nets),
            "led_groups": len(groups),
            "findings": counts,
        },
        "groups": groups,
        "findings": [_finding_dict(finding) for finding in sorted(
            result.findings, key=lambda f: (f.rule, f.parts, f.nets, f.message))],
    }


class JsonReporter(Reporter):
    """Byte-identical output for the same input: sorted findings, no timestamps."""

    def render(self, result: "CheckResult") -> str:
        return json.dumps(report_dict(result), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
