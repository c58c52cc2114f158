"""The JSON report: the DESIGN.md contract, its JSON Schema, byte-identical output."""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import jsonschema
import pytest
from report_samples import NETLIST, fixture_netlists, sample_result

from linter.cli import main
from linter.findings import Finding
from linter.report import ReportFormat
from linter.report.json import SCHEMA_FILE

REPO = Path(__file__).resolve().parents[1]
SCHEMA = json.loads(SCHEMA_FILE.read_text("utf-8"))
VALIDATOR = jsonschema.Draft202012Validator(SCHEMA)


def _report(result=None) -> dict:
    return json.loads(ReportFormat.JSON.reporter().render(result or sample_result()))


def test_schema_is_a_valid_json_schema() -> None:
    jsonschema.Draft202012Validator.check_schema(SCHEMA)


def test_sample_report_validates() -> None:
    VALIDATOR.validate(_report())
    VALIDATOR.validate(_report(sample_result(groups=False)))


def test_schema_rejects_what_breaks_the_contract() -> None:
    report = _report()
    for broken in (
        {**report, "schema": "ledlint-report/2"},
        {**report, "findings": [{**report["findings"][0], "severity": "fatal"}]},
        {**report, "findings": [{**report["findings"][0], "values": {"i_a": "20 mA"}}]},
        {**report, "summary": {**report["summary"], "led_groups": -1}},
        {**report, "groups": [{"id": "G-D1"}]},
    ):
        assert not VALIDATOR.is_valid(broken)


def test_contract_fields() -> None:
    report = _report()
    assert report["schema"] == "ledlint-report/1"  # DESIGN.md, "JSON report"
    assert report["tool"]["name"] == "ledlint"
    assert report["inputs"]["netlist"] == NETLIST
    # Expected: the hand-built sample (7 parts, 5 nets, 2 groups, one finding per severity).
    # The sample has no waived and no baselined findings.
    assert report["summary"] == {"parts": 7, "nets": 5, "led_groups": 2,
                                 "waived": 0, "baselined": 0,
                                 "findings": {"error": 1, "warning": 1, "info": 1}}
    assert [group["id"] for group in report["groups"]] == ["G-D7", "G-D15"]  # natural order
    assert [f["severity"] for f in report["findings"]] == ["error", "warning", "info"]


def test_finding_entry() -> None:
    ballast = _report()["findings"][0]
    assert ballast["rule"] == "shared-ballast"
    assert ballast["parts"] == ["D7", "D8", "D9", "D10", "R6"]
    assert ballast["values"] == {"current_max_a": 0.031, "resistor_current_a": 0.08}
    assert ballast["fix"] == "give each LED its own 150 \u03a9 resistor"
    assert ballast["fingerprint"] == sample_result().findings[1].fingerprint
    # No location of its own: the first part's instance, D7 on line 4 column 1.
    assert ballast["location"] == {"file": NETLIST, "line": 4, "column": 1}


def test_values_are_si_floats_and_unknown_is_null() -> None:
    finding = Finding("led-overcurrent", "error", "m", ("D7",),
                      values={"current_a": 1, "ratio": math.inf, "vf_v": math.nan})
    report = _report(replace(sample_result(), findings=(finding,)))
    VALIDATOR.validate(report)
    values = report["findings"][0]["values"]
    assert values == {"current_a": 1.0, "ratio": None, "vf_v": None}
    assert isinstance(values["current_a"], float)


def test_group_figures_pass_through_with_unknowns_as_null() -> None:
    d15 = _report()["groups"][1]["leds"][0]
    assert d15["vf_v"] == {"nom": None, "min": None, "max": None}
    assert d15["current_a"]["max"] == 0.0115  # invented figure of the sample


def test_same_input_same_bytes_in_process() -> None:
    result = sample_result()
    shuffled = replace(result, findings=tuple(reversed(result.findings)))
    render = ReportFormat.JSON.reporter().render
    assert render(result) == render(result) == render(shuffled)


_RENDER_SAMPLE = (
    "import sys; sys.path.insert(0, 'tests');"
    "from report_samples import sample_result;"
    "from linter.report import ReportFormat;"
    "sys.stdout.write(ReportFormat.JSON.reporter().render(sample_result()))"
)


def _run_with_hash_seed(seed: str, args: list[str]) -> bytes:
    env = {**os.environ, "PYTHONHASHSEED": seed}
    done = subprocess.run([sys.executable, *args], cwd=REPO, env=env, capture_output=True,
                          check=False)
    assert done.returncode in (0, 1), done.stderr.decode()
    return done.stdout


def test_same_bytes_under_different_hash_seeds() -> None:
    first = _run_with_hash_seed("1", ["-c", _RENDER_SAMPLE])
    assert first and first == _run_with_hash_seed("2", ["-c", _RENDER_SAMPLE])


@pytest.mark.parametrize("netlist", fixture_netlists(),
                         ids=lambda path: str(path.relative_to(REPO)))
def test_fixture_report_validates(netlist: Path, tmp_path: Path) -> None:
    output = tmp_path / "report.json"
    code = main(["check", str(netlist), "--format", "json", "--output", str(output)])
    assert code in (0, 1)
    VALIDATOR.validate(json.loads(output.read_text("utf-8")))


@pytest.mark.parametrize("netlist", fixture_netlists(),
                         ids=lambda path: str(path.relative_to(REPO)))
def test_fixture_report_same_bytes_under_two_hash_seeds(netlist: Path) -> None:
    args = ["-m", "linter.cli", "check", str(netlist.relative_to(REPO)), "--format", "json"]
    first = _run_with_hash_seed("0", args)
    assert first and first == _run_with_hash_seed("12345", args)
