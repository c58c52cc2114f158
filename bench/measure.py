"""Timing and peak memory of one measure: a command in fresh processes, or a Python call.

A command is run once untimed (the warm-up, which also checks that it works and keeps its
standard output for inspection), then ``runs`` times with its standard output sent to
/dev/null. Measures that are compared are timed in rounds (:func:`in_rounds`): each round
runs every measure once, so that a slow spell of a shared machine falls on all of them. Each run's wall-clock time is taken around the process; its peak resident memory
is the ``ru_maxrss`` that :func:`os.wait4` returns for that one child (KiB on Linux), both
taken by ``bench/launch.py``, a small process the command is forked from (forked from this
harness, a child would be charged with the harness's own resident memory). It is one
process's peak: memory of processes the command forks is not in it, so a single-board check
stays in one process (sharing a 100,000-part board's rules with a forked child once saved
about 0.1 s of 5 s, and the child's copied pages, some 125 MiB, went uncounted here).

A measure that cannot run (exit status other than 0 or 1, a crash, a missing program) is
recorded with its error and no number: never a guessed one.
"""

from __future__ import annotations

import gc
import os
import statistics
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Sequence

__all__ = ["Measure", "CommandMeasure", "CallMeasure", "in_rounds", "run_command", "time_call",
           "OK_EXIT_CODES"]

OK_EXIT_CODES = (0, 1)
"""Exit statuses that mean the command did its work (ledlint: 1 = findings at the fail level)."""
TIMEOUT = 900.0
"""Seconds after which a run is killed and the measure recorded as an error."""


@dataclass
class Measure:
    """The result of one measure: every run's seconds, the peak memory, or the error."""

    name: str
    seconds: list[float] = field(default_factory=list)
    peak_kb: int | None = None
    error: str | None = None
    output: str = field(default="", repr=False)

    @property
    def median(self) -> float | None:
        """Median wall-clock seconds, or None when the measure did not run."""
        if self.error is not None or not self.seconds:
            return None
        return statistics.median(self.seconds)

    def as_json(self) -> dict[str, Any]:
        """The record written to results.json."""
        return {"median_s": self.median, "runs_s": [round(s, 4) for s in self.seconds],
                "peak_kb": self.peak_kb, "error": self.error}


LAUNCHER = Path(__file__).with_name("launch.py")
"""The small process each measured command is forked from (see its docstring)."""


def _once(command: Sequence[str], keep_output: bool) -> tuple[float, int, int, str, str]:
    """Seconds, exit status, peak KiB, standard output (if kept) and error of one run.

    The command is started by :data:`LAUNCHER`, which times it and reads its own ``ru_maxrss``
    (the time excludes the launcher's start). A run still going after :data:`TIMEOUT` seconds
    is killed; its error text says so.
    """
    with tempfile.TemporaryFile() as err, tempfile.TemporaryFile() as out, \
            tempfile.TemporaryDirectory() as scratch:
        result = Path(scratch) / "result"
        subprocess.run([sys.executable, "-S", str(LAUNCHER), str(result), str(TIMEOUT),
                        *command], stdin=subprocess.DEVNULL,
                       stdout=out if keep_output else subprocess.DEVNULL, stderr=err,
                       check=True)
        recorded = result.read_text(encoding="utf-8")
        if recorded.startswith("cannot-start "):
            raise OSError(None, recorded.split(" ", 1)[1].strip())
        seconds, status, peak = recorded.split()
        elapsed = float(seconds)
        if elapsed >= TIMEOUT:
            err.write(f"timed out after {TIMEOUT:g} s\n".encode())
        err.seek(0)
        out.seek(0)
        return (elapsed, int(status), int(peak),
                out.read().decode("utf-8", "replace") if keep_output else "",
                err.read().decode("utf-8", "replace"))


def _error_text(status: int, stderr: str) -> str:
    """``exit 2: <last line of standard error>``, or the signal that ended the process."""
    lines = [line.strip() for line in stderr.splitlines() if line.strip()]
    last = lines[-1] if lines else "(no message)"
    cause = f"signal {-status}" if status < 0 else f"exit {status}"
    return f"{cause}: {last[:200]}"


class CommandMeasure:
    """A command timed in fresh processes: one untimed warm-up, then one run per round.

    ``failed`` may inspect standard error and return an error text for a program that
    reports failure without a bad exit status (ngspice).
    """

    def __init__(self, name: str, command: Sequence[str],
                 failed: Callable[[str], str | None] = lambda stderr: None,
                 runs: int | None = None) -> None:
        self.measure = Measure(name)
        self.command = list(command)
        self.failed = failed
        self.runs = runs  # at most this many timed runs (None: one per round)
        self._peaks: list[int] = []

    def warm_up(self) -> None:
        measure = self.measure
        try:
            _, status, peak, measure.output, stderr = _once(self.command, keep_output=True)
        except OSError as exc:
            measure.error = f"cannot start {self.command[0]}: {exc.strerror or exc}"
            return
        problem = self.failed(stderr)
        if status not in OK_EXIT_CODES or problem:
            measure.error = problem or _error_text(status, stderr)
            return
        self._peaks.append(peak)

    def run_once(self) -> None:
        seconds, status, peak, _, stderr = _once(self.command, keep_output=False)
        if status not in OK_EXIT_CODES:
            self.measure.error = _error_text(status, stderr)
            return
        self.measure.seconds.append(seconds)
        self._peaks.append(peak)
        self.measure.peak_kb = max(self._peaks)


class CallMeasure:
    """A Python call timed in this process, after a full garbage collection each time (no
    warm-up: the first call is timed too). ``collect=False`` runs it with the garbage
    collector disabled."""

    def __init__(self, name: str, call: Callable[[], object], collect: bool = True,
                 runs: int | None = None) -> None:
        self.measure = Measure(name)
        self.call = call
        self.collect = collect
        self.runs = runs

    def warm_up(self) -> None:
        pass

    def run_once(self) -> None:
        gc.collect()
        if not self.collect:
            gc.disable()
        try:
            started = time.perf_counter()
            result = self.call()
            self.measure.seconds.append(time.perf_counter() - started)
        except Exception as exc:  # noqa: BLE001 - any failure is recorded, never hidden
            self.measure.error = f"{type(exc).__name__}: {str(exc)[:200]}"
            return
        finally:
            gc.enable()
        del result


Timed = CommandMeasure | CallMeasure


def in_rounds(timed: Sequence[Timed], runs: int) -> list[Measure]:
    """Warm every measure up, then time them in turn, one run each a round, ``runs`` rounds
    (a measure with its own ``runs`` drops out after that many).

    Measures meant to be compared are thus taken side by side: a slow spell of a shared
    machine falls on one round of every measure, not on every run of one (which could move
    a ratio by half). A measure that fails is left out of the later rounds with its error.
    """
    for item in timed:
        item.warm_up()
    for round_number in range(runs):
        for item in timed:
            wanted = runs if item.runs is None else item.runs
            if item.measure.error is None and round_number < wanted:
                item.run_once()
    return [item.measure for item in timed]


def run_command(name: str, command: Sequence[str], runs: int,
                failed: Callable[[str], str | None] = lambda stderr: None) -> Measure:
    """Warm up once, then time ``runs`` runs of ``command`` (one measure on its own)."""
    return in_rounds([CommandMeasure(name, command, failed)], runs)[0]


def time_call(name: str, call: Callable[[], object], runs: int, collect: bool = True) -> Measure:
    """Time ``runs`` calls of ``call`` in this process (after a full garbage collection each).

    ``collect=False`` runs the calls with the garbage collector disabled.
    """
    return in_rounds([CallMeasure(name, call, collect)], runs)[0]
