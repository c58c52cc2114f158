"""A progress bar on standard error for runs that take longer than a moment.

:class:`Progress` counts steps (netlists checked, then the report written). It draws a rich
progress bar only when its stream is a terminal, and only once the run has lasted
:data:`SHOW_AFTER_S`; a quick run shows nothing. The bar is transient (erased when the run
ends) and never touches standard output, so a JSON or SARIF report on standard output stays
clean. Nothing is written at all when the stream is not a terminal (a pipe, a file, CI logs).
"""

from __future__ import annotations

import os
import sys
from contextlib import AbstractContextManager, nullcontext
from types import TracebackType
from typing import IO, TYPE_CHECKING, Any

if TYPE_CHECKING:
    import threading

__all__ = ["SHOW_AFTER_S", "Progress"]

SHOW_AFTER_S: float = 0.5
"""Seconds a run lasts before the bar appears."""


def _lock(enabled: bool) -> AbstractContextManager[Any]:
    """A lock between the timer's thread and the run; none is needed when no timer starts
    (threading is then not even imported: most runs write to a pipe or a file)."""
    if not enabled:
        return nullcontext()
    import threading

    return threading.Lock()


def _is_terminal(stream: IO[str]) -> bool:
    try:
        return bool(stream.isatty())
    except (AttributeError, ValueError):  # no isatty, or a closed stream
        return False


class Progress:
    """``with Progress(total) as progress: ... progress.step("checking board.edif")``.

    Parameters
    ----------
    total : int
        Steps expected.
    stream : text stream, default standard error
        Where the bar goes; nothing is drawn unless it is a terminal.
    delay : float, s
        How long a run lasts before the bar appears.
    """

    def __init__(self, total: int, stream: IO[str] | None = None,
                 delay: float = SHOW_AFTER_S) -> None:
        self.total = total
        self.stream = stream if stream is not None else sys.stderr
        self.delay = delay
        self.enabled = _is_terminal(self.stream) and os.environ.get("TERM") != "dumb"
        self._lock = _lock(self.enabled)
        self._timer: threading.Timer | None = None
        self._bar: Any = None
        self._task: Any = None
        self._done = 0
        self._label = ""
        self._closed = False

    def __enter__(self) -> "Progress":
        if self.enabled:
            import threading

            self._timer = threading.Timer(self.delay, self._show)
            self._timer.daemon = True
            self._timer.start()
        return self

    def step(self, label: str) -> None:
        """Start the next step, called ``label``; the previous one counts as done."""
        with self._lock:
            if self._label:
                self._done += 1
            self._label = label
            if self._bar is not None:
                self._bar.update(self._task, completed=self._done, description=label)

    def _show(self) -> None:
        """Start drawing (on the timer's thread), unless the run has ended meanwhile."""
        from rich.console import Console
        from rich.progress import BarColumn, MofNCompleteColumn, TextColumn, TimeElapsedColumn
        from rich.progress import Progress as RichProgress

        with self._lock:
            if self._closed:
                return
            console = Console(file=self.stream, force_terminal=True, highlight=False)
            self._bar = RichProgress(TextColumn("{task.description}"), BarColumn(),
                                     MofNCompleteColumn(), TimeElapsedColumn(),
                                     console=console, transient=True)
            self._task = self._bar.add_task(self._label or "working", total=self.total,
                                            completed=self._done)
            self._bar.start()

    def __exit__(self, kind: type[BaseException] | None, error: BaseException | None,
                 trace: TracebackType | None) -> None:
        with self._lock:
            self._closed = True
            if self._timer is not None:
                self._timer.cancel()
            bar, self._bar = self._bar, None
        if bar is not None:
            bar.stop()
