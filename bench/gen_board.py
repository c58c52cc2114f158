"""Synthetic LED boards for the benchmarks: N parts, deterministic for a seed.

A board is a sequence of *channels*, each an instance of a channel template
(:mod:`bench.templates`): resistor-ballasted LEDs, LEDs sharing a resistor, strings on
+12 V, NPN current sinks, N-MOSFET low-side switches, LEDs sourced from and sunk into
microcontroller pins, and decoupling capacitors as filler. Microcontrollers (``U1``…, 32
output pins each: ``PA0``–``PA15`` driven high, ``PB0``–``PB15`` driven low) are added as
the pin-driven channels need them. Every template is placed at least twice, so every
group kind is present and every leaf name is repeated in the hierarchical writing.

The same board is written five ways (see :func:`write_all`): flat EDIF (references ``R1``,
``D1``…), hierarchical EDIF (one cell per template, instances ``S1``…, references
``S12/R1``), a SPICE deck for ngspice, a BOM for each EDIF writing, and ``ledlint.toml``.

Usage::

    python bench/gen_board.py --parts 10000 --seed 1 --out bench/out/b10k

or, from Python, ``generate(parts, seed)`` → :class:`Board`, whose :attr:`Board.counts`
gives the expected number of groups of each kind.
"""

from __future__ import annotations

import argparse
import random
import sys
import time
from collections import Counter
from dataclasses import dataclass
from pathlib import Path
from typing import Iterator, Sequence

if __package__ in (None, ""):  # run as a script: make ``bench`` importable
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.templates import MCU, LeafPart, Template, make_templates  # noqa: E402

__all__ = ["Channel", "Mcu", "Board", "generate", "variants_for", "write_all", "MCU_PINS",
           "MIN_PARTS", "KIND_WEIGHTS", "main"]

HIGH_PINS = tuple(f"PA{i}" for i in range(16))
"""Microcontroller outputs driven high (sources, MOSFET gates)."""
LOW_PINS = tuple(f"PB{i}" for i in range(16))
"""Microcontroller outputs driven low (sinks)."""
MCU_PINS = ("VDD", "VSS", *HIGH_PINS, *LOW_PINS)
"""The microcontroller's pins in EDIF port and SPICE subcircuit node order."""

VARIANTS = 3
"""Templates per kind on the smallest boards."""
PARTS_PER_VARIANT = 1000
"""One more template per kind for every this many parts: a 100k-part board has 100 variants
of each kind (800 channel templates), so its groups are not a handful of repeated circuits
and a solver that remembers identical circuits still has hundreds of distinct ones to solve."""


def variants_for(parts: int) -> int:
    """Templates per kind for a board of ``parts`` parts: ``max(3, parts // 1000)``."""
    return max(VARIANTS, parts // PARTS_PER_VARIANT)
KIND_WEIGHTS = {
    "resistor": 20, "parallel": 10, "string": 12, "npn-sink": 10, "low-side-switch": 10,
    "pin-source": 12, "pin-sink": 8, "decoupling": 18,
}
"""Relative frequency of each kind when channels are drawn after the first placements."""


@dataclass(frozen=True)
class Channel:
    """One placed template: ``S{index}``; ``drive`` is the board net on port ``DRV``, if any.

    ``refs`` are the flat references of the template's parts, in template order.
    """

    index: int
    template: Template
    refs: tuple[str, ...]
    drive: str | None = None

    @property
    def sheet(self) -> str:
        """The hierarchical instance name, ``S12``."""
        return f"S{self.index}"

    def net(self, local: str) -> str:
        """The board net of a local net: a rail, the pin net, or ``G12_N1`` inside the sheet."""
        if local == "DRV":
            return self.drive or ""
        for port, rail in self.template.rails:
            if port == local:
                return rail
        return f"G{self.index}_{local}"


@dataclass(frozen=True)
class Mcu:
    """A microcontroller ``U{n}``; its pins' nets are ``+5V``, ``GND`` and ``U3_PA7``…"""

    ref: str

    @property
    def pins(self) -> tuple[tuple[str, str], ...]:
        """``(pin, net)`` for every pin in :data:`MCU_PINS` order, used or not (SPICE needs all)."""
        rails = {"VDD": "+5V", "VSS": "GND"}
        return tuple((pin, rails.get(pin, f"{self.ref}_{pin}")) for pin in MCU_PINS)


@dataclass(frozen=True)
class FlatPart:
    """A part as the flat writings see it: reference, template part and ``(pin, net)`` pairs."""

    ref: str
    leaf: LeafPart
    pins: tuple[tuple[str, str], ...]


@dataclass(frozen=True)
class Board:
    """A generated board: its templates, channels and microcontrollers."""

    parts: int
    seed: int
    templates: tuple[Template, ...]
    channels: tuple[Channel, ...]
    mcus: tuple[Mcu, ...]

    @property
    def counts(self) -> dict[str, int]:
        """Channels of each kind: LED groups by topology name, and ``decoupling``."""
        found = Counter(channel.template.kind for channel in self.channels)
        return {kind: found.get(kind, 0) for kind in KIND_WEIGHTS}

    @property
    def led_groups(self) -> int:
        """Number of LED groups (every channel but the decoupling capacitors)."""
        return sum(n for kind, n in self.counts.items() if kind != "decoupling")

    @property
    def leds(self) -> int:
        """Number of LEDs on the board."""
        return sum(channel.template.leds for channel in self.channels)

    @property
    def connections(self) -> int:
        """Number of joined pins: every channel part's pins, the used microcontroller pins."""
        pins = sum(len(p.pins) for c in self.channels for p in c.template.parts)
        return pins + sum(1 for _ in self.mcu_connections())

    def mcu_connections(self) -> Iterator[tuple[str, str, str]]:
        """``(ref, pin, net)`` of every joined microcontroller pin: supplies and used outputs.

        Unused outputs are on no net (an EDIF net joins at least two pins).
        """
        used = {channel.drive for channel in self.channels if channel.drive}
        for mcu in self.mcus:
            for pin, net in mcu.pins:
                if pin in ("VDD", "VSS") or net in used:
                    yield mcu.ref, pin, net

    def flat_parts(self) -> Iterator[FlatPart]:
        """Every channel part with its flat reference and board nets, in channel order."""
        for channel in self.channels:
            for ref, leaf in zip(channel.refs, channel.template.parts):
                yield FlatPart(ref, leaf, tuple((pin, channel.net(net)) for pin, net in leaf.pins))

    def nets(self) -> dict[str, list[tuple[str, str]]]:
        """Board net → ``(ref, pin)`` pairs, flat references, microcontroller pins first."""
        nets: dict[str, list[tuple[str, str]]] = {}
        for ref, pin, net in self.mcu_connections():
            nets.setdefault(net, []).append((ref, pin))
        for part in self.flat_parts():
            for pin, net in part.pins:
                nets.setdefault(net, []).append((part.ref, pin))
        return nets


class _Builder:
    """Places channels, numbers references per prefix, hands out microcontroller pins."""

    def __init__(self) -> None:
        self.channels: list[Channel] = []
        self.mcus: list[Mcu] = []
        self.numbers: Counter[str] = Counter()
        self.free: dict[str, list[str]] = {"high": [], "low": []}
        self.used = 0

    def cost(self, template: Template) -> int:
        """Parts that placing ``template`` adds, counting a new microcontroller if needed."""
        needs_mcu = template.drive is not None and not self.free[template.drive]
        return len(template.parts) + int(needs_mcu)

    def place(self, template: Template) -> None:
        drive = None
        if template.drive is not None:
            if not self.free[template.drive]:
                self._add_mcu()
            drive = self.free[template.drive].pop(0)
        refs = []
        for leaf in template.parts:
            self.numbers[leaf.prefix] += 1
            refs.append(f"{leaf.prefix}{self.numbers[leaf.prefix]}")
        self.channels.append(Channel(len(self.channels) + 1, template, tuple(refs), drive))
        self.used += len(template.parts)

    def _add_mcu(self) -> None:
        ref = f"U{len(self.mcus) + 1}"
        self.mcus.append(Mcu(ref))
        self.free["high"] = [f"{ref}_{pin}" for pin in HIGH_PINS]
        self.free["low"] = [f"{ref}_{pin}" for pin in LOW_PINS]
        self.used += 1


def _first_placements(templates: tuple[Template, ...], rng: random.Random) -> list[Template]:
    """Every template twice, in a seeded order."""
    order = list(templates) * 2
    rng.shuffle(order)
    return order


MIN_PARTS = 300
"""Smallest part count accepted: room to place every template twice (about 200 parts)."""


def generate(parts: int, seed: int, variants: int | None = None) -> Board:
    """A board of exactly ``parts`` parts, the same for the same ``(parts, seed, variants)``.

    ``variants`` templates of each kind; by default :func:`variants_for` ``(parts)``.

    Raises
    ------
    ValueError
        When ``parts`` is below :data:`MIN_PARTS` or too few to place every template twice.
    """
    if parts < MIN_PARTS:
        raise ValueError(f"a board needs at least {MIN_PARTS} parts (got {parts})")
    rng = random.Random(seed)
    templates = make_templates(rng, variants_for(parts) if variants is None else variants)
    by_kind = {kind: [t for t in templates if t.kind == kind] for kind in KIND_WEIGHTS}
    fillers = by_kind["decoupling"]
    builder = _Builder()
    for template in _first_placements(templates, rng):
        builder.place(template)
    if builder.used > parts:
        raise ValueError(f"seed {seed} needs at least {builder.used} parts (got {parts})")
    kinds, weights = list(KIND_WEIGHTS), list(KIND_WEIGHTS.values())
    while True:
        template = rng.choice(by_kind[rng.choices(kinds, weights)[0]])
        if builder.used + builder.cost(template) > parts:
            break
        builder.place(template)
    while builder.used < parts:
        builder.place(rng.choice(fillers))
    assert builder.used == parts, (builder.used, parts)
    return Board(parts, seed, templates, tuple(builder.channels), tuple(builder.mcus))


def write_all(board: Board, out: Path) -> dict[str, Path]:
    """Write every file of ``board`` into folder ``out``; returns them by role."""
    from bench.write_edif import write_flat_edif, write_hier_edif
    from bench.write_spice import write_spice
    from bench.write_tables import write_bom, write_settings

    out.mkdir(parents=True, exist_ok=True)
    files = {
        "edif": out / "board.edif", "edif_hier": out / "board_hier.edif",
        "spice": out / "board.cir", "bom": out / "bom.csv", "bom_hier": out / "bom_hier.csv",
        "settings": out / "ledlint.toml",
    }
    write_flat_edif(board, files["edif"])
    write_hier_edif(board, files["edif_hier"])
    write_spice(board, files["spice"])
    write_bom(board, files["bom"], hierarchical=False)
    write_bom(board, files["bom_hier"], hierarchical=True)
    write_settings(board, files["settings"])
    return files


def main(argv: Sequence[str] | None = None) -> int:
    """Command line: generate a board and write its files."""
    parser = argparse.ArgumentParser(description="Write a synthetic LED board for benchmarks.")
    parser.add_argument("--parts", type=int, default=10_000, help="number of parts (>= 300)")
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--out", type=Path, required=True, help="folder for the files")
    parser.add_argument("--variants", type=int, default=None,
                        help="templates per kind (default: max(3, parts // 1000))")
    args = parser.parse_args(argv)
    started = time.perf_counter()
    try:
        board = generate(args.parts, args.seed, args.variants)
    except ValueError as exc:
        parser.error(str(exc))
    files = write_all(board, args.out)
    elapsed = time.perf_counter() - started
    counts = ", ".join(f"{kind} {n}" for kind, n in board.counts.items())
    print(f"{board.parts} parts, {len(board.mcus)} MCUs, {board.leds} LEDs; {counts}")
    for role, path in files.items():
        print(f"  {role:10} {path} ({path.stat().st_size / 1e6:.2f} MB)")
    print(f"written in {elapsed:.2f} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
