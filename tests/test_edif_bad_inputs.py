"""Malformed EDIF inputs: exit code 2, one line ``FILE:LINE:COLUMN: message`` on stderr, nothing
on stdout. One fixture per failure mode under fixtures/bad/edif/ (each is the small valid board
of that folder's siblings with one defect; the defect is named in the file name).

Expected positions are counted by hand in each fixture (line numbers as ``cat -n`` shows them,
columns counting characters from 1). Messages are the wording chosen in linter/readers
(sexpr.py, edif_forms.py, edif_syntax.py, edif_flatten.py, edif.py; empty and binary files are
refused by the format dispatcher in linter/readers/__init__.py).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.cli import main

BAD = Path(__file__).resolve().parent.parent / "fixtures" / "bad" / "edif"

CASES = {
    "truncated.edif": "38:33: unexpected end of file: 8 list(s) still open, the innermost opened at 38:29",
    "missing_paren.edif": "51:50: unexpected end of file: 1 list(s) still open, the innermost opened at 1:1",
    "unbalanced.edif": "51:51: unexpected ')' with no list open",
    "unbalanced_early_close.edif": "51:3: unexpected text after the end of the top-level form",
    "unterminated_string.edif": "39:29: unterminated string (no closing '\"')",
    "unknown_instance.edif": "46:15: instanceRef 'D2': cell 'TOP' has no instance of that name",
    "unknown_port.edif": "46:15: portRef 'B': cell 'LED' has no port of that name",
    "one_pin_net.edif": "43:11: net 'LED_A' joins only one pin (R1.2); a net must join at least two pins",
    "duplicate_instance.edif": "36:11: duplicate instance name 'R1' in cell 'TOP' (first at 33:11)",
    "edif_level_1.edif": "3:3: edifLevel 1 is not supported; only level 0 (plain netlists) can be read",
    "not_edif.edif": "1:1: not an EDIF netlist: expected '(edif' at the start, found '(netlist_export'",
    "empty.edif": "1:1: empty file; expected an EDIF or SPICE netlist",
    "binary.edif": "1:1: binary data (NUL byte); expected a text file",
}


def run_cli(path: Path, capsys) -> tuple[int, str, str]:
    code = main(["check", str(path)])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_every_bad_fixture_has_a_case():
    assert sorted(p.name for p in BAD.glob("*.edif")) == sorted(CASES)


@pytest.mark.parametrize("name", sorted(CASES))
def test_bad_edif_gives_one_located_line(name, capsys):
    path = BAD / name
    code, out, err = run_cli(path, capsys)
    assert code == 2
    assert out == ""
    assert err == f"{path}:{CASES[name]}\n"


def test_nesting_100000_deep_is_a_located_error(tmp_path, capsys):
    path = tmp_path / "deep.edif"
    path.write_text("(edif deep " + "(" * 100_000 + ")" * 100_001, encoding="utf-8")
    code, out, err = run_cli(path, capsys)
    # "(edif deep " is 11 characters; the list at depth d opens at column d + 10, and the
    # first one refused is depth 1001 (MAX_DEPTH is 1000).
    assert (code, out) == (2, "")
    assert err == f"{path}:1:1011: lists nested deeper than 1000 levels\n"
