"""The CLI's report plumbing: --format choices, --output, colour, the pre-commit hook file."""

from __future__ import annotations

import io
import json
import re
import tomllib
from dataclasses import replace
from pathlib import Path

import pytest
from report_samples import REPO, fixture_netlists, sample_result

import linter.engine
from linter.cli import EXIT_BAD_INPUT, EXIT_CLEAN, EXIT_FINDINGS, main
from linter.report import Reporter, ReportFormat, ReportOptions

_ANSI = re.compile(r"\x1b\[[0-9;]*m")


@pytest.fixture
def sample_run(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> Path:
    """The CLI with the pipeline replaced by the hand-built sample; returns a netlist path."""
    netlist = tmp_path / "panel.cir"
    netlist.write_text("* stands in for a board\n.end\n", encoding="utf-8")
    monkeypatch.setattr(linter.engine, "run_check", lambda request: sample_result())
    return netlist


@pytest.mark.parametrize("choice", list(ReportFormat))
def test_every_format_builds_a_reporter(choice: ReportFormat) -> None:
    reporter = choice.reporter(ReportOptions())
    assert isinstance(reporter, Reporter)
    assert reporter.render(sample_result()).endswith("\n")


def test_cli_offers_exactly_the_enum_formats(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", "x.cir", "--format", "no-such-format"]) == EXIT_BAD_INPUT
    err = capsys.readouterr().err
    offered = re.findall(r"'([a-z]+)'", err.split("choose from", 1)[1])
    assert offered == [choice.value for choice in ReportFormat]


@pytest.mark.parametrize("choice", list(ReportFormat))
def test_output_file_receives_the_whole_report(choice, sample_run, tmp_path, capsys) -> None:
    output = tmp_path / f"report.{choice.value}"
    code = main(["check", str(sample_run), "--format", choice.value, "--output", str(output)])
    assert code == EXIT_FINDINGS  # the sample has an error; default --fail-on error
    assert capsys.readouterr().out == ""
    expected = choice.reporter(ReportOptions()).render(sample_result())
    assert output.read_text("utf-8") == expected
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(["panel.cir", output.name])


@pytest.mark.parametrize("fail_on, code", [("error", EXIT_CLEAN), ("warning", EXIT_CLEAN),
                                            ("info", EXIT_FINDINGS)])
def test_fail_on_levels(fail_on, code, sample_run, monkeypatch) -> None:
    # Only the sample's info finding is kept: it fails the run at --fail-on info alone
    # (DESIGN.md, exit codes).
    only_info = replace(sample_result(), findings=sample_result().findings[:1])
    assert only_info.findings[0].severity == "info"
    monkeypatch.setattr(linter.engine, "run_check", lambda request: only_info)
    assert main(["check", str(sample_run), "--fail-on", fail_on, "-q"]) == code


def test_failing_run_leaves_an_existing_output_untouched(tmp_path, capsys) -> None:
    empty = tmp_path / "empty.cir"
    empty.write_text("\n", encoding="utf-8")
    output = tmp_path / "report.json"
    output.write_text("the previous report\n", encoding="utf-8")
    assert main(["check", str(empty), "--format", "json", "-o", str(output)]) == EXIT_BAD_INPUT
    assert output.read_text("utf-8") == "the previous report\n"
    assert capsys.readouterr().err.count("\n") == 1
    assert sorted(p.name for p in tmp_path.iterdir()) == ["empty.cir", "report.json"]


def _refused(args: list[str], capsys) -> str:
    assert main(args) == EXIT_BAD_INPUT
    captured = capsys.readouterr()
    assert captured.out == "" and captured.err.count("\n") == 1
    return captured.err


@pytest.mark.parametrize("option", ["netlist", "--bom", "--config", "--parts"])
def test_output_may_not_be_an_input(option, sample_run, tmp_path, capsys) -> None:
    victim = tmp_path / "input.file"
    victim.write_text("precious\n", encoding="utf-8")
    netlist = victim if option == "netlist" else sample_run
    args = ["check", str(netlist), "--output", str(victim)]
    if option != "netlist":
        args += [option, str(victim)]
    err = _refused(args, capsys)
    assert "--output" in err and "is an input" in err
    assert victim.read_text("utf-8") == "precious\n"


def test_output_spelled_differently_is_still_the_input(sample_run, monkeypatch, capsys) -> None:
    monkeypatch.chdir(sample_run.parent)
    _refused(["check", "panel.cir", "-o", f"./../{sample_run.parent.name}/panel.cir"], capsys)
    assert sample_run.read_text("utf-8").startswith("* stands in")


def test_output_may_not_be_a_settings_file_found_upward(sample_run, tmp_path, capsys) -> None:
    settings = tmp_path / "ledlint.toml"
    settings.write_text("[rails]\n", encoding="utf-8")
    _refused(["check", str(sample_run), "-o", str(settings)], capsys)
    assert settings.read_text("utf-8") == "[rails]\n"


def test_several_netlists_make_one_text_report(sample_run, tmp_path, capsys) -> None:
    second = tmp_path / "second.cir"
    second.write_text("* another\n.end\n", encoding="utf-8")
    assert main(["check", str(sample_run), str(second), "-q"]) == EXIT_FINDINGS
    single = ReportFormat.TEXT.reporter(ReportOptions(quiet=True)).render(sample_result())
    assert capsys.readouterr().out == f"{single}\n{single}"
    assert main(["check", str(sample_run), str(second), "--format", "json"]) == EXIT_FINDINGS
    combined = json.loads(capsys.readouterr().out)  # several boards: one combined JSON report
    assert len(combined["boards"]) == 2 and combined["complete"] is True


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_colour_on_a_terminal_unless_no_color(sample_run, monkeypatch) -> None:
    monkeypatch.delenv("NO_COLOR", raising=False)
    terminal = _Terminal()
    monkeypatch.setattr("sys.stdout", terminal)
    main(["check", str(sample_run)])
    assert _ANSI.search(terminal.getvalue())
    monkeypatch.setenv("NO_COLOR", "1")
    plain = _Terminal()
    monkeypatch.setattr("sys.stdout", plain)
    main(["check", str(sample_run)])
    assert plain.getvalue() and not _ANSI.search(plain.getvalue())


def test_no_colour_in_a_pipe(sample_run, monkeypatch, capsys) -> None:
    monkeypatch.delenv("NO_COLOR", raising=False)
    main(["check", str(sample_run), "--verbose"])
    assert not _ANSI.search(capsys.readouterr().out)


def _hook() -> dict[str, str]:
    """The hook's keys, read line by line: the file is one list item of `key: value` lines."""
    lines = [line for line in (REPO / ".pre-commit-hooks.yaml").read_text("utf-8").splitlines()
             if line.strip() and not line.lstrip().startswith("#")]
    assert lines[0].startswith("- ") and all(line.startswith("  ") for line in lines[1:])
    entries = {}
    for line in lines:
        key, value = line[2:].split(":", 1)
        value = value.strip()
        entries[key] = value[1:-1] if value[:1] == value[-1:] == "'" else value
    return entries


def test_pre_commit_hook_definition() -> None:
    hook = _hook()
    # pre-commit requires id, name, entry and language for a hook (pre-commit's docs).
    assert {"id", "name", "entry", "language", "files"} <= set(hook)
    assert hook["id"] == "ledlint" and hook["language"] == "python"
    assert hook["entry"] == "ledlint check"
    scripts = tomllib.loads((REPO / "pyproject.toml").read_text("utf-8"))["project"]["scripts"]
    # the console script is cli.run (main, then a quick end); tests/test_cli_run.py holds it
    # to sys.exit(main())
    assert scripts["ledlint"] == "linter.cli:run"


@pytest.mark.parametrize("name, matches", [
    ("hw/panel.edif", True), ("panel.EDF", True), ("a/b.edn", True), ("sim/led.cir", True),
    ("x.sp", True), ("x.spice", True), ("board.net", True),
    ("README.md", False), ("panel.edif.bak", False), ("bom.csv", False), ("x.spx", False),
])
def test_pre_commit_hook_files_pattern(name: str, matches: bool) -> None:
    # pre-commit matches `files` with Python's re.search (pre-commit's docs).
    assert bool(re.search(hook_files := _hook()["files"], name)) is matches, hook_files


@pytest.mark.parametrize("netlist", fixture_netlists(),
                         ids=lambda path: str(path.relative_to(REPO)))
def test_fixture_text_report_through_the_cli(netlist: Path, capsys) -> None:
    code = main(["check", str(netlist), "--verbose"])
    out = capsys.readouterr().out
    assert code in (EXIT_CLEAN, EXIT_FINDINGS)
    assert out.startswith(str(netlist)) and not _ANSI.search(out)


def test_output_file_gets_ordinary_permissions(tmp_path):
    # A report is an ordinary file: 0o666 less the umask (POSIX open() semantics), or the
    # mode of the file it replaces — not the 0o600 of a temporary file.
    import os
    import stat

    from linter.output import write_atomically

    fresh = tmp_path / "fresh.json"
    umask = os.umask(0o022)
    try:
        write_atomically(fresh, "{}\n")
    finally:
        os.umask(umask)
    assert stat.S_IMODE(fresh.stat().st_mode) == 0o644
    kept = tmp_path / "kept.json"
    kept.write_text("old")
    kept.chmod(0o640)
    write_atomically(kept, "new")
    assert stat.S_IMODE(kept.stat().st_mode) == 0o640 and kept.read_text() == "new"
