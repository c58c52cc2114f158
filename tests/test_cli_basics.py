"""Command-line contract: version, exit codes, one-line errors (DESIGN.md contracts)."""

from linter import __version__
from linter.cli import EXIT_BAD_INPUT, EXIT_CLEAN, main


def test_version(capsys):
    try:
        main(["--version"])
    except SystemExit as stop:  # argparse's version action exits 0
        assert stop.code == 0
    assert capsys.readouterr().out.strip() == f"ledlint {__version__}"


def test_missing_file_is_one_line_exit_2(tmp_path, capsys):
    missing = tmp_path / "nothing.edif"
    assert main(["check", str(missing)]) == EXIT_BAD_INPUT
    captured = capsys.readouterr()
    assert captured.out == ""
    assert captured.err == f"{missing}: cannot read: No such file or directory\n"


def test_bad_command_line_is_one_line_exit_2(capsys):
    assert main(["chek"]) == EXIT_BAD_INPUT
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and err.startswith("ledlint: ")


def test_empty_file(tmp_path, capsys):
    empty = tmp_path / "empty.cir"
    empty.write_text("   \n")
    assert main(["check", str(empty)]) == EXIT_BAD_INPUT
    assert capsys.readouterr().err == f"{empty}:1:1: empty file; expected an EDIF or SPICE netlist\n"


def test_unknown_format(tmp_path, capsys):
    odd = tmp_path / "notes.txt"
    odd.write_text("hello\nworld\n")
    assert main(["check", str(odd)]) == EXIT_BAD_INPUT
    assert capsys.readouterr().err == (
        f"{odd}:1:1: not an EDIF or SPICE netlist (an EDIF file starts with '(edif')\n")


def test_binary_file(tmp_path, capsys):
    blob = tmp_path / "blob.edif"
    blob.write_bytes(b"(edif x\n  \x00\x01")
    assert main(["check", str(blob)]) == EXIT_BAD_INPUT
    assert capsys.readouterr().err == f"{blob}:2:3: binary data (NUL byte); expected a text file\n"


def test_rules_listing_and_page(capsys):
    assert main(["rules"]) == EXIT_CLEAN
    listing = capsys.readouterr().out
    assert "spice-scale-trap" in listing
    assert main(["rules", "spice-scale-trap"]) == EXIT_CLEAN
    page = capsys.readouterr().out
    assert "**Anti-pattern**" in page and "**Best practice**" in page
    assert main(["rules", "no-such-rule"]) == EXIT_BAD_INPUT
