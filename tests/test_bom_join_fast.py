"""The BOM join's shortcuts (a value comparison made once per BOM line and part reading,
line facts gathered once, parts rebuilt from their fields at once) give what the plain
per-part join gives. The expected values are the plain computations written out here with
:func:`dataclasses.replace`; nothing is pasted from the tool's output.
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

import pytest

from linter.bom_join import _BOM_PROPERTIES, _changed, _enrich, _value_matches, apply_bom
from linter.model import Circuit, Part, Pin, SourceLocation
from linter.readers import read_netlist
from linter.readers.bom import Bom, parse_bom, read_bom

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"


def _plain_parts(circuit: Circuit, bom: Bom) -> dict[str, Part]:
    """Each part joined on its own, as the join is defined (first BOM line of a ref wins)."""
    by_fold = {ref.casefold(): ref for ref in circuit.parts}
    found = {}
    for line in bom.lines:
        for bom_ref in line.refs:
            ref = by_fold.get(bom_ref.casefold())
            if ref is not None and ref not in found:
                found[ref] = line
    parts = dict(circuit.parts)
    for ref, line in found.items():
        part = circuit.parts[ref]
        same = line.value is None or part.value is None or _value_matches(part, line)
        properties = dict(part.properties)
        for name in _BOM_PROPERTIES:
            if getattr(line, name) is not None:
                properties[name] = getattr(line, name)
        if line.dnp:
            properties["dnp"] = "yes"
        if not same:
            properties["bom_value"] = line.value
        parts[ref] = replace(part, properties=properties,
                             part_number=part.part_number or line.part_number)
    return parts


def _generated(tmp: Path) -> Path:
    sys.path.insert(0, str(ROOT))
    try:
        from bench.gen_board import generate, write_all
    finally:
        sys.path.remove(str(ROOT))
    write_all(generate(600, seed=5), tmp)
    return tmp


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo_join_is_the_plain_join(netlist: str) -> None:
    circuit = read_netlist(DEMO / netlist)
    bom = read_bom(DEMO / "bom.csv")
    joined, _ = apply_bom(circuit, bom)
    assert dict(joined.parts) == _plain_parts(circuit, bom)


@pytest.mark.parametrize("netlist", ["board.edif", "board.cir"])
def test_generated_join_is_the_plain_join(netlist: str, tmp_path: Path) -> None:
    folder = _generated(tmp_path)
    circuit = read_netlist(folder / netlist)
    bom = read_bom(folder / "bom.csv")
    joined, _ = apply_bom(circuit, bom)
    assert dict(joined.parts) == _plain_parts(circuit, bom)


def test_refs_alike_but_for_case_and_repeated_values() -> None:
    here = SourceLocation("t", 1, 1)
    pins = (Pin("1", "a"), Pin("2", "b"))
    parts = {ref: Part(ref, "resistor", value, pins, here, value_si=None)
             for ref, value in [("R1", "4k7"), ("r1", "4k7"), ("R2", "4k7"), ("R3", "1k")]}
    circuit = Circuit("t", "edif", parts, {})
    bom = parse_bom('Ref,Value,Package\nR1,4.7k,0603\n"R2, R3",4.7k,0603\n', "b.csv")
    joined, _ = apply_bom(circuit, bom)
    assert dict(joined.parts) == _plain_parts(circuit, bom)


def test_changed_is_replace() -> None:
    here = SourceLocation("t", 1, 1)
    part = Part("D1", "led", "RED", (Pin("A", "x"),), here, 1.0, "S1/D1", "LED", None,
                {"color": "red"}, None)
    assert _changed(part, {"package": "0603"}, "LX-1") == \
        replace(part, properties={"package": "0603"}, part_number="LX-1")
    line = parse_bom("Ref,Value,Package,DNP\nD1,GREEN,0603,yes\n", "b.csv").lines[0]
    assert _enrich(part, line, False) == replace(
        part, properties={"color": "red", "package": "0603", "dnp": "yes",
                          "bom_value": "GREEN"})
