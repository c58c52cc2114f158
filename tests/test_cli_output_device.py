"""``--output`` naming a device or a pipe: written in place, never replaced by a file.

``write_atomically`` renames a finished temporary file over its target; over ``/dev/null``
that would put a regular file where the device was (for every program on the machine). The
expected report is the plain path of our own code: the same check written to a regular file.
"""

from __future__ import annotations

import os
import stat
import threading
from pathlib import Path

import pytest

from linter.cli import main, writes_in_place

DEMO = Path(__file__).resolve().parents[1] / "fixtures" / "demo"
ARGS = ["check", str(DEMO / "dust_extractor_panel.edif"), "--bom", str(DEMO / "bom.csv"),
        "--format", "json"]


def test_devices_and_pipes_are_written_in_place(tmp_path: Path) -> None:
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    plain = tmp_path / "plain.json"
    plain.write_text("", encoding="utf-8")
    assert writes_in_place(Path(os.devnull))       # a character device (checked, not written)
    assert writes_in_place(fifo)
    assert not writes_in_place(plain)
    assert not writes_in_place(tmp_path)            # a folder: write_atomically's refusal
    assert not writes_in_place(tmp_path / "absent.json")


def _check_through_a_fifo(args: list[str], tmp_path: Path) -> tuple[int, int, bytes, bytes]:
    """``ledlint`` run twice on ``args``: once to a regular file, once to a named pipe read
    by a thread. The exit codes of both, the file's bytes and the bytes the pipe gave; the
    pipe must still be a pipe afterwards (not a file renamed over it)."""
    expected_file = tmp_path / "report.json"
    code_file = main([*args, "--output", str(expected_file)])
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    received: list[bytes] = []

    def read() -> None:
        with open(fifo, "rb") as stream:   # blocks until the check opens the pipe
            received.append(stream.read())

    reader = threading.Thread(target=read, daemon=True)
    reader.start()
    code_fifo = main([*args, "--output", str(fifo)])
    reader.join(timeout=60)
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)
    return code_file, code_fifo, expected_file.read_bytes(), b"".join(received)


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no named pipes on this system")
def test_report_through_a_fifo_is_the_file_report(tmp_path: Path) -> None:
    code_file, code_fifo, expected, received = _check_through_a_fifo(ARGS, tmp_path)
    assert code_fifo == code_file
    assert received == expected
    assert sorted(p.name for p in tmp_path.iterdir()) == ["pipe", "report.json"]


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no named pipes on this system")
def test_combined_report_of_several_boards_through_a_fifo(tmp_path: Path) -> None:
    """The several-boards path (one combined report) writes a pipe in place too."""
    boards = [str(DEMO / "dust_extractor_panel.edif"), str(DEMO / "dust_extractor_panel.edif")]
    code_file, code_fifo, expected, received = _check_through_a_fifo(
        ["check", *boards, "--format", "json"], tmp_path)
    assert code_fifo == code_file
    assert received == expected
