"""One report for many boards (``ledlint check A.edif B.cir DIR``): text, JSON and SARIF.

Each board's part is what the one-board report gives; around it:

text
    a heading line per board (``== [2/5] path; BOM: ...``), the board's report (or the
    line ``could not be read: FILE:LINE:COLUMN: message``), then one total line; when a board
    could not be read, a last line starting ``INCOMPLETE``.
JSON
    ``{"schema": "ledlint-report/1", "tool", "complete", "boards": [one-board reports],
    "unreadable": [{"netlist", "error", "location", "bom", "bom_note"}], "summary": {totals}}``;
    each entry of ``boards`` is exactly a one-board report whose ``inputs`` add ``bom_note``
    (why the BOM is what it is). A single netlist keeps the one-board form. Layout as the
    one-board report's, two levels deeper: each group and finding of a board one line.
SARIF
    one run with every board's results (each located in its own file) and one invocation
    whose ``executionSuccessful`` is false when a board could not be read, with a
    ``toolExecutionNotifications`` entry (level ``error``) for each such board.

HTML is one page per board; the CLI refuses ``--format html`` with several netlists.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Any, Sequence

from linter import __version__
from linter.findings import SEVERITIES
from linter.report import ReportFormat, ReportOptions

if TYPE_CHECKING:
    from linter.batch import BoardOutcome

__all__ = ["render_many", "combined_dict", "combined_layout", "combined_sarif", "totals",
           "COMBINED_COMPACT_DEPTH"]


def totals(outcomes: Sequence["BoardOutcome"]) -> dict[str, Any]:
    """Counts over every board that was read, and how many were not."""
    read = [outcome.result for outcome in outcomes if outcome.readable]
    findings = {severity: 0 for severity in SEVERITIES}
    for result in read:
        for finding in result.findings:
            findings[finding.severity] += 1
    return {
        "boards": len(outcomes),
        "read": len(read),
        "unreadable": len(outcomes) - len(read),
        "parts": sum(len(result.circuit.parts) for result in read),
        "nets": sum(len(result.circuit.nets) for result in read),
        "led_groups": sum(len(result.groups) for result in read),
        "findings": findings,
        "waived": sum(len(result.waived) for result in read),
        "baselined": sum(len(result.baselined) for result in read),
    }


def _bom_words(outcome: "BoardOutcome") -> str:
    task = outcome.task
    return f"{task.bom} ({task.bom_note})" if task.bom is not None else task.bom_note


def _total_line(outcomes: Sequence["BoardOutcome"]) -> str:
    count = totals(outcomes)
    from linter.report.text import _count_of, _plural

    found = ", ".join(_count_of(count["findings"][severity], severity) for severity in SEVERITIES)
    line = (f"Total: {_plural(count['boards'], 'board')}, {count['read']} read, "
            f"{count['unreadable']} could not be read; {_plural(count['parts'], 'part')}, "
            f"{_plural(count['led_groups'], 'LED group')}; findings: {found}\n")
    unread = [str(outcome.task.netlist) for outcome in outcomes if not outcome.readable]
    if unread:
        line += (f"INCOMPLETE: {len(unread)} of {count['boards']} boards could not be read "
                 f"({', '.join(unread)}); their findings are missing from this report\n")
    return line


def _render_text(outcomes: Sequence["BoardOutcome"], options: ReportOptions) -> str:
    reporter = ReportFormat.TEXT.reporter(options)
    sections = []
    for number, outcome in enumerate(outcomes, start=1):
        heading = "" if options.quiet else (
            f"== [{number}/{len(outcomes)}] {outcome.task.netlist}; BOM: {_bom_words(outcome)}\n")
        body = (reporter.render(outcome.result) if outcome.readable
                else f"could not be read: {outcome.error}\n")
        if heading or body:  # quiet: a board without findings adds nothing
            sections.append(heading + body)
    tail = _total_line(outcomes)
    if options.quiet:
        tail = "".join(line + "\n" for line in tail.splitlines() if line.startswith("INCOMPLETE"))
    return "\n".join([*sections, tail] if tail else sections)


def _unreadable_entry(outcome: "BoardOutcome") -> dict[str, Any]:
    location = None
    if outcome.error_line is not None:
        location = {"file": outcome.error_file, "line": outcome.error_line,
                    "column": outcome.error_column}
    return {"netlist": str(outcome.task.netlist), "error": outcome.error, "location": location,
            "bom": None if outcome.task.bom is None else str(outcome.task.bom),
            "bom_note": outcome.task.bom_note}


def combined_dict(outcomes: Sequence["BoardOutcome"]) -> dict[str, Any]:
    """The combined JSON report as plain data (see the module docstring)."""
    from linter.report.json import report_dict

    boards = []
    for outcome in outcomes:
        if outcome.readable:
            report = report_dict(outcome.result)
            report["inputs"]["bom_note"] = outcome.task.bom_note
            boards.append(report)
    return _combined(outcomes, boards)


def combined_layout(outcomes: Sequence["BoardOutcome"]) -> dict[str, Any]:
    """:func:`combined_dict` ready for :func:`~linter.report.json_layout.layered_chunks`:
    each board as :func:`~linter.report.json.report_layout` gives it (groups and findings
    written one line each as they are reached)."""
    from linter.report.common import plain_data
    from linter.report.json import report_layout

    boards = [report_layout(outcome.result, {"bom_note": outcome.task.bom_note})
              for outcome in outcomes if outcome.readable]
    layout = plain_data(_combined(outcomes, []))
    layout["boards"] = boards
    return layout


COMBINED_COMPACT_DEPTH = 4
"""A board's groups and findings sit two levels deeper than in a one-board report
(``boards[i].groups[j]``): they, and what is as deep, are one line each."""


def _combined(outcomes: Sequence["BoardOutcome"], boards: list) -> dict[str, Any]:
    from linter.report.json import SCHEMA_ID

    return {
        "schema": SCHEMA_ID,
        "tool": {"name": "ledlint", "version": __version__},
        "complete": all(outcome.readable for outcome in outcomes),
        "boards": boards,
        "unreadable": [_unreadable_entry(outcome) for outcome in outcomes
                       if not outcome.readable],
        "summary": totals(outcomes),
    }


def _notification(outcome: "BoardOutcome", base: Path) -> dict[str, Any]:
    from linter.report.sarif import _artifact

    physical: dict[str, Any] = {"artifactLocation": _artifact(outcome.error_file
                                                              or str(outcome.task.netlist), base)}
    if outcome.error_line is not None:
        physical["region"] = {"startLine": outcome.error_line}
        if outcome.error_column is not None:
            physical["region"]["startColumn"] = outcome.error_column
    return {"level": "error", "message": {"text": outcome.error},
            "locations": [{"physicalLocation": physical}]}


def combined_sarif(outcomes: Sequence["BoardOutcome"], base: Path) -> dict[str, Any]:
    """One SARIF run holding every board's results; unread boards as tool notifications."""
    from linter.report.sarif import SARIF_SCHEMA_URI, SARIF_VERSION, SOURCE_ROOT, _rules, sarif_log

    read = [outcome.result for outcome in outcomes if outcome.readable]
    rules = _rules([finding for result in read for finding in result.findings])
    index = {descriptor["id"]: position for position, descriptor in enumerate(rules)}
    results = []
    for result in read:
        for entry in sarif_log(result, base)["runs"][0]["results"]:
            results.append({**entry, "ruleIndex": index[entry["ruleId"]]})
    invocation = {"executionSuccessful": all(outcome.readable for outcome in outcomes),
                  "toolExecutionNotifications": [_notification(outcome, base)
                                                 for outcome in outcomes if not outcome.readable]}
    run = {
        "tool": {"driver": {"name": "ledlint", "version": __version__,
                            "semanticVersion": __version__, "rules": rules}},
        "invocations": [invocation],
        "originalUriBaseIds": {SOURCE_ROOT: {"uri": base.as_uri().rstrip("/") + "/"}},
        "columnKind": "unicodeCodePoints",
        "results": results,
    }
    return {"$schema": SARIF_SCHEMA_URI, "version": SARIF_VERSION, "runs": [run]}


def render_many(fmt: ReportFormat, outcomes: Sequence["BoardOutcome"],
                options: ReportOptions) -> str:
    """The whole combined report in ``fmt`` (text, JSON or SARIF)."""
    if fmt is ReportFormat.TEXT:
        return _render_text(outcomes, options)
    if fmt is ReportFormat.JSON:
        from linter.report.json_layout import layered_chunks

        return "".join(layered_chunks(combined_layout(outcomes), COMBINED_COMPACT_DEPTH)) + "\n"
    if fmt is ReportFormat.SARIF:
        from linter.report.json_layout import Lines, compact_json
        from linter.report.sarif import sarif_chunks

        base = (options.base_dir or Path.cwd()).resolve()
        log = combined_sarif(outcomes, base)
        run = log["runs"][0]
        run["results"] = Lines([compact_json(entry) for entry in run["results"]])
        return "".join(sarif_chunks(log))
    raise ValueError(f"no combined report in {fmt.value}; one page per board")
