"""SPICE deck of a synthetic board: the flat EDIF's twin, for ngspice and the SPICE reader.

Same references and nets as the flat EDIF (``GND`` is ground; ngspice takes ``gnd`` as node
0). The rails are DC sources ``V12`` and ``V5``. Every LED, transistor and MOSFET uses a
``.model`` named by its part number; the microcontroller is ``XU{n}``, an instance of the
subcircuit ``BM32`` that models each output as 25 Ω to the 5 V supply (``PA*``, driven
high) or to ground (``PB*``, driven low), as the demo board does. MOSFET bulks are tied to
their sources; a MOSFET ``Q7`` is the element ``MQ7`` (SPICE needs the ``M``; the letter in
front is the usual exporter convention, as in the demo board). The deck ends with ``.op``
and ``.end``.

Model figures are invented but of plausible size: LED saturation currents are fitted so
that V = N·Vt·ln(I/IS + 1) + I·RS (the Shockley equation with series resistance) passes
through the typical Vf at 20 mA at 27 °C, ngspice's nominal temperature.
"""

from __future__ import annotations

import math
from pathlib import Path

from bench.gen_board import HIGH_PINS, LOW_PINS, MCU_PINS, Board
from bench.templates import LED_TYPES, MCU, NMOS, NPN, PIN_RESISTANCE, LedType

__all__ = ["write_spice", "led_saturation_current", "TEST_CURRENT"]

TEST_CURRENT = 0.020
"""Current at which the LED models pass through their typical Vf (A)."""
_BOLTZMANN = 1.380649e-23  # J/K, exact (SI 2019)
_CHARGE = 1.602176634e-19  # C, exact (SI 2019)
_TNOM = 300.15  # K, ngspice's default nominal temperature (27 °C)
_NODES_PER_LINE = 8


def led_saturation_current(led: LedType) -> float:
    """IS (A) so that the diode passes through (vf_typ, :data:`TEST_CURRENT`).

    IS = I / (exp((Vf − I·RS) / (N·Vt)) − 1), Vt = k·T/q at 27 °C.
    """
    thermal = _BOLTZMANN * _TNOM / _CHARGE
    junction = led.vf_typ - TEST_CURRENT * led.spice_rs
    return TEST_CURRENT / math.expm1(junction / (led.spice_n * thermal))


def _models() -> list[str]:
    lines = [f".model {led.part_number} D (IS={led_saturation_current(led):.4g} "
             f"N={led.spice_n:g} RS={led.spice_rs:g} BV=5 IBV=10u)" for led in LED_TYPES]
    lines.append(f".model {NPN} NPN (IS=1e-14 BF=200 VAF=100 CJC=4p CJE=8p)")
    lines.append(f".model {NMOS} NMOS (LEVEL=1 VTO=1.6 KP=0.4 LAMBDA=0.01)")
    return lines


def _continued(head: str, nodes: list[str], tail: str) -> list[str]:
    """``head`` then ``nodes`` on continuation lines (``+``) of at most 8 nodes, then ``tail``."""
    lines = [head]
    for start in range(0, len(nodes), _NODES_PER_LINE):
        lines.append("+ " + " ".join(nodes[start:start + _NODES_PER_LINE]))
    lines[-1] += f" {tail}" if tail else ""
    return lines


def _mcu_subcircuit() -> list[str]:
    lines = _continued(f".subckt {MCU}", list(MCU_PINS), "")
    lines += [f"R{pin} {pin} VDD {PIN_RESISTANCE:g}" for pin in HIGH_PINS]
    lines += [f"R{pin} {pin} VSS {PIN_RESISTANCE:g}" for pin in LOW_PINS]
    lines.append(f".ends {MCU}")
    return lines


def _element(ref: str, cell: str, value: str, nets: list[str]) -> str:
    if cell == "LED":
        return f"{ref} {nets[0]} {nets[1]} {value}"
    if cell == "NPN":
        return f"{ref} {nets[0]} {nets[1]} {nets[2]} {NPN}"
    if cell == "NMOS":
        return f"M{ref} {nets[0]} {nets[1]} {nets[2]} {nets[2]} {NMOS}"
    return f"{ref} {nets[0]} {nets[1]} {value}"


def write_spice(board: Board, path: Path) -> None:
    """Write the deck; parts in the flat EDIF's order, microcontrollers first."""
    with path.open("w", encoding="ascii", newline="\n") as stream:
        head = [f"* Synthetic LED board (bench/gen_board.py): {board.parts} parts, "
                f"seed {board.seed}",
                "* Twin of board.edif: same references and nets.",
                "V12 +12V GND DC 12", "V5 +5V GND DC 5", *_models(), *_mcu_subcircuit()]
        for mcu in board.mcus:
            head += _continued(f"X{mcu.ref}", [net for _, net in mcu.pins], MCU)
        stream.write("\n".join(head) + "\n")
        chunk: list[str] = []
        for part in board.flat_parts():
            value = part.leaf.part_number if part.leaf.cell == "LED" else part.leaf.spice_value
            chunk.append(_element(part.ref, part.leaf.cell, value or "",
                                  [net for _, net in part.pins]))
            if len(chunk) >= 20_000:
                stream.write("\n".join(chunk) + "\n")
                chunk.clear()
        chunk += [".op", ".end"]
        stream.write("\n".join(chunk) + "\n")
