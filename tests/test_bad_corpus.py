"""The bad-input corpus: every broken input gives exit 2 and one located line, or a finding.

Cases come from fixtures/bad/MANIFEST.toml (one fixture per failure, each with the exact
expected message; positions are counted by hand in the fixtures, as the manifest's ``why``
says). Inputs too large to commit (a 50 MB line, 100,000-deep nesting) are generated here.
Every run is a subprocess with a timeout, so a hang fails the test instead of stalling it.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest

from linter.cli import main
from linter.errors import MAX_MESSAGE_LENGTH

ROOT = Path(__file__).resolve().parents[1]
BAD = ROOT / "fixtures" / "bad"
CORPUS = BAD / "corpus"
MANIFEST = tomllib.loads((BAD / "MANIFEST.toml").read_text(encoding="utf-8"))["case"]
BOARD = "fixtures/bad/corpus/board.cir"
TIMEOUT_S = 120  # a hang, not a speed measure: a case normally ends within seconds


def ledlint(*args: str, env: dict[str, str] | None = None, cwd: Path = ROOT
            ) -> subprocess.CompletedProcess[str]:
    """Run the CLI as a CI gate would, in its own process."""
    environment = {**os.environ, **(env or {})}
    return subprocess.run([sys.executable, "-m", "linter.cli", *args], cwd=cwd, env=environment,
                          capture_output=True, text=True, encoding="utf-8", timeout=TIMEOUT_S)


def _argv(case: dict) -> list[str]:
    given = f"fixtures/bad/{case['file']}"
    role = case["as"]
    if role == "netlist":
        return ["check", given]
    flag = {"bom": "--bom", "config": "--config", "parts": "--parts"}[role]
    return ["check", BOARD, flag, given]


def test_every_corpus_file_is_in_the_manifest():
    listed = {case["file"] for case in MANIFEST}
    on_disk = {str(path.relative_to(BAD)) for folder in ("edif", "spice", "bom", "settings", "parts")
               for path in (CORPUS / folder).iterdir()}
    assert on_disk == listed


@pytest.mark.parametrize("case", MANIFEST, ids=[case["file"].removeprefix("corpus/")
                                                for case in MANIFEST])
def test_bad_input(case: dict, capsys: pytest.CaptureFixture[str],
                   monkeypatch: pytest.MonkeyPatch) -> None:
    # in-process (a subprocess a case would cost a second of start-up each); the inputs that
    # could hang are generated below and run in subprocesses with a timeout
    monkeypatch.chdir(ROOT)
    for name, value in case.get("env", {}).items():
        monkeypatch.setenv(name, value)
    code = main(_argv(case))
    out, err = capsys.readouterr()
    if "finding" in case:
        assert (code, err) == (1, "")
        main([*_argv(case), "--format", "json"])
        found = json.loads(capsys.readouterr().out)["findings"]
        assert any(f["rule"] == case["finding"] and f["parts"] == case["parts"] for f in found)
        return
    at = f"fixtures/bad/{case.get('at', case['file'])}"
    assert (code, out) == (2, "")
    assert err == f"{at}:{case['expect']}\n"


# ---- generated inputs --------------------------------------------------------------------------

def _one_located_line(run: subprocess.CompletedProcess[str], prefix: str) -> None:
    assert (run.returncode, run.stdout) == (2, "")
    assert run.stderr.count("\n") == 1 and run.stderr.startswith(prefix)
    assert len(run.stderr) <= MAX_MESSAGE_LENGTH + 1


def test_50_megabyte_single_line_spice_value(tmp_path: Path) -> None:
    deck = tmp_path / "long.cir"
    deck.write_text("* one 50 MB token\nR1 a 0 " + "1" * 50_000_000 + "\n.end\n")
    # line 2 'R1 a 0 111…': the value starts in column 8; the message quotes it, shortened
    _one_located_line(ledlint("check", str(deck)), f"{deck}:2:8: cannot read '1111")


def test_50_megabyte_single_line_edif_string(tmp_path: Path) -> None:
    netlist = tmp_path / "long.edif"
    netlist.write_text('(edif long (comment "' + "a" * 50_000_000 + '"))')
    # a well-formed file without a (design ...) form: refused at the top-level list, 1:1
    _one_located_line(ledlint("check", str(netlist)), f"{netlist}:1:1: no (design ...) form")


def test_50_megabyte_single_line_bom_cell(tmp_path: Path) -> None:
    bom = tmp_path / "long.csv"
    bom.write_text("References,Value\nR1," + 'a"' * 25_000_000 + "\n")
    # a long value with stray quotes is text (not a number): R1 differs from the netlist's 330
    run = ledlint("check", BOARD, "--bom", str(bom), "--format", "json")
    assert run.stderr == ""
    assert "bom-mismatch" in {f["rule"] for f in json.loads(run.stdout)["findings"]}


def test_bom_range_with_thousands_of_digits(tmp_path: Path) -> None:
    bom = tmp_path / "digits.csv"
    bom.write_text("References,Value\nR" + "1" * 5000 + "-R" + "1" * 4999 + "2,1k\n")
    # line 2, the references cell in column 1; numbers beyond Python's int() text limit
    _one_located_line(ledlint("check", BOARD, "--bom", str(bom)),
                      f"{bom}:2:1: reference range 'R1111")


def test_100000_deep_settings_nesting(tmp_path: Path) -> None:
    settings = tmp_path / "deep.toml"
    settings.write_text("[assume]\nx = " + "[" * 100_000 + "]" * 100_000 + "\n")
    # line 2 'x = [[[…': the 101st bracket (TOML_MAX_DEPTH is 100) is in column 4 + 101
    run = ledlint("check", BOARD, "--config", str(settings))
    assert (run.returncode, run.stdout) == (2, "")
    assert run.stderr == (f"{settings}:2:105: invalid TOML: arrays or tables nested deeper "
                          "than 100 levels\n")


def test_100000_deep_spice_expression(tmp_path: Path) -> None:
    deck = tmp_path / "deep.cir"
    deck.write_text("* deep\nR1 a 0 {" + "(" * 100_000 + "1" + ")" * 100_000 + "}\n.end\n")
    # line 2, the expression starts in column 8; longer than MAX_EXPRESSION_LENGTH (10,000)
    _one_located_line(ledlint("check", str(deck)),
                      f"{deck}:2:8: expression longer than 10000 characters in '{{((((")


def test_edif_hierarchy_bomb_is_refused_within_the_part_limit(tmp_path: Path) -> None:
    cells = ["(cell L0 (cellType GENERIC) (view v (viewType NETLIST) (interface "
             "(port A (direction INOUT)) (port K (direction INOUT)))))"]
    for level in range(1, 10):
        instances = " ".join(f"(instance i{k} (viewRef v (cellRef L{level - 1})))" for k in range(10))
        cells.append(f"(cell L{level} (cellType GENERIC) (view v (viewType NETLIST) (interface) "
                     f"(contents {instances})))")
    netlist = tmp_path / "bomb.edif"
    netlist.write_text("(edif bomb (edifVersion 2 0 0) (edifLevel 0) (keywordMap (keywordLevel 0))"
                       " (library LIB (edifLevel 0) (technology (numberDefinition))\n"
                       + "\n".join(cells) + ")\n(design bomb (cellRef L9 (libraryRef LIB))))\n")
    # 10^9 leaves from 10 lines; the 101st instance placed is refused (a limit of 100)
    run = ledlint("check", str(netlist), env={"LEDLINT_MAX_PARTS": "100"})
    assert (run.returncode, run.stdout) == (2, "")
    assert run.stderr.endswith(": the design expands to more than 100 instances (max_parts)\n")
    assert run.stderr.startswith(f"{netlist}:")


def test_limit_from_environment_wins_over_settings(tmp_path: Path) -> None:
    shutil.copy(CORPUS / "board.cir", tmp_path / "board.cir")
    (tmp_path / "ledlint.toml").write_text('[limits]\nmax_file_size = "1 MB"\n')
    run = ledlint("check", str(tmp_path / "board.cir"), env={"LEDLINT_MAX_FILE_SIZE": "100"})
    # board.cir is 152 bytes (wc -c): over the environment's 100, under the settings' 1 MB
    assert run.stderr == (f"{tmp_path / 'board.cir'}: file of 152 bytes is larger than the "
                          "100-byte limit (max_file_size; raise it in [limits] or "
                          "$LEDLINT_MAX_FILE_SIZE)\n")


def test_a_bad_limit_in_the_environment(tmp_path: Path) -> None:
    run = ledlint("check", BOARD, env={"LEDLINT_MAX_PARTS": "lots"})
    assert (run.returncode, run.stdout) == (2, "")
    assert run.stderr == "$LEDLINT_MAX_PARTS: max_parts: cannot read 'lots' (write it such as 10000)\n"


@pytest.mark.skipif(not Path("/dev/zero").exists(), reason="no /dev/zero")
def test_a_device_is_not_read(tmp_path: Path) -> None:
    run = ledlint("check", "/dev/zero")
    assert (run.returncode, run.stdout) == (2, "")
    assert run.stderr == "/dev/zero: not a regular file; expected a text file\n"


# ---- line endings: CRLF and lone CR read as LF --------------------------------------------------

LINE_ENDED = [("fixtures/demo/dust_extractor_panel.cir", "--bom", "fixtures/demo/bom.csv"),
              ("fixtures/demo/dust_extractor_panel.edif", "--bom", "fixtures/demo/bom.csv")]


@pytest.mark.parametrize("ending", ["\r\n", "\r"], ids=["crlf", "cr"])
@pytest.mark.parametrize("netlist, flag, bom", LINE_ENDED, ids=["spice", "edif"])
def test_line_endings_give_the_same_report(tmp_path: Path, ending: str, netlist: str, flag: str,
                                           bom: str) -> None:
    reports = []
    for name, end in (("lf", "\n"), ("other", ending)):
        folder = tmp_path / name
        folder.mkdir()
        for source in (netlist, bom, "fixtures/demo/ledlint.toml"):
            text = (ROOT / source).read_text(encoding="utf-8")
            (folder / Path(source).name).write_bytes(text.replace("\n", end).encode("utf-8"))
        run = ledlint("check", Path(netlist).name, flag, Path(bom).name, "--format", "json",
                      cwd=folder)
        assert run.returncode in (0, 1) and run.stderr == ""
        reports.append(run.stdout)
    assert reports[0] == reports[1]
