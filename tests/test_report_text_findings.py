"""The text report's finding lines written as text (text.print_text, _finding_text,
_folded, text_line.stripped) against the Line road and the plain functions.

Expected values: the plain path of our own code, ``str.translate(CONTROL_CODES)`` (itself
held to rich by tests/test_report_text_plain.py), :func:`linter.refs.fold_refs`, and the
:class:`~linter.report.text_line.Line` the reporter printed before.
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path
from types import MappingProxyType

from hypothesis import given, settings, strategies as st
from report_samples import placed_circuit, sample_result

from linter.engine import CheckRequest, run_check
from linter.findings import Finding
from linter.model import SourceLocation, stored_location
from linter.refs import fold_refs
from linter.report import text as text_report
from linter.report.common import finding_location
from linter.report.text_line import CONTROL_CODES, Line, stripped

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

_ODD = list("ab -:\n\r\t\x00\x07\x08\x0b\x0c\x0d\x1b\x7f\u0085\u2028\u0301\u03a9\U0001f600")


def test_stripped_is_translate_for_every_code_point() -> None:
    every = "".join(map(chr, range(sys.maxunicode + 1)))
    for start in range(0, len(every), 4096):
        chunk = every[start:start + 4096]
        assert stripped(chunk) == chunk.translate(CONTROL_CODES)
    for char in every[:0x3000]:
        assert stripped(char) == char.translate(CONTROL_CODES), hex(ord(char))


@given(st.one_of(st.text(max_size=60), st.text(alphabet=st.sampled_from(_ODD), max_size=30)))
def test_stripped_is_translate(text: str) -> None:
    assert stripped(text) == text.translate(CONTROL_CODES)


@given(st.lists(st.one_of(st.text(max_size=8), st.text(alphabet=st.sampled_from(_ODD),
                                                        max_size=8)), max_size=5))
def test_line_plain_is_each_piece_stripped(pieces: list) -> None:
    line = Line(*pieces[:1])
    for piece in pieces[1:]:
        line.append(piece)
    assert line.plain == "".join(piece.translate(CONTROL_CODES) for piece in pieces)


_refs = st.one_of(st.sampled_from(["D1", "D2", "D3", "D10", "d2", "R6", "S2/R7", "S1/R7",
                                   "U1.PA4", "D01", "", "0"]),
                  st.text(alphabet=st.sampled_from("D0129/.-"), max_size=4))


@settings(max_examples=300)
@given(st.lists(_refs, min_size=1, max_size=5).map(tuple))
def test_folded_is_fold_refs(parts: tuple) -> None:
    assert text_report._folded(parts) == fold_refs(parts)


def test_hand_made_lists_fold_as_fold_refs() -> None:
    lists = [("D3", "D1", "D2"), ("D1", "D2"), ("D2", "D1"), ("D1", "D1"), ("D1", "D2", "D2"),
             ("D01", "D1"), ("D1", "D01"), ("D10", "d2"),
             ("D1", "D2", "D3", "D5"), ("d1", "D1"), ("S2/R7", "S1/R7"), ("R6",), ("",)]
    for parts in lists:  # invented designators
        assert text_report._folded(parts) == fold_refs(parts)
    assert text_report._folded(lists[0]) == "D1\u2013D3"  # fold_refs' own doctest form


_findings = st.builds(
    Finding, st.sampled_from(["led-overcurrent", "a\x07b"]),
    st.sampled_from(["error", "warning", "info"]),
    st.one_of(st.text(max_size=20), st.text(alphabet=st.sampled_from(_ODD), max_size=20)),
    st.lists(_refs, max_size=4).map(tuple),
    location=st.none() | st.builds(SourceLocation, st.sampled_from(["b.cir", "a\tb.edif"]),
                                   st.integers(1, 99), st.integers(1, 9)),
    fix=st.none() | st.text(alphabet=st.sampled_from(_ODD), max_size=10))


@settings(max_examples=300)
@given(_findings)
def test_finding_text_is_the_finding_line(finding: Finding) -> None:
    result = sample_result()
    line = text_report._finding_line(finding, result)
    assert stripped(text_report._finding_text(finding, result)) == line.plain
    fast, slow = text_report._Lines(color=False), text_report._Lines(color=False)
    fast.print_text(text_report._finding_text(finding, result), text_report._finding_line,
                    finding, result)
    slow.print(line)
    if finding.fix:
        fast.print_text(f"    fix: {finding.fix}", text_report._fix_line, finding.fix)
        slow.print(Line(f"    fix: {finding.fix}"))
    assert fast.take() == slow.take()


def test_sample_findings_text_is_the_finding_line() -> None:
    result = sample_result()
    for finding in result.findings:
        assert text_report._finding_text(finding, result) == \
            "".join(text_report._finding_line(finding, result)._texts)


def test_where_text_is_the_location_written() -> None:
    circuit = placed_circuit("a:b\tc.edif")
    findings = [Finding("r", "info", "m", parts)  # invented
                for parts in [("R1",), ("R2", "R1"), ("R3",), ("R4",), ("U1.PA4",), ("X9", "R2"),
                              ()]]
    findings.append(Finding("r", "info", "m", ("R1",), location=SourceLocation("d", 2, 3)))
    for finding in findings:
        where = finding_location(finding, circuit)
        assert text_report._where_text(finding, circuit) == \
            (f"{where}: " if where is not None else "")
    proxy = replace(circuit, parts=MappingProxyType(dict(circuit.parts)))
    assert text_report._where_text(findings[0], proxy) == "a:b\tc.edif:3:9: "


def test_generated_board_finding_texts_are_the_finding_lines(tmp_path: Path) -> None:
    files = write_all(generate(1500, seed=4), tmp_path / "board")
    result = run_check(CheckRequest(netlist=files["edif"], bom=files["bom"]))
    parts = result.circuit.parts
    assert sum(f.location is None and bool(f.parts) and f.parts[0] in parts
               and type(stored_location(parts[f.parts[0]])) is int for f in result.findings) > 10
    for finding in result.findings:
        assert text_report._finding_text(finding, result) == \
            "".join(text_report._finding_line(finding, result)._texts)
