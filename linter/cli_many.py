"""``ledlint check`` with several netlists or a folder: plan the boards, run them, one report.

The command line's side of :mod:`linter.batch` (discovery, BOM beside each netlist, the pool)
and :mod:`linter.report.combined` (the one report). Exit code: the worst over the boards —
:data:`~linter.cli.EXIT_BAD_INPUT` when any board could not be read (its located line on
standard error, and the report marked incomplete), else
:data:`~linter.cli.EXIT_FINDINGS` when any board has a finding at or above ``--fail-on``,
else :data:`~linter.cli.EXIT_CLEAN`. When the paths lead to one netlist only, JSON, SARIF
and HTML keep their one-board form (JSON ``inputs`` adds ``bom_note``) and an unreadable
board stops the run as it does for one named netlist.
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path
from typing import Sequence

from linter.batch import BoardOutcome, expand_inputs, plan_boards, run_boards
from linter.cli_plan import wants_many
from linter.errors import UsageError
from linter.report import ReportFormat, ReportOptions

__all__ = ["wants_many", "run_many", "HTML_REFUSAL"]


HTML_REFUSAL = ("ledlint check: --format html makes one page per board; name one netlist, "
                "or use text, json or sarif for several")
"""The one-line refusal of ``--format html`` when the paths lead to several netlists."""


def _render(fmt: ReportFormat, outcomes: Sequence[BoardOutcome], options: ReportOptions) -> str:
    only = outcomes[0]
    if len(outcomes) > 1 or fmt is ReportFormat.TEXT:
        from linter.report.combined import render_many

        return render_many(fmt, outcomes, options)
    if fmt is ReportFormat.JSON:
        from linter.report.json import json_report_chunks

        return "".join(json_report_chunks(only.result, {"bom_note": only.task.bom_note}))
    return fmt.reporter(options).render(only.result)


def _check_plan(args: argparse.Namespace) -> list:
    from linter.cli import _refuse_output_over_input

    netlists = expand_inputs([args.netlist, *args.more_netlists])
    tasks = plan_boards(netlists, args.bom, args.config, tuple(args.parts), args.baseline)
    _refuse_output_over_input(args, netlists)
    found = [task.bom for task in tasks if task.bom is not None]
    if args.output is not None and any(_same(args.output, bom) for bom in found):
        raise UsageError(f"ledlint check: --output {args.output} is a BOM found beside a "
                         f"netlist; write the report to another file")
    return tasks


def _same(first: Path, second: Path) -> bool:
    from linter.cli import _same_file

    return _same_file(first, second)


def run_many(args: argparse.Namespace) -> int:
    """Check every board the paths lead to; write one report; return the worst exit code."""
    from linter.cli import EXIT_BAD_INPUT, EXIT_CLEAN, EXIT_FINDINGS, _say_baselined
    from linter.findings import severity_rank
    from linter.progress import Progress

    tasks = _check_plan(args)
    fmt = ReportFormat(args.format)
    if fmt is ReportFormat.HTML and len(tasks) > 1:
        raise UsageError(HTML_REFUSAL)
    with Progress(total=len(tasks) + 1) as progress:
        progress.step(f"checking {len(tasks)} boards")
        outcomes = run_boards(tasks, args.jobs,
                              on_done=lambda done: progress.step(f"checked {done.task.netlist.name}"))
        if len(outcomes) == 1 and not outcomes[0].readable:
            raise UsageError(outcomes[0].error or "")
        progress.step(f"writing the {fmt.value} report")
        color = args.output is None and sys.stdout.isatty() and "NO_COLOR" not in os.environ
        options = ReportOptions(verbose=args.verbose, quiet=args.quiet, color=color)
        text = _render(fmt, outcomes, options)
    if args.output is not None:
        from linter.cli import write_report

        write_report(args.output, text)
    else:
        sys.stdout.write(text)
    for outcome in outcomes:
        if not outcome.readable:
            sys.stderr.write(f"{outcome.error}\n")
    read = [outcome.result for outcome in outcomes if outcome.readable]
    _say_baselined(read)
    if len(read) < len(outcomes):
        return EXIT_BAD_INPUT
    threshold = severity_rank(args.fail_on)
    failing = any(severity_rank(f.severity) >= threshold for result in read for f in result.findings)
    return EXIT_FINDINGS if failing else EXIT_CLEAN
