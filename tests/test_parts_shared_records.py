"""Resistor part data worked out once per distinct resistor is the per-part record.

The expected value of every resistor is :func:`linter.parts.resistor_data` of that part on
its own (the plain computation); the shared records must equal it, note and all.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.bom_join import apply_bom
from linter.config import default_settings, load_settings
from linter.model import Circuit, Part, Pin, SourceLocation
from linter.parts import find_spec, resistor_data, resolve_part_data
from linter.readers import read_netlist
from linter.readers.bom import read_bom

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"


def _check(circuit: Circuit, settings) -> None:
    resolved, data = resolve_part_data(circuit, settings)
    tolerance = settings.assume.resistor_tolerance
    resistors = [part for part in resolved.parts.values() if part.kind == "resistor"]
    assert resistors
    for part in resistors:
        spec = find_spec(part, settings.parts)
        assert data[part.ref] == resistor_data(part, spec, tolerance)  # the plain record


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo_resistor_records(netlist: str) -> None:
    path = DEMO / netlist
    circuit, _ = apply_bom(read_netlist(path), read_bom(DEMO / "bom.csv"))
    _check(circuit, load_settings(path, None, ()))


def test_records_with_notes_name_their_own_part() -> None:
    here = SourceLocation("t", 1, 1)

    def resistor(ref: str, **properties: str) -> Part:
        return Part(ref, "resistor", "1k", (Pin("1", "a"), Pin("2", "b")), here, 1e3,
                    properties=properties)

    parts = [resistor("R1"), resistor("R2"), resistor("R3", tolerance="1%"),
             resistor("R4", tolerance="1%", package="0603"), resistor("R5", package="0603"),
             resistor("R6", package="0603"), resistor("R7", power="1/4W")]
    circuit = Circuit("t", "edif", {p.ref: p for p in parts}, {})
    _check(circuit, default_settings())
    _, data = resolve_part_data(circuit, default_settings())
    assert data["R2"].note is not None and data["R2"].note.startswith("R2: ")  # its own name
