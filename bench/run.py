"""Benchmark harness (``make bench``): ledlint against floors measured in the same run.

For each size (default 1k, 10k and 100k parts) a synthetic board is generated
(:mod:`bench.gen_board`, seed 1) and these are measured, each the median of ``--runs`` runs
(3 by default) after one untimed warm-up, in rounds (every measure once a round, so that a
slow spell of the machine falls on all of them alike, :func:`bench.measure.in_rounds`):

* floor: read the flat EDIF text and tokenize it with one compiled regex into nested lists
  (:func:`floor_parse`: iterative, explicit stack), the least any Python reader must do; also
  with the garbage collector off, for information;
* ``sexpdata.loads`` of the same text, the reference parser (run once at 100k and above;
  ``--skip-sexpdata-large`` skips it there);
* ``ledlint check`` on the flat EDIF, the hierarchical EDIF and the SPICE twin, JSON report
  to /dev/null, each in a fresh process, wall clock; peak resident memory of each run;
* ``ngspice -b`` on the SPICE twin.

Start-up: ``ledlint check`` on the demo board against ``python -c "import numpy, networkx"``.

Targets (:data:`TARGETS`) are checked at 100k and printed with PASS, FAIL or SKIP (size not
measured). A measure that could not run is "n/a (error: …)" and its targets FAIL; no number
is ever made up. Beside the timings, the number of LED groups each ledlint run reported is
shown against the number the generator placed, so a fast run that does less work is seen.

Results go to bench/results.json. Exit status 0, or 1 with ``--check`` when a target FAILs.
"""

from __future__ import annotations

import argparse
import json
import platform
import re
import shutil
import sys
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Sequence

if __package__ in (None, ""):  # run as a script: make ``bench`` importable
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.gen_board import Board, generate, write_all  # noqa: E402
from bench.measure import CallMeasure, CommandMeasure, Measure, in_rounds  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
BIN = ROOT / ".venv" / "bin"
DEMO = ROOT / "fixtures" / "demo" / "dust_extractor_panel.edif"
DEMO_BOM = ROOT / "fixtures" / "demo" / "bom.csv"
LARGE = 100_000
"""Size at which the targets are defined; sexpdata runs once at this size and above."""

_TOKEN = re.compile(r'\(|\)|"[^"]*"|[^\s()"]+')
"""One token of an s-expression: a parenthesis, a string with its quotes, or an atom."""


def floor_parse(text: str) -> list:
    """Nested lists of token strings; iterative with an explicit stack, no checks at all.

    >>> floor_parse('(edif x (a "b c") (d))')
    [['edif', 'x', ['a', '"b c"'], ['d']]]
    """
    stack: list[list] = []
    current: list = []
    push, pop = stack.append, stack.pop
    for token in _TOKEN.findall(text):
        if token == "(":
            child: list = []
            current.append(child)
            push(current)
            current = child
        elif token == ")":
            current = pop()
        else:
            current.append(token)
    return current


@dataclass(frozen=True)
class Target:
    """A ratio with its limit: ``value <= limit`` passes."""

    key: str
    label: str
    limit: float
    unit: str = ""


TARGETS = (
    Target("edif_vs_floor", "100k EDIF: ledlint / floor", 2.5),
    Target("spice_vs_ngspice", "100k SPICE: ledlint / ngspice", 0.5),
    Target("memory_per_part", "100k peak memory per part", 2.5, "KiB"),
    Target("scaling", "ledlint EDIF time(100k) / time(10k)", 11.0),
    Target("startup", "demo check / import numpy, networkx", 1.5),
)
"""The performance targets (issue 7)."""


def _ledlint(netlist: Path, bom: Path) -> list[str]:
    return [str(BIN / "ledlint"), "check", str(netlist), "--bom", str(bom), "--format", "json"]


def _ngspice_failed(stderr: str) -> str | None:
    """ngspice may report a bad deck on standard error and still exit 0."""
    for line in stderr.splitlines():
        if re.match(r"\s*(error|fatal)", line, re.I):
            return f"ngspice: {line.strip()[:200]}"
    return None


def _reported_groups(measure: Measure) -> int | None:
    """``summary.led_groups`` of the warm-up run's JSON report, if there is one."""
    try:
        return int(json.loads(measure.output)["summary"]["led_groups"])
    except (ValueError, KeyError, TypeError):
        return None


def _sexpdata_measure(path: Path, parts: int, skip_large: bool) -> CallMeasure | Measure:
    import sexpdata

    if parts >= LARGE and skip_large:
        return Measure("sexpdata.loads", error="skipped (--skip-sexpdata-large)")
    return CallMeasure("sexpdata.loads", lambda: sexpdata.loads(path.read_text()),
                       runs=1 if parts >= LARGE else None)


def measure_size(board: Board, files: dict[str, Path], runs: int,
                 skip_large: bool) -> dict[str, Measure]:
    """Every per-size measure of one generated board, taken in rounds (:func:`in_rounds`)."""
    edif = files["edif"]
    sexpdata = _sexpdata_measure(edif, board.parts, skip_large)
    timed = [
        CallMeasure("floor", lambda: floor_parse(edif.read_text())),
        CallMeasure("floor, GC off", lambda: floor_parse(edif.read_text()), collect=False),
        *([sexpdata] if isinstance(sexpdata, CallMeasure) else []),
        CommandMeasure("ledlint EDIF", _ledlint(edif, files["bom"])),
        CommandMeasure("ledlint EDIF hier", _ledlint(files["edif_hier"], files["bom_hier"])),
        CommandMeasure("ledlint SPICE", _ledlint(files["spice"], files["bom"])),
        CommandMeasure("ngspice -b", ["ngspice", "-b", str(files["spice"])],
                       failed=_ngspice_failed),
    ]
    measures = in_rounds(timed, runs)
    if isinstance(sexpdata, Measure):
        measures.insert(2, sexpdata)
    return {m.name: m for m in measures}


def measure_startup(runs: int) -> dict[str, Measure]:
    """ledlint on the demo board against importing numpy and networkx, fresh processes, in
    rounds."""
    floor = CommandMeasure("import numpy, networkx",
                           [str(BIN / "python"), "-c", "import numpy, networkx"])
    if not DEMO.exists():
        demo = Measure("demo check", error=f"no demo board at {DEMO.relative_to(ROOT)}")
        return {demo.name: demo, floor.measure.name: in_rounds([floor], runs)[0]}
    command = [str(BIN / "ledlint"), "check", str(DEMO), "--format", "json"]
    if DEMO_BOM.exists():
        command[3:3] = ["--bom", str(DEMO_BOM)]
    measured = in_rounds([CommandMeasure("demo check", command), floor], runs)
    return {measure.name: measure for measure in measured}


@dataclass
class SizeResult:
    """One board size: the board's expected groups, its files and its measures."""

    board: Board
    files: dict[str, Path]
    generate_s: float
    measures: dict[str, Measure]

    def reported(self, name: str) -> dict[str, int] | None:
        """LED groups by topology in the warm-up report of ledlint measure ``name``."""
        try:
            groups = json.loads(self.measures[name].output)["groups"]
            found: dict[str, int] = {}
            for group in groups:
                found[group["topology"]] = found.get(group["topology"], 0) + 1
            return found
        except (ValueError, KeyError, TypeError):
            return None

    def groups_note(self, name: str) -> str | None:
        """None when ledlint found exactly the generated groups, else what it found."""
        found = self.reported(name)
        expected = {k: n for k, n in self.board.counts.items() if k != "decoupling"}
        if found == expected:
            return None
        total = sum(found.values()) if found is not None else "no report of"
        return f"ledlint found {total} of {self.board.led_groups} LED groups"


def _ratio(top: Measure | None, bottom: Measure | None) -> tuple[float | None, str | None]:
    """``top / bottom`` of the medians, or None and why not."""
    if top is None or bottom is None:
        return None, "not measured"
    for measure in (top, bottom):
        if measure.median is None:
            return None, f"n/a (error: {measure.name}: {measure.error})"
    return top.median / bottom.median, None  # type: ignore[operator]


def _target_values(sizes: dict[int, SizeResult],
                   startup: dict[str, Measure]) -> dict[str, tuple[float | None, str | None]]:
    """Each target's value (or None and why) and, for ledlint on boards, a groups note."""
    large, medium = sizes.get(LARGE), sizes.get(10_000)

    def get(result: SizeResult | None, name: str) -> Measure | None:
        return result.measures.get(name) if result else None

    values = {
        "edif_vs_floor": _ratio(get(large, "ledlint EDIF"), get(large, "floor")),
        "spice_vs_ngspice": _ratio(get(large, "ledlint SPICE"), get(large, "ngspice -b")),
        "scaling": _ratio(get(large, "ledlint EDIF"), get(medium, "ledlint EDIF")),
        "startup": _ratio(startup.get("demo check"), startup.get("import numpy, networkx")),
    }
    edif = get(large, "ledlint EDIF")
    if edif is None:
        values["memory_per_part"] = (None, "not measured")
    elif edif.error is not None or edif.peak_kb is None:
        values["memory_per_part"] = (None, f"n/a (error: ledlint EDIF: {edif.error})")
    else:
        values["memory_per_part"] = (edif.peak_kb / LARGE, None)
    return values


def evaluate(sizes: dict[int, SizeResult], startup: dict[str, Measure]) -> list[dict[str, Any]]:
    """Every target with its value, verdict (PASS, FAIL, SKIP) and a note."""
    values = _target_values(sizes, startup)
    notes = {size: result.groups_note("ledlint EDIF") for size, result in sizes.items()}
    spice_note = sizes[LARGE].groups_note("ledlint SPICE") if LARGE in sizes else None
    rows = []
    for target in TARGETS:
        value, why = values[target.key]
        note = why
        if value is None:
            verdict = "SKIP" if why == "not measured" else "FAIL"
        else:
            verdict = "PASS" if value <= target.limit else "FAIL"
            incomplete = spice_note if target.key == "spice_vs_ngspice" else notes.get(LARGE)
            if target.key != "startup" and incomplete:
                verdict, note = "FAIL", f"{incomplete}: the timing is of an incomplete check"
        rows.append({"target": target.key, "label": target.label, "limit": target.limit,
                     "unit": target.unit, "value": value, "verdict": verdict, "note": note})
    return rows


def _results_json(sizes: dict[int, SizeResult], startup: dict[str, Measure],
                  targets: list[dict[str, Any]], args: argparse.Namespace) -> dict[str, Any]:
    def size_record(result: SizeResult) -> dict[str, Any]:
        return {
            "parts": result.board.parts, "seed": result.board.seed,
            "generate_s": round(result.generate_s, 3),
            "files_bytes": {role: path.stat().st_size for role, path in result.files.items()},
            "expected_groups": result.board.counts,
            "reported_groups": {name: result.reported(name) for name in
                                ("ledlint EDIF", "ledlint EDIF hier", "ledlint SPICE")},
            "measures": {name: m.as_json() for name, m in result.measures.items()},
        }

    return {
        "schema": "ledlint-bench/1",
        "when": time.strftime("%Y-%m-%dT%H:%M:%S%z"),
        "machine": {"python": platform.python_version(), "platform": platform.platform(),
                    "processor": platform.processor() or platform.machine()},
        "runs": args.runs,
        "sizes": [size_record(result) for result in sizes.values()],
        "startup": {name: m.as_json() for name, m in startup.items()},
        "targets": [dict(row, value=row["value"] if row["value"] is not None
                         else (row["note"] or "n/a")) for row in targets],
    }


def _parse_args(argv: Sequence[str] | None) -> argparse.Namespace:
    parser = argparse.ArgumentParser(description="Benchmark ledlint against floors.")
    parser.add_argument("--sizes", default="1000,10000,100000",
                        help="comma-separated part counts (default 1000,10000,100000)")
    parser.add_argument("--quick", action="store_true", help="1k parts only")
    parser.add_argument("--runs", type=int, default=3, help="timed runs per measure (>= 3)")
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--skip-sexpdata-large", action="store_true",
                        help=f"do not run sexpdata at {LARGE} parts and above")
    parser.add_argument("--out", type=Path, default=ROOT / "bench" / "out",
                        help="folder for the generated boards")
    parser.add_argument("--results", type=Path, default=ROOT / "bench" / "results.json")
    parser.add_argument("--check", action="store_true", help="exit 1 when a target FAILs")
    args = parser.parse_args(argv)
    args.sizes = [1000] if args.quick else [int(s) for s in args.sizes.split(",") if s.strip()]
    if args.runs < 3:
        parser.error("--runs must be at least 3 (a median of fewer says little)")
    return args


def main(argv: Sequence[str] | None = None) -> int:
    """Run every measure, print the report, write results.json."""
    args = _parse_args(argv)
    missing = [p for p in (BIN / "ledlint", BIN / "python") if not p.exists()]
    if missing or shutil.which("ngspice") is None:
        print(f"bench: needs {', '.join(map(str, missing)) or 'ngspice on PATH'}", file=sys.stderr)
        return 2
    from bench.results_table import format_report

    sizes: dict[int, SizeResult] = {}
    for parts in args.sizes:
        print(f"bench: {parts} parts…", file=sys.stderr, flush=True)
        started = time.perf_counter()
        board = generate(parts, args.seed)
        files = write_all(board, args.out / f"b{parts}_s{args.seed}")
        generated = time.perf_counter() - started
        sizes[parts] = SizeResult(board, files, generated,
                                  measure_size(board, files, args.runs, args.skip_sexpdata_large))
    startup = measure_startup(max(args.runs, 5))
    targets = evaluate(sizes, startup)
    sys.stdout.write(format_report(sizes, startup, targets))
    args.results.write_text(json.dumps(_results_json(sizes, startup, targets, args), indent=2)
                            + "\n", encoding="utf-8")
    print(f"bench: results in {args.results}", file=sys.stderr)
    failed = any(row["verdict"] == "FAIL" for row in targets)
    return 1 if args.check and failed else 0


if __name__ == "__main__":
    raise SystemExit(main())
