"""The EDIF 2.0.0 reader: the demo board against its spec, hierarchy naming, renames, arrays,
properties, kinds and locations.

Where expected values come from is said beside each check: fixtures/demo/BOARD.md (the demo
board's spec, parsed here independently of the reader), the fixture text read by hand, the
EDIF 2.0.0 rules (rename keeps the display text; member 0 is the leftmost array element;
(e m x) is m × 10^x; identifiers are case-insensitive), or IEC 60062 for resistor values.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.errors import NetlistError
from linter.readers.edif import read_edif

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "fixtures" / "demo" / "dust_extractor_panel.edif"
HIER = ROOT / "fixtures" / "edif" / "hierarchical.edif"
ARRAYS = ROOT / "fixtures" / "edif" / "arrays_renamed.edif"


def read(path: Path):
    return read_edif(path.read_text(encoding="utf-8"), str(path))


def board_rows() -> list[list[str]]:
    """The parts table of BOARD.md: ref, kind, value, part number, package, pins."""
    rows = []
    for line in (ROOT / "fixtures" / "demo" / "BOARD.md").read_text(encoding="utf-8").splitlines():
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        if len(cells) == 6 and re.fullmatch(r"[A-Z]+[0-9]+", cells[0]):
            rows.append(cells)
    return rows


def position_in(text: str, needle: str) -> tuple[int, int]:
    """Line and column of the first ``needle`` in ``text``, by plain string search."""
    offset = text.index(needle)
    return text.count("\n", 0, offset) + 1, offset - (text.rfind("\n", 0, offset) + 1) + 1


# --- the demo board ------------------------------------------------------------------------

def test_demo_has_every_part_and_pin_of_the_spec():
    circuit = read(DEMO)
    rows = board_rows()
    assert len(rows) == 50  # BOARD.md lists 50 parts (J1…D19)
    assert sorted(circuit.parts) == sorted(row[0] for row in rows)
    for ref, _kind, value, part_number, package, pins in rows:
        part = circuit.parts[ref]
        expected_pins = dict(pin.split(":") for pin in pins.split())  # from BOARD.md
        assert {pin.name: pin.net for pin in part.pins} == expected_pins, ref
        assert part.value == (value or None), ref
        assert part.part_number == (part_number or None), ref
        assert part.properties.get("footprint") == package, ref


def test_demo_nets_are_the_nets_of_the_spec():
    circuit = read(DEMO)
    expected: dict[str, set[tuple[str, str]]] = {}
    for ref, *_, pins in board_rows():  # from BOARD.md
        for pin in pins.split():
            name, net = pin.split(":")
            expected.setdefault(net, set()).add((ref, name))
    assert {name: set(net.pins) for name, net in circuit.nets.items()} == expected
    assert {"+12V", "+5V", "GND"} <= set(circuit.nets)  # rails named through rename (BOARD.md)
    assert circuit.design == "DX40_PANEL"  # the (design ...) form of the fixture
    assert circuit.format == "edif"


def test_demo_kinds():
    circuit = read(DEMO)
    kinds = {ref: part.kind for ref, part in circuit.parts.items()}
    # from BOARD.md: D1–D18 are LEDs, D19 is a flyback diode (not an LED)
    assert all(kinds[f"D{i}"] == "led" for i in range(1, 19))
    assert kinds["D19"] == "diode"
    # from BOARD.md: Q1, Q3 NPN; Q2 N-MOSFET; R1–R17 resistors; C1–C4 capacitors
    assert (kinds["Q1"], kinds["Q2"], kinds["Q3"]) == ("npn", "nmos", "npn")
    assert all(kinds[f"R{i}"] == "resistor" for i in range(1, 18))
    assert all(kinds[f"C{i}"] == "capacitor" for i in range(1, 5))
    assert (kinds["SW1"], kinds["J1"]) == ("switch", "connector")


def test_demo_resistor_values_in_ohms():
    circuit = read(DEMO)
    # values from BOARD.md, read as IEC 60062 / SI-prefix text: 1k = 1000 Ω, 100k = 100 000 Ω
    assert circuit.parts["R12"].value_si == 1000.0
    assert circuit.parts["R8"].value_si == 100_000.0
    assert circuit.parts["R9"].value_si == 91.0
    assert circuit.parts["C1"].value_si is None  # only resistors get a value in ohms


def test_demo_locations_point_at_the_instance_and_net_forms():
    text = DEMO.read_text(encoding="utf-8")
    circuit = read(DEMO)
    # positions found by string search in the fixture text, independent of the reader
    for ref in ("J1", "R12", "D19"):
        line, column = position_in(text, f"(instance {ref}\n")
        location = circuit.parts[ref].location
        assert (location.file, location.line, location.column) == (str(DEMO), line, column)
    line, column = position_in(text, '(net (rename &_5V "+5V")')
    assert (circuit.nets["+5V"].location.line, circuit.nets["+5V"].location.column) == (line, column)


# --- hierarchy -----------------------------------------------------------------------------

def test_hierarchy_paths_only_where_ambiguous():
    circuit = read(HIER)
    # by hand from the fixture: LED_CHANNEL (R1, D1) is placed as S1 and S2; SUPPLY (C1, R9)
    # once as S3; J1 on the top sheet
    assert sorted(circuit.parts) == sorted(["J1", "S1/R1", "S1/D1", "S2/R1", "S2/D1", "C1", "R9"])
    assert circuit.parts["C1"].path == "S3/C1"
    assert circuit.parts["S2/R1"].path == "S2/R1"
    assert circuit.parts["J1"].path == "J1"


def test_hierarchy_nets_merge_through_ports_and_take_the_top_name():
    circuit = read(HIER)
    # by hand: +12V on the top sheet reaches DRIVE of S1, S2 and VIN of S3
    assert set(circuit.nets["+12V"].pins) == {("J1", "1"), ("S1/R1", "1"), ("S2/R1", "1"),
                                              ("C1", "1"), ("R9", "1")}
    assert set(circuit.nets["GND"].pins) == {("J1", "2"), ("S1/D1", "K"), ("S2/D1", "K"),
                                             ("C1", "2"), ("R9", "2")}
    assert set(circuit.nets["+12V"].aliases) == {"S1/DRIVE_IN", "S2/DRIVE_IN", "S3/VIN_LOCAL"}
    # LED_A exists once per channel: ambiguous, so each takes its path
    assert set(circuit.nets["S1/LED_A"].pins) == {("S1/R1", "2"), ("S1/D1", "A")}
    assert set(circuit.nets) == {"+12V", "GND", "S1/LED_A", "S2/LED_A"}


def test_hierarchy_port_rename_does_not_change_connectivity():
    circuit = read(HIER)
    # RTN is renamed "0V" in LED_CHANNEL: still joined to GND (by hand from the fixture)
    assert circuit.parts["S1/D1"].pin("K").net == "GND"
    assert circuit.parts["S1/D1"].kind == "led"  # value RED (colour word)


# --- arrays, members, renames, properties, keyword case ---------------------------------------

def test_arrays_and_members():
    circuit = read(ARRAYS)
    rn1 = {pin.name: pin.net for pin in circuit.parts["RN1"].pins}
    # net array DRV[3:0] joined to array ports element by element (EDIF: element i to
    # element i); U1's Q has no range in its name, so its elements are Q[0]..Q[3]
    assert [pin.name for pin in circuit.parts["U1"].pins] == ["VCC", "GND", "Q[0]", "Q[1]", "Q[2]", "Q[3]"]
    assert circuit.parts["U1"].pin("Q[0]").net == "DRV[3]"
    assert rn1["IN[3]"] == "DRV[3]" and rn1["IN[0]"] == "DRV[0]"
    # (member &R_OUT 3) of OUT[3:0] is bit 0 (member 0 is the leftmost, bit 3);
    # (member &A 0) of A[1:4] is bit 1
    assert set(circuit.nets["SEG 1"].pins) == {("RN1", "OUT[0]"), ("DB1", "A[1]")}
    assert set(circuit.nets["SEG 4"].pins) == {("RN1", "OUT[3]"), ("DB1", "A[4]")}


def test_renamed_instances_nets_and_properties():
    circuit = read(ARRAYS)
    u1 = circuit.parts["U1"]  # instance &U_1 renamed "U1"
    assert u1.part_number == "DRV-Q4"  # property renamed "Part Number"
    assert u1.properties == {"fitted": "true"}  # (boolean (true))
    assert set(circuit.nets["LED COM"].pins) == {("DB1", "K"), ("R1", "1")}  # COM renamed
    assert "+5V" in circuit.nets


def test_typed_property_values():
    circuit = read(ARRAYS)
    r1 = circuit.parts["R1"]
    assert r1.value == "4700"  # (number (e 47 2)) = 47 × 10^2
    assert r1.value_si == 4700.0
    assert r1.properties["power"] == "0.25"  # (e 25 -2) = 25 × 10^-2
    rn1 = circuit.parts["RN1"]
    assert rn1.value == "150"  # property "Value": names match in any case
    assert rn1.properties == {"dnp": "false", "tolerance_ppm": "100"}
    db1 = circuit.parts["DB1"]  # description from the library cell's property
    assert db1.properties["description"] == "4-segment LED bar, common cathode"
    assert db1.kind == "led"


# --- small inline netlists -----------------------------------------------------------------

def netlist(instances: str, nets: str, ports: str = "", extra_cells: str = "") -> str:
    """A one-sheet EDIF text around the given instance and net forms (resistor cell RES)."""
    return f"""(edif t (edifVersion 2 0 0) (edifLevel 0) (keywordMap (keywordLevel 0))
 (external P (edifLevel 0) (technology (numberDefinition))
  (cell RES (cellType GENERIC) (view v (viewType NETLIST)
   (interface (port (rename &1 "1")) (port (rename &2 "2")))))
  (cell LED (cellType GENERIC) (view v (viewType NETLIST)
   (interface (port A) (port K)))){extra_cells})
 (library L (edifLevel 0) (technology (numberDefinition))
  (cell TOP (cellType GENERIC) (view v (viewType NETLIST)
   (interface {ports})
   (contents
{instances}
{nets}))))
 (design D (cellRef TOP (libraryRef L))))
"""


def res(name: str, *forms: str) -> str:
    return f"  (instance {name} (viewRef v (cellRef RES (libraryRef P))) {' '.join(forms)})"


def test_designator_and_reference_properties_name_parts():
    text = netlist(res("I_7", '(designator "R7")') + "\n" + res("I_8", '(property RefDes (string "R8"))'),
                   "(net N1 (joined (portRef &1 (instanceRef I_7)) (portRef &1 (instanceRef I_8))))\n"
                   "(net N2 (joined (portRef &2 (instanceRef I_7)) (portRef &2 (instanceRef I_8))))")
    circuit = read_edif(text, "t.edif")
    assert sorted(circuit.parts) == ["R7", "R8"]  # designator, then a refdes property
    assert circuit.parts["R7"].path == "I_7"
    assert "refdes" not in circuit.parts["R8"].properties


def test_identifiers_and_keywords_match_in_any_case():
    text = netlist(res("R1") + "\n" + res("R2"),
                   "(NET n1 (JOINED (PORTREF &1 (INSTANCEREF r1)) (portRef &1 (instanceRef R2))))\n"
                   "(Net N2 (Joined (PortRef &2 (InstanceRef R1)) (portref &2 (instanceref r2))))")
    circuit = read_edif(text, "t.edif")
    assert set(circuit.nets["n1"].pins) == {("R1", "1"), ("R2", "1")}  # display keeps its case
    assert set(circuit.nets["N2"].pins) == {("R1", "2"), ("R2", "2")}


def test_unconnected_pin_has_no_net_and_top_ports_count_as_connections():
    text = netlist(res("R1"), '(net (rename &_5V "+5V") (joined (portRef IN) (portRef &1 (instanceRef R1))))',
                   ports="(port IN)")
    circuit = read_edif(text, "t.edif")
    assert [(p.name, p.net) for p in circuit.parts["R1"].pins] == [("1", "+5V"), ("2", None)]
    assert circuit.nets["+5V"].pins == (("R1", "1"),)


def test_percent_escapes_in_strings():
    text = netlist(res("R1", '(property VALUE (string "4%37%7"))', '(property NOTE (string "say %34%hi%34%"))'),
                   "(net A (joined (portRef &1 (instanceRef R1)) (portRef &2 (instanceRef R1))))")
    part = read_edif(text, "t.edif").parts["R1"]
    assert part.value == "4%7"  # %37% is ASCII 37, '%' (EDIF string escape)
    assert part.properties["note"] == 'say "hi"'  # %34% is ASCII 34, '"'
    assert part.value_si is None  # "4%7" is no resistance: unknown, not guessed


def located(text: str) -> str:
    with pytest.raises(NetlistError) as caught:
        read_edif(text, "t.edif")
    return str(caught.value)


def test_structural_errors_are_located():
    # wording from linter/readers; positions found by string search in the text
    text = netlist(res("R1") + "\n  (instance X (viewRef v (cellRef NOPE (libraryRef P))))",
                   "(net A (joined (portRef &1 (instanceRef R1)) (portRef &2 (instanceRef R1))))")
    line, column = position_in(text, "(instance X")
    assert located(text) == f"t.edif:{line}:{column}: instance 'X': library 'P' has no cell 'NOPE'"
    text = netlist(res("R1"), "(net (array B 2) (joined (portRef &1 (instanceRef R1)) (portRef &2 (instanceRef R1))))")
    line, column = position_in(text, "(portRef &1")
    assert located(text) == f"t.edif:{line}:{column}: net 'B' has 2 wire(s) but this reference has 1 pin(s)"
    text = netlist(res("R1"), "(net A (joined (portRef &1 (instanceRef R1)) (portRef &2 (instanceRef R1))))")
    bad = text.replace("(edifVersion 2 0 0)", "(edifVersion 3 0 0)")
    assert located(bad) == "t.edif:1:9: EDIF version 3.0.0 is not supported; only 2.0.0 can be read"
    no_design = text.replace(" (design D (cellRef TOP (libraryRef L))))", ")")
    assert located(no_design) == "t.edif:1:1: no (design ...) form: cannot tell which cell is the top"


def test_member_outside_the_array_is_refused():
    cell = """
  (cell BAR (cellType GENERIC) (view v (viewType NETLIST)
   (interface (port (array A 2)) (port K))))"""
    text = netlist("  (instance U1 (viewRef v (cellRef BAR (libraryRef P))))",
                   "(net A (joined (portRef (member A 2) (instanceRef U1)) (portRef K (instanceRef U1))))",
                   extra_cells=cell)
    line, column = position_in(text, "(portRef (member A 2)")
    assert located(text) == f"t.edif:{line}:{column}: member [2] is outside array 'A' of size [2]"


def test_a_cell_that_contains_itself_is_refused():
    text = netlist(res("R1") + "\n  (instance LOOP (viewRef v (cellRef TOP)))",
                   "(net A (joined (portRef &1 (instanceRef R1)) (portRef &2 (instanceRef R1))))")
    line, column = position_in(text, "(instance LOOP")
    assert located(text) == f"t.edif:{line}:{column}: instance 'LOOP': cell 'TOP' contains itself"


def test_two_parts_with_one_designator_take_their_paths():
    text = netlist(res("A1", '(designator "R1")') + "\n" + res("A2", '(designator "R1")'),
                   "(net A (joined (portRef &1 (instanceRef A1)) (portRef &1 (instanceRef A2))))\n"
                   "(net B (joined (portRef &2 (instanceRef A1)) (portRef &2 (instanceRef A2))))")
    # common practice: an ambiguous designator is no name; the instance path is unique
    assert sorted(read_edif(text, "t.edif").parts) == ["A1", "A2"]


# --- property-based: random flat netlists read back to the connectivity they were made from --

@st.composite
def flat_boards(draw):
    count = draw(st.integers(1, 12))
    names = [f"R{i}" for i in range(1, count + 1)]
    pins = [(name, port) for name in names for port in ("1", "2")]
    order = draw(st.permutations(pins))
    cuts = sorted(draw(st.sets(st.integers(1, len(order) - 1), max_size=len(order) // 2 - 1))
                  ) if len(order) > 3 else []
    groups, start = [], 0
    for cut in [*cuts, len(order)]:
        if cut - start >= 2:
            groups.append(order[start:cut])
            start = cut
    if start < len(order):  # leftover single pin joins the last group
        groups[-1] = groups[-1] + order[start:]
    upper = draw(st.booleans())
    return names, groups, upper


@settings(max_examples=60, deadline=None)
@given(flat_boards())
def test_random_flat_boards_read_back(board):
    names, groups, upper = board
    instances = "\n".join(res(name, '(property VALUE (string "1k"))') for name in names)
    nets = "\n".join(
        f"(net (rename &N{i} \"NET {i}\") (joined "
        + " ".join(f"(portRef &{port} (instanceRef {ref}))" for ref, port in group) + "))"
        for i, group in enumerate(groups))
    text = netlist(instances, nets)
    if upper:  # keywords in upper case: EDIF keywords are case-insensitive
        text = re.sub(r"\((\w+)", lambda m: "(" + m.group(1).upper(), text)
    circuit = read_edif(text, "gen.edif")
    assert sorted(circuit.parts) == sorted(names)
    expected = {f"NET {i}": set(group) for i, group in enumerate(groups)}
    assert {name: set(net.pins) for name, net in circuit.nets.items()} == expected
    assert all(part.value_si == 1000.0 for part in circuit.parts.values())  # 1k: SI prefix
