"""Reports written as they are made: a reporter may give its text in pieces.

A :class:`StreamingReporter` makes its report as an iterator of strings
(:meth:`~StreamingReporter.chunks`); :meth:`~StreamingReporter.render` joins them, so it is
still a :class:`~linter.report.Reporter` for every caller that wants one string. The CLI
writes the pieces as they come (:func:`report_chunks`), to standard output or through
:func:`linter.output.write_atomically`, so that a 100k-part report never exists whole in
memory (a report file is still replaced whole or not at all).
"""

from __future__ import annotations

from abc import abstractmethod
from typing import TYPE_CHECKING, Iterable, Iterator

from linter.report import Reporter

if TYPE_CHECKING:
    from linter.engine import CheckResult

__all__ = ["StreamingReporter", "report_chunks"]


class StreamingReporter(Reporter):
    """A reporter whose text comes in pieces; the pieces joined are :meth:`render`."""

    @abstractmethod
    def chunks(self, result: "CheckResult") -> Iterator[str]:
        """The report's text in order, in pieces; the last one ends in a newline."""

    def render(self, result: "CheckResult") -> str:
        return "".join(self.chunks(result))


def report_chunks(reporter: Reporter, results: "Iterable[CheckResult]") -> Iterator[str]:
    """The reports of ``results``, one after another with a blank line between, in pieces
    (the text of ``"\\n".join(reporter.render(r) for r in results)``)."""
    for index, result in enumerate(results):
        if index:
            yield "\n"
        if isinstance(reporter, StreamingReporter):
            yield from reporter.chunks(result)
        else:
            yield reporter.render(result)
