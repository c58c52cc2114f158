"""The report orders sorted by short texts (linter.report.lean_order) against the plain sorts.

Expected values: the plain path of our own code, ``natural_key`` tuples
(:func:`linter.refs.natural_key`), :func:`linter.report.common.ordered_findings` and
:func:`linter.report.common.sorted_records`.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from hypothesis import given, strategies as st

from linter.engine import CheckRequest, run_check
from linter.findings import Finding
from linter.refs import natural_key
from linter.report.common import ordered_findings, sorted_records
from linter.report.lean_order import (lean_ordered_findings, lean_sorted_records, name_text,
                                      names_text)

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"

_names = st.text(alphabet=st.sampled_from("0012349aAbBzZ_-./+ßİﬃµΩ\u0660\u0661\x03\x7f"),
                 max_size=10)
"""Invented names: digits (leading zeros, Arabic-Indic digits), letters of both cases,
letters that casefold to several (ß, ﬃ) or with a dot (İ), separators, the lowest allowed
character."""


def _sign(a, b) -> int:
    return (a > b) - (a < b)


@given(_names, _names)
def test_a_name_text_compares_as_its_natural_key(a: str, b: str) -> None:
    assert _sign(name_text(a), name_text(b)) == _sign(natural_key(a), natural_key(b))


@given(st.lists(_names, max_size=4), st.lists(_names, max_size=4))
def test_a_list_text_compares_as_its_tuple_of_keys(a: list, b: list) -> None:
    plain_a = tuple(natural_key(name) for name in a)
    plain_b = tuple(natural_key(name) for name in b)
    assert _sign(names_text(a), names_text(b)) == _sign(plain_a, plain_b)


def test_hand_made_names_sort_as_the_plain_key() -> None:
    names = ["D10", "D2", "d1", "D01", "D1", "D", "", "R1", "R10", "R1a", "R1A", "R1.1",
             "U1.PA4", "U1.PA10", "G12_N1", "G12_NB", "g12_n01", "0", "00", "9" * 40,
             "1" + "0" * 50, "+5V", "+12V", "GND", "a1b2c3d4", "A1B2C3D4", "Straße", "STRASSE"]
    assert sorted(names, key=name_text) == sorted(names, key=natural_key)


def test_casefolding_never_makes_a_marker() -> None:
    # the guard looks at the name only: what casefolds into the chunks must stay above \x02
    for code in range(3, sys.maxunicode + 1):
        folded = chr(code).casefold()
        assert min(folded) >= "\x03", hex(code)


_findings = st.builds(
    Finding, st.sampled_from(["string-headroom", "led-overcurrent", "a"]),
    st.sampled_from(["error", "warning", "info"]), st.sampled_from(["m", "n", ""]),
    st.lists(_names, max_size=3).map(tuple), st.lists(_names, max_size=2).map(tuple))


@given(st.lists(_findings, max_size=12))
def test_findings_in_the_plain_order(findings: list) -> None:
    assert lean_ordered_findings(findings) == ordered_findings(findings)
    assert lean_ordered_findings(iter(findings)) == ordered_findings(findings)


def test_a_name_with_a_low_character_sends_the_list_the_plain_way() -> None:
    findings = [Finding("r", "error", "m", ("D\x012",)), Finding("r", "error", "m", ("D\x001",)),
                Finding("r", "error", "m", ("D1",))]
    assert lean_ordered_findings(findings) == ordered_findings(findings)


@pytest.mark.parametrize("suffix", ["edif", "cir"])
def test_demo_orders_are_the_plain_orders(suffix: str) -> None:
    result = run_check(CheckRequest(netlist=DEMO / f"dust_extractor_panel.{suffix}",
                                    bom=DEMO / "bom.csv"))
    assert lean_ordered_findings(result.findings) == ordered_findings(result.findings)
    assert lean_sorted_records(result.groups) == sorted_records(result.groups)


def test_generated_board_orders_are_the_plain_orders(tmp_path: Path) -> None:
    files = write_all(generate(1500, seed=9), tmp_path / "board")
    result = run_check(CheckRequest(netlist=files["edif"], bom=files["bom"]))
    assert len(result.findings) > 20
    assert lean_ordered_findings(result.findings) == ordered_findings(result.findings)
    assert lean_sorted_records(result.groups) == sorted_records(result.groups)
