"""EDIF 2.0.0 writings of a synthetic board: flat, and hierarchical with repeated sheets.

Both writings share a library ``parts`` of leaf cells (``RES``, ``CAP``, ``LED``, ``NPN``,
``NMOS`` and the microcontroller ``BM32``). Pin names that are not EDIF identifiers are
written ``(rename &1 "1")``; so are net names (``(rename &_12V "+12V")``). Instances carry
the properties ``value``, ``partNumber`` and ``package``.

Flat: one cell ``board`` holds every part (instance name = reference) and every net.
Hierarchical: library ``sheets`` holds one cell per channel template with ports
``VIN`` / ``V5`` / ``GND`` / ``DRV``; cell ``board`` holds the microcontrollers and one
instance ``S{n}`` of a sheet per channel, so the parts' paths are ``S12/R1``.

Files are written in chunks as they are produced; a 100k-part board takes a few seconds.
"""

from __future__ import annotations

import re
from pathlib import Path
from typing import IO, Iterable

from bench.gen_board import MCU_PINS, Board
from bench.templates import MCU, LeafPart, Template

__all__ = ["write_flat_edif", "write_hier_edif", "edif_name"]

_IDENTIFIER = re.compile(r"[A-Za-z][A-Za-z0-9_]*")
_LEAF_CELLS = {"RES": ("1", "2"), "CAP": ("1", "2"), "LED": ("A", "K"),
               "NPN": ("C", "B", "E"), "NMOS": ("D", "G", "S"), MCU: MCU_PINS}
_CHUNK = 20_000


def edif_name(name: str) -> str:
    """``name`` as an EDIF name: the identifier itself, or ``(rename &_12V "+12V")``."""
    if _IDENTIFIER.fullmatch(name):
        return name
    return f'(rename {_ref(name)} "{name}")'


def _ref(name: str) -> str:
    """The EDIF identifier that stands for ``name`` in references (``&1``, ``&_12V``)."""
    if _IDENTIFIER.fullmatch(name):
        return name
    return "&" + re.sub(r"[^A-Za-z0-9_]", "_", name)


class _Chunks:
    """Collects lines and writes them to ``stream`` every :data:`_CHUNK` lines."""

    def __init__(self, stream: IO[str]) -> None:
        self.stream = stream
        self.lines: list[str] = []

    def add(self, line: str) -> None:
        self.lines.append(line)
        if len(self.lines) >= _CHUNK:
            self.flush()

    def flush(self) -> None:
        self.stream.write("\n".join(self.lines) + "\n" if self.lines else "")
        self.lines.clear()


def _header(out: _Chunks, board: Board, kind: str) -> None:
    out.add(f"(edif bench_{board.parts}_s{board.seed}")
    for line in ("  (edifVersion 2 0 0)", "  (edifLevel 0)", "  (keywordMap (keywordLevel 0))",
                 "  (status", "    (written", "      (timeStamp 2024 1 1 0 0 0)",
                 '      (program "bench/gen_board.py" (version "1"))',
                 f'      (comment "synthetic LED board, {kind}: {board.parts} parts, '
                 f'seed {board.seed}")))'):
        out.add(line)


def _library_open(out: _Chunks, name: str) -> None:
    out.add(f"  (library {name}")
    out.add("    (edifLevel 0)")
    out.add("    (technology (numberDefinition))")


def _leaf_library(out: _Chunks) -> None:
    _library_open(out, "parts")
    for cell, pins in _LEAF_CELLS.items():
        out.add(f"    (cell {cell} (cellType GENERIC)")
        out.add("      (view netlist (viewType NETLIST)")
        ports = " ".join(f"(port {edif_name(pin)} (direction INOUT))" for pin in pins)
        out.add(f"        (interface {ports})))")
    out.add("  )")


def _properties(leaf: LeafPart) -> str:
    props = [("value", leaf.value), ("partNumber", leaf.part_number), ("package", leaf.package)]
    return "".join(f' (property {key} (string "{text}"))' for key, text in props if text)


def _instance(name: str, cell: str, library: str, properties: str) -> str:
    return (f"        (instance {name} (viewRef netlist (cellRef {cell} (libraryRef {library})))"
            f"{properties})")


def _net(name: str, refs: Iterable[str]) -> str:
    """A net whose joined list is the given ``(portRef …)`` texts."""
    return f"        (net {edif_name(name)} (joined\n          " + \
        "\n          ".join(refs) + "))"


def _mcu_instance(ref: str) -> str:
    return _instance(ref, MCU, "parts",
                     f' (property value (string "{MCU}")) (property partNumber (string "{MCU}"))'
                     ' (property package (string "TQFP-48"))')


def _cell_open(out: _Chunks, name: str, ports: Iterable[str]) -> None:
    out.add(f"    (cell {name} (cellType GENERIC)")
    out.add("      (view netlist (viewType NETLIST)")
    out.add("        (interface" + "".join(f" (port {p} (direction INOUT))" for p in ports) + ")")
    out.add("        (contents")


def _footer(out: _Chunks, top_library: str) -> None:
    out.add("        ))))")
    out.add(f"  (design board (cellRef board (libraryRef {top_library}))))")
    out.flush()


def write_flat_edif(board: Board, path: Path) -> None:
    """Flat EDIF: every part an instance of cell ``board``, named by its reference."""
    with path.open("w", encoding="ascii", newline="\n") as stream:
        out = _Chunks(stream)
        _header(out, board, "flat")
        _leaf_library(out)
        _library_open(out, "design")
        _cell_open(out, "board", ())
        for mcu in board.mcus:
            out.add(_mcu_instance(mcu.ref))
        for part in board.flat_parts():
            out.add(_instance(part.ref, part.leaf.cell, "parts", _properties(part.leaf)))
        for net, pins in board.nets().items():
            out.add(_net(net, (f"(portRef {_ref(pin)} (instanceRef {ref}))" for ref, pin in pins)))
        _footer(out, "design")


def _sheet(out: _Chunks, template: Template) -> None:
    """One channel template as a cell with ports and its own parts and nets."""
    _cell_open(out, template.name, template.ports)
    nets: dict[str, list[str]] = {port: [f"(portRef {port})"] for port in template.ports}
    for leaf in template.parts:
        out.add(_instance(leaf.name, leaf.cell, "parts", _properties(leaf)))
        for pin, net in leaf.pins:
            nets.setdefault(net, []).append(f"(portRef {_ref(pin)} (instanceRef {leaf.name}))")
    for net, refs in nets.items():
        out.add(_net(net, refs))
    out.add("        )))")


def write_hier_edif(board: Board, path: Path) -> None:
    """Hierarchical EDIF: one sheet cell per template, one instance ``S{n}`` per channel."""
    with path.open("w", encoding="ascii", newline="\n") as stream:
        out = _Chunks(stream)
        _header(out, board, "hierarchical")
        _leaf_library(out)
        _library_open(out, "sheets")
        for template in board.templates:
            _sheet(out, template)
        out.add("  )")
        _library_open(out, "design")
        _cell_open(out, "board", ())
        nets: dict[str, list[str]] = {}
        for mcu in board.mcus:
            out.add(_mcu_instance(mcu.ref))
        for ref, pin, net in board.mcu_connections():
            nets.setdefault(net, []).append(f"(portRef {pin} (instanceRef {ref}))")
        for channel in board.channels:
            out.add(_instance(channel.sheet, channel.template.name, "sheets", ""))
            for port in channel.template.ports:
                nets.setdefault(channel.net(port), []).append(
                    f"(portRef {port} (instanceRef {channel.sheet}))")
        for net, refs in nets.items():
            out.add(_net(net, refs))
        _footer(out, "design")
