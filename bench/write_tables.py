"""The BOM (CSV) and the settings file (``ledlint.toml``) of a synthetic board.

BOM: one row per line item (same value, package, rating, tolerance and part number), at
most :data:`REFS_PER_ROW` references a row, listed ``"R1, R7, R12"``; columns References,
Value, Qty, Package, Power, Tolerance, Part. The hierarchical BOM names parts by path
(``S12/R1``), since every leaf name repeats across sheets.

Settings: the rails (+12 V ±10 %, +5 V ±5 %, GND) and part data for every invented LED,
transistor, MOSFET and the microcontroller. All figures are invented.
"""

from __future__ import annotations

import csv
from pathlib import Path

from bench.gen_board import Board
from bench.templates import LED_TYPES, MCU, NMOS, NPN, PIN_RESISTANCE, LeafPart
from bench.write_spice import TEST_CURRENT

__all__ = ["write_bom", "write_settings", "REFS_PER_ROW"]

REFS_PER_ROW = 50
"""References listed in one BOM row at most."""

_MCU_LEAF = LeafPart("U", MCU, MCU, (), part_number=MCU, package="TQFP-48")


def _line_items(board: Board, hierarchical: bool) -> dict[tuple, list[str]]:
    items: dict[tuple, list[str]] = {}
    for mcu in board.mcus:
        items.setdefault(_item_key(_MCU_LEAF), []).append(mcu.ref)
    for channel in board.channels:
        for ref, leaf in zip(channel.refs, channel.template.parts):
            name = f"{channel.sheet}/{leaf.name}" if hierarchical else ref
            items.setdefault(_item_key(leaf), []).append(name)
    return items


def _item_key(leaf: LeafPart) -> tuple:
    return (leaf.value, leaf.package or "", leaf.power or "", leaf.tolerance or "",
            leaf.part_number or "")


def write_bom(board: Board, path: Path, hierarchical: bool) -> None:
    """Write the BOM; references flat (``R12``) or by sheet path (``S12/R1``)."""
    with path.open("w", encoding="utf-8", newline="") as stream:
        writer = csv.writer(stream, lineterminator="\n")
        writer.writerow(["References", "Value", "Qty", "Package", "Power", "Tolerance", "Part"])
        for (value, package, power, tolerance, part), refs in _line_items(board,
                                                                           hierarchical).items():
            for start in range(0, len(refs), REFS_PER_ROW):
                row_refs = refs[start:start + REFS_PER_ROW]
                writer.writerow([", ".join(row_refs), value, len(row_refs), package, power,
                                 tolerance, part])


def _led_tables() -> list[str]:
    lines = []
    for led in LED_TYPES:
        lines += [f'[parts."{led.part_number}"]', 'kind = "led"',
                  f'color = "{led.color.lower()}"', f'vf_min = "{led.vf_min:g} V"',
                  f'vf_typ = "{led.vf_typ:g} V"', f'vf_max = "{led.vf_max:g} V"',
                  f'vf_test_current = "{TEST_CURRENT * 1000:g} mA"', 'if_max = "30 mA"',
                  'vr_max = "5 V"', f'tempco = "{led.tempco_mv:g} mV/K"', ""]
    return lines


def write_settings(board: Board, path: Path) -> None:
    """Write ``ledlint.toml``: rails and part data."""
    lines = [f"# Settings of a synthetic board ({board.parts} parts, seed {board.seed}).", "",
             "[rails]", '"+12V" = "12 V ±10%"', '"+5V" = "5 V ±5%"', '"GND" = "0 V"', "",
             *_led_tables(),
             f'[parts."{NPN}"]', 'kind = "npn"', "hfe_min = 100", "hfe_typ = 200",
             'vbe = "0.7 V"', 'vbe_current = "10 mA"', 'vce_sat = "0.2 V"', 'vce_max = "45 V"', 'ic_max = "100 mA"',
             'pd_max = "250 mW"', "",
             f'[parts."{NMOS}"]', 'kind = "nmos"', 'vgs_th = "1.6 V"', 'rds_on = "0.8 Ω"',
             'rds_on_vgs = "4.5 V"', 'vds_max = "30 V"', 'id_max = "1.5 A"',
             'pd_max = "350 mW"', "",
             f'[parts."{MCU}"]', 'kind = "mcu"', 'pin_current_max = "20 mA"',
             'package_current_max = "200 mA"', f'output_resistance = "{PIN_RESISTANCE:g} Ω"',
             'supply_pins = ["VDD"]', 'ground_pins = ["VSS"]', ""]
    path.write_text("\n".join(lines), encoding="utf-8")
