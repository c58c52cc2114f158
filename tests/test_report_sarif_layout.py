"""The SARIF report's layout (one line per result) against the plain log (same data).

Expected values: ledlint's own plain path, ``sarif_log`` (the log as one plain tree) written
by ``json.dumps(indent=2)``, which is what the report was before results went one a line.
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import pytest
from report_samples import fixture_netlists, sample_result

from linter.engine import CheckRequest, run_check
from linter.report import ReportFormat, ReportOptions
from linter.report.sarif import sarif_log

REPO = Path(__file__).resolve().parents[1]


def _render(result, base: Path = REPO) -> str:
    return ReportFormat.SARIF.reporter(ReportOptions(base_dir=base)).render(result)


def _old_layout(result, base: Path = REPO) -> str:
    log = sarif_log(result, base)
    return json.dumps(log, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def test_without_findings_the_bytes_are_json_dumps_indent_2() -> None:
    result = replace(sample_result(), findings=())
    assert _render(result) == _old_layout(result)


def test_each_result_is_one_line_holding_the_plain_data() -> None:
    result = sample_result()
    text = _render(result)
    assert json.loads(text) == json.loads(_old_layout(result))
    lines = [line for line in text.splitlines() if line.startswith('        {"ruleId": ')]
    expected = sarif_log(result, REPO)["runs"][0]["results"]
    assert [json.loads(line.rstrip(",")) for line in lines] == expected


@pytest.mark.parametrize("netlist", fixture_netlists()[::7],
                         ids=lambda path: str(path.relative_to(REPO)))
def test_fixture_logs_hold_the_plain_data(netlist: Path) -> None:
    result = run_check(CheckRequest(netlist=netlist))
    assert json.loads(_render(result)) == json.loads(_old_layout(result))


def test_a_file_outside_the_base_is_an_absolute_uri_every_time(tmp_path: Path) -> None:
    # the artifact of each file is resolved once per log; both results must still carry it
    result = sample_result()
    log = json.loads(_render(result, base=tmp_path))
    uris = [location["physicalLocation"]["artifactLocation"]["uri"]
            for entry in log["runs"][0]["results"] for location in entry["locations"]]
    assert len(uris) == 3 and len(set(uris)) == 1 and uris[0].startswith("file:///")


def test_combined_log_holds_the_plain_data(monkeypatch: pytest.MonkeyPatch) -> None:
    from linter.batch import expand_inputs, plan_boards, run_boards
    from linter.report.combined import combined_sarif, render_many

    monkeypatch.chdir(REPO)
    many = Path("fixtures") / "many"  # good boards and one torn deck (tests/test_many_designs.py)
    outcomes = run_boards(plan_boards(expand_inputs([many / "boards", many / "bad"])))
    text = render_many(ReportFormat.SARIF, outcomes, ReportOptions(base_dir=REPO))
    reference = json.dumps(combined_sarif(outcomes, REPO), ensure_ascii=False)
    assert json.loads(text) == json.loads(reference)
    assert sum(line.startswith('        {"ruleId": ') for line in text.splitlines()) > 3
