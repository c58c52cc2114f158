"""The BOM join shares one enriched properties mapping among the parts of a BOM line whose
own properties are the same mapping (or empty) and whose values agree alike; each part still
gets what joining it on its own gives. The reference is our own plain path: each part's
properties merged with its line's facts by hand, the part made with dataclasses.replace.
Nothing is pasted from the tool's output.
"""

from __future__ import annotations

from dataclasses import fields, replace

from hypothesis import given, strategies as st

from linter.bom_join import _changed, _compare, _value_matches, apply_bom
from linter.model import Circuit, DeviceModel, Part, Pin, SourceLocation
from linter.readers.bom import parse_bom

HERE = SourceLocation("t.edif", 1, 1)
PINS = (Pin("1", "a"), Pin("2", "b"))


def _resistor(ref: str, value: str, properties: dict[str, str]) -> Part:
    return Part(ref, "resistor", value, PINS, HERE, properties=properties)


def test_parts_of_one_line_get_their_own_facts_merged() -> None:
    shared = {"footprint": "r0603"}
    parts = {part.ref: part for part in (
        _resistor("R1", "4k7", shared),
        _resistor("R2", "4k7", shared),          # same mapping as R1
        _resistor("R3", "4k7", {"footprint": "r0603"}),  # equal, another mapping
        _resistor("R4", "4k7", {"footprint": "r0805"}),
        _resistor("R5", "4k7", {}),
        _resistor("R6", "1k", {}),               # disagrees with the BOM's value
        _resistor("R7", "1k", shared),           # disagrees, R1's mapping
    )}
    circuit = Circuit("t.edif", "edif", parts, {})
    bom = parse_bom('Ref,Value,Package,Tolerance\n"R1,R2,R3,R4,R5,R6,R7",4.7k,0603,1%\n', "b.csv")
    joined, _ = apply_bom(circuit, bom)
    facts = {"package": "0603", "tolerance": "1%"}  # the line's columns, read by hand
    for ref, part in parts.items():
        expected = {**part.properties, **facts}
        if part.value == "1k":
            expected["bom_value"] = "4.7k"
        assert joined.parts[ref] == replace(part, properties=expected)
        assert dict(joined.parts[ref].properties) == expected
    # The originals are untouched.
    assert shared == {"footprint": "r0603"} and parts["R5"].properties == {}
    # Shared where the result is the same by construction, separate otherwise.
    assert joined.parts["R1"].properties is joined.parts["R2"].properties
    assert joined.parts["R1"].properties is not joined.parts["R7"].properties
    assert joined.parts["R5"].properties is not joined.parts["R6"].properties


def test_lines_do_not_share() -> None:
    parts = {ref: _resistor(ref, "4k7", {}) for ref in ("R1", "R2")}
    circuit = Circuit("t.edif", "edif", parts, {})
    bom = parse_bom("Ref,Value,Package\nR1,4k7,0603\nR2,4k7,0805\n", "b.csv")
    joined, _ = apply_bom(circuit, bom)
    assert joined.parts["R1"].properties == {"package": "0603"}
    assert joined.parts["R2"].properties == {"package": "0805"}


def test_changed_keeps_every_other_field() -> None:
    # Every field of Part set to a value of its own, whatever fields Part has.
    values = {}
    for index, item in enumerate(fields(Part)):
        values[item.name] = {
            "pins": PINS, "location": SourceLocation("f", index, index),
            "value_si": float(index), "properties": {"k": str(index)},
            "model": DeviceModel(f"M{index}", "D"),
        }.get(item.name, f"text{index}")
    part = Part(**values)
    new = _changed(part, {"package": "0402"}, "PN-9")
    assert new == replace(part, properties={"package": "0402"}, part_number="PN-9")
    for item in fields(Part):
        if item.name not in ("properties", "part_number"):
            assert getattr(new, item.name) is getattr(part, item.name)


_NUMBERS = st.sampled_from([None, "", "LX-1", "lx-1", "LX-2", "M1"])


@given(st.lists(st.tuples(_NUMBERS, _NUMBERS, st.booleans(), st.sampled_from(["1k", "2k"])),
                min_size=1, max_size=6))
def test_discrepancies_as_plain(cases) -> None:
    # Reference: our own plain path, _compare asked for every joined part (the join only
    # skips parts whose part numbers are equal texts and whose values agree).
    parts, rows = {}, ["Ref,Value,Part Number"]
    for index, (netlist_number, bom_number, has_model, value) in enumerate(cases):
        ref = f"R{index + 1}"
        model = DeviceModel("M1", "R") if has_model else None
        parts[ref] = Part(ref, "resistor", value, PINS, HERE, part_number=netlist_number,
                          model=model)
        rows.append(f"{ref},1k,{bom_number or ''}")
    circuit = Circuit("t.edif", "edif", parts, {})
    bom = parse_bom("\n".join(rows) + "\n", "b.csv")
    _, problems = apply_bom(circuit, bom)
    expected = []
    for line in bom.lines:
        for ref in line.refs:
            part = parts[ref]
            same = _value_matches(part, line)
            expected.extend(_compare(part, line, same))
    assert [p for p in problems if p.kind in ("value", "part-number")] == expected
