"""A report's finding lines written together (json_findings.finding_lines) against one by one.

Expected values: our own plain path, ``finding_line`` for each finding (itself held to
``plain_json(finding_dict(...))`` by tests/test_report_json_findings.py), byte for byte, on
the demo, a generated board (packed part places), hand-made findings and hypothesis'.
"""

from __future__ import annotations

import math
import sys
from dataclasses import replace
from itertools import repeat
from pathlib import Path
from types import MappingProxyType

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from report_samples import placed_circuit, sample_result

from linter.engine import CheckRequest, run_check
from linter.findings import Finding
from linter.model import SourceLocation, stored_location
from linter.report import json_findings
from linter.report.json_findings import finding_line, finding_lines
from linter.report.json_layout import plain_json

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"
ODD_FILE = 'a "b" %d.edif'
"""A file name with a quote and a percent sign (invented)."""


def _assert_one_by_one(findings, circuit) -> None:
    findings = list(findings)
    together = list(finding_lines(findings, circuit))
    assert together == list(map(finding_line, findings, repeat(circuit)))
    assert together == [plain_json(json_findings.finding_dict(f, circuit)) for f in findings]


@pytest.mark.parametrize("suffix", ["edif", "cir"])
def test_demo_lines_together_are_the_lines_one_by_one(suffix: str) -> None:
    result = run_check(CheckRequest(netlist=DEMO / f"dust_extractor_panel.{suffix}",
                                    bom=DEMO / "bom.csv"))
    assert len(result.findings) > 5
    _assert_one_by_one(result.findings, result.circuit)


def test_generated_board_lines_together_are_the_lines_one_by_one(tmp_path: Path) -> None:
    files = write_all(generate(1500, seed=4), tmp_path / "board")
    result = run_check(CheckRequest(netlist=files["edif"], bom=files["bom"]))
    findings = result.findings
    parts = result.circuit.parts
    packed = [f for f in findings if f.location is None and f.parts and f.parts[0] in parts
              and type(stored_location(parts[f.parts[0]])) is int]
    assert len(packed) > 10  # the packed road is taken
    assert len({id(f.values) for f in findings}) < len(findings)  # shared values met
    _assert_one_by_one(findings, result.circuit)


def test_sample_lines_together_are_the_lines_one_by_one() -> None:
    result = sample_result()
    _assert_one_by_one(result.findings, result.circuit)


def test_odd_findings_together_are_the_lines_one_by_one() -> None:
    circuit = placed_circuit(ODD_FILE)
    shared = {"b": 1.5, "a": 0.0}
    odd = [  # invented findings
        Finding("r", "error", 'say "hi" \\ µ', ("R1",), values=shared),
        Finding("r", "info", "m", ("R2", "R1"), ("N%s", "A"), "G-1", shared, 'fix "x"'),
        Finding("r", "info", "m", ("R3",), values={"b": 1.5, "a": -0.0}),
        Finding("r", "info", "m", ("R4",), values={1: 2.0}),   # a key not text
        Finding("r", "info", "m", ("U1.PA4",)),                # a pin: its part's place
        Finding("r", "info", "m", ("X9", "R2")),               # first part unknown
        Finding("r", "info", "m", (), ("A",)),
        Finding("r", "warning", "m", ("R1",), location=SourceLocation("d.edif", 2, 3)),
        Finding("r", "warning", "m", ("R1",), location=SourceLocation("d.edif", True, 3)),
        Finding("r", "info", "m", values={"x": np.float64(0.1), "y": np.int64(3), "n": math.nan}),
        Finding("q", "info", "m", ("R2",), values=MappingProxyType({"a": 1.0})),
    ]
    _assert_one_by_one(odd, circuit)
    _assert_one_by_one(odd, replace(circuit, parts=MappingProxyType(dict(circuit.parts))))


def test_fields_of_other_types_take_the_plain_writer() -> None:
    circuit = placed_circuit(ODD_FILE)
    odd = [Finding("r", "info", "m", ("R1",), group=7),      # invented: fields not text
           Finding("r", "info", "m", ("R1",), fix=3.5),
           Finding("r", "info", 5, ("R1",)),
           Finding("r", "info", "m", ("R1",))]
    lines = list(finding_lines(odd, circuit))
    assert '"group": 7,' in lines[0] and '"fix": 3.5,' in lines[1]  # json.dumps' texts
    assert '"message": 5,' in lines[2]
    _assert_one_by_one(odd, circuit)


_text = st.text(max_size=10)
_name = st.one_of(_text, st.sampled_from(["R1", "R2", "R3", "R4", "U1.PA4", "X9"]))
_mapping = st.dictionaries(_text, st.one_of(st.floats(), st.integers(-99, 99)), max_size=4)


@settings(max_examples=200)
@given(st.lists(st.tuples(_text, st.sampled_from(["error", "warning", "info"]), _text,
                          st.lists(_name, max_size=3), st.lists(_name, max_size=2),
                          st.none() | _text, st.integers(0, 3), st.none() | _text,
                          st.none() | st.builds(SourceLocation, _text, st.integers(1, 99),
                                                st.integers(1, 99))),
                max_size=8),
       st.lists(_mapping, min_size=4, max_size=4))
def test_any_findings_together_are_the_lines_one_by_one(rows, mappings) -> None:
    findings = [Finding(rule, severity, message, tuple(parts), tuple(nets), group,
                        mappings[which], fix, location)
                for rule, severity, message, parts, nets, group, which, fix, location in rows]
    _assert_one_by_one(findings, placed_circuit(ODD_FILE))
