"""Batched fix searches give exactly the numbers of the plain, one-value-at-a-time path.

Every expected value here is our own plain path (:func:`linter.fix_search.with_resistor`,
one solve per value, and the series walk of :func:`linter.fixes.resistor_for_current_solved`
fed by it): the batched path must agree with it bit for bit, on every solved group of the
demo board (EDIF and SPICE) and of the rule fixtures that carry a resistor.
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

import pytest

from linter import eseries, fix_batch, fix_search
from linter.engine import CheckRequest, analyse, load_inputs
from linter.fix_batch import Overlay, SeriesWalk, solve_resistor_values, solve_variants
from linter.fixes import SERIES_STEP, resistor_for_current_solved
from linter.rulekit import solved_groups

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "fixtures" / "demo"
BOARDS = [(DEMO / "dust_extractor_panel.edif", DEMO / "bom.csv"),
          (DEMO / "dust_extractor_panel.cir", DEMO / "bom.csv"),
          (ROOT / "fixtures" / "rules" / "shared-ballast" / "fires.cir", None),
          (ROOT / "fixtures" / "rules" / "led-overcurrent" / "fires.cir", None)]


def _context(netlist: Path, bom: Path | None):
    return analyse(load_inputs(CheckRequest(netlist=netlist, bom=bom)))


def _solved_on_boards():
    """(netlist, context, solved group) for every solved group of the boards that exist."""
    for netlist, bom in BOARDS:
        if netlist.exists():
            context = _context(netlist, bom)
            for result in solved_groups(context):
                yield netlist, context, result


def _resistor_groups():
    """(context, solved group, resistor) for every group and resistor of the boards."""
    return [pytest.param(context, result, resistor.ref,
                         id=f"{netlist.name}-{result.id}-{resistor.ref}")
            for netlist, context, result in _solved_on_boards()
            for resistor in result.resistors]


CASES = _resistor_groups()


def test_there_are_cases():
    assert len(CASES) >= 10


@pytest.mark.parametrize(("context", "result", "ref"), CASES)
def test_batch_equals_one_value_at_a_time(context, result, ref):
    ohms = result.resistor(ref).ohms
    values = [ohms * factor for factor in (0.5, 0.83, 1.0, 1.21, 2.0, 3.3)]
    batched = solve_resistor_values(context, result, ref, values)
    plain = [fix_search.with_resistor(context, result, ref, v) for v in values]
    # repr tells every float apart exactly (our plain path is the reference)
    assert [repr(b) for b in batched] == [repr(p) for p in plain]


@pytest.mark.parametrize(("context", "result", "ref"), CASES)
def test_walked_search_equals_plain_search(context, result, ref):
    """The led-overcurrent search for 80 % of today's worst current: same choice, walked
    (solved ahead in batches) or asked one value at a time."""
    leds = tuple(x.ref for x in result.leds)
    worst = fix_search.led_currents(result, leds)[2]
    if not worst > 0:
        pytest.skip("no LED current to lower")
    tolerance = fix_search.tolerance_of(context, ref)
    series = eseries.series_for_tolerance(tolerance)
    start = result.resistor(ref).ohms

    def plain(ohms):
        return fix_search.led_currents(fix_search.with_resistor(context, result, ref, ohms), leds)

    walk = fix_search.resistor_walk(context, result, ref, series)

    def walked(ohms):
        return fix_search.led_currents(walk(ohms), leds)

    expected = resistor_for_current_solved(plain, 0.8 * worst, start, series=series,
                                           tolerance=tolerance, max_steps=60)
    got = resistor_for_current_solved(walked, 0.8 * worst, start, series=series,
                                      tolerance=tolerance, max_steps=60)
    assert repr(got) == repr(expected)


def test_walk_asks_each_value_once_and_batches():
    context = _context(DEMO / "dust_extractor_panel.edif", DEMO / "bom.csv")
    result = next(r for r in solved_groups(context) if r.resistors)
    ref = result.resistors[0].ref
    asked: list[list[float]] = []

    def solve_many(values):
        asked.append(list(values))
        return solve_resistor_values(context, result, ref, values)

    walk = SeriesWalk(solve_many, up=lambda r: eseries.above(r * SERIES_STEP, "E24"),
                      down=lambda r: eseries.below(r / SERIES_STEP, "E24"))
    value = eseries.above(result.resistor(ref).ohms, "E24")
    for _ in range(30):  # climb 30 series steps: far fewer solver runs than values
        assert repr(walk(value)) == repr(fix_search.with_resistor(context, result, ref, value))
        value = eseries.above(value * SERIES_STEP, "E24")
    solved = [v for batch in asked for v in batch]
    assert len(solved) == len(set(solved))  # no value solved twice
    assert walk.batches == len(asked) <= 3


def test_unbuildable_variant_is_unsolved_like_the_plain_path():
    context = _context(DEMO / "dust_extractor_panel.edif", DEMO / "bom.csv")
    result = next(r for r in solved_groups(context) if r.resistors)
    # without the group's own rails its model cannot be built
    broken = replace(context, rails={name: rail for name, rail in context.rails.items()
                                     if name not in result.group.rails})
    (answer,) = solve_variants(broken, result, [({}, {})])
    plain = fix_search.resolve(broken, result)
    assert answer.status == plain.status == "unsolved"
    assert answer.reason == plain.reason


def test_overlay_reads_changes_first_and_copies_nothing():
    base = {"R1": 1, "R2": 2}
    overlay = Overlay(base, {"R2": 20, "R3": 30})
    assert overlay["R2"] == 20 and overlay.get("R1") == 1 and overlay.get("R9") is None
    assert "R3" in overlay and "R9" not in overlay
    assert dict(overlay) == {"R1": 1, "R2": 20, "R3": 30} and len(overlay) == 3
    base["R1"] = 10
    assert overlay["R1"] == 10  # a view, not a copy
    with pytest.raises(KeyError):
        overlay["R9"]


def test_first_window_is_small():
    assert sum(fix_batch.FIRST_WINDOW) + 1 <= fix_batch.MAX_WINDOW


def test_a_failing_value_solved_ahead_does_not_fail_the_value_asked():
    solved: list[list[float]] = []

    def solve_many(values):
        solved.append(list(values))
        if len(values) > 1:
            raise FloatingPointError("one of the values ahead cannot be solved")
        return [f"answer {values[0]}"]

    walk = SeriesWalk(solve_many, up=lambda r: r * 2, down=lambda r: r / 2)
    assert walk(10.0) == "answer 10.0"
    assert solved[-1] == [10.0]

    def never(values):
        raise FloatingPointError("no value can be solved")

    with pytest.raises(FloatingPointError):  # the value asked fails alone too: as before
        SeriesWalk(never, up=lambda r: r * 2, down=lambda r: r / 2)(5.0)


def _parallel_cases():
    return [(context, result) for _, context, result in _solved_on_boards()
            if (result.group.topology == "parallel" and len(result.group.strings) > 1
                and result.group.setter in {r.ref for r in result.resistors})]


def test_split_circuits_solved_together_equal_one_at_a_time():
    from linter.fix_batch import solve_circuits
    from linter.rules.shared_ballast import _split_problem

    cases = _parallel_cases()
    assert cases
    problems, plain = [], []
    for context, result in cases:
        ohms = result.resistor(result.group.setter).ohms
        for each in (ohms, ohms * 3.9, ohms * 4.7):
            circuit, data = _split_problem(context, result, result.group.setter, each)
            problems.append((context, circuit, data))
            plain.append(fix_search.resolve_circuit(context, circuit, data))
    for context in {id(c): c for c, _, _ in problems}.values():
        mine = [(i, p) for i, p in enumerate(problems) if p[0] is context]
        together = solve_circuits(context, [(circuit, data) for _, circuit, data in
                                            (p for _, p in mine)])
        assert [repr(t) for t in together] == [repr(plain[i]) for i, _ in mine]


@pytest.fixture(scope="module")
def generated_board(tmp_path_factory):
    """A 600-part generated board (bench/gen_board.py): several kinds of parallel channels,
    each placed at least twice, so that the first splits are solved together."""
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate, write_all

    folder = tmp_path_factory.mktemp("board")
    write_all(generate(600, 3), folder)
    return _context(folder / "board.cir", folder / "bom.csv")


def test_shared_ballast_findings_same_with_and_without_splits_solved_ahead(
        monkeypatch, generated_board):
    import linter.rules.shared_ballast as rule_module
    from linter.rules import all_rules

    context = generated_board
    rule = all_rules()["shared-ballast"]()
    batches: list[int] = []
    solve = rule_module.solve_circuits
    monkeypatch.setattr(rule_module, "solve_circuits",
                        lambda c, problems: batches.append(len(problems)) or solve(c, problems))
    fix_search._ANSWERS.clear()
    ahead = [repr(f) for f in rule.check(context)]
    assert batches and batches[0] >= 2  # several distinct first splits, solved in one call
    fix_search._ANSWERS.clear()
    monkeypatch.setattr(rule_module, "_solve_first_splits", lambda *args: {})
    plain = [repr(f) for f in rule.check(context)]
    assert ahead == plain
    assert any("own resistor" in text for text in ahead)
