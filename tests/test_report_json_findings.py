"""Finding lines written directly (linter.report.json_findings) against the plain path.

Expected values: the plain path of our own code, ``plain_json(finding_dict(...))`` (the
standard library's C encoder over the plain record), byte for byte.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, strategies as st
from report_samples import sample_circuit, sample_result

from linter.engine import CheckRequest, run_check
from linter.findings import Finding
from linter.model import SourceLocation
from linter.report import json_findings
from linter.report.json_findings import finding_dict, finding_line
from linter.report.json_layout import plain_json

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"


def _assert_plain(findings, circuit) -> None:
    for finding in findings:
        assert finding_line(finding, circuit) == plain_json(finding_dict(finding, circuit))


@pytest.mark.parametrize("suffix", ["edif", "cir"])
def test_demo_finding_lines_are_the_plain_lines(suffix: str) -> None:
    result = run_check(CheckRequest(netlist=DEMO / f"dust_extractor_panel.{suffix}",
                                    bom=DEMO / "bom.csv"))
    assert len(result.findings) > 5
    _assert_plain(result.findings, result.circuit)


def test_generated_board_finding_lines_are_the_plain_lines(tmp_path: Path) -> None:
    files = write_all(generate(1500, seed=4), tmp_path / "board")
    result = run_check(CheckRequest(netlist=files["edif"], bom=files["bom"]))
    assert len({finding.rule for finding in result.findings}) >= 3
    _assert_plain(result.findings, result.circuit)


def test_sample_finding_lines_are_the_plain_lines() -> None:
    result = sample_result()
    _assert_plain(result.findings, result.circuit)


_text = st.text(max_size=12)
_number = st.one_of(st.floats(), st.integers(-10**6, 10**6), st.just(-0.0), st.just(0.0),
                    st.builds(np.float64, st.floats()), st.builds(np.int64, st.integers(-99, 99)))


@given(rule=_text, message=_text, parts=st.lists(_text, max_size=4),
       nets=st.lists(_text, max_size=3), group=st.none() | _text, fix=st.none() | _text,
       values=st.dictionaries(_text, _number, max_size=6),
       location=st.none() | st.builds(SourceLocation, _text, st.integers(1, 10**6),
                                      st.integers(1, 999)))
def test_any_finding_gives_the_plain_line(rule, message, parts, nets, group, fix, values,
                                          location) -> None:
    finding = Finding(rule, "warning", message, tuple(parts), tuple(nets), group, values, fix,
                      location)
    _assert_plain([finding], sample_circuit())


def test_odd_findings_give_the_plain_line(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(json_findings, "KEY_FORMS_MAX", 2)
    circuit = sample_circuit()
    odd = [  # invented: keys that are not text, NaN and infinity, numpy numbers, quotes
        Finding("r", "error", 'say "hi" \\ µ', ("D7",), values={1: 2.0, 0: 0.5}),
        Finding("r", "info", "m", values={"b": math.nan, "a": math.inf, "c": -0.0}),
        Finding("r", "info", "m", values={"x": np.float64(0.1), "y": np.int64(3), "z": 7}),
        Finding("r", "info", "m", ("R6", "U1.PA4"), ("+5V",), "G-D7", {"k": 1e300}, "fix"),
        Finding("r", "info", "m", values={"a": 1.0, "b": 2.0}),
        Finding("r", "info", "m", values={"b": 2.0, "a": 1.0}),  # same keys, other order
    ]
    for _ in range(2):
        _assert_plain(odd, circuit)
    assert len(json_findings._KEY_FORMS) <= 2  # the memory starts again past its size


def test_remembered_values_texts_keep_zero_signs_and_unknowns(
        monkeypatch: pytest.MonkeyPatch) -> None:
    """The same key set and equal numbers one after another: a remembered text must not
    stand for a zero of the other sign, and NaN or infinity stay null."""
    monkeypatch.setattr(json_findings, "VALUES_TEXTS_MAX", 3)
    circuit = sample_circuit()
    nan = math.nan
    odd = [  # invented figures
        Finding("r", "info", "m", values={"a": 0.0, "b": 1.5}),
        Finding("r", "info", "m", values={"a": -0.0, "b": 1.5}),
        Finding("r", "info", "m", values={"b": 1.5, "a": 0.0}),
        Finding("r", "info", "m", values={"a": 2.5, "b": 1.5}),
        Finding("r", "info", "m", values={"a": 2.5, "b": 1.5}),   # remembered
        Finding("r", "info", "m", values={"a": 2, "b": np.float64(1.5)}),  # equal numbers
        Finding("r", "info", "m", values={"a": nan, "b": 1.5}),
        Finding("r", "info", "m", values={"a": nan, "b": 1.5}),   # the very same NaN
        Finding("r", "info", "m", values={"a": -math.inf, "b": 1e-300}),
        Finding("r", "info", "m", values={"a": 1.0, "b": 3.0, "c": 7.0}),
        Finding("r", "info", "m", values={"a%s": 1.0, "%(b)s": 3.0}),  # format marks in keys
    ]
    for _ in range(2):
        _assert_plain(odd, circuit)
    assert 0 < len(json_findings._VALUES_TEXTS) <= 3


def test_odd_locations_give_the_plain_line() -> None:
    circuit = sample_circuit()
    odd = [  # invented: a file name with quotes and a percent sign, numbers not plain ints
        Finding("r", "info", "m", location=SourceLocation('a "b" %d.edif', 3, 9)),
        Finding("r", "info", "m", location=SourceLocation("c.edif", True, 2)),
        Finding("r", "info", "m", location=SourceLocation("c.edif", np.int64(4), 2)),
        Finding("r", "info", "m", location=SourceLocation("c.edif", 5, 2.0)),
    ]
    _assert_plain(odd, circuit)
