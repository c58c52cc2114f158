"""The JSON report's layout and fast writer against the plain path (same data, new layout).

Expected values here are ledlint's own plain path, not stored figures: the report's data
must be exactly what ``json.dumps(plain_data(report_dict(result)))`` holds (the layout
changed on purpose: top levels indented, one line per group and per finding), and each
group line must be the bytes ``json.dumps`` writes for ``plain_data(group.as_dict())``.
"""

from __future__ import annotations

import json
import math
import sys
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, strategies as st
from report_samples import fixture_netlists, sample_result

from linter.corners import Corner
from linter.engine import CheckRequest, run_check
from linter.groups import Group
from linter.output import write_atomically
from linter.report import ReportFormat
from linter.report.common import plain_data
from linter.report.json import COMPACT_DEPTH, report_dict
from linter.report.json_groups import CornerTexts, group_line
from linter.report.json_layout import Lines, compact_json, layered_chunks
from linter.report.stream import report_chunks
from linter.results import GroupResult, LedResult, PinResult, ResistorResult, Span, TransistorResult

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402


def _plain_report(result) -> dict:
    """The reference: the report's data built as one plain tree (the plain path)."""
    return json.loads(json.dumps(plain_data(report_dict(result)), ensure_ascii=False,
                                 allow_nan=False))


def _reference_line(group) -> str:
    return compact_json(plain_data(group.as_dict()))


def _check_result_against_plain_path(result) -> None:
    text = ReportFormat.JSON.reporter().render(result)
    assert json.loads(text) == _plain_report(result)
    for group in result.groups:
        assert group_line(group) == _reference_line(group)


@pytest.fixture(scope="module")
def fixture_results() -> list:
    """Every fixture board checked once (module scope: the checks take a few seconds)."""
    return [run_check(CheckRequest(netlist=path)) for path in fixture_netlists()]


def test_fixture_reports_hold_the_plain_data(fixture_results) -> None:
    assert sum(len(result.groups) for result in fixture_results) > 50  # a real sample
    for result in fixture_results:
        _check_result_against_plain_path(result)


def test_generated_board_report_holds_the_plain_data(tmp_path: Path) -> None:
    # every group kind of the benchmark generator, with its BOM and settings
    files = write_all(generate(1000, seed=5), tmp_path)
    result = run_check(CheckRequest(netlist=files["edif"], bom=files["bom"]))
    kinds = {group.group.topology for group in result.groups}
    assert {"npn-sink", "low-side-switch", "pin-source", "parallel"} <= kinds
    _check_result_against_plain_path(result)


def test_sample_report_layout() -> None:
    text = ReportFormat.JSON.reporter().render(sample_result())
    lines = text.splitlines()
    assert lines[0] == "{" and lines[-1] == "}" and text.endswith("}\n")
    assert '  "schema": "ledlint-report/1",' in lines
    assert '    "findings": {"error": 1, "warning": 1, "info": 1},' in lines
    start = lines.index('  "groups": [')
    # one line per group, indented four spaces, each a JSON object on its own
    groups = [json.loads(line.strip().rstrip(",")) for line in lines[start + 1:start + 3]]
    assert [group["id"] for group in groups] == ["G-D7", "G-D15"]
    assert lines[start + 3] == "  ],"
    start = lines.index('  "findings": [')
    assert all(lines[start + n].startswith('    {"rule": ') for n in (1, 2, 3))


def test_empty_lists_are_written_as_json_dumps_writes_them() -> None:
    text = ReportFormat.JSON.reporter().render(replace(sample_result(groups=False),
                                                        findings=()))
    assert '  "groups": [],' in text and '  "findings": []\n}' in text


def _corner(name: str, volts: float) -> Corner:
    return Corner(scenario="on", rails={"+5V": ("min", volts), "VBAT": ("max", 14.4)},
                  ambient_c=-10.0, vf={"D1": "vf_max", "D2": "vf_min"},
                  beta={"Q1": "hfe_min"}, resistors={name: "high", "R2": "nom"})


def _odd_group() -> GroupResult:
    """Every branch of the writer: shared and missing corners, unknown figures (NaN,
    infinity, None), numpy numbers, a MOSFET with gate figures, a BJT that saturates, a
    pin, corners that did not converge, text with quotes and non-ASCII (invented values)."""
    low, high = _corner("R1", 4.75), _corner("R1", np.float64(4.5))
    current = Span(0.02, 0.015, np.float64(0.025), low, high)
    unknown = Span(math.nan, -math.inf, None)
    led = LedResult("D1", "LX-\"R\"-µ", current, unknown, Span(0.04, 0.03, 0.05, None, high),
                    ("on", "blink"), np.float32(1.5), low, None, ("vf_typ",))
    resistor = ResistorResult("R1", 150.0, 0.05, current, Span(1, 2, 3, high, low), None,
                              "0603")
    bjt = TransistorResult("Q1", "npn", current, current, current, True, low, 0.019,
                           8.4, high, "+12V", 0.2)
    mosfet = TransistorResult("Q2", "nmos", current, current, unknown, False,
                              vgs=Span(3.3, 3.1, 3.5), vgs_th=np.float64(1.2))
    pin = PinResult("U1.PA4", "LED_A", current, True, None)
    group = Group(id="G-D1", topology="npn-sink", leds=("D1",), strings=(("D1",),),
                  parts=("D1", "Q1", "R1"), nets=("+12V", "a", "GND"), rails=("+12V", "GND"),
                  setter="Q1")
    return GroupResult(group, "solved", "+12V", (led, led), (resistor,), (bjt, mosfet), (pin,),
                       np.int64(33), "vertices", (low, high, low), ("generic Vf for D1",))


def test_odd_values_give_the_plain_bytes() -> None:
    group = _odd_group()
    assert group_line(group) == _reference_line(group)
    unsolved = GroupResult(group.group, "unsolved", reason="R1 has no value")
    assert group_line(unsolved) == _reference_line(unsolved)


def test_corner_text_made_once_per_corner_object() -> None:
    corner = _corner("R1", 4.75)
    corners = CornerTexts()
    first = corners.text(corner)
    assert first == compact_json(plain_data(corner.as_dict()))  # expected: the plain path
    assert corners.text(corner) is first
    assert corners.text(_corner("R1", 4.75)) == first  # an equal corner, another object


def test_a_stand_in_record_takes_the_plain_path() -> None:
    stand_in = sample_result().groups[0]
    assert group_line(stand_in) == _reference_line(stand_in)


_scalars = st.one_of(st.none(), st.booleans(), st.integers(),
                     st.floats(allow_nan=False, allow_infinity=False), st.text())
_plain = st.recursive(_scalars, lambda inner: st.one_of(
    st.lists(inner, max_size=4), st.dictionaries(st.text(), inner, max_size=4)), max_leaves=30)


@given(_plain, st.integers(min_value=0, max_value=4))
def test_layered_text_holds_the_data_and_compacts_below_the_depth(data, depth) -> None:
    text = "".join(layered_chunks(data, depth))
    assert json.loads(text) == data
    if depth == 0:
        assert text == compact_json(data)  # expected: the standard library's C encoder


@given(st.lists(_plain, max_size=5))
def test_depth_one_writes_each_entry_on_its_own_line(entries) -> None:
    text = "".join(layered_chunks(entries, 1))
    if entries:  # expected: json.dumps of each entry, one a line, indented two spaces
        body = ",\n".join("  " + compact_json(entry) for entry in entries)
        assert text == "[\n" + body + "\n]"
    else:
        assert text == "[]"


def test_lines_are_written_one_entry_a_line() -> None:
    data = {"a": {"b": Lines(iter(['{"x": 1}', "[2]"])), "c": Lines(())}}
    assert "".join(layered_chunks(data, 2)) == (
        '{\n  "a": {\n    "b": [\n      {"x": 1},\n      [2]\n    ],\n    "c": []\n  }\n}')


@pytest.mark.parametrize("count", [0, 1, 2, 15, 16, 17, 32, 33, 50])
def test_lines_in_blocks_are_the_layout_of_the_same_list(count: int) -> None:
    """Entries written a block to a piece (json_layout.BLOCK) against the same list written
    as data at the same depth (expected: the plain layout of our own code, itself held to
    json.dumps above)."""
    from linter.report.json_layout import BLOCK

    assert BLOCK == 16  # the counts above sit around one, two and three blocks
    entries = [{"n": index, "t": "é\"" * (index % 3)} for index in range(count)]
    data = {"a": {"b": Lines(map(compact_json, entries)), "c": 1}}
    pieces = list(layered_chunks(data, 2))
    assert "".join(pieces) == "".join(layered_chunks({"a": {"b": entries, "c": 1}}, 3))
    assert len(pieces) < 12 + count // BLOCK  # entries come a block to a piece


def test_compact_depth_is_that_of_groups_and_findings() -> None:
    assert COMPACT_DEPTH == 2  # report["groups"][i] sits at depth 2


def test_streamed_pieces_join_to_the_rendered_report(tmp_path: Path) -> None:
    result = sample_result()
    reporter = ReportFormat.JSON.reporter()
    pieces = list(report_chunks(reporter, [result, result]))
    assert len(pieces) > 4
    assert "".join(pieces) == reporter.render(result) + "\n" + reporter.render(result)
    target = tmp_path / "report.json"
    write_atomically(target, report_chunks(reporter, [result]))
    assert target.read_text("utf-8") == reporter.render(result)


def test_a_failing_stream_leaves_the_old_file_and_no_temporary(tmp_path: Path) -> None:
    target = tmp_path / "report.json"
    target.write_text("old")

    def pieces():
        yield "{"
        raise RuntimeError("made to fail half-way")

    with pytest.raises(RuntimeError):
        write_atomically(target, pieces())
    assert target.read_text() == "old"
    assert [path.name for path in tmp_path.iterdir()] == ["report.json"]


def test_combined_report_holds_the_plain_data(monkeypatch: pytest.MonkeyPatch) -> None:
    from linter.batch import expand_inputs, plan_boards, run_boards
    from linter.report import ReportOptions
    from linter.report.combined import combined_dict, render_many

    monkeypatch.chdir(ROOT)
    many = Path("fixtures") / "many"  # good boards and one torn deck (tests/test_many_designs.py)
    outcomes = run_boards(plan_boards(expand_inputs([many / "boards", many / "bad"])))
    assert any(not outcome.readable for outcome in outcomes)
    text = render_many(ReportFormat.JSON, outcomes, ReportOptions())
    reference = json.dumps(plain_data(combined_dict(outcomes)), ensure_ascii=False)
    assert json.loads(text) == json.loads(reference)
    # a board's groups sit at depth 4: eight spaces, one line each
    group_lines = [line for line in text.splitlines() if line.startswith('        {"id": "G-')]
    assert len(group_lines) == sum(len(outcome.result.groups) for outcome in outcomes
                                   if outcome.readable) > 0


_raw_scalars = st.one_of(_scalars, st.floats(), st.builds(np.float64, st.floats()),
                         st.builds(np.int64, st.integers(-2**62, 2**62)),
                         st.builds(np.bool_, st.booleans()))
_raw = st.recursive(_raw_scalars, lambda inner: st.one_of(
    st.lists(inner, max_size=4), st.lists(inner, max_size=4).map(tuple),
    st.dictionaries(st.text(), inner, max_size=4)), max_leaves=30)


@given(_raw)
def test_plain_json_is_the_plain_path(data) -> None:
    from linter.report.json_layout import plain_json

    # expected: the plain path, plain_data then the standard library's encoder
    assert plain_json(data) == compact_json(plain_data(data))


def test_remembered_float_texts_keep_signed_zeros_and_unknowns_apart(monkeypatch) -> None:
    from linter.report import json_groups

    monkeypatch.setattr(json_groups, "_FLOAT_TEXTS", {})
    monkeypatch.setattr(json_groups, "FLOAT_TEXTS_MAX", 3)
    # expected: json.dumps of plain_data for each value (the plain path), in any order
    values = [0.0, -0.0, 0.0, 0.1, -0.1, math.nan, math.inf, -math.inf, 0.1, 1e300, 2.5, -0.0]
    for _ in range(2):
        for value in values:
            assert json_groups._value(value) == compact_json(plain_data(value))
    assert len(json_groups._FLOAT_TEXTS) <= 3  # the memory starts again past its size
