"""Safety of a CI gate that reads whatever a pull request contains.

ledlint never evaluates input as Python, never reads outside the project through ``.include``,
never opens an input for writing, and writes reports and baselines to a temporary file in the
same folder that is then renamed over the target: an interrupted run leaves the old report
byte for byte. A run killed while the temporary file is being written can leave one
``.report.json.*.tmp`` beside the report; ledlint does not delete such files on the next run
(it cannot tell a dead run's file from a running one's), and the leading dot keeps them out of
globs.
"""

from __future__ import annotations

import builtins
import io
import os
import re
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from linter.cli import main
from linter.readers.spice_expr import ExpressionError, evaluate

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"


# ---- no Python evaluation ---------------------------------------------------------------------

def test_no_eval_or_exec_in_the_code() -> None:
    calls = re.compile(r"(?<![\w.])(eval|exec)\s*\(")
    offenders = [f"{path.relative_to(ROOT)}:{number}"
                 for folder in ("linter", "rules") for path in sorted((ROOT / folder).rglob("*.py"))
                 for number, line in enumerate(path.read_text(encoding="utf-8").splitlines(), 1)
                 if calls.search(line.split("#", 1)[0])]
    assert offenders == []


@pytest.mark.parametrize("text", ["__import__('os')", "__import__(os)", "().__class__",
                                  "open(1)", "exec(1)", "eval(1)", "lambda: 1"])
def test_python_in_an_expression_is_refused(text: str) -> None:
    with pytest.raises(ExpressionError):
        evaluate(text, {})


def test_reading_never_calls_eval_or_exec(monkeypatch: pytest.MonkeyPatch, tmp_path: Path,
                                          capsys: pytest.CaptureFixture[str]) -> None:
    real_eval, real_exec = builtins.eval, builtins.exec

    def refuse(real):  # type: ignore[no-untyped-def]
        def guard(source, *args, **kwargs):  # type: ignore[no-untyped-def]
            # imports run compiled module code through exec; text is what must never arrive
            if isinstance(source, (str, bytes)):
                raise AssertionError(f"text evaluated as Python: {source!r}")
            return real(source, *args, **kwargs)
        return guard

    deck = tmp_path / "deck.cir"
    deck.write_text("* expressions\n.param r={2*165}\nV1 a 0 DC {10/2}\nR1 a b {r}\nD1 b 0 LR\n"
                    ".model LR D(IS=1e-19 N=2)\nR2 a 0 {__import__('os').system('true')}\n.end\n")
    # first run: every module is imported (the standard library's namedtuple evaluates text
    # while a module is imported); the second run, guarded, is the reading itself
    main(["check", str(deck)])
    main(["check", str(DEMO / "dust_extractor_panel.cir")])
    capsys.readouterr()
    monkeypatch.setattr(builtins, "eval", refuse(real_eval))
    monkeypatch.setattr(builtins, "exec", refuse(real_exec))
    assert main(["check", str(deck)]) == 2
    # line 7 'R2 a 0 {…': the expression starts in column 8
    assert capsys.readouterr().err.startswith(f"{deck}:7:8: ")
    assert main(["check", str(DEMO / "dust_extractor_panel.cir")]) in (0, 1)


# ---- includes stay in the project ------------------------------------------------------------

@pytest.mark.skipif(not hasattr(os, "symlink"), reason="no symbolic links")
def test_include_through_a_linked_folder_out_of_the_project_is_refused(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    outside = tmp_path / "outside"
    outside.mkdir()
    (outside / "models.inc").write_text("R9 a 0 1k\n")
    project = tmp_path / "project"
    project.mkdir()
    (project / "lib").symlink_to(outside, target_is_directory=True)
    deck = project / "deck.cir"
    deck.write_text("* include through a linked folder\n.include lib/models.inc\n.end\n")
    assert main(["check", str(deck)]) == 2
    # line 2 '.include lib/models.inc': the file name starts in column 10
    assert capsys.readouterr().err == (f"{deck}:2:10: .include 'lib/models.inc' is outside the "
                                       "project folder; refused\n")


def test_lib_with_parent_folders_is_refused(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    project = tmp_path / "project"
    project.mkdir()
    deck = project / "deck.cir"
    deck.write_text("* library above the project\n.lib ../../../../etc/hosts tt\n.end\n")
    assert main(["check", str(deck)]) == 2
    # line 2: the file name starts in column 6
    assert capsys.readouterr().err == (f"{deck}:2:6: .lib '../../../../etc/hosts' is outside the "
                                       "project folder; refused\n")


# ---- inputs are never written ------------------------------------------------------------------

def _demo_copy(folder: Path) -> list[Path]:
    folder.mkdir()
    names = ("dust_extractor_panel.cir", "dust_extractor_panel.edif", "bom.csv", "ledlint.toml")
    for name in names:
        (folder / name).write_bytes((DEMO / name).read_bytes())
    return [folder / name for name in names]


@pytest.mark.skipif(hasattr(os, "geteuid") and os.geteuid() == 0,
                    reason="root ignores file permissions")
def test_check_works_on_read_only_inputs(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    inputs = _demo_copy(tmp_path / "board")
    for path in inputs:
        path.chmod(0o444)
    (tmp_path / "board").chmod(0o555)
    try:
        code = main(["check", str(inputs[1]), "--bom", str(inputs[2]), "--format", "json",
                     "-o", str(tmp_path / "report.json")])
    finally:
        (tmp_path / "board").chmod(0o755)
    assert code in (0, 1) and capsys.readouterr().err == ""
    assert (tmp_path / "report.json").read_text().startswith("{")


def test_no_input_is_opened_for_writing(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                        capsys: pytest.CaptureFixture[str]) -> None:
    inputs = _demo_copy(tmp_path / "board")
    guarded = {str(path.resolve()) for path in inputs}
    opened: list[str] = []

    def check(file: object, mode: str) -> None:
        if isinstance(file, (str, os.PathLike)) and os.path.realpath(file) in guarded:
            opened.append(mode)
            if any(flag in mode for flag in "wax+"):
                raise AssertionError(f"{file} opened with mode {mode!r}")

    real_open, real_path_open, real_os_open = builtins.open, Path.open, os.open

    def open_guard(file, mode="r", *args, **kwargs):  # type: ignore[no-untyped-def]
        check(file, mode)
        return real_open(file, mode, *args, **kwargs)

    def path_open_guard(self, mode="r", *args, **kwargs):  # type: ignore[no-untyped-def]
        check(self, mode)
        return real_path_open(self, mode, *args, **kwargs)

    def os_open_guard(path, flags, *args, **kwargs):  # type: ignore[no-untyped-def]
        check(path, "w" if flags & (os.O_WRONLY | os.O_RDWR | os.O_APPEND | os.O_TRUNC) else "r")
        return real_os_open(path, flags, *args, **kwargs)

    monkeypatch.setattr(builtins, "open", open_guard)
    monkeypatch.setattr(io, "open", open_guard)
    monkeypatch.setattr(Path, "open", path_open_guard)
    monkeypatch.setattr(os, "open", os_open_guard)
    for netlist in inputs[:2]:
        code = main(["check", str(netlist), "--bom", str(inputs[2]), "--format", "json",
                     "-o", str(tmp_path / "report.json")])
        assert code in (0, 1), capsys.readouterr().err
    assert opened and set(opened) <= {"r", "rb"}


def test_output_naming_an_input_is_refused(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    inputs = _demo_copy(tmp_path / "board")
    before = inputs[2].read_bytes()
    assert main(["check", str(inputs[0]), "--bom", str(inputs[2]), "-o", str(inputs[2])]) == 2
    assert inputs[2].read_bytes() == before
    assert capsys.readouterr().err.startswith("ledlint check: --output")


# ---- interrupted runs leave the old report -----------------------------------------------------

def _large_deck(path: Path, channels: int) -> None:
    """A flat deck of ``channels`` resistor-fed red LEDs on one 5 V rail (invented values)."""
    lines = ["* many channels for the interruption test", "V1 vcc 0 DC 5",
             ".model LR D(IS=1e-19 N=2.0 RS=4)"]
    for n in range(channels):
        lines += [f"R{n} vcc a{n} {150 + n % 200}", f"D{n} a{n} 0 LR"]
    path.write_text("\n".join(lines + [".end", ""]))


def test_a_killed_run_leaves_the_old_report(tmp_path: Path) -> None:
    deck = tmp_path / "big.cir"
    _large_deck(deck, 30_000)
    report = tmp_path / "report.json"
    old = b'{"old": "report"}\n'
    report.write_bytes(old)
    process = subprocess.Popen([sys.executable, "-m", "linter.cli", "check", str(deck),
                                "--format", "json", "-o", str(report)],
                               stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    time.sleep(1.5)
    running = process.poll() is None
    process.send_signal(signal.SIGKILL)
    process.wait(timeout=60)
    # 30,000 groups take far longer than 1.5 s to read and solve, so the kill lands mid-run
    assert running
    assert report.read_bytes() == old
    assert sorted(p.name for p in tmp_path.iterdir()) == ["big.cir", "report.json"]


def test_a_finished_run_replaces_the_report_and_leaves_no_temporary_file(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    report = tmp_path / "report.json"
    report.write_text("old")
    code = main(["check", str(DEMO / "dust_extractor_panel.cir"), "--format", "json",
                 "-o", str(report)])
    assert code in (0, 1)
    assert report.read_text().startswith("{")
    assert [p.name for p in tmp_path.iterdir()] == ["report.json"]
