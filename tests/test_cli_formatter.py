"""The CLI's help formatter: argparse's own, at the width argparse would choose, found without
importing shutil (start-up). Expected values: shutil's and argparse's own results for the
same environment (the plain path), never stored text."""

from __future__ import annotations

import argparse
import contextlib
import io
import shutil

import pytest

from linter import cli


@pytest.mark.parametrize("columns", [None, "40", "200", "0", "-3", "wide", ""])
def test_terminal_columns_as_shutil_finds_them(columns, monkeypatch) -> None:
    if columns is None:
        monkeypatch.delenv("COLUMNS", raising=False)
    else:
        monkeypatch.setenv("COLUMNS", columns)
    assert cli._terminal_columns() == shutil.get_terminal_size().columns


def _help(argv: list[str]) -> str:
    out = io.StringIO()
    with contextlib.redirect_stdout(out), pytest.raises(SystemExit):
        cli.main(argv)
    return out.getvalue()


@pytest.mark.parametrize("columns", [None, "52", "120"])
@pytest.mark.parametrize("argv", [["--help"], ["check", "--help"], ["rules", "--help"],
                                  ["baseline", "write", "--help"]])
def test_help_as_argparse_writes_it(argv, columns, monkeypatch) -> None:
    if columns is None:
        monkeypatch.delenv("COLUMNS", raising=False)
    else:
        monkeypatch.setenv("COLUMNS", columns)
    ours = _help(argv)
    monkeypatch.setattr(cli, "_Formatter", argparse.HelpFormatter)  # argparse's own width
    assert ours == _help(argv)
    assert "usage: ledlint" in ours
