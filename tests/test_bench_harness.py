"""The benchmark harness's own logic (bench/run.py, bench/measure.py); it times nothing here."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import sexpdata

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402
from bench.measure import Measure, run_command  # noqa: E402
from bench.run import evaluate, floor_parse  # noqa: E402


def _shape(tree: object) -> object:
    """The nesting of a tree with every atom replaced by None (iterative: no recursion)."""
    root: list = []
    work = [(tree, root)]
    while work:
        node, into = work.pop()
        copy: list = []
        into.append(copy)
        for child in node:
            if isinstance(child, list):
                work.append((child, copy))
            else:
                copy.append(None)
    return root


def test_floor_builds_the_nesting_sexpdata_builds(tmp_path: Path) -> None:
    # Reference: sexpdata parses the same text (t/nil read as plain symbols).
    files = write_all(generate(300, seed=4), tmp_path)
    text = files["edif"].read_text()
    [floor_tree] = floor_parse(text)
    reference = sexpdata.loads(text, true=None, nil=None)
    assert _shape(floor_tree) == _shape(reference)


def test_floor_keeps_strings_whole() -> None:
    assert floor_parse('(a "b (c) d" e)') == [["a", '"b (c) d"', "e"]]  # from the s-expression syntax


def test_a_command_that_fails_gives_an_error_and_no_number() -> None:
    command = [sys.executable, "-c", "import sys; sys.stderr.write('bad input\\n'); sys.exit(2)"]
    measure = run_command("fails", command, runs=3)
    assert measure.median is None
    assert measure.error == "exit 2: bad input"
    assert measure.seconds == []


def test_a_command_that_works_is_timed_with_its_peak_memory() -> None:
    measure = run_command("works", [sys.executable, "-c", "pass"], runs=3)
    assert measure.error is None and len(measure.seconds) == 3
    assert measure.peak_kb is not None and measure.peak_kb > 1000  # a Python process: megabytes


def test_targets_fail_on_errors_and_skip_sizes_not_run() -> None:
    startup = {"demo check": Measure("demo check", error="exit 2: no such file"),
               "import numpy, networkx": Measure("import numpy, networkx", seconds=[0.2] * 3)}
    rows = {row["target"]: row for row in evaluate({}, startup)}
    assert rows["startup"]["verdict"] == "FAIL"
    assert rows["startup"]["value"] is None
    assert "n/a (error: demo check: exit 2: no such file)" == rows["startup"]["note"]
    assert rows["edif_vs_floor"]["verdict"] == "SKIP"


def _size_with_report(groups: list[dict]) -> dict:
    from bench.run import LARGE, SizeResult

    board = generate(300, seed=4)
    report = json.dumps({"summary": {"led_groups": len(groups)}, "groups": groups})
    measures = {"floor": Measure("floor", seconds=[1.0] * 3),
                "ledlint EDIF": Measure("ledlint EDIF", seconds=[2.0] * 3, peak_kb=100_000,
                                        output=report)}
    return {LARGE: SizeResult(board, {}, 0.0, measures)}


def test_a_fast_check_that_finds_no_groups_fails() -> None:
    rows = {row["target"]: row for row in evaluate(_size_with_report([]), {})}
    assert rows["edif_vs_floor"]["value"] == 2.0  # 2 s / 1 s, within 2.5
    assert rows["edif_vs_floor"]["verdict"] == "FAIL"
    assert rows["edif_vs_floor"]["note"].startswith("ledlint found 0 of ")


def test_a_check_that_finds_every_group_passes_within_the_limit() -> None:
    board = generate(300, seed=4)
    groups = [{"topology": kind} for kind, n in board.counts.items() if kind != "decoupling"
              for _ in range(n)]
    rows = {row["target"]: row for row in evaluate(_size_with_report(groups), {})}
    assert rows["edif_vs_floor"]["verdict"] == "PASS"
    assert rows["memory_per_part"]["value"] == 1.0  # 100,000 KiB over 100k parts


def test_peak_memory_is_the_commands_own_not_the_harness() -> None:
    """A child forked from a big process is charged with that process's resident memory on
    Linux (the kernel keeps the old memory map's high-water mark across exec). With 400 MiB
    touched here, a bare Python run must still measure far below it (an interpreter is a few
    tens of MiB, common practice)."""
    ballast = bytearray(400 * 1024 * 1024)
    ballast[:: 4096] = b"\x01" * len(ballast[:: 4096])  # touch every page: resident
    measure = run_command("bare python", [sys.executable, "-c", "pass"], runs=1)
    del ballast
    assert measure.error is None
    assert measure.peak_kb is not None and measure.peak_kb < 100 * 1024


def test_a_missing_program_is_an_error_not_a_number() -> None:
    """A command that cannot be started gives an error text and no measure."""
    measure = run_command("nothing", ["/nonexistent/ledlint-bench-missing"], runs=1)
    assert measure.error is not None and "cannot start" in measure.error
    assert measure.peak_kb is None and measure.median is None


def test_measures_are_taken_in_rounds() -> None:
    """Each round times every measure once (the harness's documented order), a measure with
    its own run count drops out after it, and one that fails is not run again."""
    from bench.measure import CallMeasure, in_rounds

    calls: list[str] = []

    def failing() -> None:
        calls.append("bad")
        raise RuntimeError("broken")

    measures = in_rounds([CallMeasure("a", lambda: calls.append("a")),
                          CallMeasure("b", lambda: calls.append("b")),
                          CallMeasure("once", lambda: calls.append("once"), runs=1),
                          CallMeasure("bad", failing)], runs=3)
    assert calls == ["a", "b", "once", "bad", "a", "b", "a", "b"]
    assert [len(m.seconds) for m in measures] == [3, 3, 1, 0]
    assert measures[3].error == "RuntimeError: broken"
