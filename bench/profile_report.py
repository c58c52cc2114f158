"""The report stage alone, per format (not a test; prints seconds and MiB).

Runs a whole check in this process (:func:`linter.engine.run_check`), then writes the report
of one format the way ``ledlint check`` does: to a file through
:func:`linter.output.write_atomically` (``--output``), or to a null stream (``--to null``,
as a pipe to /dev/null would). It prints the report stage's process CPU seconds, the bytes
written, and the peak resident memory (``ru_maxrss``) before and after the stage: the rise
is what the report adds to the run's peak. ``ru_maxrss`` only grows, so measure one format
per process. ``--profile N`` adds a cProfile listing of the report stage.

Usage::

    .venv/bin/python bench/profile_report.py bench/out/b100000_s1/board.edif \\
        --bom bench/out/b100000_s1/bom.csv --format json [--verbose] [--profile 30]
"""

from __future__ import annotations

import argparse
import cProfile
import io
import pstats
import resource
import sys
import tempfile
import time
from pathlib import Path
from typing import Sequence

if __package__ in (None, ""):  # run as a script: make ``linter`` importable from the checkout
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent))


class _NullStream(io.TextIOBase):
    """Counts the characters written and keeps none of them."""

    def __init__(self) -> None:
        self.count = 0

    def write(self, text: str) -> int:
        self.count += len(text)
        return len(text)


def _peak_mib() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def _write_report(reporter, result, to: str) -> int:
    """Characters written to a temporary file (atomically) or to a null stream."""
    try:
        from linter.report.stream import report_chunks
    except ImportError:  # before streaming reports: one string
        def report_chunks(reporter, results):
            return [reporter.render(one) for one in results]
    if to == "null":
        stream = _NullStream()
        for chunk in report_chunks(reporter, [result]):
            stream.write(chunk)
        return stream.count
    from linter.output import write_atomically

    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "report.out"
        pieces = report_chunks(reporter, [result])
        write_atomically(path, pieces if not isinstance(pieces, list) else "".join(pieces))
        return path.stat().st_size


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Report stage of ledlint check, one format.")
    parser.add_argument("netlist", type=Path)
    parser.add_argument("--bom", type=Path)
    parser.add_argument("--format", default="json", choices=("text", "json", "sarif", "html"))
    parser.add_argument("--verbose", action="store_true", help="text: a table per group")
    parser.add_argument("--to", default="file", choices=("file", "null"))
    parser.add_argument("--profile", type=int, default=0, metavar="N")
    parser.add_argument("--sort", default="cumulative", help="pstats sort key (tottime, ...)")
    args = parser.parse_args(argv)

    from linter.engine import CheckRequest, run_check
    from linter.report import ReportFormat

    started = time.process_time()
    result = run_check(CheckRequest(netlist=args.netlist, bom=args.bom))
    check_cpu = time.process_time() - started
    before = _peak_mib()
    reporter = ReportFormat(args.format).reporter(verbose=args.verbose)
    profiler = cProfile.Profile() if args.profile else None
    started, started_wall = time.process_time(), time.perf_counter()
    if profiler is not None:
        profiler.enable()
    size = _write_report(reporter, result, args.to)
    if profiler is not None:
        profiler.disable()
    cpu, wall = time.process_time() - started, time.perf_counter() - started_wall
    after = _peak_mib()
    parts = len(result.circuit.parts)
    print(f"check       cpu {check_cpu:8.3f} s  ({parts} parts, {len(result.groups)} groups, "
          f"{len(result.findings)} findings)")
    print(f"report {args.format:5} cpu {cpu:8.3f} s  wall {wall:8.3f} s  "
          f"{size / 2**20:8.1f} MiB written")
    print(f"peak        before {before:8.1f} MiB  after {after:8.1f} MiB  "
          f"(+{after - before:.1f} MiB)")
    if profiler is not None:
        pstats.Stats(profiler).sort_stats(args.sort).print_stats(args.profile)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
