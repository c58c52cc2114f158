"""Many boards in one run: finding the netlists, pairing each with its BOM, checking them.

``ledlint check A.edif B.cir DIR ...`` checks every named netlist and every netlist below each
named folder, each as its own board (settings found upward from each netlist, as for one).

Discovery (:func:`find_netlists`)
    Below a folder, every file whose suffix is a netlist suffix (EDIF ``.edif .edf .edn .edo``;
    SPICE ``.cir .sp .spice .net .ckt .spi``), except a ``.net`` file whose text opens with a
    parenthesis but not ``(edif`` (another tool's S-expression netlist), plus any other file
    whose text opens with ``(edif``. Hidden folders and files (name starting with ``.``) and
    virtualenvs (a folder holding ``pyvenv.cfg``) are skipped, and so is anything that is not
    a regular file (a named pipe would block the read); symbolic links to folders are not
    followed. A file named on the command line is always checked.

BOM (:func:`bom_beside`)
    With ``--bom`` (one netlist only) that file. Otherwise, for several boards, a BOM is taken
    from the netlist's own folder only when that folder holds exactly one netlist: ``bom.csv``
    there, else the single file matching ``*bom*.csv`` (case ignored). Otherwise none; the
    reason is kept (:attr:`BoardTask.bom_note`) and shown in the report's inputs.

Order and jobs (:func:`run_boards`)
    Boards are sorted by path (folder by folder) and reported in that order, whatever
    ``--jobs`` is; with ``jobs > 1`` they are checked on a process pool.

A board whose inputs cannot be used does not stop the others: its outcome carries the
one-line located error instead of a result, and the run's report says it is incomplete.
"""

from __future__ import annotations

import os
import pickle
from dataclasses import dataclass
from pathlib import Path
from typing import Callable, Iterable, Iterator, Sequence

from linter.errors import LedlintError, UsageError, one_line
from linter.readers import EDIF_SUFFIXES, SPICE_SUFFIXES

__all__ = ["BoardTask", "BoardOutcome", "NETLIST_SUFFIXES", "looks_like_netlist",
           "find_netlists", "expand_inputs", "bom_beside", "plan_boards", "check_board",
           "run_boards"]

NETLIST_SUFFIXES = EDIF_SUFFIXES | SPICE_SUFFIXES
"""Suffixes taken as netlists below a folder (case ignored)."""
SNIFF_BYTES = 256
"""Bytes read from the head of a file to tell an EDIF netlist by its content."""
BOM_NAME = "bom.csv"
"""The BOM taken beside a netlist first; else the one ``*bom*.csv`` there."""


@dataclass(frozen=True)
class BoardTask:
    """One board to check: the netlist, the files that go with it, and why its BOM is what it is."""

    netlist: Path
    bom: Path | None = None
    bom_note: str = ""
    config: Path | None = None
    parts_files: tuple[Path, ...] = ()
    baseline: Path | None = None


@dataclass(frozen=True)
class BoardOutcome:
    """A board's result, or the one-line located error that stopped it (never both)."""

    task: BoardTask
    result: object | None = None  # linter.engine.CheckResult (picklable)
    error: str | None = None
    error_file: str | None = None
    error_line: int | None = None
    error_column: int | None = None

    @property
    def readable(self) -> bool:
        return self.error is None


def _head(path: Path) -> bytes:
    try:
        with path.open("rb") as stream:
            return stream.read(SNIFF_BYTES)
    except OSError:
        return b""


def looks_like_netlist(path: Path) -> bool:
    """True for a netlist by the discovery rule above (suffix, then the head of the text)."""
    head = _head(path).lstrip(b"\xef\xbb\xbf \t\r\n").lower()
    suffix = path.suffix.lower()
    if head.startswith(b"(edif"):
        return True
    if suffix == ".net" and head.startswith(b"("):
        return False
    return suffix in NETLIST_SUFFIXES


def _skipped_folder(folder: Path) -> bool:
    return folder.name.startswith(".") or (folder / "pyvenv.cfg").is_file()


def find_netlists(folder: Path, recursive: bool = True) -> list[Path]:
    """The netlists in ``folder`` (and below it when ``recursive``), sorted by path."""
    found: list[Path] = []
    for top, folders, files in os.walk(folder, followlinks=False):
        here = Path(top)
        folders[:] = sorted(name for name in folders if not _skipped_folder(here / name))
        found += [here / name for name in sorted(files) if not name.startswith(".")
                  and (here / name).is_file() and looks_like_netlist(here / name)]
        if not recursive:
            break
    return sorted(found, key=lambda path: path.parts)


def expand_inputs(paths: Iterable[Path]) -> list[Path]:
    """Named files as they are and folders' netlists, each once (by real path), sorted by path.

    Raises
    ------
    UsageError
        A named folder holds no netlist.
    """
    netlists: dict[Path, Path] = {}
    for path in paths:
        if path.is_dir():
            below = find_netlists(path)
            if not below:
                raise UsageError(f"ledlint check: {path}: no netlist found below this folder "
                                 f"(suffixes {' '.join(sorted(NETLIST_SUFFIXES))})")
        else:
            below = [path]
        for netlist in below:
            netlists.setdefault(netlist.resolve(), netlist)
    return sorted(netlists.values(), key=lambda path: path.parts)


def bom_beside(netlist: Path) -> tuple[Path | None, str]:
    """The BOM in the netlist's own folder by the rule above, and a note saying why (or why none)."""
    folder = netlist.parent
    count = len(find_netlists(folder, recursive=False))
    if count > 1:
        return None, f"none: {folder} holds {count} netlists, so no BOM is taken from it"
    exact = folder / BOM_NAME
    if exact.is_file():
        return exact, f"{BOM_NAME} found beside the netlist"
    try:
        names = sorted(entry.name for entry in os.scandir(folder) if entry.is_file()
                       and "bom" in entry.name.lower() and entry.name.lower().endswith(".csv"))
    except OSError:
        names = []
    if len(names) == 1:
        return folder / names[0], f"{names[0]} found beside the netlist"
    if names:
        return None, f"none: {len(names)} files match *bom*.csv beside the netlist"
    return None, "none: no bom.csv beside the netlist"


def plan_boards(netlists: Sequence[Path], bom: Path | None = None, config: Path | None = None,
                parts_files: tuple[Path, ...] = (), baseline: Path | None = None) -> list[BoardTask]:
    """One task per netlist; ``bom`` (the user's ``--bom``) only for a single netlist."""
    if bom is not None and len(netlists) > 1:
        raise UsageError("ledlint check: --bom names one board's BOM; with several netlists "
                         "leave it out (a bom.csv beside each netlist is taken)")
    tasks = []
    for netlist in netlists:
        if bom is not None:
            found, note = bom, "given with --bom"
        else:
            found, note = bom_beside(netlist)
        tasks.append(BoardTask(netlist, found, note, config, tuple(parts_files), baseline))
    return tasks


def check_board(task: BoardTask) -> BoardOutcome:
    """Check one board (in this process or a pool worker); input errors become the outcome."""
    from linter.engine import CheckRequest, run_check

    request = CheckRequest(netlist=task.netlist, bom=task.bom, config=task.config,
                           parts_files=task.parts_files, baseline=task.baseline)
    try:
        return BoardOutcome(task, result=run_check(request))
    except LedlintError as exc:
        return BoardOutcome(task, error=one_line(str(exc)),
                            error_file=getattr(exc, "file", None) or str(task.netlist),
                            error_line=getattr(exc, "line", None),
                            error_column=getattr(exc, "column", None))
    except RecursionError:
        return BoardOutcome(task, error=f"{task.netlist}: input nested too deeply",
                            error_file=str(task.netlist))


WORKER_THREAD_VARIABLES = ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS")
"""Set to 1 in each pool worker (unless the user set them): one process per board already
fills the CPUs, and each worker's BLAS threads would compete for the same CPUs (common
practice for process pools over numpy)."""


def _worker_start() -> None:
    """Pool initializer: one BLAS thread per worker.

    It takes effect when numpy is first imported in the worker, which is the case under the
    CLI (the parent process never imports numpy before the pool starts). A caller that has
    imported numpy already passes its BLAS threads on to the forked workers.
    """
    for name in WORKER_THREAD_VARIABLES:
        os.environ.setdefault(name, "1")


def _check_board_packed(task: BoardTask) -> bytes:
    """:func:`check_board` in a pool worker, the outcome pickled here (sent as bytes)."""
    return pickle.dumps(check_board(task), protocol=pickle.HIGHEST_PROTOCOL)


def _unpack(data: bytes) -> BoardOutcome:
    """A worker's outcome, unpickled with the cyclic garbage collector paused.

    A 2k-part board's result is a few hundred thousand small objects; with the collector on,
    loading twenty of them took seven times as long as with it paused (measured while
    writing bench/jobs.py), which undid the pool's gain.
    """
    from linter.gc_pause import paused_gc

    with paused_gc():
        return pickle.loads(data)


def _pooled(tasks: Sequence[BoardTask], jobs: int) -> Iterator[tuple[int, BoardOutcome]]:
    """(index, outcome) as the pool delivers them; an interruption cancels what has not started."""
    from concurrent.futures import as_completed
    from concurrent.futures.process import BrokenProcessPool

    from concurrent.futures import ProcessPoolExecutor  # only a --jobs run pays for it

    pool = ProcessPoolExecutor(max_workers=min(jobs, len(tasks)), initializer=_worker_start)
    try:
        futures = {pool.submit(_check_board_packed, task): index
                   for index, task in enumerate(tasks)}
        for future in as_completed(futures):
            try:
                outcome = _unpack(future.result())
            except BrokenProcessPool:
                raise LedlintError("ledlint check: a worker process ended abruptly (out of "
                                   "memory?); try fewer --jobs") from None
            yield futures[future], outcome
    finally:
        pool.shutdown(wait=True, cancel_futures=True)


def _outcomes(tasks: Sequence[BoardTask], jobs: int) -> Iterator[tuple[int, BoardOutcome]]:
    """(index, outcome) as each board finishes: in order on one job, else as the pool delivers."""
    if jobs <= 1 or len(tasks) <= 1:
        for index, task in enumerate(tasks):
            yield index, check_board(task)
        return
    yield from _pooled(tasks, jobs)


def run_boards(tasks: Sequence[BoardTask], jobs: int = 1,
               on_done: Callable[[BoardOutcome], None] | None = None) -> list[BoardOutcome]:
    """Every board's outcome, in the order of ``tasks`` whatever ``jobs`` is.

    ``on_done`` is called once per board as it finishes (for a progress bar).
    """
    if jobs < 1:
        raise UsageError(f"ledlint check: --jobs {jobs}: give a whole number of 1 or more")
    outcomes: list[BoardOutcome | None] = [None] * len(tasks)
    for index, outcome in _outcomes(tasks, jobs):
        outcomes[index] = outcome
        if on_done is not None:
            on_done(outcome)
    return [outcome for outcome in outcomes if outcome is not None]
