"""Reporters: one module per output format behind one small interface.

A reporter turns a :class:`linter.engine.CheckResult` into the text of one report
(:meth:`Reporter.render`; a :class:`linter.report.stream.StreamingReporter` also gives it in
pieces); it never prints and never touches files (the CLI writes the pieces to standard output
or to ``--output``, which is replaced whole or not at all). :class:`ReportFormat` maps each ``--format``
choice to its class. To add a format: write ``linter/report/<name>.py`` with a
:class:`Reporter` subclass, add a member here and a branch in
:meth:`ReportFormat.reporter_class`; the type checker's ``assert_never`` and the test that
builds every member catch a member without a branch.
"""

from __future__ import annotations

from abc import ABC, abstractmethod
from enum import Enum
from pathlib import Path
from typing import TYPE_CHECKING, assert_never

from linter.records import record

if TYPE_CHECKING:
    from linter.engine import CheckResult

__all__ = ["Reporter", "ReportFormat", "ReportOptions"]


@record
class ReportOptions:
    """How a report is asked for; each format uses what means something to it.

    verbose : add per-group tables (text).
    quiet : print only the findings (text).
    color : use colour and terminal styling (text); the CLI sets it only on a terminal and
        never when ``NO_COLOR`` is set.
    base_dir : the folder that relative file URIs start from (SARIF ``SRCROOT``); None means
        the current directory at render time.
    """

    verbose: bool = False
    quiet: bool = False
    color: bool = False
    base_dir: Path | None = None


class Reporter(ABC):
    """Turns a check result into the text of one report format."""

    def __init__(self, options: ReportOptions | None = None) -> None:
        self.options = options if options is not None else ReportOptions()

    @abstractmethod
    def render(self, result: "CheckResult") -> str:
        """The whole report as text, ending in a newline."""


class ReportFormat(str, Enum):
    """The ``--format`` choices (the CLI lists the members' values)."""

    TEXT = "text"
    JSON = "json"
    SARIF = "sarif"
    HTML = "html"

    def reporter_class(self) -> type[Reporter]:
        """The class that writes this format (imported on demand: start-up stays quick)."""
        if self is ReportFormat.TEXT:
            from linter.report.text import TextReporter

            return TextReporter
        if self is ReportFormat.JSON:
            from linter.report.json import JsonReporter

            return JsonReporter
        if self is ReportFormat.SARIF:
            from linter.report.sarif import SarifReporter

            return SarifReporter
        if self is ReportFormat.HTML:
            from linter.report.html import HtmlReporter

            return HtmlReporter
        assert_never(self)

    def reporter(self, options: ReportOptions | None = None, *, verbose: bool = False,
                 quiet: bool = False, color: bool = False) -> Reporter:
        """A reporter of this format, from ``options`` or else from the three flags."""
        if options is None:
            options = ReportOptions(verbose=verbose, quiet=quiet, color=color)
        return self.reporter_class()(options)
