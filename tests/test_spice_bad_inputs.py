"""Malformed SPICE decks: exit code 2, one line ``FILE:LINE:COLUMN: message`` on stderr, nothing else.

One fixture per failure mode in ``fixtures/bad/spice``. Each expected line and column is
read off the fixture's text (named beside it); the message wording is this project's own.
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from linter.cli import EXIT_BAD_INPUT, main

ROOT = Path(__file__).resolve().parents[1]
BAD = "fixtures/bad/spice"

CASES = [
    # line 4 'W1 a 0 vctl 0 switchmodel': the element name starts at column 1
    ("unknown_letter.cir",
     "4:1: unknown element letter 'W' in 'W1'; SPICE elements read here: B C D E F G H I J L M Q R V X"),
    # line 3 'R1 vcc': one node where a resistor has two
    ("too_few_nodes.cir", "3:1: R1 needs 2 nodes (1 2), found 1"),
    # line 3 '.subckt channel a k' is never closed
    ("subckt_without_ends.cir", "3:1: .subckt channel has no .ends"),
    # line 7 'XBACK a b outer' inside inner, reached from outer
    ("recursive_subckt.cir", "7:1: subcircuit used inside itself: outer -> inner -> outer"),
    # line 3 '.include ../../spice/models.inc': the file name starts at column 10
    ("include_outside.cir", "3:10: .include '../../spice/models.inc' is outside the project folder; refused"),
    # line 3 'R1 vcc 0 fifty': the value starts at column 10
    ("bad_value.cir", "3:10: cannot read 'fifty' as a SPICE number"),
    # line 7 'X2 vcc 0 chanel': the subcircuit name starts at column 10
    ("unknown_subckt.cir", "7:10: X2: unknown subcircuit 'chanel'"),
    # line 6 'X1 vcc mid 0 channel': three nodes, channel has ports a k
    ("wrong_node_count.cir", "6:1: X1: subcircuit channel has 2 ports (a k), found 3 nodes"),
]


def _check(argv: list[str], capsys: pytest.CaptureFixture[str]) -> tuple[int, str, str]:
    code = main(argv)
    captured = capsys.readouterr()
    return code, captured.out, captured.err


@pytest.mark.parametrize(("name", "expected"), CASES, ids=[c[0] for c in CASES])
def test_bad_deck_gives_one_located_line(name: str, expected: str, capsys: pytest.CaptureFixture[str],
                                         monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(ROOT)
    code, out, err = _check(["check", f"{BAD}/{name}"], capsys)
    assert code == EXIT_BAD_INPUT
    assert out == ""
    assert err == f"{BAD}/{name}:{expected}\n"


def test_include_loop_is_reported_where_it_closes(capsys: pytest.CaptureFixture[str],
                                                  monkeypatch: pytest.MonkeyPatch) -> None:
    # include_loop.cir includes include_loop_more.inc, whose line 3 '.include include_loop.cir'
    # (file name at column 10) opens the deck again.
    monkeypatch.chdir(ROOT)
    code, out, err = _check(["check", f"{BAD}/include_loop.cir"], capsys)
    assert code == EXIT_BAD_INPUT
    assert out == ""
    assert err == (f"{BAD}/include_loop_more.inc:3:10: .include loop: {BAD}/include_loop.cir -> "
                   f"{BAD}/include_loop_more.inc -> {BAD}/include_loop.cir\n")


@pytest.mark.skipif(not hasattr(os, "symlink"), reason="the platform has no symbolic links")
def test_include_through_a_symbolic_link_out_of_the_project_is_refused(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    outside = tmp_path / "elsewhere"
    outside.mkdir()
    (outside / "secret.inc").write_text("R9 a 0 1k\n")
    project = tmp_path / "project"
    project.mkdir()
    (project / "models.inc").symlink_to(outside / "secret.inc")
    deck = project / "deck.cir"
    deck.write_text("Deck whose include is a link to a file outside\n.include models.inc\n"
                    "V1 a 0 DC 5\n.end\n")
    code, out, err = _check(["check", str(deck)], capsys)
    assert code == EXIT_BAD_INPUT
    assert out == ""
    # line 2 '.include models.inc': the file name starts at column 10
    assert err == f"{deck}:2:10: .include 'models.inc' is outside the project folder; refused\n"


def test_a_link_that_stays_inside_the_project_is_followed(tmp_path: Path) -> None:
    from linter.readers import read_netlist

    (tmp_path / "lib").mkdir()
    (tmp_path / "lib" / "models.inc").write_text("R9 a 0 1k\n")
    (tmp_path / "models.inc").symlink_to(tmp_path / "lib" / "models.inc")
    deck = tmp_path / "deck.cir"
    deck.write_text("Deck whose include is a link inside the project\n.include models.inc\n"
                    "V1 a 0 DC 5\n.end\n")
    circuit = read_netlist(deck, source="deck.cir")
    assert set(circuit.parts) == {"R9", "V1"}
    # the link is followed: the part is located in the file it really is in
    assert circuit.parts["R9"].location.file == os.path.join("lib", "models.inc")
