"""Baselines: written whole and deterministic, read with located errors, applied by the CLI."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from linter import __version__
from linter.baseline import (BASELINE_SCHEMA, BaselineError, baseline_text, parse_baseline,
                             read_baseline, split_baselined)
from linter.cli import EXIT_BAD_INPUT, EXIT_CLEAN, EXIT_FINDINGS, main
from linter.engine import CheckRequest, run_check
from linter.findings import Finding

FIXTURES = Path(__file__).resolve().parent.parent / "fixtures" / "baseline"
BOARD = FIXTURES / "board.cir"
CHANGED = FIXTURES / "board_changed.cir"


def _findings(netlist: Path) -> tuple[Finding, ...]:
    return run_check(CheckRequest(netlist=netlist)).findings


def test_text_is_sorted_deterministic_and_deduplicated():
    a = Finding("nonstandard-value", "info", "R2 text", ("R2",))
    b = Finding("led-reverse", "error", "D1 text", ("D1",), ("N1",))
    again = Finding("led-reverse", "error", "D1 other words", ("D1",), ("N1",))
    first = baseline_text([a, b, again])
    assert first == baseline_text([again, a, b])  # same fingerprints, same bytes
    document = json.loads(first)
    assert document["schema"] == BASELINE_SCHEMA
    assert document["tool"] == {"name": "ledlint", "version": __version__}
    assert [e["rule"] for e in document["findings"]] == ["led-reverse", "nonstandard-value"]
    assert document["findings"][0] == {"fingerprint": b.fingerprint, "rule": "led-reverse",
                                       "parts": ["D1"], "nets": ["N1"],
                                       "message": document["findings"][0]["message"]}


def test_round_trip_and_split():
    a = Finding("nonstandard-value", "info", "m", ("R2",))
    b = Finding("led-reverse", "error", "m", ("D1",))
    baseline = parse_baseline(baseline_text([a]), "base.json")
    assert baseline.fingerprints == frozenset({a.fingerprint})
    assert split_baselined([b, a], baseline) == ((b,), (a,))


def test_write_through_the_cli(tmp_path, capsys):
    target = tmp_path / "accepted.json"
    assert main(["baseline", "write", str(target), str(BOARD)]) == EXIT_CLEAN
    written = target.read_text(encoding="utf-8")
    expected = {f.fingerprint for f in _findings(BOARD)}
    entries = json.loads(written)["findings"]
    assert {e["fingerprint"] for e in entries} == expected and len(entries) == len(expected)
    assert capsys.readouterr().err == (f"{target}: baseline of {len(expected)} "
                                       f"finding{'s' if len(expected) != 1 else ''} written\n")
    assert main(["baseline", "write", str(target), str(BOARD)]) == EXIT_CLEAN
    assert target.read_text(encoding="utf-8") == written  # deterministic bytes
    assert not list(tmp_path.glob(".*.tmp"))  # no temporary file left behind


def test_check_with_baseline_shows_only_new_findings(tmp_path, capsys):
    target = tmp_path / "accepted.json"
    assert main(["baseline", "write", str(target), str(BOARD)]) == EXIT_CLEAN
    capsys.readouterr()
    old = {f.fingerprint for f in _findings(BOARD)}
    # Same board: nothing new; every finding counted as baselined.
    assert main(["check", str(BOARD), "--baseline", str(target), "--fail-on", "info",
                 "--format", "json"]) == EXIT_CLEAN
    captured = capsys.readouterr()
    assert json.loads(captured.out)["findings"] == []
    assert captured.err == f"{len(old)} findings in the baseline not shown\n"
    # One change later: only fingerprints the baseline does not hold are shown.
    result = run_check(CheckRequest(netlist=CHANGED, baseline=target))
    shown = {f.fingerprint for f in result.findings}
    assert shown == {f.fingerprint for f in _findings(CHANGED)} - old
    assert {f.fingerprint for f in result.baselined} <= old
    # IEC 60063: 2.05 kΩ is no E24 value, so the new resistor is among the new findings.
    assert ("nonstandard-value", ("RAUX",)) in {(f.rule, f.parts) for f in result.findings}
    assert ("nonstandard-value", ("RLIM",)) not in {(f.rule, f.parts) for f in result.findings}
    assert main(["check", str(CHANGED), "--baseline", str(target), "--fail-on", "info"]) \
        == EXIT_FINDINGS


@pytest.mark.parametrize(("text", "message"), [
    # Cut short after two lines: the value is missing at the end of the text, line 3 column 1.
    ('{"schema": "ledlint-baseline/1",\n "findings": [\n', "3:1: not JSON: Expecting value"),
    ('[1, 2]\n', "1:1: not a ledlint baseline (an object with \"schema\": "
                 "\"ledlint-baseline/1\" expected)"),
    ('{\n  "schema": "other/2",\n  "findings": []\n}\n',
     "2: schema 'other/2' is not 'ledlint-baseline/1'"),
    ('{\n  "schema": "ledlint-baseline/1"\n}\n', "1: no 'findings' list"),
    ('{\n  "schema": "ledlint-baseline/1",\n  "findings": {}\n}\n',
     "3: 'findings' must be a list of entries"),
    ('{\n  "schema": "ledlint-baseline/1",\n  "findings": [\n    {"fingerprint": '
     '"0123456789abcdef"},\n    {"rule": "x",\n     "message": "a \\"{quoted}\\" brace"}\n  ]\n}\n',
     "5: findings[1] has no fingerprint (16 hex digits expected)"),
    ('{\n  "schema": "ledlint-baseline/1",\n  "findings": [\n    7\n  ]\n}\n',
     "4: findings[0] is not an object"),
])
def test_bad_baselines_are_one_located_line_exit_2(tmp_path, capsys, text, message):
    bad = tmp_path / "bad.json"
    bad.write_text(text, encoding="utf-8")
    assert main(["check", str(BOARD), "--baseline", str(bad)]) == EXIT_BAD_INPUT
    captured = capsys.readouterr()
    assert captured.out == ""
    assert captured.err == f"{bad}:{message}\n"


def test_missing_and_binary_baselines(tmp_path, capsys):
    missing = tmp_path / "none.json"
    assert main(["check", str(BOARD), "--baseline", str(missing)]) == EXIT_BAD_INPUT
    assert capsys.readouterr().err == f"{missing}: cannot read: No such file or directory\n"
    binary = tmp_path / "blob.json"
    binary.write_bytes(b'{\n"schema": \xff\xfe}')
    with pytest.raises(BaselineError) as caught:
        read_baseline(binary)
    assert str(caught.value) == f"{binary}:2: not UTF-8 text"


def test_write_refuses_an_input_and_an_unwritable_place(tmp_path, capsys):
    assert main(["baseline", "write", str(BOARD), str(BOARD)]) == EXIT_BAD_INPUT
    assert capsys.readouterr().err.count("\n") == 1
    nowhere = tmp_path / "no" / "such" / "folder.json"
    assert main(["baseline", "write", str(nowhere), str(BOARD)]) == EXIT_BAD_INPUT
    err = capsys.readouterr().err
    assert err.startswith(f"ledlint baseline write: cannot write {nowhere}") and err.count("\n") == 1
