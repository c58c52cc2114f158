"""Property tests on random valid boards built from the recognised LED group kinds.

A board is drawn as a list of groups (resistor LED from a rail, a string on one resistor,
parallel LEDs on one resistor, an NPN sink with a base divider, LEDs sourced from and sunk
into microcontroller pins) and written twice by the small writers below, as EDIF 2.0.0 and as
a SPICE deck, with a ``ledlint.toml`` giving the rails and part data (invented figures).

Properties:
* the two readings agree: the same parts, kinds and connectivity;
* Kirchhoff's current law holds at the nominal corner at every net of a group joining only
  LEDs and at most one resistor (current into the net = current out, from the solved LED
  and resistor currents);
* every solved span has min <= nom <= max;
* reordering the file's parts and nets changes nothing in the report but locations;
* the JSON report is byte-identical across runs and across PYTHONHASHSEED values.
Examples are bounded (deadline None, a few dozen examples) to keep the suite fast.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from linter.engine import CheckRequest, run_check
from linter.readers import read_netlist
from linter.report import ReportFormat
from linter.solve import CURRENT_TOL, GMIN

ROOT = Path(__file__).resolve().parents[1]
SETTINGS = """# invented figures for generated boards
[rails]
"+5V" = "5 V ±5%"
"+12V" = "12 V ±10%"
"GND" = "0 V"

[parts."RED"]
kind = "led"
color = "red"
vf_typ = "2.0 V"
vf_max = "2.4 V"
vf_test_current = "20 mA"
if_max = "30 mA"

[parts."NPNX"]
kind = "npn"
hfe_min = 100
hfe_typ = 200
vbe = "0.65 V"
vce_sat = "0.2 V"

[parts."MCU8"]
kind = "mcu"
pin_current_max = "20 mA"
output_resistance = "25 Ω"
supply_pins = ["VDD"]
ground_pins = ["VSS"]
"""
MCU_PORTS = ("VDD", "VSS", *(f"P{i}" for i in range(8)))
CELL_PORTS = {"RES": ("1", "2"), "LED": ("A", "K"), "NPN": ("C", "B", "E"), "MCU8": MCU_PORTS}
BOUNDED = settings(max_examples=25, deadline=None, derandomize=True,
                   suppress_health_check=[HealthCheck.too_slow,
                                          HealthCheck.function_scoped_fixture])


@dataclass(frozen=True)
class Placed:
    """One part: reference, library cell, value (ohms for a resistor, else the part number), pins."""

    ref: str
    cell: str
    value: str
    pins: tuple[tuple[str, str], ...]


class Board:
    """Parts placed group by group with fresh references and net names."""

    def __init__(self) -> None:
        self.parts: list[Placed] = []
        self.counts: dict[str, int] = {}
        self.pins_used = 0
        self.kinds: list[str] = []  # the group kinds placed, in order

    def add(self, letter: str, cell: str, value: str, *nets: str) -> str:
        self.counts[letter] = self.counts.get(letter, 0) + 1
        ref = f"{letter}{self.counts[letter]}"
        self.parts.append(Placed(ref, cell, value, tuple(zip(CELL_PORTS[cell], nets))))
        return ref

    def net(self) -> str:
        return f"N{sum(self.counts.values())}_{len(self.parts)}"

    def pin(self) -> str | None:
        if self.pins_used >= 8:
            return None
        self.pins_used += 1
        return f"P{self.pins_used - 1}"


def _place(board: Board, kind: str, ohms: int, count: int) -> None:
    if kind.startswith("pin") and board.pins_used >= 8:
        return
    board.kinds.append(kind)
    rail = "+12V" if kind in ("string", "npn-sink") else "+5V"
    if kind == "resistor":
        a = board.net()
        board.add("R", "RES", str(ohms), rail, a)
        board.add("D", "LED", "RED", a, "GND")
    elif kind == "string":
        node = board.net()
        board.add("R", "RES", str(ohms), rail, node)
        for index in range(count):
            following = "GND" if index == count - 1 else f"{node}_s{index}"
            board.add("D", "LED", "RED", node, following)
            node = following
    elif kind == "parallel":
        a = board.net()
        board.add("R", "RES", str(ohms), rail, a)
        for _ in range(count):
            board.add("D", "LED", "RED", a, "GND")
    elif kind == "npn-sink":
        top, collector, base, emitter = (f"{board.net()}_{s}" for s in "tcbe")
        board.add("D", "LED", "RED", rail, top)
        board.add("D", "LED", "RED", top, collector)
        board.add("Q", "NPN", "NPNX", collector, base, emitter)
        board.add("R", "RES", "10000", rail, base)
        board.add("R", "RES", "2200", base, "GND")
        board.add("R", "RES", str(max(ohms // 4, 10)), emitter, "GND")
    elif kind in ("pin-source", "pin-sink"):
        pin = board.pin()
        if pin is None:
            return
        a = board.net()
        if kind == "pin-source":
            board.add("R", "RES", str(ohms), f"U1_{pin}", a)
            board.add("D", "LED", "RED", a, "GND")
        else:
            board.add("R", "RES", str(ohms), rail, a)
            board.add("D", "LED", "RED", a, f"U1_{pin}")


GROUP = st.tuples(st.sampled_from(["resistor", "string", "parallel", "npn-sink", "pin-source",
                                   "pin-sink"]),
                  st.sampled_from([150, 220, 330, 470, 680, 1000]), st.integers(2, 3))


@st.composite
def boards(draw: st.DrawFn) -> Board:
    board = Board()
    for kind, ohms, count in draw(st.lists(GROUP, min_size=1, max_size=5)):
        _place(board, kind, ohms, count)
    if board.pins_used:
        used = [f"P{i}" for i in range(board.pins_used)]
        board.add("U", "MCU8", "MCU8", "+5V", "GND", *(f"U1_{p}" for p in used))
    return board


# ---- writers -----------------------------------------------------------------------------------

def write_spice(board: Board, order: list[int] | None = None) -> str:
    """A SPICE deck: the MCU is an X instance of an empty subcircuit (kept whole)."""
    lines = ["* generated board", ".model RED D(IS=1e-19 N=2.0 RS=4)",
             ".model NPNX NPN(IS=1e-14 BF=200)",
             f".subckt MCU8 {' '.join(MCU_PORTS)}", ".ends MCU8"]
    for index in order or range(len(board.parts)):
        part = board.parts[index]
        nets = dict(part.pins)
        nodes = [("0" if nets.get(port) == "GND" else nets.get(port, f"nc_{part.ref}_{port}"))
                 for port in CELL_PORTS[part.cell]]
        if part.cell == "MCU8":
            lines.append(f"X{part.ref} {' '.join(nodes)} MCU8")
        else:
            lines.append(f"{part.ref} {' '.join(nodes)} {part.value}")
    return "\n".join([*lines, ".end", ""])


def write_edif(board: Board, order: list[int] | None = None) -> str:
    """EDIF 2.0.0: library PARTS with the four cells, cell TOP with instances and nets."""
    cells = "".join(
        f"(cell {cell} (cellType GENERIC) (view netlist (viewType NETLIST) (interface "
        + " ".join(f"(port (rename p{i} \"{port}\") (direction INOUT))"
                   for i, port in enumerate(ports)) + ")))\n"
        for cell, ports in CELL_PORTS.items())
    parts = [board.parts[i] for i in (order or range(len(board.parts)))]
    instances = "".join(
        f"(instance {p.ref} (viewRef netlist (cellRef {p.cell} (libraryRef PARTS)))"
        f" (property VALUE (string \"{p.value}\")))\n" for p in parts)
    joined: dict[str, list[str]] = {}
    for part in parts:
        for port, net in part.pins:
            index = CELL_PORTS[part.cell].index(port)
            joined.setdefault(net, []).append(f"(portRef p{index} (instanceRef {part.ref}))")
    nets = "".join(f"(net (rename n{i} \"{name}\") (joined {' '.join(refs)}))\n"
                   for i, (name, refs) in enumerate(joined.items()) if len(refs) > 1)
    return ("(edif generated (edifVersion 2 0 0) (edifLevel 0) (keywordMap (keywordLevel 0))\n"
            f"(library PARTS (edifLevel 0) (technology (numberDefinition))\n{cells})\n"
            "(library BOARD (edifLevel 0) (technology (numberDefinition))\n"
            "(cell TOP (cellType GENERIC) (view netlist (viewType NETLIST) (interface)\n"
            f"(contents\n{instances}{nets}))))\n(design generated (cellRef TOP (libraryRef BOARD))))\n")


def _folder(tmp: Path, name: str, board: Board, order: list[int] | None = None) -> Path:
    folder = tmp / name
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "ledlint.toml").write_text(SETTINGS, encoding="utf-8")
    (folder / "board.cir").write_text(write_spice(board, order), encoding="utf-8")
    (folder / "board.edif").write_text(write_edif(board, order), encoding="utf-8")
    return folder


def _connectivity(circuit) -> set[frozenset[tuple[str, str]]]:  # type: ignore[no-untyped-def]
    """Nets as sets of (ref, pin), nets of one pin left out (SPICE names unused MCU ports)."""
    return {frozenset(net.pins) for net in circuit.nets.values() if len(net.pins) > 1}


def _json(result) -> dict:  # type: ignore[no-untyped-def]
    return json.loads(ReportFormat("json").reporter(verbose=False, quiet=False,
                                                    color=False).render(result))


# ---- properties --------------------------------------------------------------------------------

@BOUNDED
@given(board=boards())
def test_edif_and_spice_readings_agree(board: Board, tmp_path_factory) -> None:
    folder = _folder(tmp_path_factory.mktemp("agree"), "b", board)
    edif = read_netlist(folder / "board.edif")
    spice = read_netlist(folder / "board.cir", opaque={"MCU8"})
    assert {r: p.kind for r, p in edif.parts.items()} == {r: p.kind for r, p in spice.parts.items()}
    assert _connectivity(edif) == _connectivity(spice)


@BOUNDED
@given(board=boards())
def test_kirchhoff_current_law_and_ordered_spans(board: Board, tmp_path_factory) -> None:
    folder = _folder(tmp_path_factory.mktemp("kcl"), "b", board)
    result = run_check(CheckRequest(netlist=folder / "board.cir"))
    circuit = result.circuit
    # every group drawn is recognised as its kind and solved
    assert sorted(g.group.topology for g in result.groups) == sorted(board.kinds)
    assert all(g.status == "solved" for g in result.groups)
    for group in result.groups:
        if group.status != "solved":
            continue
        for item in (*group.leds, *group.resistors):
            for span in (item.current, item.power):
                assert span.min <= span.nom * (1 + 1e-9) + 1e-15
                assert span.nom <= span.max * (1 + 1e-9) + 1e-15
        leds = {led.ref: led.current.nom for led in group.leds}
        resistors = {r.ref: abs(r.current.nom) for r in group.resistors}
        for net in group.group.nets:
            refs = set(circuit.parts_on(net))
            if net in result.rails or not refs or not refs <= set(leds) | set(resistors) or len(refs & set(resistors)) > 1:
                continue
            into = sum(leds[ref] * (1 if pin == "K" else -1)
                       for ref, pin in circuit.nets[net].pins if ref in leds)
            through = sum(resistors[ref] for ref in refs & set(resistors))
            # the net joins only LEDs and at most one resistor: what enters leaves (Kirchhoff),
            # within the solver's KCL residual and the GMIN leak to ground at up to 15 V
            allowed = CURRENT_TOL + GMIN * 15.0 + 1e-9 * max(through, abs(into))
            assert abs(abs(into) - through) <= allowed, (net, into, through)


def _reordered_reports(board: Board, order: list[int], tmp: Path) -> list[dict]:
    reports = []
    for name, permutation in (("a", None), ("b", order)):
        folder = _folder(tmp, name, board, permutation)
        report = _json(run_check(CheckRequest(netlist=folder / "board.cir")))
        for finding in report["findings"]:
            finding.pop("location", None)
        report.pop("inputs", None)
        reports.append(report)
    return reports


@BOUNDED
@given(board=boards(), data=st.data())
def test_reordering_parts_changes_only_locations(board: Board, data: st.DataObject,
                                                 tmp_path_factory) -> None:
    # groups, currents, rules, severities, values, fingerprints, messages, fixes and the
    # findings' order are the same: parts are listed in natural order, whatever the file's
    order = list(data.draw(st.permutations(range(len(board.parts)))))
    first, second = _reordered_reports(board, order, tmp_path_factory.mktemp("order"))
    assert first == second


def test_reordering_parts_keeps_the_finding_text(tmp_path: Path) -> None:
    board = Board()
    _place(board, "parallel", 150, 2)  # R1 feeding D1 and D2 in parallel
    first, second = _reordered_reports(board, [2, 1, 0], tmp_path)
    assert first == second


@settings(max_examples=2, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(board=boards())
def test_json_report_is_byte_identical_across_runs_and_hash_seeds(board: Board,
                                                                  tmp_path_factory) -> None:
    folder = _folder(tmp_path_factory.mktemp("seed"), "b", board)
    outputs = set()
    for seed in ("0", "1", "12345"):
        run = subprocess.run([sys.executable, "-m", "linter.cli", "check", "board.edif",
                              "--format", "json"], cwd=folder, capture_output=True, timeout=120,
                             env={**os.environ, "PYTHONHASHSEED": seed})
        assert run.returncode in (0, 1), run.stderr
        outputs.add(run.stdout)
    assert len(outputs) == 1
