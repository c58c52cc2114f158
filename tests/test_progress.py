"""The progress bar: drawn on a terminal after a delay, never on a pipe, never on stdout."""

from __future__ import annotations

import io
import json
import time
from pathlib import Path

from linter.cli import main
from linter.progress import Progress

DEMO = Path(__file__).resolve().parents[1] / "fixtures" / "demo"
WAIT_S = 30.0
"""How long a test waits for the timer thread at most (not a speed measurement)."""


class _FakeTerminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def _wait_for_output(stream: io.StringIO) -> None:
    deadline = time.monotonic() + WAIT_S
    while not stream.getvalue() and time.monotonic() < deadline:
        time.sleep(0.01)


def test_a_terminal_gets_a_bar_naming_the_step(monkeypatch):
    monkeypatch.delenv("TERM", raising=False)
    stream = _FakeTerminal()
    with Progress(total=2, stream=stream, delay=0.0) as progress:
        progress.step("checking board.edif")
        _wait_for_output(stream)
    assert progress.enabled
    assert "checking board.edif" in stream.getvalue()


def test_no_output_when_the_stream_is_not_a_terminal():
    stream = io.StringIO()
    with Progress(total=2, stream=stream, delay=0.0) as progress:
        progress.step("checking board.edif")
        progress.step("writing the report")
    assert not progress.enabled
    assert stream.getvalue() == ""


def test_no_output_on_a_dumb_terminal(monkeypatch):
    monkeypatch.setenv("TERM", "dumb")
    stream = _FakeTerminal()
    with Progress(total=1, stream=stream, delay=0.0) as progress:
        progress.step("checking board.edif")
    assert not progress.enabled and stream.getvalue() == ""


def test_a_quick_run_shows_nothing(monkeypatch):
    monkeypatch.delenv("TERM", raising=False)
    stream = _FakeTerminal()
    with Progress(total=1, stream=stream, delay=WAIT_S) as progress:
        progress.step("checking board.edif")
    assert progress.enabled and stream.getvalue() == ""


def test_cli_writes_no_progress_to_a_pipe_and_keeps_json_clean(capsys):
    code = main(["check", str(DEMO / "dust_extractor_panel.edif"), "--bom", str(DEMO / "bom.csv"),
                 "--format", "json"])
    out, err = capsys.readouterr()
    assert code in (0, 1)
    assert err == ""
    assert json.loads(out)["schema"] == "ledlint-report/1"
