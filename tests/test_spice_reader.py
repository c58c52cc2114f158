"""The SPICE reader: numbers, expressions, lines, elements, subcircuits, models, includes, notes.

Expected values come from the SPICE3/ngspice rules named beside each check (scale suffixes,
node order, ``M`` = milli), checked by hand on ngspice 39 where said, or are worked out by
hand from the fixture's text.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from linter.errors import NetlistError
from linter.model import Circuit
from linter.readers import spice_flatten
from linter.readers.spice import read_spice
from linter.readers.spice_expr import ExpressionError, evaluate
from linter.readers.spice_numbers import SpiceNumberError, read_spice_number, spice_spelling

ROOT = Path(__file__).resolve().parents[1]
SPICE = ROOT / "fixtures" / "spice"
DEMO = ROOT / "fixtures" / "demo" / "dust_extractor_panel.cir"


def read(text: str, opaque: tuple[str, ...] = ()) -> Circuit:
    return read_spice(text, "deck.cir", path=Path("deck.cir"), root=Path("."), opaque=opaque)


def read_file(path: Path, opaque: tuple[str, ...] = ()) -> Circuit:
    return read_spice(path.read_text(), path.relative_to(ROOT).as_posix(), path=path,
                      root=path.parent, opaque=opaque)


def error_of(text: str) -> str:
    with pytest.raises(NetlistError) as caught:
        read(text)
    return str(caught.value)


def pins(circuit: Circuit, ref: str) -> dict[str, str | None]:
    return {pin.name: pin.net for pin in circuit.parts[ref].pins}


# ---- numbers --------------------------------------------------------------------------------

@pytest.mark.parametrize(("text", "expected"), [
    ("1M", 1e-3),          # SPICE: M is milli (checked on ngspice 39)
    ("1MEG", 1e6), ("1Meg", 1e6), ("1megohm", 1e6),
    ("4k7", 4e3),          # letters and digits after the suffix are ignored (ngspice 39)
    ("10kohm", 1e4), ("1mil", 25.4e-6), ("1Mil", 25.4e-6),
    ("2.5e3k", 2.5e6), ("1e-3u", 1e-9), ("1.5F", 1.5e-15), ("1ff", 1e-15),
    ("3t", 3e12), ("2g", 2e9), (".5", 0.5), ("5.", 5.0), ("1uF", 1e-6), ("1µ", 1e-6),
    ("1d2", 100.0),        # Fortran exponent (ngspice 39)
    ("1a", 1.0), ("1x", 1.0), ("1e", 1.0), ("-3", -3.0), ("+2k", 2e3), ("10u", 1e-5),
])
def test_spice_numbers_read_as_ngspice_reads_them(text: str, expected: float) -> None:
    assert math.isclose(read_spice_number(text), expected, rel_tol=1e-12)


@pytest.mark.parametrize("text", ["abc", "", "k1", "1k-2", "1.5.3", "R47", "1u$x"])
def test_spice_numbers_refuse_what_is_not_a_number(text: str) -> None:
    with pytest.raises(SpiceNumberError):
        read_spice_number(text)


def test_exponents_of_thousands_of_digits() -> None:
    # 10 to a power of 5,000 digits is beyond any double (IEEE 754): refused like 1e999;
    # 10 to minus that power underflows to 0; leading zeros do not count (0...05 is 5)
    with pytest.raises(SpiceNumberError):
        read_spice_number("1e" + "9" * 5000)
    assert read_spice_number("1e-" + "9" * 5000) == 0.0
    assert read_spice_number("2e" + "0" * 5000 + "3k") == 2e6
    assert error_of("t\nR1 a 0 1e" + "9" * 5000 + "\n.end\n").startswith("deck.cir:2:8: ")


_SUFFIXES = {"t": 1e12, "g": 1e9, "meg": 1e6, "k": 1e3, "m": 1e-3, "u": 1e-6, "n": 1e-9,
             "p": 1e-12, "f": 1e-15, "mil": 25.4e-6}
"""SPICE3 scale suffixes (SPICE3 and ngspice manuals)."""


@given(mantissa=st.floats(min_value=1e-6, max_value=1e6, allow_nan=False),
       suffix=st.sampled_from(sorted(_SUFFIXES)),
       upper=st.lists(st.booleans(), min_size=3, max_size=3),
       unit=st.sampled_from(["", "ohm", "F", "V", "A", "Hz", "7"]))
def test_suffix_spellings_agree_with_plain_floats(mantissa: float, suffix: str, upper: list[bool],
                                                  unit: str) -> None:
    spelled = "".join(c.upper() if u else c for c, u in zip(suffix, upper))
    value = read_spice_number(f"{mantissa!r}{spelled}{unit}")
    assert math.isclose(value, mantissa * _SUFFIXES[suffix], rel_tol=1e-12)


@given(st.floats(min_value=-1e15, max_value=1e15, allow_nan=False, allow_infinity=False))
def test_plain_numbers_and_exponents_read_as_floats(value: float) -> None:
    assert read_spice_number(repr(value)) == value
    assert read_spice_number(f"{value:e}") == float(f"{value:e}")


@given(st.floats(min_value=1e-14, max_value=1e14, allow_nan=False))
def test_spice_spelling_reads_back(value: float) -> None:
    assert math.isclose(read_spice_number(spice_spelling(value)), value, rel_tol=1e-5)


# ---- expressions ----------------------------------------------------------------------------

@pytest.mark.parametrize(("text", "expected"), [
    ("1+2*3", 7.0), ("(1+2)*3", 9.0), ("2**3", 8.0), ("2^3^2", 512.0),  # power is right-assoc.
    ("-2**2", -4.0), ("2*-3", -6.0), ("-(-3)", 3.0), ("1meg/1k", 1000.0),
    ("sqrt(16)+abs(-2)", 6.0), ("min(3, 1, 2)", 1.0), ("max(1k, 2)", 1000.0), ("pow(2, 10)", 1024.0),
    ("r*2", 2000.0), ("R*2", 2000.0),  # names are case-insensitive
])
def test_expressions(text: str, expected: float) -> None:
    assert evaluate(text, {"r": 1000.0}) == pytest.approx(expected)


@pytest.mark.parametrize(("text", "message"), [
    ("1/0", "division by zero"), ("x+1", "unknown parameter 'x'"), ("1+", "expression ends"),
    ("(1", "never closed"), ("1)", "without '('"), ("min(1)", "min() takes"),
    ("__import__(1)", "unknown function '__import__'"), ("__import__('os')", "unexpected"),
    ("2 3", "expected an operator"),
    ("1;2", "unexpected ';'"),
])
def test_expression_errors(text: str, message: str) -> None:
    with pytest.raises(ExpressionError) as caught:
        evaluate(text, {})
    assert message in str(caught.value)


def test_deeply_nested_expression_needs_no_recursion() -> None:
    depth = 4000  # far beyond Python's recursion limit
    assert evaluate("(" * depth + "1" + ")" * depth, {}) == 1.0


# ---- lines, comments, continuation ------------------------------------------------------------

def test_continuation_comments_and_case_fixture() -> None:
    circuit = read_file(SPICE / "continuation.cir")
    # the first line is the title, even though it starts with '*'
    assert circuit.design.startswith("* This first line is the title")
    assert set(circuit.parts) == {"r1", "R2", "v1", "c1", "D1", "R3"}  # .end stops; .control skipped
    assert pins(circuit, "R2") == {"1": "Out", "2": "0"}  # nodes on '+' lines, comment between
    assert circuit.parts["R2"].value_si == 2000.0          # '$ inline comment' dropped
    assert circuit.parts["v1"].value_si == 5.0              # 'dc 5' on the continuation line
    # 'Out', 'out' and 'OUT' are one net, named as first written
    assert {ref for ref, _ in circuit.nets["Out"].pins} == {"r1", "R2", "c1", "D1"}
    assert circuit.parts["D1"].model is not None
    assert dict(circuit.parts["D1"].model.params) == {"IS": 2.2e-18, "N": 2.0, "RS": 5.0}
    # positions: the element's first physical line; R3 is indented by four blanks
    assert (circuit.parts["R2"].location.line, circuit.parts["R2"].location.column) == (4, 1)
    assert (circuit.parts["R3"].location.line, circuit.parts["R3"].location.column) == (13, 5)
    assert circuit.parts["R3"].location.file == "fixtures/spice/continuation.cir"


def test_lines_after_end_are_not_read() -> None:
    circuit = read("title\nR1 a 0 1k\n.end\nthis is not spice at all\n")
    assert set(circuit.parts) == {"R1"}


def test_ground_spellings_are_one_net_named_0_with_alias_gnd() -> None:
    circuit = read("title\nR1 a 0 1k\nR2 a GND 1k\nR3 a gnd 1k\n.end\n")
    assert set(circuit.nets) == {"a", "0"}
    assert circuit.nets["0"].aliases == ("GND",)
    assert [ref for ref, _ in circuit.nets["0"].pins] == ["R1", "R2", "R3"]


# ---- elements ---------------------------------------------------------------------------------

ALL_LETTERS = """every element letter
.model dm D(IS=1e-14)
.model qn NPN(BF=100)
.model qp PNP(BF=80)
.model mn NMOS(VTO=1 KP=0.1)
.model mp PMOS(VTO=-1 KP=0.1)
.model jn NJF(VTO=-2)
R1 a b 1k
C1 a b 1u
L1 a b 10m
D1 a b dm
Q1 c b e qn
Q2 c b e s qp
M1 d g s bulk mn
M2 d g s s mp
J1 d g s jn
V1 a 0 DC 5
I1 a b 2m
E1 a b c d 2
G1 a b c d 1m
F1 a b V1 3
H1 a b V1 100
B1 a b V=2*V(c)
.end
"""


def test_each_letter_has_its_pins_in_node_order() -> None:
    circuit = read(ALL_LETTERS)
    # pin names and node order per letter: SPICE3 manual, element by element
    assert pins(circuit, "R1") == {"1": "a", "2": "b"}
    assert pins(circuit, "D1") == {"A": "a", "K": "b"}
    assert pins(circuit, "Q1") == {"C": "c", "B": "b", "E": "e"}
    assert pins(circuit, "Q2") == {"C": "c", "B": "b", "E": "e", "S": "s"}
    assert pins(circuit, "M1") == {"D": "d", "G": "g", "S": "s", "B": "bulk"}
    assert pins(circuit, "J1") == {"D": "d", "G": "g", "S": "s"}
    assert pins(circuit, "V1") == {"+": "a", "-": "0"}
    assert pins(circuit, "E1") == {"+": "a", "-": "b", "C+": "c", "C-": "d"}
    assert pins(circuit, "G1") == {"+": "a", "-": "b", "C+": "c", "C-": "d"}
    assert pins(circuit, "F1") == {"+": "a", "-": "b"}
    assert pins(circuit, "H1") == {"+": "a", "-": "b"}
    assert pins(circuit, "B1") == {"+": "a", "-": "b"}
    assert circuit.parts["B1"].value == "V=2*V(c)"


def test_kinds_and_values() -> None:
    circuit = read(ALL_LETTERS)
    kinds = {ref: part.kind for ref, part in circuit.parts.items()}
    assert kinds == {"R1": "resistor", "C1": "capacitor", "L1": "inductor", "D1": "diode",
                     "Q1": "npn", "Q2": "pnp", "M1": "nmos", "M2": "pmos", "J1": "transistor",
                     "V1": "source", "I1": "source", "E1": "other", "G1": "other", "F1": "other",
                     "H1": "other", "B1": "other"}
    # SPICE suffixes: k 1e3, u 1e-6, m 1e-3
    assert [circuit.parts[r].value_si for r in ("R1", "C1", "L1", "V1", "I1")] == [1e3, 1e-6, 1e-2, 5.0, 2e-3]
    assert circuit.parts["R1"].value == "1k"
    # the model name is the part number of D, Q and M elements
    assert [circuit.parts[r].part_number for r in ("D1", "Q1", "M1", "R1")] == ["dm", "qn", "mn", None]
    assert circuit.parts["Q1"].model is not None and circuit.parts["Q1"].model.type == "NPN"


def test_a_zero_ohm_resistor_is_a_link() -> None:
    assert read("t\nR1 a b 0\n.end\n").parts["R1"].kind == "link"


def test_sources_carry_their_dc_voltage() -> None:
    circuit = read("t\nV1 a 0 12\nV2 b 0 DC 3.3 AC 1\nV3 c 0 PULSE(0 5 1u 1n 1n 1u 2u)\n.end\n")
    assert [circuit.parts[r].value_si for r in ("V1", "V2", "V3")] == [12.0, 3.3, None]
    assert circuit.parts["V3"].value == "PULSE(0 5 1u 1n 1n 1u 2u)"


def test_diode_kind_from_the_model_forward_voltage() -> None:
    # Shockley: V = N·Vt·ln(I/IS + 1) + I·RS at 10 mA, Vt = 25.9 mV at 27 °C (k/q, SI 2019):
    # IS=2.2e-18, N=2, RS=5 gives about 1.9 V (an LED); IS=2.5e-9, N=1.75, RS=0.5 about 0.69 V.
    circuit = read("t\n.model lx D(IS=2.2e-18 N=2 RS=5)\n.model sx D(IS=2.5e-9 N=1.75 RS=0.5)\n"
                   ".model red_indicator D(IS=1e-14)\nD1 a 0 lx\nD2 a 0 sx\nD3 a 0 red_indicator\n.end\n")
    assert [circuit.parts[r].kind for r in ("D1", "D2", "D3")] == ["led", "diode", "led"]


def test_board_designators_behind_a_spice_letter() -> None:
    # exporters write a MOSFET Q2 as MQ2 (SPICE needs M); the board name is Q2
    circuit = read("t\n.model mn NMOS(VTO=1)\nMQ2 d g 0 0 mn\nM5 d g 0 0 mn\n.end\n")
    assert set(circuit.parts) == {"Q2", "M5"}
    assert circuit.parts["Q2"].properties["spice_name"] == "MQ2"


# ---- subcircuits ------------------------------------------------------------------------------

def test_subcircuit_parameters_fixture() -> None:
    circuit = read_file(SPICE / "subckt_params.cir")
    values = {ref: part.value_si for ref, part in circuit.parts.items()}
    # by hand from the fixture: rser*scale with defaults 100*1; X2 rser=330; X3 rser={rtwice}=2*150
    # and scale=sqrt(4)/2=1; X4 rset=470 gives XA 470 and XB 470*2; RBLEED max(4700, 1k);
    # RLOAD 150 + 2**3 - 8; V1 {vsupply} = 5
    assert values == {"V1": 5.0, "X1/RSER": 100.0, "X1/DLED": None, "X2/RSER": 330.0, "X2/DLED": None,
                      "X3/RSER": 300.0, "X3/DLED": None, "X4/XA/RSER": 470.0, "X4/XA/DLED": None,
                      "X4/XB/RSER": 940.0, "X4/XB/DLED": None, "RBLEED": 4700.0, "RLOAD": 150.0}
    # a leaf name used once stays short; its path says where it is
    assert circuit.parts["RBLEED"].path == "X4/RBLEED"
    # internal nodes are qualified by the instance path, ports take the outer net
    assert pins(circuit, "X4/XB/RSER") == {"1": "vcc", "2": "X4/XB/mid"}
    assert pins(circuit, "X4/XB/DLED") == {"A": "X4/XB/mid", "K": "0"}
    assert circuit.parts["X4/XB/DLED"].location.line == 8  # the line in the subcircuit body


def test_opaque_subcircuits_stay_whole_and_lose_their_x() -> None:
    circuit = read_file(DEMO, opaque=("km8c28",))  # names compare without regard to case
    u1 = circuit.parts["U1"]
    assert u1.cell == "KM8C28" and u1.part_number == "KM8C28"
    assert [p.name for p in u1.pins][:4] == ["VDD", "VSS", "PA0", "PA1"]
    assert pins(circuit, "U1")["PA3"] == "REMOTE_K"
    assert u1.properties["spice_name"] == "XU1"
    assert "RPA0" not in circuit.parts
    flat = read_file(DEMO)
    assert "U1" not in flat.parts and pins(flat, "RPA0") == {"1": "RUN_DRV", "2": "+5V"}


def test_empty_subcircuits_stay_whole() -> None:
    circuit = read("t\n.subckt box p q\n.ends\nX1 a 0 box\nXJ7 a b box\n.end\n")
    assert set(circuit.parts) == {"X1", "J7"}   # X1 keeps its name: no letter after the X
    assert pins(circuit, "J7") == {"p": "a", "q": "b"}
    assert circuit.parts["J7"].kind == "connector"


def test_models_local_to_a_subcircuit() -> None:
    circuit = read("t\n.subckt ch a k\n.model local D(IS=1e-14 N=1.5)\nD1 a k local\n.ends\n"
                   "X1 v 0 ch\nX2 v 0 ch\n.end\n")
    model = circuit.parts["X1/D1"].model
    assert model is not None and model.params["N"] == 1.5


def test_global_nodes_are_not_qualified() -> None:
    circuit = read("t\n.global vcc\n.subckt ch k\nR1 vcc k 1k\n.ends\nX1 a ch\nV1 vcc 0 5\n.end\n")
    assert pins(circuit, "R1") == {"1": "vcc", "2": "a"}


def test_a_deep_hierarchy_needs_no_recursion() -> None:
    depth = 3000  # far beyond Python's recursion limit
    lines = ["deep"] + [f".subckt s{i} a b\nX{i} a b s{i + 1}\n.ends" for i in range(depth)]
    lines += [f".subckt s{depth} a b\nR1 a b 1k\n.ends", "XTOP in 0 s0", ".end"]
    circuit = read("\n".join(lines) + "\n")
    assert list(circuit.parts) == ["R1"]
    assert circuit.parts["R1"].path.count("/") == depth + 1


def test_runaway_hierarchies_are_refused(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(spice_flatten, "MAX_ELEMENTS", 10)
    text = "t\n.subckt two a\nR1 a 0 1\nR2 a 0 1\n.ends\n" + "".join(f"X{i} a two\n" for i in range(6)) + ".end\n"
    assert "flattens to more than 10 elements" in error_of(text)


# ---- includes ---------------------------------------------------------------------------------

def test_include_and_library_section_fixture() -> None:
    circuit = read_file(SPICE / "with_include.cir")
    assert set(circuit.parts) == {"V1", "R1", "DPWR", "RLIM", "D1", "R2"}
    assert circuit.parts["DPWR"].model is not None  # from models.inc
    assert circuit.parts["D1"].location.file == "fixtures/spice/parts.lib"
    assert circuit.parts["D1"].location.line == 5
    assert pins(circuit, "D1") == {"A": "XS1/n1", "K": "b"}


def test_other_library_sections_are_not_read(tmp_path: Path) -> None:
    deck = tmp_path / "deck.cir"
    deck.write_text("t\n.lib parts.lib indicator\nX1 a 0 never_used\n.end\n")
    (tmp_path / "parts.lib").write_text((SPICE / "parts.lib").read_text())
    with pytest.raises(NetlistError, match="unknown subcircuit 'never_used'"):
        read_spice(deck.read_text(), "deck.cir", path=deck, root=tmp_path)


def test_a_missing_include_is_located(tmp_path: Path) -> None:
    deck = tmp_path / "deck.cir"
    deck.write_text("t\n.include nowhere.inc\n.end\n")
    with pytest.raises(NetlistError) as caught:
        read_spice(deck.read_text(), "deck.cir", path=deck, root=tmp_path)
    assert str(caught.value).startswith("deck.cir:2:10: .include 'nowhere.inc': cannot read:")


# ---- scale traps ------------------------------------------------------------------------------

def test_scale_trap_notes() -> None:
    circuit = read_file(SPICE / "scale_trap.cir")
    notes = {note.parts[0]: note for note in circuit.notes}
    # SPICE reading by the suffix rules (checked on ngspice 39); engineering reading: M mega,
    # IEC 60062 RKM codes (4k7 = 4.7 kΩ, 2R2 = 2.2 Ω, 3V3 = 3.3 V), F farad
    assert set(notes) == {"V1", "RPULL", "RLIM", "RSENSE", "CBULK"}
    expected = {"V1": (3.0, 3.3), "RPULL": (1e-3, 1e6), "RLIM": (4e3, 4.7e3), "RSENSE": (2.0, 2.2),
                "CBULK": (1e-15, 1.0)}
    for ref, (spice, meant) in expected.items():
        values = notes[ref].values
        assert values["spice_reading"] == pytest.approx(spice, rel=1e-12)
        assert values["engineering_reading"] == pytest.approx(meant, rel=1e-12)
        assert notes[ref].rule == "spice-scale-trap"
    assert notes["RPULL"].message == ("RPULL: SPICE reads '1M' as 1 mΩ, an engineer reads 1 MΩ; "
                                      "write 1meg if 1 MΩ is meant, or 1m if not")
    assert (notes["RLIM"].location.line, notes["RLIM"].location.column) == (4, 12)
    # the SPICE reading is the one computed with
    assert circuit.parts["RLIM"].value_si == 4e3


def test_no_trap_for_spellings_that_read_alike() -> None:
    circuit = read("t\nR1 a b 1meg\nR2 a b 4.7k\nR3 a b 10m\nR4 a b 10kohm\nC1 a b 100nF\n"
                   "V1 a 0 5V\nR5 a b {1M}\n.end\n")
    assert circuit.notes == ()


# ---- other errors -----------------------------------------------------------------------------

@pytest.mark.parametrize(("text", "message"), [
    ("t\nR1 a b 1k\nR1 a c 2k\n.end\n", "deck.cir:3:1: R1 is defined twice (first at deck.cir:2:1)"),
    ("t\nD1 a b nomodel\n.end\n", "deck.cir:2:8: D1: no .model 'nomodel'"),
    ("t\nD1 a b\n.end\n", "deck.cir:2:1: D1 needs a model name after its 2 nodes (A K)"),
    ("t\n.model mn NMOS(VTO=1)\nM1 d g s mn\n.end\n", "deck.cir:3:1: M1 needs 4 nodes (D G S B), found 3"),
    ("t\nR1 a b {x*2}\n.end\n", "deck.cir:2:8: unknown parameter 'x' in '{x*2}'"),
    ("t\nR1 a b {1/0}\n.end\n", "deck.cir:2:8: division by zero in '{1/0}'"),
    ("t\n.subckt s a r=1\nR1 a 0 {r}\n.ends\nX1 n s w=2\n.end\n",
     "deck.cir:5:8: X1: subcircuit s has no parameter 'w'"),
    ("t\n.ends\n.end\n", "deck.cir:2:1: .ends without .subckt"),
    ("t\n+ R1 a b 1\n.end\n", "deck.cir:2:1: continuation line '+' with no line to continue"),
    ("t\nR1 a b {1+2\n.end\n", "deck.cir:2:8: '{' is never closed on this line"),
    ("t\nR1 a b\n.end\n", "deck.cir:2:1: R1 has no value"),
])
def test_other_bad_input_is_located(text: str, message: str) -> None:
    # line and column read off each text: the card, or the token at fault
    assert error_of(text) == message


# ---- anything else ----------------------------------------------------------------------------

_WORDS = ["R1", "C2", "D3", "Q4", "M5", "J6", "V7", "I8", "E9", "F1", "G2", "H3", "B4", "X5", "XU1",
          "W1", "a", "b", "0", "gnd", "1k", "4k7", "{x}", "{1/0}", "'a+b'", ".subckt", "s", "p", "q",
          ".ends", ".model", "dm", "D", "NPN", "(", ")", "IS=1e-14", "r=2", "params:", ".param",
          "x=3", ".include", ".lib", "f.inc", "+", "*", ";", "$", "=", ",", "1M", "DC", "PULSE",
          "\n", ".end", ".global", "{", "}", "'", '"', ".control", ".endc", "Ω", "1e999", "-"]


@given(st.lists(st.sampled_from(_WORDS), max_size=60))
def test_any_text_reads_or_fails_with_one_located_line(words: list[str]) -> None:
    text = "title\n" + " ".join(words)
    try:
        read(text)
    except NetlistError as exc:
        assert "\n" not in str(exc) and str(exc).startswith("deck.cir:")
