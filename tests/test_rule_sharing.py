"""One board's rules shared between processes (linter.rule_sharing): the same findings as the
plain loop, element for element, and nothing lost when a child or a rule fails.

Expected values: the plain loop (``run_rules(..., processes=1)``) is the reference for every
list compared here; the process counts follow the module's documented policy.
"""

from __future__ import annotations

import io
import os
import pickle
import sys
import threading
from pathlib import Path

import pytest

from linter import rule_sharing
from linter.cli import main
from linter.engine import CheckRequest, analyse, load_check_modules, load_inputs, run_rules
from linter.findings import Finding
from linter.model import SourceLocation
from linter.rule_sharing import queue_order, shared_findings, usable_processes

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
from bench.gen_board import generate, write_all  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"

needs_fork = pytest.mark.skipif(not sys.platform.startswith("linux"),
                                reason="rules are shared by fork, on Linux")


@pytest.fixture(scope="module")
def board(tmp_path_factory):
    """A generated 1,500-part board, analysed, with the rule registry."""
    files = write_all(generate(1500, 5), tmp_path_factory.mktemp("shared"))
    registry = load_check_modules()
    context = analyse(load_inputs(CheckRequest(files["edif"], bom=files["bom"]), registry))
    return context, registry


@needs_fork
@pytest.mark.parametrize("processes", [2, 3])
def test_shared_rules_give_the_plain_list(board, processes: int) -> None:
    context, registry = board
    plain = run_rules(context, registry, processes=1)
    # the generated board has findings of several rules (seen when written: from memory),
    # so the list is put together from more than one process's share
    assert len(plain) > 100
    assert len({finding.rule for finding in plain}) >= 2
    assert run_rules(context, registry, processes=processes) == plain


@needs_fork
def test_a_rule_failing_in_a_child_is_run_here(board) -> None:
    context, registry = board
    parent = os.getpid()
    rule_ids = sorted(registry)

    def check(rule_id: str) -> list[Finding]:
        if os.getpid() != parent:
            raise RuntimeError("only in the child")
        return list(registry[rule_id]().check(context))

    found = shared_findings(rule_ids, check, 2)
    assert found == {rule_id: list(registry[rule_id]().check(context)) for rule_id in rule_ids}


@needs_fork
def test_a_child_that_dies_leaves_its_rules_here(board) -> None:
    context, registry = board
    parent = os.getpid()
    rule_ids = sorted(registry)

    def check(rule_id: str) -> list[Finding]:
        if os.getpid() != parent:
            os._exit(3)  # no message, no findings: as if killed
        return list(registry[rule_id]().check(context))

    found = shared_findings(rule_ids, check, 2)
    assert found == {rule_id: list(registry[rule_id]().check(context)) for rule_id in rule_ids}


@needs_fork
def test_a_rule_raising_here_asks_for_the_plain_loop() -> None:
    parent = os.getpid()

    def check(rule_id: str) -> list[Finding]:
        if os.getpid() == parent:
            raise ValueError(rule_id)
        return []

    assert shared_findings(["a", "b", "c"], check, 2) is None


@needs_fork
def test_rules_are_claimed_once_each() -> None:
    """Every rule is run by exactly one process: the children's claims come back, none twice."""
    ran_here: list[str] = []
    parent = os.getpid()
    rule_ids = [f"rule-{index:03}" for index in range(60)]

    def check(rule_id: str) -> list[Finding]:
        if os.getpid() == parent:
            ran_here.append(rule_id)
        return [Finding(rule_id, "info", f"ran in {os.getpid()}")]

    found = shared_findings(rule_ids, check, 3)
    assert sorted(found) == rule_ids
    assert all(len(findings) == 1 for findings in found.values())
    by_child = [rule_id for rule_id, findings in found.items()
                if findings[0].message != f"ran in {parent}"]
    assert not set(by_child) & set(ran_here)
    assert len(by_child) + len(ran_here) == len(rule_ids)


def test_too_few_processes_or_rules_ask_for_the_plain_loop() -> None:
    assert shared_findings(["a", "b"], lambda rule_id: [], 1) is None
    assert shared_findings(["a"], lambda rule_id: [], 2) is None
    assert shared_findings([f"r{i}" for i in range(257)], lambda rule_id: [], 2) is None


@needs_fork
def test_usable_processes(monkeypatch) -> None:
    monkeypatch.setattr(rule_sharing, "_cpus", lambda: 4)
    assert usable_processes(None, rule_sharing.MIN_GROUPS - 1) == 1
    assert usable_processes(None, rule_sharing.MIN_GROUPS) == 2
    assert usable_processes(1, 10 ** 6) == 1
    assert usable_processes(3, 5) == 3
    monkeypatch.setattr(rule_sharing, "_cpus", lambda: 1)
    assert usable_processes(None, 10 ** 6) == 1


def test_no_sharing_beside_another_thread(monkeypatch) -> None:
    monkeypatch.setattr(rule_sharing, "_cpus", lambda: 4)
    release = threading.Event()
    other = threading.Thread(target=release.wait)
    other.start()
    try:
        assert usable_processes(None, 10 ** 6) == 1
        assert usable_processes(2, 10 ** 6) == 1
    finally:
        release.set()
        other.join()


def test_queue_order_longest_first_then_by_id() -> None:
    ids = ["b-rule", "string-headroom", "a-rule", "shared-ballast"]
    assert queue_order(ids) == ["shared-ballast", "string-headroom", "a-rule", "b-rule"]


def test_findings_travel_whole() -> None:
    values = {"current_a": 0.0123, "limit_a": 0.02}
    findings = {"r": [Finding("r", "error", "m", ("D1", "D2"), ("N1",), "G-D1", values,
                              "make R1 220 Ω", SourceLocation("a.edif", 3, 7)),
                      Finding("r", "info", "n", location=None)]}
    out = io.BytesIO()
    rule_sharing._FindingsPickler(out, protocol=pickle.HIGHEST_PROTOCOL).dump(findings)
    back = pickle.loads(out.getvalue())
    assert back == findings
    assert back["r"][0].location == SourceLocation("a.edif", 3, 7)


@needs_fork
@pytest.mark.parametrize("fmt", ["json", "text", "sarif"])
def test_cli_report_is_the_same_with_shared_rules(monkeypatch, capsys, fmt: str) -> None:
    """The demo board (below the size limit, lowered here so that its rules are shared)."""
    monkeypatch.setattr(rule_sharing, "MIN_GROUPS", 0)
    monkeypatch.setattr(rule_sharing, "_cpus", lambda: 2)
    netlist, bom = str(DEMO / "dust_extractor_panel.edif"), str(DEMO / "bom.csv")
    outputs = []
    for jobs in ([], ["--jobs", "1"], ["--jobs", "2"]):
        code = main(["check", netlist, "--bom", bom, "--format", fmt, *jobs])
        outputs.append((code, capsys.readouterr().out))
    assert outputs[0][1]
    assert outputs[0] == outputs[1] == outputs[2]
