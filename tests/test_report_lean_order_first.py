"""Findings ordered by their first part's text and the rest on a tie (lean_order's
``_finding_key_first``) against the plain order.

Expected values: the plain path of our own code, :func:`linter.report.common._order` (the
``natural_key`` tuples) and :func:`linter.report.common.ordered_findings`.
"""

from __future__ import annotations

import sys
from pathlib import Path

from hypothesis import given, settings, strategies as st

from linter.engine import CheckRequest, run_check
from linter.findings import Finding
from linter.report import lean_order
from linter.report.common import _order, ordered_findings
from linter.report.lean_order import lean_ordered_findings

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

_few = st.sampled_from(["D1", "D2", "D10", "d1", "D01", "R1", "U1.PA4", "U1.PA10", "", "0",
                        "+5V", "Straße", "STRASSE"])
"""Invented names, few, so that first parts tie often."""
_any = st.text(alphabet=st.sampled_from("0012349aAbBzZ_-./+ßİµ\u0660\x03"), max_size=6)
_name = st.one_of(_few, _any)

_findings = st.builds(
    Finding, st.sampled_from(["string-headroom", "a"]),
    st.sampled_from(["error", "warning", "info"]), st.sampled_from(["m", "n"]),
    st.lists(_name, max_size=4).map(tuple), st.lists(_few, max_size=2).map(tuple))


def _sign(a, b) -> int:
    return (a > b) - (a < b)


@settings(max_examples=300)
@given(_findings, _findings)
def test_two_keys_compare_as_the_plain_keys(a: Finding, b: Finding) -> None:
    lean_a, lean_b = lean_order._finding_key_first(a), lean_order._finding_key_first(b)
    assert _sign(lean_a, lean_b) == _sign(_order(a), _order(b))
    assert _sign(lean_a, lean_b) == _sign(lean_order._finding_key(a), lean_order._finding_key(b))


@settings(max_examples=300)
@given(st.lists(_findings, max_size=14))
def test_findings_in_the_plain_order(findings: list) -> None:
    plain = ordered_findings(findings)
    for lean in (lean_ordered_findings(findings), lean_ordered_findings(findings, first=False)):
        assert [id(f) for f in lean] == [id(f) for f in plain]  # the very objects, in order


def test_a_low_character_in_a_compared_rest_sends_the_list_the_plain_way() -> None:
    findings = [Finding("r", "error", "m", ("D1", "D\x012")),  # invented
                Finding("r", "error", "m", ("D1", "D\x001")),
                Finding("r", "error", "m", ("D1", "D3")),
                Finding("r", "error", "m", ("D2", "D\x01")),  # never compared past D2
                Finding("r", "error", "m", ("D0", "9" * 5))]
    assert [id(f) for f in lean_ordered_findings(findings)] == \
        [id(f) for f in ordered_findings(findings)]
    alone = findings[3:]
    assert [id(f) for f in lean_ordered_findings(alone)] == \
        [id(f) for f in ordered_findings(alone)]


def test_generated_board_in_the_plain_order(tmp_path: Path) -> None:
    files = write_all(generate(1500, seed=9), tmp_path / "board")
    result = run_check(CheckRequest(netlist=files["edif"], bom=files["bom"]))
    findings = result.findings
    assert sum(len(f.parts) > 1 for f in findings) > 20
    assert [id(f) for f in lean_ordered_findings(findings)] == \
        [id(f) for f in ordered_findings(findings)]
