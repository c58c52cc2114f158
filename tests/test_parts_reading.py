"""Part data worked out once per part reading (kind, value, part number, cell, properties,
model) is the part data made part by part.

Expected values: the plain path of our own code, :func:`linter.parts.resolve_part_data_plain`
(find_spec and the record makers for each part on its own, nothing shared).
"""

from __future__ import annotations

import pickle
import sys
from pathlib import Path

import pytest

from linter.bom_join import apply_bom
from linter.config import default_settings, load_settings, settings_from_text
from linter.model import Circuit, DeviceModel, Part, Pin, SourceLocation, packed_location
from linter.parts import resolve_part_data, resolve_part_data_plain
from linter.readers import read_netlist
from linter.readers.bom import read_bom

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"
AT = SourceLocation("t.cir", 1, 1)


def _same(circuit: Circuit, settings) -> None:
    plain, plain_data = resolve_part_data_plain(circuit, settings)
    before = dict(circuit.parts)
    fresh = pickle.loads(pickle.dumps(circuit))  # (parts of its own, for fresh=True)
    for fast, fast_data in (resolve_part_data(circuit, settings),
                            resolve_part_data(fresh, settings, fresh=True)):
        assert fast == plain and dict(fast.parts) == dict(plain.parts)
        assert list(fast.parts) == list(plain.parts)
        for ref, part in fast.parts.items():  # (field by field: properties are no hash key)
            assert part.properties == plain.parts[ref].properties
            assert part.location == plain.parts[ref].location
        assert fast_data == plain_data and list(fast_data) == list(plain_data)
        for ref, record in fast_data.items():  # a note names its own part
            note = getattr(record, "note", None)
            assert note is None or note.startswith(f"{ref}: ")
            assert type(record) is type(plain_data[ref])
            assert list(vars(record)) == list(vars(plain_data[ref]))  # (fields in order)
    assert all(before[ref] is part for ref, part in circuit.parts.items())


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo(netlist: str) -> None:
    path = DEMO / netlist
    circuit, _ = apply_bom(read_netlist(path), read_bom(DEMO / "bom.csv"))
    _same(circuit, load_settings(path, None, ()))
    _same(read_netlist(path), default_settings())  # no BOM, no part data: generic notes


def test_generated_board(tmp_path: Path) -> None:
    sys.path.insert(0, str(ROOT))
    try:
        from bench.gen_board import generate, write_all
    finally:
        sys.path.remove(str(ROOT))
    write_all(generate(600, seed=7), tmp_path)
    for name in ("board.edif", "board.cir"):
        path = tmp_path / name
        circuit, _ = apply_bom(read_netlist(path), read_bom(tmp_path / "bom.csv"))
        _same(circuit, load_settings(path, None, ()))
        _same(circuit, default_settings())


SETTINGS = settings_from_text(
    '[parts."LD0603RD"]\nkind = "led"\ncolor = "red"\nvf_typ = "2.0 V"\n'
    '[parts."UC8"]\nkind = "mcu"\npin_current_max = "25 mA"\n'
    '[parts."QX1"]\nkind = "npn"\nhfe_min = 100\n')


def test_shared_readings_of_every_kind() -> None:
    model = DeviceModel("QM", "NPN", {"BF": 150.0, "IS": 1e-14})
    props = {"tolerance": "1%", "package": "0603"}

    def part(ref, kind, value=None, number=None, pins=("1", "2"), **extra):
        return Part(ref, kind, value, tuple(Pin(name, f"N{i}") for i, name in enumerate(pins)),
                    packed_location("t.cir", len(ref), 1), part_number=number, **extra)

    parts = [
        part("D1", "led", "RED"), part("D2", "led", "RED"), part("D3", "led", "BLUE"),
        part("D4", "diode", "LD0603RD", "LD0603RD"), part("D5", "diode", "LD0603RD", "LD0603RD"),
        part("D6", "diode", "1N4148"),
        part("R1", "resistor", "1k", value_si=1e3), part("R2", "resistor", "1k", value_si=1e3),
        part("R3", "resistor", "1k", value_si=1e3, properties=props),
        part("R4", "resistor", "1k", value_si=1e3, properties=dict(props)),
        part("Q1", "npn", "QX1", pins=("C", "B", "E")), part("Q2", "npn", pins=("C", "B", "E")),
        part("Q3", "npn", pins=("C", "B", "E")), part("Q4", "pnp", pins=("C", "B", "E")),
        part("Q5", "npn", "QM", pins=("C", "B", "E"), model=model),
        part("Q6", "npn", "QM", pins=("C", "B", "E"), model=model),
        part("M1", "nmos", pins=("D", "G", "S")), part("M2", "pmos", pins=("D", "G", "S")),
        part("M3", "nmos", pins=("D", "G", "S")),
        part("U1", "ic", "UC8", "UC8", pins=("VDD", "VSS", "PA0")),
        part("U2", "ic", "UC8", "UC8", pins=("VCC", "GND", "PB1")),
        part("C1", "capacitor", "100n"), part("C2", "capacitor", "100n"),
    ]
    circuit = Circuit("t.cir", "spice", {p.ref: p for p in parts}, {})
    _same(circuit, SETTINGS)
    _same(circuit, default_settings())
    _, data = resolve_part_data(circuit, default_settings())
    assert data["Q3"].note.startswith("Q3: ") and data["M3"].note.startswith("M3: ")


def test_nothing_changed_keeps_the_parts_mapping() -> None:
    parts = {"R1": Part("R1", "resistor", "1k", (), AT, 1e3)}
    circuit = Circuit("t.cir", "spice", parts, {})
    resolved, _ = resolve_part_data(circuit, default_settings())
    assert resolved.parts is circuit.parts and resolved == circuit


def test_renamed_is_replace() -> None:
    """The note renaming copies the record's fields: dataclasses.replace is the plain way."""
    from dataclasses import replace

    from linter.parts import _DICT_RECORDS, _renamed
    from linter.partdata import BjtData, LedData, McuData, MosfetData, ResistorData

    assert _DICT_RECORDS == {LedData, ResistorData, BjtData, MosfetData, McuData}
    for record in (LedData(color="red", vf_typ=2.0, assumed=("vf_min",), note="D1: x"),
                   ResistorData(ohms=1e3, tolerance=0.05, note="R1: y"),
                   BjtData(polarity="npn", note=None), MosfetData(polarity="nmos"),
                   McuData(supply_pins=("VDD",), note="U1: z")):
        renamed = _renamed(record, "Q9: w")
        assert renamed == replace(record, note="Q9: w") and renamed.note == "Q9: w"
        assert list(vars(renamed).items()) == list(vars(replace(record, note="Q9: w")).items())
        assert record.note != "Q9: w"  # (the given record unchanged)
        assert hash(renamed) == hash(replace(record, note="Q9: w"))
