"""The bulk BOM join (:func:`linter.bom_join.apply_bom`: lines taken in one update, the join
worked out once per line and part reading, fields handed to the parts in bulk, and with
``fresh=True`` stored into the just-read parts in place) gives exactly what the plain part by
part join (:func:`linter.bom_join.apply_bom_plain`) gives: the same parts, the same
discrepancies in the same order, the same BOM references.

Expected values: the plain path of our own code, run on a second reading of the same files
(a fresh join changes the parts it is given).
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Callable

import pytest
from hypothesis import given
from hypothesis import strategies as st

from linter.bom_join import _folded, _picked, apply_bom, apply_bom_plain
from linter.model import Circuit, DeviceModel, Part, Pin, SourceLocation
from linter.readers import read_netlist
from linter.readers.bom import Bom, parse_bom, read_bom

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"


def _agree(read_circuit: Callable[[], Circuit], read: Callable[[], Bom]) -> None:
    """The plain join, the bulk join and the fresh bulk join, each on its own reading."""
    plain_bom = read()
    plain, plain_problems = apply_bom_plain(read_circuit(), plain_bom)
    for fresh in (False, True):
        circuit, bom = read_circuit(), read()
        before = dict(circuit.parts)
        joined, problems = apply_bom(circuit, bom, fresh=fresh)
        assert problems == plain_problems
        assert list(joined.parts) == list(plain.parts)
        assert dict(joined.parts) == dict(plain.parts)
        for ref, part in joined.parts.items():  # (field by field: properties are no hash key)
            other = plain.parts[ref]
            assert part.properties == other.properties and part.part_number == other.part_number
            assert part.location == other.location and part.model == other.model
        assert joined.nets == plain.nets and joined.notes == plain.notes
        assert [line.refs for line in bom.lines] == [line.refs for line in plain_bom.lines]
        assert bom == plain_bom
        if not fresh:  # the given parts are left as they were
            assert all(before[ref] is part for ref, part in circuit.parts.items())
            assert dict(circuit.parts) == before


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo(netlist: str) -> None:
    _agree(lambda: read_netlist(DEMO / netlist), lambda: read_bom(DEMO / "bom.csv"))


@pytest.fixture(scope="module")
def generated(tmp_path_factory: pytest.TempPathFactory) -> Path:
    sys.path.insert(0, str(ROOT))
    try:
        from bench.gen_board import generate, write_all
    finally:
        sys.path.remove(str(ROOT))
    folder = tmp_path_factory.mktemp("board")
    write_all(generate(800, seed=11), folder)
    return folder


@pytest.mark.parametrize("netlist, bom", [("board.edif", "bom.csv"),
                                          ("board_hier.edif", "bom_hier.csv"),
                                          ("board.cir", "bom.csv"),
                                          ("board.edif", "bom_hier.csv")])
def test_generated(generated: Path, netlist: str, bom: str) -> None:
    _agree(lambda: read_netlist(generated / netlist), lambda: read_bom(generated / bom))


_HERE = SourceLocation("t.cir", 3, 1)
_DIODE = DeviceModel("DX", "D", {"IS": 1e-12})


def _made(fmt: str = "edif") -> Circuit:
    pins = (Pin("1", "a"), Pin("2", "b"))
    shared = {"package": "0603"}
    rows = [("R1", "resistor", "4k7", 4700.0, None, shared, None),
            ("r1", "resistor", "4k7", 4700.0, None, shared, None),
            ("R2", "resistor", "4k7", None, None, shared, None),
            ("R3", "resistor", "1k", 1000.0, None, {}, None),
            ("R4", "resistor", "1k", 1000.0, None, {}, None),
            ("D1", "led", "RED", None, "LX-1", {"color": "red"}, None),
            ("D2", "led", "DX", None, "DX", {}, _DIODE),
            ("D3", "diode", "DX", None, None, {}, _DIODE),
            ("V1", "source", "5", 5.0, None, {}, None),
            ("Q1", "npn", "BC", None, "QN-1", {}, None),
            ("C1", "capacitor", None, None, None, {}, None),
            ("J1", "connector", "HDR", None, None, shared, None)]
    parts = {ref: Part(ref, kind, value, pins, _HERE, si, ref, kind.upper(), number,
                       properties, model)
             for ref, kind, value, si, number, properties, model in rows}
    return Circuit("t", fmt, parts, {})  # type: ignore[arg-type]


_BOMS = {
    "every kind of disagreement": (
        "Ref,Value,Qty,Package,Power,Part,DNP\n"
        '"R1, R2",4.7k,3,0603,0.1W,,\n'          # quantity; R1 also names r1? no: r1 folds to R1
        '"R3 R4",1k,2,0805,,,\n'
        "R3,2k,1,,,,\n"                            # R3 listed twice
        "D1,GREEN,1,0603,,LX-2,\n"                 # value and part number disagree
        "D2,DX,1,,,DX,\n"                          # a SPICE model name as value
        "D3,DX,,,,,yes\n"                          # do not populate
        "Q1,BC,1,SOT23,,qn-1,\n"                   # part numbers alike but for case
        '"X9, J1, J1",HDR,3,,,,\n'                 # unknown ref, a ref twice in one line
        "C1,100n,1,,,,x\n"),
    "plain lines": "Ref,Value\n\"R1, R2, R3, R4\",4k7\n\"D1, D2\",RED\n",
    "case of refs": "Ref,Value\n\"r1, d1, q1\",4k7\nR1,4k7\n",
    "nothing listed": "Ref,Value\nZ1,1\n",
}


@pytest.mark.parametrize("fmt", ["edif", "spice"])
@pytest.mark.parametrize("name", sorted(_BOMS))
def test_made_circuits(fmt: str, name: str) -> None:
    _agree(lambda: _made(fmt), lambda: parse_bom(_BOMS[name], "b.csv"))


def test_fresh_changes_the_given_parts_only_in_properties_and_part_number() -> None:
    circuit = _made()
    before = {ref: (part.ref, part.kind, part.value, part.pins, part.location, part.value_si,
                    part.path, part.cell, part.model) for ref, part in circuit.parts.items()}
    joined, _ = apply_bom(circuit, parse_bom(_BOMS["every kind of disagreement"], "b.csv"),
                          fresh=True)
    for ref, part in joined.parts.items():
        assert part is circuit.parts[ref]
        assert (part.ref, part.kind, part.value, part.pins, part.location, part.value_si,
                part.path, part.cell, part.model) == before[ref]


@given(st.lists(st.text()))
def test_folded_is_casefold_of_each(texts: list[str]) -> None:
    # Expected: str.casefold applied to each text, the plain definition.
    assert _folded(texts) == [text.casefold() for text in texts]


@pytest.mark.parametrize("texts", [[], [""], ["", ""], ["a\0b", "C"], ["ß", "Σ", "ΣΑ", "K"]])
def test_folded_edge_texts(texts: list[str]) -> None:
    assert _folded(texts) == [text.casefold() for text in texts]


@pytest.mark.parametrize("places", [[], [2], [3, 0, 3, 1]])
def test_picked_is_indexing(places: list[int]) -> None:
    items = ["a", "b", "c", "d"]
    assert _picked(items, places) == [items[place] for place in places]
