"""SARIF result lines with the values' text written by the JSON report's writer
(sarif._result_line) against the plain result through the encoder.

Expected values: the plain path of our own code, ``compact_json(_result(...))`` (the
standard library's C encoder over the plain record), byte for byte.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from report_samples import sample_circuit, sample_result

from linter.engine import CheckRequest, run_check
from linter.findings import Finding
from linter.report import sarif
from linter.report.json_layout import compact_json

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"


def _assert_plain(findings, circuit) -> None:
    rules = sarif._rules(findings)
    index = {descriptor["id"]: position for position, descriptor in enumerate(rules)}
    fast, slow = sarif._Places(ROOT), sarif._Places(ROOT)
    for finding in findings:
        position = index[finding.rule]
        assert sarif._result_line(finding, position, circuit, fast) == \
            compact_json(sarif._result(finding, position, circuit, slow))
    lines = list(sarif._result_lines(list(findings), rules, circuit, ROOT))
    assert lines == [compact_json(entry) for entry in
                     sarif._results(list(findings), rules, circuit, ROOT)]


@pytest.mark.parametrize("suffix", ["edif", "cir"])
def test_demo_result_lines_are_the_plain_lines(suffix: str) -> None:
    result = run_check(CheckRequest(netlist=DEMO / f"dust_extractor_panel.{suffix}",
                                    bom=DEMO / "bom.csv"))
    assert len(result.findings) > 5
    _assert_plain(result.findings, result.circuit)


def test_generated_board_result_lines_are_the_plain_lines(tmp_path: Path) -> None:
    files = write_all(generate(1500, seed=4), tmp_path / "board")
    result = run_check(CheckRequest(netlist=files["edif"], bom=files["bom"]))
    assert len({finding.rule for finding in result.findings}) >= 3
    _assert_plain(result.findings, result.circuit)


def test_sample_result_lines_are_the_plain_lines() -> None:
    result = sample_result()
    _assert_plain(result.findings, result.circuit)


def test_odd_values_give_the_plain_line() -> None:
    odd = [  # invented figures: every value kind the plain path writes its own way
        {"a": 0.0, "b": -0.0}, {"b": -0.0, "a": 0.0}, {"n": math.nan, "i": -math.inf},
        {"x": 1, "y": 2.0}, {"t": True}, {"z": np.float64(0.1)}, {1: 2.0}, {},
        {'q"uote': 1e300, "µ": 5e-324, "%s": 0.1}, {"a": 1.0, "b": 2.0}, {"b": 2.0, "a": 1.0},
    ]
    findings = [Finding("r", "info", "m", ("D7", "R6"), values=values, fix="f")
                for values in odd]
    for _ in range(2):  # remembered texts the second time
        _assert_plain(findings, sample_circuit())


_number = st.one_of(st.floats(), st.integers(-99, 99), st.just(-0.0), st.just(0.0),
                    st.builds(np.float64, st.floats()))


@settings(max_examples=200)
@given(st.lists(st.dictionaries(st.text(max_size=6), _number, max_size=5), min_size=1,
                max_size=4),
       st.sampled_from([(), ("D7",), ("D7", "R6", "X1")]), st.none() | st.text(max_size=8))
def test_any_values_give_the_plain_line(mappings, parts, fix) -> None:
    findings = [Finding("r", "warning", "m", parts, values=values, fix=fix)
                for values in mappings]
    _assert_plain(findings, sample_circuit())


def test_shared_values_give_the_plain_line() -> None:
    shared, mixed = {"b": 1.5, "a": -0.0}, {"a": 1, "b": 2.0}  # invented figures
    findings = [Finding("r", "info", "m", ("D7",), values=shared),
                Finding("r", "info", "m", ("D8",), values=mixed),
                Finding("q", "error", "n", ("R6", "D7"), values=shared),
                Finding("q", "error", "n", ("R6",), values=mixed),
                Finding("q", "error", "n", ("R6",), values={"b": 1.5, "a": 0.0})]
    _assert_plain(findings, sample_circuit())
    places = sarif._Places(ROOT)
    for finding in findings:
        sarif._result_line(finding, 0, sample_circuit(), places)
    assert [entry[0] for entry in places.values_texts.values()] == [shared, {"b": 1.5, "a": 0.0}]
