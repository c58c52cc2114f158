"""A group being labelled: the cluster, its strands, and the extras a transistor brings.

:class:`Draft` gathers parts, nets, rails and pins from the walks and freezes them into a
:class:`~linter.groups.Group` (parts, nets and rails in natural order; LEDs in netlist order;
strings by their first LED).
"""

from __future__ import annotations

from linter.groups import NO_LEVELS, Group, PinDrive, Scenario
from linter.refs import natural_key
from linter.topology_index import CircuitIndex
from linter.topology_shape import Bank, Strand
from linter.topology_walk import Cluster

__all__ = ["Draft", "pin_ids", "resistor_label"]


class Draft:
    """What is known of a group while it is being labelled; :meth:`group` freezes it."""

    def __init__(self, index: CircuitIndex, cluster: Cluster, leds: tuple[str, ...]) -> None:
        self.index = index
        self.cluster = cluster
        self.leds = leds
        self.strands: list[Strand] = []
        self.extra_parts: list[str] = []
        self.extra_nets: list[str] = []
        self.extra_pins: list[PinDrive] = []

    def strings(self) -> tuple[tuple[str, ...], ...]:
        if self.strands:
            found = [s.leds for s in self.strands if s.leds]
        else:
            found = [(led,) for led in self.leds]
        if len(found) == 1:
            return (found[0],)
        rank = self.index.led_rank
        return tuple(sorted(found, key=lambda leds: rank[leds[0]]))

    def pins(self) -> tuple[PinDrive, ...]:
        if not self.cluster.pins and not self.extra_pins:
            return ()
        found = dict.fromkeys(self.cluster.pins + self.extra_pins)
        if len(found) == 1:
            return tuple(found)
        return tuple(sorted(found, key=lambda pin: natural_key(pin.id)))

    def group(self, topology: str, setter: str | None = None,
              scenarios: tuple[Scenario, ...] | None = None, reason: str | None = None,
              transistor: str | None = None, drive: str | None = None) -> Group:
        """The frozen Group; parts and nets gathered from the cluster and the extras."""
        pins = self.pins()
        index, cluster = self.index, self.cluster
        all_rails = index.rails
        parts = set(self.extra_parts)
        for chain in cluster.chains:
            parts.update(chain.parts)
        parts.update(cluster.transistors)
        nets = cluster.nets.union(self.extra_nets)
        if pins:
            parts.update([p.part for p in pins])
            nets.update([p.supply for p in pins if p.supply in all_rails])
        sorted_nets = index.natural_sorted(nets)
        leds = self.leds
        first = min(leds, key=index.led_rank.__getitem__) if len(leds) > 1 else leds[0]
        return Group(
            f"G-{first}", topology, leds, self.strings(), tuple(sorted(parts, key=natural_key)),
            tuple(sorted_nets), index.rails_among(sorted_nets),
            setter, pins, scenarios or (Scenario("on", NO_LEVELS, leds),), reason, transistor,
            drive)

    def unrecognised(self, reason: str) -> Group:
        return self.group("unrecognised", reason=reason)


def pin_ids(pins: tuple[PinDrive, ...], net: str) -> list[str]:
    """Ids (``U1.PA4``) of the pins on ``net``."""
    return [pin.id for pin in pins if pin.net == net]


def resistor_label(bank: Bank, single: str) -> tuple[str, str | None, str | None]:
    """(label, setter, reason) for strings on resistors; ``single`` labels one string."""
    own = [s.resistors for s in bank.strings]
    if bank.shared:
        label = "parallel" if len(bank.strings) > 1 else single
        return label, bank.shared[0], None
    if len(bank.strings) == 1:
        return (single, own[0][0], None) if own[0] else ("across-rails", None, None)
    if all(own):
        shape = "resistor" if all(len(s.leds) == 1 for s in bank.strings) else "string"
        label = shape if single in ("resistor", "string") else single
        setters = ", ".join(r[0] for r in own)
        return label, None, f"each string has its own resistor ({setters})"
    if not any(own):
        return "across-rails", None, None
    return "unrecognised", None, "only some of the parallel strings have their own resistor"
