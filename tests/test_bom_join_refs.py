"""The BOM join makes a BOM line's references the circuit's own strings: the BOM stays equal
(same texts, same hash), each named reference is then the circuit's object, and the joined
circuit and discrepancies are those of the plain per-part join.

Expected values: the plain path of our own code (the BOM as read again from the same text,
and ``_plain_parts`` of tests/test_bom_join_fast.py, written with dataclasses.replace).
"""

from __future__ import annotations

from pathlib import Path

from linter.bom_join import apply_bom
from linter.readers import read_netlist
from linter.readers.bom import parse_bom, read_bom
from test_bom_join_fast import _plain_parts

DEMO = Path(__file__).resolve().parents[1] / "fixtures" / "demo"


def test_bom_refs_become_the_circuits_strings_and_the_bom_stays_equal() -> None:
    circuit = read_netlist(DEMO / "dust_extractor_panel.edif")
    text = (DEMO / "bom.csv").read_text(encoding="utf-8")
    bom, again = parse_bom(text, "bom.csv"), parse_bom(text, "bom.csv")
    joined, problems = apply_bom(circuit, bom)
    assert bom == again and hash(bom) == hash(again)
    keys = {ref: ref for ref in circuit.parts}
    for line in bom.lines:
        for ref in line.refs:
            if ref in keys:
                assert ref is keys[ref]
    assert dict(joined.parts) == _plain_parts(circuit, again)
    assert apply_bom(circuit, again) == (joined, problems)


def test_refs_alike_but_for_case_and_unknown_refs_keep_their_text() -> None:
    circuit = read_netlist(DEMO / "dust_extractor_panel.edif")
    bom = parse_bom('Ref,Value\n"r1, R1, X99",1k\n', "b.csv")
    joined, problems = apply_bom(circuit, bom)
    assert bom.lines[0].refs == ("r1", "R1", "X99")  # the BOM's own texts, case as written
    # r1 names R1 (any case), R1 then repeats it, X99 names nothing: the join's definition
    assert [p.kind for p in problems if p.kind in ("duplicate", "missing-from-netlist")] == \
        ["duplicate", "missing-from-netlist"]
    again = parse_bom('Ref,Value\n"r1, R1, X99",1k\n', "b.csv")
    assert dict(joined.parts) == _plain_parts(circuit, again)
