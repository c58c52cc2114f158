"""--fail-on, [rules.ID] severity and enabled = false, end to end through the CLI."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from linter.cli import EXIT_CLEAN, EXIT_FINDINGS, main

FOLDER = Path(__file__).resolve().parent.parent / "fixtures" / "rules" / "floating-led"
NETLIST = FOLDER / "fires.cir"
BASE = (FOLDER / "ledlint.toml").read_text(encoding="utf-8")


def _run(capsys, *args: str) -> tuple[int, list[dict]]:
    code = main(["check", str(NETLIST), "--format", "json", *args])
    return code, json.loads(capsys.readouterr().out)["findings"]


def _config(tmp_path: Path, extra: str) -> str:
    config = tmp_path / "ledlint.toml"
    config.write_text(BASE + "\n" + extra, encoding="utf-8")
    return str(config)


def _floating(findings: list[dict]) -> list[dict]:
    return [f for f in findings if f["rule"] == "floating-led"]


DARK_LED_OFF = "[rules.led-undercurrent]\nenabled = false\n"
"""The dark LED is also led-undercurrent's (an error): off, so floating-led decides alone."""


def test_fail_on_levels(tmp_path, capsys):
    config = _config(tmp_path, DARK_LED_OFF)
    code, findings = _run(capsys, "--config", config)
    (floating,) = _floating(findings)
    assert floating["severity"] == "warning"        # DESIGN: floating-led is a warning
    assert {f["severity"] for f in findings} == {"warning"}
    assert code == EXIT_CLEAN                       # default --fail-on error
    code, _ = _run(capsys, "--config", config, "--fail-on", "warning")
    assert code == EXIT_FINDINGS
    code, _ = _run(capsys, "--config", config, "--fail-on", "info")
    assert code == EXIT_FINDINGS


@pytest.mark.parametrize(("severity", "fail_on", "expected"), [
    ("error", "error", EXIT_FINDINGS),
    ("info", "warning", EXIT_CLEAN),
    ("info", "info", EXIT_FINDINGS),
])
def test_severity_override(tmp_path, capsys, severity, fail_on, expected):
    # Every other rule that finds something here is set to info as well, so that the exit
    # code depends on floating-led alone.
    quiet = "".join(f'[rules.{rule}]\nseverity = "info"\n'
                    for rule in ("unknown-part", "led-undercurrent"))
    config = _config(tmp_path, quiet + f'[rules.floating-led]\nseverity = "{severity}"\n')
    code, findings = _run(capsys, "--config", config, "--fail-on", fail_on)
    (floating,) = _floating(findings)
    assert floating["severity"] == severity
    assert code == expected


def test_disabled_rule_reports_nothing(tmp_path, capsys):
    config = _config(tmp_path, "[rules.floating-led]\nenabled = false\n")
    _, findings = _run(capsys, "--config", config)
    assert _floating(findings) == []
    _, findings = _run(capsys)                      # the fixture's own settings: on
    assert len(_floating(findings)) == 1
