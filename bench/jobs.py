"""Speed-up of ``ledlint check --jobs N`` on many boards: wall clock for 1 job and for more.

Generates ``--boards`` synthetic boards of ``--parts`` parts (:mod:`bench.gen_board`, seeds
1…N) into ``bench/out/jobs/pPARTS/bNN/``, then times one ``ledlint check`` of every board's
flat EDIF (or, with ``--netlist board.cir``, its SPICE twin) at once, JSON report to /dev/null, for each ``--jobs`` value (fresh process, one untimed
warm-up, then the median of ``--runs`` runs; :func:`bench.measure.run_command`). The reports
of the warm-ups must be byte-identical across job counts (the boards are reported in path
order whatever the pool does); a difference is printed and the exit status is 1.

The speed-up is the 1-job time over the N-job time, beside the ideal ``min(N, CPUs)`` and
beside a floor measured in the same run: the speed-up of pure-Python work on a pool of N
(:func:`floor_speedup`), the most this machine gives any pool at that moment. The CPU
seconds of each run (the ledlint process and its pool workers) are printed too: their growth
from 1 job to N is the pool's own cost, whatever else the machine is doing.
Results go to ``bench/out/jobs/jobs.json`` (not tracked).

Usage::

    .venv/bin/python bench/jobs.py                     # 20 boards of 2k parts, jobs 1 and 2
    .venv/bin/python bench/jobs.py --boards 8 --parts 1000 --jobs 1,2,4
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import resource
import sys
import time
from pathlib import Path
from typing import Sequence

if __package__ in (None, ""):  # run as a script: make ``bench`` importable
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.gen_board import generate, write_all  # noqa: E402
from bench.measure import Measure, run_command  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
LEDLINT = ROOT / ".venv" / "bin" / "ledlint"
OUT = ROOT / "bench" / "out" / "jobs"
RESULTS = OUT / "jobs.json"


def boards(count: int, parts: int, name: str = "board.edif") -> list[Path]:
    """The netlist ``name`` of each board, generated when missing (seed = board number)."""
    netlists = []
    for seed in range(1, count + 1):
        folder = OUT / f"p{parts}" / f"b{seed:02d}"
        if not (folder / name).is_file():
            write_all(generate(parts, seed), folder)
        netlists.append(folder / name)
    return netlists


def measure_jobs(netlists: Sequence[Path], jobs: int, runs: int) -> tuple[Measure, float]:
    """Time one check of every board; a report that is not every board's JSON is an error.

    Also returns the CPU seconds (user + system) of one run: the ledlint process and its
    pool workers, averaged over the warm-up and the timed runs.
    """
    command = [str(LEDLINT), "check", *map(str, netlists), "--format", "json", "--jobs", str(jobs)]
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    measure = run_command(f"jobs {jobs}", command, runs)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime) / (runs + 1)
    if measure.error is None:
        try:
            report = json.loads(measure.output)
            read = len(report["boards"]) if "boards" in report else 1
        except (ValueError, KeyError, TypeError):
            read = -1
        if read != len(netlists) or not report.get("complete", True):
            measure.error = f"the report does not hold all {len(netlists)} boards"
    return measure, cpu


FLOOR_TASKS = 20
"""Units of pure-Python work in the floor, one per board by default."""
FLOOR_LOOP = 2_000_000
"""Loop steps in one unit of floor work (about a tenth of a second)."""


def _floor_work(steps: int) -> int:
    total = 0
    for step in range(steps):
        total += step * step
    return total


def floor_speedup(jobs: int) -> float:
    """Speed-up of pure-Python work on a pool of ``jobs`` over one process, in this run.

    The most any pool can get from this machine now: on a shared or throttled machine it is
    well below ``min(jobs, CPUs)``, and ledlint's speed-up is read against it.
    """
    from concurrent.futures import ProcessPoolExecutor

    work = [FLOOR_LOOP] * FLOOR_TASKS
    started = time.perf_counter()
    for steps in work:
        _floor_work(steps)
    serial = time.perf_counter() - started
    started = time.perf_counter()
    with ProcessPoolExecutor(max_workers=jobs) as pool:
        list(pool.map(_floor_work, work))
    return serial / (time.perf_counter() - started)


def _row(measure: Measure, base: float | None, jobs: int, floor: float, cpu: float) -> str:
    median = measure.median
    if median is None:
        return f"{measure.name:8} n/a ({measure.error})"
    ideal = min(jobs, os.cpu_count() or 1)
    speed = (f"{base / median:5.2f}x (ideal {ideal}x; pure-Python floor on a pool now "
             f"{floor:4.2f}x)" if base else "")
    return f"{measure.name:8} {median:8.2f} s  CPU {cpu:7.2f} s  {speed}"


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--boards", type=int, default=20)
    parser.add_argument("--parts", type=int, default=2000)
    parser.add_argument("--jobs", default="1,2", help="comma-separated job counts; 1 first")
    parser.add_argument("--runs", type=int, default=1)
    parser.add_argument("--netlist", default="board.edif", choices=("board.edif", "board.cir"),
                        help="which writing of each board to check")
    args = parser.parse_args(argv)
    counts = [int(word) for word in args.jobs.split(",")]
    netlists = boards(args.boards, args.parts, args.netlist)
    print(f"{len(netlists)} boards of {args.parts} parts; {os.cpu_count()} CPUs; "
          f"Python {platform.python_version()}")
    timed = [measure_jobs(netlists, jobs, args.runs) for jobs in counts]
    measures = [measure for measure, _ in timed]
    cpus = {jobs: cpu for jobs, (_, cpu) in zip(counts, timed)}
    base = measures[0].median if counts[0] == 1 else None
    floors = {jobs: floor_speedup(jobs) for jobs in counts}
    for jobs, measure in zip(counts, measures):
        print(_row(measure, base, jobs, floors[jobs], cpus[jobs]))
    outputs = {measure.output for measure in measures if measure.error is None}
    same = len(outputs) <= 1
    print("reports identical across job counts" if same else "REPORTS DIFFER across job counts")
    RESULTS.write_text(json.dumps({
        "boards": len(netlists), "parts": args.parts, "cpus": os.cpu_count(),
        "measures": {str(jobs): measure.as_json() for jobs, measure in zip(counts, measures)},
        "speedup": {str(jobs): (base / m.median if base and m.median else None)
                    for jobs, m in zip(counts, measures)},
        "cpu_s": {str(jobs): cpus[jobs] for jobs in counts},
        "floor_speedup": {str(jobs): floors[jobs] for jobs in counts},
        "identical_reports": same}, indent=2) + "\n", "utf-8")
    return 0 if same else 1


if __name__ == "__main__":
    raise SystemExit(main())
