"""Many boards in one run: discovery, the BOM beside each netlist, the pool, one combined report.

Fixtures: fixtures/many/boards (alpha: a clean lamp with bom.csv; beta: three LEDs sharing a
resistor, with fan_bar_bom.csv; gamma: two lamp decks in one folder beside a bom.csv that must
not be taken, and another tool's S-expression .net that is no netlist of ours) and
fixtures/many/bad (a good lamp beside a torn deck whose line 3 lost a node).
Expected exit codes are DESIGN.md's (0 clean, 1 findings at or above --fail-on, 2 unusable input).
"""

from __future__ import annotations

import json
import os
import pickle
import shutil
from pathlib import Path

import jsonschema
import pytest
from report_samples import REPO

from linter.batch import (BoardTask, bom_beside, check_board, expand_inputs, find_netlists,
                          looks_like_netlist, plan_boards, run_boards)
from linter.cli import EXIT_BAD_INPUT, EXIT_CLEAN, EXIT_FINDINGS, main
from linter.cli_many import HTML_REFUSAL
from linter.errors import UsageError
from linter.report.json import SCHEMA_FILE

MANY = Path("fixtures") / "many"  # relative: the tests run in the repository (_in_repo)
BOARDS = MANY / "boards"
BAD = MANY / "bad"
ALPHA = BOARDS / "alpha" / "power_lamp.cir"
BETA = BOARDS / "beta" / "fan_bar.cir"
DOOR = BOARDS / "gamma" / "door.cir"
HOPPER = BOARDS / "gamma" / "hopper.cir"
TORN = BAD / "torn" / "torn.cir"
LAMP = BAD / "lamp" / "lamp.cir"
SARIF_SCHEMA = REPO.parent / "shared" / "schemas" / "sarif-schema-2.1.0.json"
"""The OASIS schema the SARIF reporter's tests use (tests/test_report_sarif.py)."""
JSON_VALIDATOR = jsonschema.Draft202012Validator(json.loads(SCHEMA_FILE.read_text("utf-8")))


def _run(argv: list[str], capsys: pytest.CaptureFixture[str]) -> tuple[int, str, str]:
    code = main(argv)
    captured = capsys.readouterr()
    return code, captured.out, captured.err


@pytest.fixture(autouse=True)
def _in_repo(monkeypatch: pytest.MonkeyPatch) -> None:
    """Relative paths in reports start from the repository (the SARIF base folder too)."""
    monkeypatch.chdir(REPO)


# --- discovery -----------------------------------------------------------------------------

def test_folder_discovery_sorted_by_path_skipping_other_tools_files() -> None:
    found = find_netlists(BOARDS)
    # the four decks of fixtures/many/boards; NOTES.txt, the BOMs, the TOMLs and the
    # S-expression hopper_other_tool.net are not netlists by the rule of linter.batch
    assert found == [ALPHA, BETA, DOOR, HOPPER]


def test_hidden_folders_hidden_files_and_virtualenvs_are_skipped(tmp_path: Path) -> None:
    shutil.copytree(BOARDS, tmp_path / "boards")
    for folder in (".git", ".cache", "venv", "env2"):
        (tmp_path / "boards" / folder).mkdir()
        shutil.copy(ALPHA, tmp_path / "boards" / folder / "lamp.cir")
    (tmp_path / "boards" / "venv" / "pyvenv.cfg").write_text("home = /usr\n", "utf-8")
    shutil.copy(ALPHA, tmp_path / "boards" / "alpha" / ".power_lamp.cir")  # an editor's copy
    found = [path.relative_to(tmp_path / "boards").as_posix()
             for path in find_netlists(tmp_path / "boards")]
    # env2 has no pyvenv.cfg: an ordinary folder of the user's, so its deck is checked
    assert found == ["alpha/power_lamp.cir", "beta/fan_bar.cir", "env2/lamp.cir",
                     "gamma/door.cir", "gamma/hopper.cir"]


def test_edif_by_content_whatever_the_suffix(tmp_path: Path) -> None:
    edif = tmp_path / "panel.export"
    edif.write_text("(edif panel (edifVersion 2 0 0))\n", "utf-8")
    plain = tmp_path / "notes.export"
    plain.write_text("* not a deck, just a note starting with a star\n", "utf-8")
    broken_edif = tmp_path / "broken.edif"
    broken_edif.write_text("(edfi oops\n", "utf-8")
    assert looks_like_netlist(edif)  # an EDIF file starts with (edif (DESIGN.md)
    assert not looks_like_netlist(plain)  # unknown suffix: only EDIF is told by content
    assert looks_like_netlist(broken_edif)  # a netlist suffix is checked, to report it broken


def test_named_paths_expand_once_each_in_path_order() -> None:
    netlists = expand_inputs([BOARDS / "gamma", BETA, BOARDS / "alpha", ALPHA,
                              Path("fixtures/many/boards/beta/fan_bar.cir")])
    assert netlists == [ALPHA, BETA, DOOR, HOPPER]


def test_a_folder_without_netlists_is_a_usage_error(tmp_path: Path) -> None:
    (tmp_path / "readme.txt").write_text("no boards here\n", "utf-8")
    with pytest.raises(UsageError, match="no netlist found below this folder"):
        expand_inputs([tmp_path])


# --- the BOM beside each netlist --------------------------------------------------------------

def test_bom_csv_beside_a_lone_netlist_is_taken() -> None:
    bom, note = bom_beside(ALPHA)
    assert bom == BOARDS / "alpha" / "bom.csv" and "found beside" in note


def test_a_single_star_bom_star_csv_is_taken_when_there_is_no_bom_csv() -> None:
    bom, _ = bom_beside(BETA)
    assert bom == BOARDS / "beta" / "fan_bar_bom.csv"


def test_no_bom_from_a_folder_of_two_netlists_and_the_report_says_why() -> None:
    bom, note = bom_beside(DOOR)
    assert bom is None and "holds 2 netlists" in note


def test_two_candidate_boms_take_none(tmp_path: Path) -> None:
    shutil.copy(ALPHA, tmp_path / "lamp.cir")
    for name in ("front_bom.csv", "BOM_rear.csv"):
        (tmp_path / name).write_text("References,Value\n", "utf-8")
    bom, note = bom_beside(tmp_path / "lamp.cir")
    assert bom is None and "2 files match" in note


def test_bom_option_with_several_netlists_is_refused() -> None:
    with pytest.raises(UsageError, match="--bom names one board"):
        plan_boards([ALPHA, BETA], bom=BOARDS / "alpha" / "bom.csv")


def test_the_bom_found_is_used(capsys) -> None:
    code, out, _ = _run(["check", str(BOARDS), "--format", "json"], capsys)
    boards = {Path(b["inputs"]["netlist"]).name: b for b in json.loads(out)["boards"]}
    # alpha's BOM gives R1 1 % and 0.25 W, so no unknown-part for R1 (the BOM is applied);
    # gamma's bom.csv is not taken, so door's R1 keeps an assumed tolerance (unknown-part)
    assert not [f for f in boards["power_lamp.cir"]["findings"] if f["rule"] == "unknown-part"]
    door_rules = {(f["rule"], tuple(f["parts"])) for f in boards["door.cir"]["findings"]}
    assert ("unknown-part", ("R1",)) in door_rules
    assert boards["door.cir"]["inputs"]["bom"] is None
    assert "holds 2 netlists" in boards["door.cir"]["inputs"]["bom_note"]
    assert not [f for f in boards["door.cir"]["findings"] if f["rule"] == "bom-mismatch"]


# --- the pool -------------------------------------------------------------------------------

def test_results_survive_pickling_for_the_pool() -> None:
    outcome = check_board(BoardTask(BETA, BOARDS / "beta" / "fan_bar_bom.csv"))
    assert outcome.readable
    outcome.result.circuit.graph  # the cached graph travels too
    again = pickle.loads(pickle.dumps(outcome))
    assert again.result.findings == outcome.result.findings
    assert [g.id for g in again.result.groups] == [g.id for g in outcome.result.groups]
    assert sorted(again.result.circuit.graph.nodes) == sorted(outcome.result.circuit.graph.nodes)


def test_pool_keeps_the_order_of_the_tasks() -> None:
    tasks = plan_boards([ALPHA, BETA, DOOR, HOPPER, LAMP, TORN])
    seen: list[str] = []
    outcomes = run_boards(tasks, jobs=2, on_done=lambda outcome: seen.append(outcome.task.netlist.name))
    assert [outcome.task for outcome in outcomes] == tasks
    assert sorted(seen) == sorted(task.netlist.name for task in tasks)
    assert [outcome.readable for outcome in outcomes] == [True] * 5 + [False]


@pytest.mark.parametrize("fmt", ["text", "json", "sarif"])
def test_same_report_bytes_for_one_and_two_jobs(fmt: str, capsys) -> None:
    runs = [_run(["check", str(BOARDS), str(BAD), "--format", fmt, "--jobs", jobs], capsys)
            for jobs in ("1", "2")]
    assert runs[0] == runs[1]
    assert runs[0][0] == EXIT_BAD_INPUT


def test_jobs_below_one_is_refused(capsys) -> None:
    code, out, err = _run(["check", str(BOARDS), "--jobs", "0"], capsys)
    assert (code, out) == (EXIT_BAD_INPUT, "") and "--jobs 0" in err and err.count("\n") == 1


# --- exit codes -----------------------------------------------------------------------------

def test_exit_code_is_the_worst_over_the_boards(capsys) -> None:
    # beta: three LEDs on one resistor, shared-ballast is an error by default (DESIGN.md)
    assert _run(["check", str(BOARDS), "-q"], capsys)[0] == EXIT_FINDINGS
    # alpha and gamma: no errors; gamma's unknown-part warnings count from --fail-on warning
    assert _run(["check", str(ALPHA), str(BOARDS / "gamma"), "-q"], capsys)[0] == EXIT_CLEAN
    assert _run(["check", str(ALPHA), str(BOARDS / "gamma"), "-q", "--fail-on", "warning"],
                capsys)[0] == EXIT_FINDINGS


def test_a_broken_board_among_good_ones(capsys) -> None:
    code, out, err = _run(["check", str(BAD), str(ALPHA)], capsys)
    assert code == EXIT_BAD_INPUT
    # the torn deck's third line is the R1 card that lost its node (the fixture itself)
    assert err.startswith("fixtures/many/bad/torn/torn.cir:3:1: ")
    assert err.count("\n") == 1
    assert "could not be read: fixtures/many/bad/torn/torn.cir:3:1:" in out
    assert out.count("\n== [") + out.startswith("== [") == 3  # one section per board
    last = out.rstrip("\n").splitlines()[-1]
    assert last.startswith("INCOMPLETE: 1 of 3 boards could not be read")


def test_one_unreadable_board_alone_gives_no_report(tmp_path: Path, capsys) -> None:
    shutil.copy(TORN, tmp_path / "torn.cir")
    code, out, err = _run(["check", str(tmp_path), "--format", "json"], capsys)
    assert (code, out) == (EXIT_BAD_INPUT, "")
    assert err.endswith("torn.cir:3:1: R1 needs 2 nodes (1 2), found 1\n")


# --- the combined reports -------------------------------------------------------------------

def test_text_has_a_section_per_board_and_one_total_line(capsys) -> None:
    code, out, _ = _run(["check", str(BOARDS)], capsys)
    headings = [line for line in out.splitlines() if line.startswith("== [")]
    assert headings == [
        f"== [1/4] {ALPHA}; BOM: fixtures/many/boards/alpha/bom.csv "
        "(bom.csv found beside the netlist)",
        f"== [2/4] {BETA}; BOM: fixtures/many/boards/beta/fan_bar_bom.csv "
        "(fan_bar_bom.csv found beside the netlist)",
        f"== [3/4] {DOOR}; BOM: none: fixtures/many/boards/gamma holds "
        "2 netlists, so no BOM is taken from it",
        f"== [4/4] {HOPPER}; BOM: none: fixtures/many/boards/gamma holds "
        "2 netlists, so no BOM is taken from it"]
    totals = [line for line in out.splitlines() if line.startswith("Total: ")]
    assert len(totals) == 1 and totals[0].startswith("Total: 4 boards, 4 read, 0 could not")
    assert "INCOMPLETE" not in out


def _board_reports_from_single_runs(netlists: list[Path], capsys) -> list[dict]:
    """Each board checked alone, with its BOM named by hand (the folder rule's choice)."""
    reports = []
    for netlist in netlists:
        bom, _ = bom_beside(netlist)
        argv = ["check", str(netlist), "--format", "json"]
        argv += ["--bom", str(bom)] if bom else []
        reports.append(json.loads(_run(argv, capsys)[1]))
    return reports


def test_json_combined_report_validates_and_holds_each_board_report(capsys) -> None:
    code, out, _ = _run(["check", "fixtures/many/boards", "--format", "json"], capsys)
    report = json.loads(out)
    assert list(JSON_VALIDATOR.iter_errors(report)) == []
    assert report["complete"] is True and report["unreadable"] == []
    singles = _board_reports_from_single_runs([ALPHA, BETA, DOOR, HOPPER], capsys)
    for board, single in zip(report["boards"], singles, strict=True):
        note = board["inputs"].pop("bom_note")
        assert note and board == single  # each board as its own report says, plus the note
    summary = report["summary"]
    assert summary["boards"] == 4 and summary["read"] == 4 and summary["unreadable"] == 0
    assert summary["parts"] == sum(single["summary"]["parts"] for single in singles)
    for severity in ("error", "warning", "info"):
        assert summary["findings"][severity] == sum(single["summary"]["findings"][severity]
                                                    for single in singles)


def test_json_combined_report_marks_unreadable_boards(capsys) -> None:
    code, out, _ = _run(["check", str(BAD), "--format", "json"], capsys)
    report = json.loads(out)
    assert code == EXIT_BAD_INPUT and list(JSON_VALIDATOR.iter_errors(report)) == []
    assert report["complete"] is False and len(report["boards"]) == 1
    [torn] = report["unreadable"]
    assert torn["location"] == {"file": str(TORN), "line": 3, "column": 1}


def test_schema_rejects_a_combined_report_that_breaks_its_contract(capsys) -> None:
    report = json.loads(_run(["check", str(BAD), "--format", "json"], capsys)[1])
    broken = [{**report, "complete": "no"},
              {**report, "boards": [{"netlist": "x.cir"}]},
              {key: value for key, value in report.items() if key != "unreadable"},
              {**report, "groups": []}]
    for case in broken:
        assert list(JSON_VALIDATOR.iter_errors(case)), case.keys()


def test_a_folder_with_one_netlist_keeps_the_one_board_json_form(capsys) -> None:
    code, out, _ = _run(["check", str(BOARDS / "alpha"), "--format", "json"], capsys)
    report = json.loads(out)
    assert "boards" not in report and list(JSON_VALIDATOR.iter_errors(report)) == []
    assert report["inputs"]["bom"].endswith("alpha/bom.csv")
    assert report["inputs"]["bom_note"] == "bom.csv found beside the netlist"


@pytest.fixture(scope="module")
def sarif_validator() -> jsonschema.Draft4Validator:
    """The official schema, as tests/test_report_sarif.py loads it; missing fails, never skips."""
    if not SARIF_SCHEMA.is_file():
        pytest.fail(f"the SARIF 2.1.0 schema is missing: {SARIF_SCHEMA}")
    return jsonschema.Draft4Validator(json.loads(SARIF_SCHEMA.read_text("utf-8")))


def test_sarif_one_run_with_every_boards_results(sarif_validator, capsys) -> None:
    code, out, _ = _run(["check", str(BOARDS), str(BAD), "--format", "sarif"], capsys)
    log = json.loads(out)
    assert list(sarif_validator.iter_errors(log)) == []
    [run] = log["runs"]
    files = {result["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]
             for result in run["results"]}
    assert {"fixtures/many/boards/beta/fan_bar.cir", "fixtures/many/boards/gamma/door.cir",
            "fixtures/many/boards/gamma/hopper.cir"} <= files
    rules = [rule["id"] for rule in run["tool"]["driver"]["rules"]]
    assert all(rules[result["ruleIndex"]] == result["ruleId"] for result in run["results"])
    [invocation] = run["invocations"]
    assert invocation["executionSuccessful"] is False
    [note] = invocation["toolExecutionNotifications"]
    where = note["locations"][0]["physicalLocation"]
    assert where["artifactLocation"]["uri"] == "fixtures/many/bad/torn/torn.cir"
    assert where["region"] == {"startLine": 3, "startColumn": 1}


def test_html_for_several_boards_is_refused_in_one_line(capsys) -> None:
    code, out, err = _run(["check", str(BOARDS), "--format", "html"], capsys)
    assert (code, out, err) == (EXIT_BAD_INPUT, "", HTML_REFUSAL + "\n")


def test_html_for_a_folder_with_one_netlist_is_one_page(capsys) -> None:
    code, out, _ = _run(["check", str(BOARDS / "alpha"), "--format", "html"], capsys)
    assert code == EXIT_CLEAN and out.startswith("<!DOCTYPE html>")


def test_output_may_not_be_a_bom_found_beside_a_netlist(capsys) -> None:
    bom = BOARDS / "alpha" / "bom.csv"
    before = bom.read_bytes()
    code, out, err = _run(["check", str(BOARDS), "-o", str(bom)], capsys)
    assert code == EXIT_BAD_INPUT and "is a BOM found beside a netlist" in err
    assert bom.read_bytes() == before


def test_quiet_prints_nothing_for_clean_boards(tmp_path: Path, capsys) -> None:
    for name in ("north", "south"):  # alpha is clean (no finding at all) with its BOM
        shutil.copytree(BOARDS / "alpha", tmp_path / name)
    assert _run(["check", str(tmp_path), "-q", "--fail-on", "info"], capsys)[:2] == (EXIT_CLEAN, "")


def test_a_named_pipe_below_the_folder_is_not_opened(tmp_path: Path) -> None:
    shutil.copy(ALPHA, tmp_path / "lamp.cir")
    os.mkfifo(tmp_path / "stream.cir")  # reading it would block until a writer comes
    assert find_netlists(tmp_path) == [tmp_path / "lamp.cir"]
