"""Stage times of the corner solver on a synthetic board (not a test; prints seconds).

Generates a board with :func:`bench.gen_board.generate` of about ``--groups`` LED groups of
every kind (resistor, string, parallel, npn-sink with divider, pin source and sink with a
microcontroller, low-side N-MOSFET switch), reads its flat EDIF with its ``ledlint.toml``
and times: reading, topology, and inside :func:`linter.analysis.analyse` the stages that
:data:`linter.analysis.STAGE_TIMES` records: ``build`` (group models), ``params`` (figures
stacked per bucket), ``nominal`` (each group's nominal point, from zero), ``probe`` (each axis
alone at each extreme), ``plan`` (corner choice and warm starts), ``corners`` (every corner
row) and ``reduce`` (spans and result records). ``--profile N`` adds a cProfile listing.

Usage::

    .venv/bin/python bench/profile_solve.py --groups 1000,10000,25000
    .venv/bin/python bench/profile_solve.py --groups 10000 --profile 30
"""

from __future__ import annotations

import argparse
import cProfile
import pstats
import sys
import tempfile
import time
from pathlib import Path
from typing import Sequence

if __package__ in (None, ""):  # run as a script: make ``bench`` importable
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.gen_board import generate  # noqa: E402

PARTS_PER_GROUP = 3.9
"""Parts per LED group on a generated board (measured on 10k parts: 2583 groups)."""


def _load(groups: int, folder: Path):
    from bench.write_edif import write_flat_edif
    from bench.write_tables import write_settings
    from linter.engine import CheckRequest, load_inputs

    board = generate(max(300, int(groups * PARTS_PER_GROUP)), 1)
    write_flat_edif(board, folder / "board.edif")
    write_settings(board, folder / "ledlint.toml")
    return load_inputs(CheckRequest(folder / "board.edif"))


def measure(groups: int, profile_lines: int = 0) -> dict[str, float]:
    """Seconds per stage for a board of about ``groups`` LED groups."""
    import linter.analysis as analysis
    from linter.topology import find_groups

    times: dict[str, float] = {}
    with tempfile.TemporaryDirectory() as tmp:
        started = time.perf_counter()
        context = _load(groups, Path(tmp))
        times["read"] = time.perf_counter() - started
    started = time.perf_counter()
    found = find_groups(context.circuit, context.rails, context.part_data)
    times["topology"] = time.perf_counter() - started
    times["groups"] = len(found)
    stage_times = getattr(analysis, "STAGE_TIMES", None)
    if stage_times is not None:
        stage_times.clear()
    profiler = cProfile.Profile() if profile_lines else None
    started = time.perf_counter()
    if profiler:
        profiler.enable()
    results = analysis.analyse(found, context.circuit, context.part_data, context.rails,
                               context.settings.ambient)
    if profiler:
        profiler.disable()
    times["analyse"] = time.perf_counter() - started
    times["unsolved"] = sum(r.status != "solved" for r in results)
    if stage_times is not None:
        times.update({f"  {k}": v for k, v in stage_times.items()})
    if profiler:
        pstats.Stats(profiler).sort_stats("cumulative").print_stats(profile_lines)
    return times


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Stage times of topology and the solver.")
    parser.add_argument("--groups", default="1000,10000", help="comma-separated group counts")
    parser.add_argument("--profile", type=int, default=0, help="cProfile lines to print")
    args = parser.parse_args(argv)
    for count in (int(x) for x in args.groups.split(",")):
        times = measure(count, args.profile)
        print(f"--- about {count} groups")
        for name, value in times.items():
            print(f"{name:14} {value:10.3f}" if isinstance(value, float) else f"{name:14} {value:10d}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
