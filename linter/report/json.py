"""The JSON report (schema ``ledlint-report/1``, see DESIGN.md): stable, sorted, SI floats.

The shape is described by ``linter/data/report.schema.json`` (JSON Schema draft 2020-12),
which the tests hold every fixture's report to. The same input gives the same bytes: no
timestamps, findings and groups in a fixed order, keys in a fixed order.

Layout: ``schema``, ``tool``, ``inputs`` and ``summary`` indented by two spaces; each group
and each finding one line (``json.dumps`` without indent: the C encoder), so that a changed
group is one changed line in a diff. The groups are written straight from the solved
records (:mod:`linter.report.json_groups`, the data of ``as_dict()``; a renamed group from
its template's line, :mod:`linter.report.json_followers`), the findings straight from
theirs (:mod:`linter.report.json_findings`), and the text is made
in pieces as it is written (:meth:`JsonReporter.chunks`); :func:`report_dict` is the same
report as one plain tree.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Any, Iterable, Iterator, Mapping

from linter import __version__
from linter.gc_pause import paused_gc
from linter.report.common import ordered_findings, plain_data, severity_counts, sorted_groups
from linter.report.json_findings import finding_dict, finding_lines
from linter.report.json_followers import GroupLines
from linter.report.json_layout import Lines, layered_chunks
from linter.report.lean_order import lean_ordered_findings, lean_sorted_records
from linter.report.stream import StreamingReporter

if TYPE_CHECKING:
    from linter.engine import CheckResult

__all__ = ["JsonReporter", "SCHEMA_ID", "SCHEMA_FILE", "COMPACT_DEPTH", "report_dict",
           "report_layout", "json_report_chunks", "indented_json"]

SCHEMA_ID = "ledlint-report/1"
"""The ``schema`` field: changes only when a consumer would have to change."""
SCHEMA_FILE = Path(__file__).resolve().parents[1] / "data" / "report.schema.json"
"""The JSON Schema (draft 2020-12) of this report, shipped with the package."""


def _inputs(result: "CheckResult") -> dict[str, Any]:
    request = result.request
    return {
        "netlist": str(request.netlist),
        "format": result.circuit.format,
        "bom": None if request.bom is None else str(request.bom),
        "config": None if request.config is None else str(request.config),
        "parts": [str(path) for path in request.parts_files],
    }


def _head(result: "CheckResult") -> dict[str, Any]:
    """``schema``, ``tool``, ``inputs`` and ``summary``: what comes before the groups."""
    return {
        "schema": SCHEMA_ID,
        "tool": {"name": "ledlint", "version": __version__},
        "inputs": _inputs(result),
        "summary": {
            "parts": len(result.circuit.parts),
            "nets": len(result.circuit.nets),
            "led_groups": len(result.groups),
            "findings": severity_counts(result.findings),
            "waived": len(result.waived),
            "baselined": len(result.baselined),
        },
    }


def report_dict(result: "CheckResult") -> dict[str, Any]:
    """The report as plain Python data, ready for :func:`json.dumps`."""
    return {
        **_head(result),
        "groups": sorted_groups(result.groups),
        "findings": [finding_dict(finding, result.circuit)
                     for finding in ordered_findings(result.findings)],
    }


class _GroupLines:
    """Each group's JSON entry, one line each, in natural order of the group id (a
    follower's from its template's, :mod:`linter.report.json_followers`); sorted when
    iterated, each line made as it is taken (a C-level ``map``, no generator between the
    writer and the lines)."""

    __slots__ = ("groups",)

    def __init__(self, groups: Iterable[Any]) -> None:
        self.groups = groups

    def __iter__(self) -> Iterator[str]:
        records = lean_sorted_records(self.groups)
        return map(GroupLines(records).line, records)


class _FindingLines:
    """Each finding's JSON entry in report order, as :class:`_GroupLines` does groups."""

    __slots__ = ("result",)

    def __init__(self, result: "CheckResult") -> None:
        self.result = result

    def __iter__(self) -> Iterator[str]:
        return finding_lines(lean_ordered_findings(self.result.findings), self.result.circuit)


def report_layout(result: "CheckResult",
                  extra_inputs: Mapping[str, Any] | None = None) -> dict[str, Any]:
    """The report of :func:`report_dict` ready for :func:`layered_chunks`: the head as plain
    data, ``groups`` and ``findings`` as :class:`Lines` made when they are written.
    ``extra_inputs`` are added to ``inputs`` (a combined report's ``bom_note``)."""
    head = _head(result)
    head["inputs"].update(extra_inputs or {})
    layout = plain_data(head)
    layout["groups"] = Lines(_GroupLines(result.groups))
    layout["findings"] = Lines(_FindingLines(result))
    return layout


COMPACT_DEPTH = 2
"""Containers this deep are one line each: a report's groups and findings (and the counts
of ``summary.findings``); the levels above are indented by two spaces."""


def json_report_chunks(result: "CheckResult", extra_inputs: Mapping[str, Any] | None = None
                       ) -> Iterator[str]:
    """The whole JSON report in pieces, ending in a newline (see :class:`JsonReporter`).

    The cyclic collector is paused while the pieces are made: they are acyclic strings, and
    on a large board every collection would re-walk the whole solved board (half the time
    of a 100k-part report).
    """
    with paused_gc():
        yield from layered_chunks(report_layout(result, extra_inputs), COMPACT_DEPTH)
        yield "\n"


class JsonReporter(StreamingReporter):
    """Byte-identical output for the same input: sorted findings, no timestamps.

    Layout: the top two levels indented by two spaces; each group and each finding one line
    (a changed group is one changed line in a diff). The text is made group by group as it
    is written (:meth:`chunks`).
    """

    def chunks(self, result: "CheckResult") -> Iterator[str]:
        return json_report_chunks(result)


def indented_json(data: Any) -> str:
    """``json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False)``, byte for byte,
    for plain data (dict, list, str, int, float, bool, None; :func:`plain_data` output).

    Raises ValueError for a number that is not finite and TypeError for any other type.
    """
    return "".join(layered_chunks(data))
