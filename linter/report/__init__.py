"""Reporters: one module per output format behind one small interface."""

from __future__ import annotations

from abc import ABC, abstractmethod
from enum import Enum
from typing import TYPE_CHECKING, assert_never

if TYPE_CHECKING:
    from linter.engine import CheckResult

__all__ = ["Reporter", "ReportFormat"]


class Reporter(ABC):
    """Turns a check result into the text of one report format."""

    @abstractmethod
    def render(self, result: "CheckResult") -> str:
        """The whole report as text."""


class ReportFormat(str, Enum):
    """The ``--format`` choices."""

    TEXT = "text"
    JSON = "json"

    def reporter(self, *, verbose: bool = False, quiet: bool = False, color: bool = False) -> Reporter:
        """The reporter for this format."""
        if self is ReportFormat.TEXT:
            from linter.report.text import TextReporter

            return TextReporter(verbose=verbose, quiet=quiet, color=color)
        if self is ReportFormat.JSON:
            from linter.report.json import JsonReporter

            return JsonReporter()
        assert_never(self)
