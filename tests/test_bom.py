"""BOM reader and the BOM-to-netlist join (bom-mismatch)."""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, strategies as st

from linter.bom_join import apply_bom
from linter.cli import main
from linter.errors import BomError
from linter.model import Circuit, Net, Part, Pin, SourceLocation
from linter.readers import read_netlist
from linter.readers.bom import expand_references, parse_bom, read_bom

ROOT = Path(__file__).resolve().parent.parent
FIXTURES = ROOT / "fixtures"
DEMO = FIXTURES / "demo"
AT = SourceLocation("t.cir", 1, 1)


def circuit_of(*parts: tuple[str, str, str | None], fmt: str = "edif") -> Circuit:
    """A circuit of two-pin parts (ref, kind, value) all between nets A and B."""
    built = {ref: Part(ref, kind, value, (Pin("1", "A"), Pin("2", "B")), AT)
             for ref, kind, value in parts}
    nets = {name: Net(name, tuple((ref, pin) for ref in built for pin in ("1", "2")), AT)
            for name in ("A", "B")}
    return Circuit("t.cir", fmt, built, nets)


# ---- reading ---------------------------------------------------------------------------------

def test_aliases_ranges_semicolons_and_fitted_column():
    bom = read_bom(FIXTURES / "bom" / "spellings.csv")
    refs = [line.refs for line in bom.lines]
    # the file lists "R1, R2", "R3 – R5" (en dash), R6, R7 (written by hand for this test)
    assert refs == [("R1", "R2"), ("R3", "R4", "R5"), ("R6",), ("R7",)]
    first = bom.lines[0]
    assert (first.value, first.quantity, first.package, first.power, first.tolerance) == \
        ("4K7", 2, "0603", "1/4W", "±1%")
    assert (first.line, first.column) == (2, 1)
    assert [line.dnp for line in bom.lines] == [False, False, True, True]  # Fitted=no; value DNP


def test_utf8_byte_order_mark_and_dnp_column():
    bom = read_bom(FIXTURES / "bom" / "utf8_bom.csv")
    assert bom.fields[0] == "references"  # the mark did not stick to the first header
    assert [(line.refs, line.dnp) for line in bom.lines] == [(("R1",), False), (("R2",), True)]


def test_quoted_cell_with_line_break_and_doubled_quotes():
    bom = parse_bom('Ref,Description\n"R1,\nR2","a ""quoted"" word"\nR3,x\n', "q.csv")
    assert bom.lines[0].refs == ("R1", "R2")
    assert bom.lines[0].description == 'a "quoted" word'
    assert bom.lines[1].line == 4  # the quoted cell spanned lines 2 and 3


@pytest.mark.parametrize("cell, expected", [
    ("R1-R4", ("R1", "R2", "R3", "R4")),
    ("R1 - R3, C1", ("R1", "R2", "R3", "C1")),
    ("D7\u2013D9", ("D7", "D8", "D9")),
    ("R1-4", ("R1", "R2", "R3", "R4")),
    ("S2/R7-S2/R8", ("S2/R7", "S2/R8")),
    ("LED-A", ("LED-A",)),
])
def test_reference_cells(cell, expected):
    assert expand_references(cell) == expected


@pytest.mark.parametrize("cell, message", [
    ("R4-R1", "x.csv:3:2: reference range 'R4-R1' runs backwards"),
    ("R1-C4", "x.csv:3:2: reference range 'R1-C4' mixes prefixes 'R' and 'C'"),
])
def test_bad_ranges(cell, message):
    with pytest.raises(BomError) as caught:
        expand_references(cell, "x.csv", 3, 2)
    assert str(caught.value) == message


def test_quantity_must_be_whole():
    with pytest.raises(BomError) as caught:
        parse_bom("Ref,Qty\nR1,two\n", "q.csv")
    assert str(caught.value) == "q.csv:2:4: quantity 'two' is not a whole number"


BAD = FIXTURES / "bad" / "bom"


@pytest.mark.parametrize("name, message", [
    ("no_header.csv", "no_header.csv:1:1: no header row; the first line must name the columns "
                      "(such as References, Value, Qty)"),
    ("no_reference_column.csv", "no_reference_column.csv:1:1: no reference column; expected a "
                                "column named References, Ref, Designator or RefDes"),
    ("empty.csv", "empty.csv:1:1: empty file; expected a CSV bill of materials with a header row"),
    ("binary.csv", "binary.csv:2:5: binary data (NUL byte); expected a text file"),
    ("unclosed_quote.csv", "unclosed_quote.csv:3:1: quoted cell never closes "
                           "(no matching '\"' before the end of the file)"),
])
def test_bad_bom_exits_2_with_located_message(name, message, capsys):
    code = main(["check", str(DEMO / "dust_extractor_panel.cir"), "--bom", str(BAD / name)])
    captured = capsys.readouterr()
    assert code == 2
    assert captured.err == f"{BAD / name}".removesuffix(name) + message + "\n"
    assert captured.out == ""


# ---- joining -----------------------------------------------------------------------------------

@pytest.mark.parametrize("netlist_value, bom_value", [
    ("4k7", "4.7k"), ("4k7", "4700"), ("4K7", "4k7"), ("330", "330R"), ("2R2", "2.2"),
    ("100n", "0.1u"), ("10u", "10µF"),
])
def test_equal_values_in_other_spellings_are_never_flagged(netlist_value, bom_value):
    # pairs equal by IEC 60062 (RKM) and SI-prefix reading
    kind = "capacitor" if netlist_value.endswith(("n", "u")) else "resistor"
    circuit = circuit_of(("R1", kind, netlist_value))
    _, problems = apply_bom(circuit, parse_bom(f"Ref,Value\nR1,{bom_value}\n", "b.csv"))
    assert problems == ()


@given(st.integers(min_value=1, max_value=999), st.sampled_from(["", "k", "M"]))
def test_rkm_and_decimal_spellings_agree(mantissa, prefix):
    # 47 + "k" -> "4k7" (IEC 60062) and "4.7k" denote one value
    text = str(mantissa)
    if len(text) < 2:
        return
    rkm = f"{text[0]}{prefix or 'R'}{text[1:]}"
    decimal = f"{text[0]}.{text[1:]}{prefix}"
    circuit = circuit_of(("R1", "resistor", rkm))
    _, problems = apply_bom(circuit, parse_bom(f"Ref,Value\nR1,{decimal}\n", "b.csv"))
    assert problems == ()


def test_joined_properties_and_part_number():
    circuit = circuit_of(("R1", "resistor", "1k"), ("D1", "led", "RED"))
    bom = parse_bom("Ref,Value,Package,Power,Tolerance,MPN\nR1,1k,0603,1/10W,1%,\n"
                    "D1,red,0603,,,LX-R0603\n", "b.csv")
    joined, problems = apply_bom(circuit, bom)
    assert problems == ()
    assert dict(joined.parts["R1"].properties) == {"package": "0603", "power": "1/10W",
                                                   "tolerance": "1%"}
    assert joined.parts["D1"].part_number == "LX-R0603"
    assert circuit.parts["D1"].part_number is None  # the input circuit is untouched


def test_spice_sources_need_no_bom_line():
    circuit = circuit_of(("V1", "source", "DC 5"), ("R1", "resistor", "1k"), fmt="spice")
    _, problems = apply_bom(circuit, parse_bom("Ref,Value\nR1,1k\n", "b.csv"))
    assert problems == ()


def test_dnp_part_has_no_value_check():
    circuit = circuit_of(("R1", "resistor", "1k"))
    joined, problems = apply_bom(circuit, parse_bom("Ref,Value\nR1,DNP\n", "b.csv"))
    assert problems == ()
    assert joined.parts["R1"].properties["dnp"] == "yes"


def test_demo_bom_agrees_with_both_netlists():
    bom = read_bom(DEMO / "bom.csv")
    for name in ("dust_extractor_panel.edif", "dust_extractor_panel.cir"):
        circuit = read_netlist(DEMO / name, opaque={"KM8C28"})
        _, problems = apply_bom(circuit, bom)
        assert problems == (), (name, problems)


def test_mismatching_bom_lists_each_planted_error():
    # fixtures/bom/mismatch.csv is the demo BOM with five planted errors (see the test name)
    circuit = read_netlist(DEMO / "dust_extractor_panel.edif")
    _, problems = apply_bom(circuit, read_bom(FIXTURES / "bom" / "mismatch.csv"))
    found = sorted((problem.kind, problem.refs) for problem in problems)
    assert found == [
        ("duplicate", ("R5",)),
        ("missing-from-bom", ("R17",)),
        ("missing-from-netlist", ("R99",)),
        ("quantity", ("D7", "D8", "D9", "D10")),
        ("value", ("R12",)),
    ]
    value = next(problem for problem in problems if problem.kind == "value")
    assert value.values == {"netlist_value": 1000.0, "bom_value": 1200.0}  # 1k and 1k2 (RKM)
    assert "the analysis uses the netlist's value" in value.message


def test_bom_mismatch_findings_through_the_cli(capsys):
    code = main(["check", str(DEMO / "dust_extractor_panel.edif"), "--bom",
                 str(FIXTURES / "bom" / "mismatch.csv"), "--format", "json"])
    import json

    report = json.loads(capsys.readouterr().out)
    rules = [finding["rule"] for finding in report["findings"]]
    assert rules.count("bom-mismatch") == 5
    assert code == 1  # bom-mismatch is an error by default (DESIGN.md)
