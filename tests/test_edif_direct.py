"""The flat road (linter.readers.edif_direct) against the plain hierarchy walk.

The expected value of every check here is the plain path of our own code: the same parsed
netlist read by ``edif._circuit(doc, direct=False)`` (the walk of edif_flatten), which the
other EDIF tests check against spydrnet and hand-counted positions. Circuits are compared
field by field, locations as stored (packed or not) and as read, dictionaries in order.
Each case also says whether the flat road must have been taken, so a guard that silently
stopped letting flat designs through would fail.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

from linter.errors import NetlistError
from linter.model import stored_location
from linter.readers import edif
from linter.readers.edif_compound import EdifCompounds
from linter.readers.edif_direct import flat_plan
from linter.readers.edif_syntax import read_edif_file
from linter.readers.sexpr import parse

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate  # noqa: E402
from bench.write_edif import write_flat_edif, write_hier_edif  # noqa: E402

FIXTURES = sorted(ROOT.glob("fixtures/**/*.edif"))


def _fields(circuit) -> tuple:
    parts = [(ref, part.ref, part.kind, part.value, part.value_si, part.pins,
              stored_location(part), part.location, part.path, part.cell, part.part_number,
              list(part.properties.items()), part.model) for ref, part in circuit.parts.items()]
    nets = [(name, net.name, net.pins, stored_location(net), net.location, net.aliases)
            for name, net in circuit.nets.items()]
    return circuit.source, circuit.format, circuit.design, circuit.notes, parts, nets


def _read(text: str, source: str, direct: bool, compounds: bool = True):
    """The circuit, or the error's line (both roads, with or without compound forms)."""
    try:
        doc = parse(text, source, EdifCompounds() if compounds else None)
        return _fields(edif._circuit(doc, direct=direct))
    except NetlistError as problem:
        return str(problem)


def _takes_flat_road(text: str) -> bool:
    plan = flat_plan(read_edif_file(parse(text, "t.edif", EdifCompounds())))
    return plan is not None and edif._flat_refs(plan.instances) is not None


def assert_same(text: str, source: str = "t.edif", flat: bool | None = None) -> None:
    for compounds in (True, False):
        fast = _read(text, source, True, compounds)
        assert fast == _read(text, source, False, compounds)
    if flat is not None:
        assert _takes_flat_road(text) is flat


def _readable(path: Path) -> str | None:
    try:
        return path.read_text(encoding="utf-8")
    except UnicodeDecodeError:
        return None


@pytest.mark.parametrize("path", FIXTURES, ids=lambda p: str(p.relative_to(ROOT)))
def test_every_fixture_reads_the_same(path: Path) -> None:
    text = _readable(path)
    if text is None:  # not UTF-8: refused before any EDIF is read (test_edif_bad_inputs)
        return
    assert_same(text, str(path))


def test_the_demo_takes_the_flat_road() -> None:
    text = (ROOT / "fixtures" / "demo" / "dust_extractor_panel.edif").read_text(encoding="utf-8")
    assert_same(text, "demo.edif", flat=True)


@pytest.mark.parametrize("parts, seed", [(300, 1), (700, 2), (1200, 5), (2000, 9)])
def test_generated_boards(tmp_path: Path, parts: int, seed: int) -> None:
    board = generate(parts, seed)
    write_flat_edif(board, tmp_path / "flat.edif")
    write_hier_edif(board, tmp_path / "hier.edif")
    assert_same((tmp_path / "flat.edif").read_text(), "flat.edif", flat=True)
    assert_same((tmp_path / "hier.edif").read_text(), "hier.edif", flat=False)


def board(instances: str, nets: str, cell_properties: str = "",
          top_ports: str = "(port VIN) (port VOUT)") -> str:
    return f"""(edif t (edifVersion 2 0 0) (edifLevel 0) (keywordMap (keywordLevel 0))
 (external P (edifLevel 0) (technology (numberDefinition))
  (cell RES (cellType GENERIC) {cell_properties} (view netlist (viewType NETLIST)
   (interface (port (rename &1 "1")) (port (rename &2 "2")))))
  (cell LED (cellType GENERIC) (view netlist (viewType NETLIST)
   (interface (port A) (port K))))
  (cell BUS (cellType GENERIC) (view netlist (viewType NETLIST)
   (interface (port (array D 2)) (port E)))))
 (library L (edifLevel 0) (technology (numberDefinition))
  (cell TOP (cellType GENERIC) (view netlist (viewType NETLIST)
   (interface {top_ports})
   (contents
{instances}
{nets}))))
 (design T (cellRef TOP (libraryRef L))))
"""


def inst(name: str, cell: str, extra: str = "") -> str:
    return f"(instance {name} (viewRef netlist (cellRef {cell} (libraryRef P))) {extra})"


R1 = '(instance R1 (viewRef netlist (cellRef RES (libraryRef P))) (property value (string "330")))'
D1 = '(instance D1 (viewRef netlist (cellRef LED (libraryRef P))))'
NETS = ('(net A (joined (portRef VIN) (portRef &1 (instanceRef R1))))\n'
        '(net B (joined (portRef &2 (instanceRef R1)) (portRef A (instanceRef D1))))\n'
        '(net C (joined (portRef K (instanceRef D1)) (portRef VOUT)))')
PLAIN = board(R1 + "\n" + D1, NETS)

CASES = {
    # flat designs the flat road reads
    "plain": (board(R1 + "\n" + D1,
                    '(net A (joined (portRef VIN) (portRef &1 (instanceRef R1))))\n'
                    '(net B (joined (portRef &2 (instanceRef R1)) (portRef A (instanceRef D1))))\n'
                    '(net (rename gnd "0V") (joined (portRef K (instanceRef D1)) '
                    '(portRef VOUT)))'), True),
    "renamed names and case": (board(
        '(instance (rename r_1 "R%49%") (viewRef NETLIST (cellRef res (libraryRef p))) '
        '(designator "R9") (property (rename pn "Part Number") (string "X%37%Y")))\n' + D1,
        '(net (rename &_5V "+5V") (joined (portRef vin) (PORTREF &1 (INSTANCEREF R_1))))\n'
        '(net b (joined (portRef &2 (instanceRef r_1)) (portRef a (instanceRef d1))))\n'
        '(net c (joined (portRef k (instanceRef d1)) (portRef Vout)))'), True),
    "designators and reference properties": (board(
        R1.replace(")))", "))) (designator \"RX\")", 1) + "\n" + inst("D1", "LED", '(property refdes (string " LX "))'),
        NETS), True),
    "properties on cells": (board(R1 + "\n" + D1, NETS,
                                  cell_properties='(property value (string "1k")) '
                                                  '(property footprint (string "0805"))'), True),
    "a net spelled token by token": (board(R1 + "\n" + D1,
        '(net A (joined (portRef &1 (instanceRef R1)) (portRef K (instanceRef D1))))\n'
        '(net B (joined (portRef &2 (instanceRef R1))\n'
        ' (portRef A (instanceRef D1))) (comment "not a compound form"))'), True),
    "an unconnected pin": (board(R1 + "\n" + D1 + "\n" + R1.replace("R1", "R2"),
        '(net A (joined (portRef &1 (instanceRef R1)) (portRef K (instanceRef D1)) '
        '(portRef &1 (instanceRef R2))))\n'
        '(net B (joined (portRef &2 (instanceRef R1)) (portRef A (instanceRef D1))))'), True),
    # designs the flat road leaves to the walk (which merges or refuses)
    "a pin on two nets": (board(R1 + "\n" + D1, NETS + '\n(net E (joined (portRef K '
                                                      '(instanceRef D1)) (portRef &1 (instanceRef R1))))'), False),
    "a pin twice on one net": (board(R1 + "\n" + D1, NETS.replace(
        "(portRef A (instanceRef D1))", "(portRef A (instanceRef D1)) (portRef A (instanceRef D1))")),
        False),
    "a top port twice on one net": (board(R1 + "\n" + D1, NETS.replace(
        "(net A (joined (portRef VIN)", "(net A (joined (portRef VIN) (portRef VIN)")), False),
    "nets joined through a top port on both": (board(R1 + "\n" + D1, NETS.replace("VOUT", "VIN")), False),
    "equal designators (parts named by instance)": (board(
        R1.replace(")))", "))) (designator \"X1\")", 1) + "\n"
        + inst("D1", "LED", '(designator "X1")'), NETS), True),
    "a designator equal to an instance name": (board(
        R1.replace(")))", "))) (designator \"D1\")", 1) + "\n"
        + inst("D1", "LED", '(designator "Q")') + "\n"
        + R1.replace("instance R1", "instance R2").replace(")))", "))) (designator \"Q\")", 1),
        NETS + "\n(net E (joined (portRef &1 (instanceRef R2)) (portRef &2 (instanceRef R2))))"),
        False),
    "duplicate net names": (board(R1 + "\n" + D1, NETS.replace("(net C", "(net (rename c2 \"A\")")),
                            False),
    "a one-pin net": (board(R1 + "\n" + D1, NETS.replace("(portRef VIN) (portRef &1 (instanceRef R1))",
                                                         "(portRef &1 (instanceRef R1))")), False),
    "an unknown instance": (board(R1 + "\n" + D1, NETS.replace("instanceRef D1))))",
                                                               "instanceRef D9))))", 1)), False),
    "an unknown port": (board(R1 + "\n" + D1, NETS.replace("(portRef K", "(portRef Z")), False),
    "an array net": (board(R1 + "\n" + D1, NETS + "\n(net (array W 2) (joined (portRef &1 "
                                                  "(instanceRef R1)) (portRef A (instanceRef D1))))"), False),
    "a cell with an array port": (board(R1 + "\n" + D1 + "\n(instance U1 (viewRef netlist "
                                        "(cellRef BUS (libraryRef P))))", NETS), False),
    "a member reference": (board(R1 + "\n" + D1 + "\n(instance U1 (viewRef netlist "
                                 "(cellRef BUS (libraryRef P))))", NETS + "\n(net M (joined "
                                 "(portRef (member D 0) (instanceRef U1)) (portRef E (instanceRef U1))))"),
                           False),
    "a negative resistance": (board(R1.replace('"330"', '"-330"') + "\n" + D1, NETS), True),
    "no instances": (board("", "(net A (joined (portRef VIN) (portRef VIN)))"), False),
    "an unknown cell": (board(R1.replace("cellRef RES", "cellRef RESX") + "\n" + D1, NETS), False),
}


@pytest.mark.parametrize("name", list(CASES))
def test_made_cases(name: str) -> None:
    text, flat = CASES[name]
    assert_same(text, flat=flat)


def test_the_flat_road_is_taken_for_a_plain_board() -> None:
    assert _takes_flat_road(PLAIN)
    assert isinstance(_read(PLAIN, "t.edif", True), tuple)


def test_errors_are_the_plain_road_s_word_for_word() -> None:
    # each is refused by the walk (or the part maker); the flat road must not word it otherwise
    for name in ("a designator equal to an instance name", "duplicate net names", "a one-pin net",
                 "an unknown instance", "an unknown port", "a negative resistance",
                 "an unknown cell"):
        text, _ = CASES[name]
        fast = _read(text, "t.edif", True, compounds=False)  # read_edif words errors so
        assert isinstance(fast, str) and fast.startswith("t.edif:"), name
        with pytest.raises(NetlistError) as caught:
            edif.read_edif(text, "t.edif")
        assert str(caught.value) == fast


def test_limits_leave_big_designs_to_the_walk() -> None:
    from linter import limits

    with limits.applied(limits.Limits(max_parts=1)):
        assert_same(PLAIN, flat=False)
