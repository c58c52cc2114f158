"""Stage times of the whole ``ledlint check`` pipeline on one netlist (not a test; prints seconds).

Runs in this process, stage by stage, what :func:`linter.engine.run_check` and the JSON reporter
do: ``settings``, ``read`` (the netlist), ``bom`` (reading it), ``bom join``, ``part data``,
``rails``, ``topology``, ``analyse``, ``rules``, ``waivers`` and ``report`` (the JSON report
written piece by piece to /dev/null, as the CLI writes it). ``--profile N`` adds a cProfile
listing of the stages named by ``--stages`` (all by default). Each stage shows wall-clock and
process CPU seconds. ``--stop-after STAGE`` ends early. The peak resident memory
(``ru_maxrss``) is printed after each stage and after the run, whole and per part.

Usage::

    .venv/bin/python bench/gen_board.py --parts 100000 --seed 1 --out bench/out/b100k
    .venv/bin/python bench/profile_pipeline.py bench/out/b100k/board.edif --bom bench/out/b100k/bom.csv
    .venv/bin/python bench/profile_pipeline.py bench/out/b100k/board.cir --profile 40 --stages read
"""

from __future__ import annotations

import argparse
import cProfile
import datetime as dt
import pstats
import resource
import sys
import time
from pathlib import Path
from typing import Callable, Sequence

if __package__ in (None, ""):  # run as a script: make ``linter`` importable from the checkout
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent))


class _Stop(Exception):
    """Raised after the stage named by ``--stop-after``."""


class _Stages:
    """Times named stages; profiles the chosen ones into one cProfile."""

    def __init__(self, profiled: set[str] | None, profile: bool, stop_after: str | None) -> None:
        self.times: dict[str, float] = {}
        self.cpu: dict[str, float] = {}  # process CPU seconds (less sensitive to a busy machine)
        self.peaks: dict[str, int] = {}  # ru_maxrss (KiB) after each stage
        self.profiled = profiled
        self.profiler = cProfile.Profile() if profile else None
        self.stop_after = stop_after
        self.parts = 0

    def run(self, name: str, call: Callable, count: bool = False):
        """``call()``, timed; ``count`` takes its result's part count (a Circuit)."""
        on = self.profiler is not None and (self.profiled is None or name in self.profiled)
        started, started_cpu = time.perf_counter(), time.process_time()
        if on:
            self.profiler.enable()
        try:
            result = call()
        finally:
            if on:
                self.profiler.disable()
            self.times[name] = time.perf_counter() - started
            self.cpu[name] = time.process_time() - started_cpu
            self.peaks[name] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
        if count:
            self.parts = len(result.parts)
        if name == self.stop_after:
            raise _Stop
        return result


def _drain(chunks) -> int:
    """Write ``chunks`` to /dev/null as the CLI writes a report (piece by piece); their length."""
    written = 0
    with open("/dev/null", "w", encoding="utf-8") as sink:
        for chunk in chunks:
            written += sink.write(chunk)
    return written


def _pipeline(netlist: Path, bom_path: Path | None, stages: _Stages) -> None:
    """Every stage of a check, in order (``stages.parts`` gets the circuit's part count)."""
    from linter import limits
    from linter.bom_join import apply_bom
    from linter.config import check_rule_settings, load_settings
    from linter.context import AnalysisContext
    from linter.engine import CheckRequest, CheckResult, run_rules
    from linter.gc_pause import paused_gc
    from linter.parts import resolve_part_data
    from linter.rails import resolve_rails
    from linter.readers import read_netlist
    from linter.readers.bom import read_bom
    from linter.rules import all_rules

    registry = stages.run("rules import", all_rules)
    settings = stages.run("settings", lambda: check_rule_settings(
        load_settings(netlist, None, ()), registry))
    opaque = frozenset(n for n, spec in settings.parts.items() if spec.kind == "mcu")
    with paused_gc():  # as linter.engine.load_inputs does
        with limits.applied(limits.effective(settings.limits)):
            circuit = stages.run("read", lambda: read_netlist(netlist, str(netlist),
                                                              opaque=opaque), count=True)
            bom = stages.run("bom", lambda: read_bom(bom_path)) if bom_path else None
        discrepancies = ()
        if bom is not None:
            circuit, discrepancies = stages.run("bom join", lambda: apply_bom(circuit, bom, fresh=True))
        circuit, part_data = stages.run("part data", lambda: resolve_part_data(circuit, settings,
                                                                          fresh=True))
        rails = stages.run("rails", lambda: resolve_rails(circuit, settings))
    context = AnalysisContext(circuit=circuit, settings=settings, rails=rails,
                              part_data=part_data, bom=bom, bom_discrepancies=discrepancies)
    _analyse(context, stages, registry, CheckRequest(netlist, bom_path), CheckResult, run_rules)


def _analyse(context, stages: _Stages, registry, request, result_type, run_rules) -> None:
    from dataclasses import replace

    from linter.analysis import analyse
    from linter.report import ReportFormat
    from linter.report.stream import report_chunks
    from linter.topology import find_groups
    from linter.waivers import STALE_WAIVER, apply_waivers

    groups = stages.run("topology", lambda: find_groups(context.circuit, context.rails,
                                                        context.part_data))
    solved = stages.run("analyse", lambda: analyse(groups, context.circuit, context.part_data,
                                                   context.rails, context.settings.ambient))
    context = replace(context, groups=solved)
    findings = stages.run("rules", lambda: run_rules(context, registry))
    kept, waived, notices = stages.run("waivers", lambda: apply_waivers(
        findings, context.settings.waivers, dt.date.today(),
        context.severity(STALE_WAIVER, "info")))
    result = result_type(request=request, circuit=context.circuit, findings=kept + notices,
                         groups=solved, rails=context.rails, part_data=context.part_data,
                         settings=context.settings, bom=context.bom,
                         bom_discrepancies=context.bom_discrepancies, waived=waived,
                         context=context)
    reporter = ReportFormat("json").reporter(verbose=False, quiet=False, color=False)
    stages.run("report", lambda: _drain(report_chunks(reporter, [result])))


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Stage times of ledlint check on one netlist.")
    parser.add_argument("netlist", type=Path)
    parser.add_argument("--bom", type=Path)
    parser.add_argument("--profile", type=int, default=0, metavar="N",
                        help="print the N heaviest functions by cumulative time")
    parser.add_argument("--sort", default="cumulative", help="pstats sort key (tottime, …)")
    parser.add_argument("--stages", help="comma-separated stages to profile (default: all)")
    parser.add_argument("--stop-after", metavar="STAGE", help="end after this stage (topology…)")
    parser.add_argument("--dump", type=Path, metavar="FILE",
                        help="also write the cProfile statistics to FILE (for pstats callers)")
    args = parser.parse_args(argv)
    profiled = set(args.stages.split(",")) if args.stages else None
    stages = _Stages(profiled, bool(args.profile), args.stop_after)
    started, started_cpu = time.perf_counter(), time.process_time()
    try:
        _pipeline(args.netlist, args.bom, stages)
    except _Stop:
        pass
    parts = stages.parts
    total, total_cpu = time.perf_counter() - started, time.process_time() - started_cpu
    for name, seconds in stages.times.items():
        print(f"{name:14} {seconds:8.3f} s  cpu {stages.cpu[name]:8.3f} s  "
              f"peak so far {stages.peaks[name] / 1024:7.1f} MiB")
    print(f"{'total':14} {total:8.3f} s  cpu {total_cpu:8.3f} s  ({parts} parts)")
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    print(f"{'peak memory':14} {peak / 1024:8.1f} MiB   ({peak / max(parts, 1):.2f} KiB a part)")
    if stages.profiler is not None:
        pstats.Stats(stages.profiler).sort_stats(args.sort).print_stats(args.profile)
        if args.dump is not None:
            stages.profiler.dump_stats(str(args.dump))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
