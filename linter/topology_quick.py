"""The quick path for the commonest LED group: one series chain between two terminals.

Most groups on a board are one chain (a resistor and one or more LEDs) from a rail to a rail,
or from a microcontroller pin to a rail. :func:`quick_group` labels such a group without the
cluster, draft and bank records of the general path (:func:`linter.topology._classify`), and
gives exactly the Group the general path gives. It answers only when every step is the plain
one: ``resistor`` or ``string`` between two rails of different voltage (anode on the higher
one), ``pin-source`` or ``pin-sink`` with a resistor in the chain. Anything else (a net that
is not a rail or pin at either end, an unconnected end, an LED without anode and cathode
names, LEDs facing opposite ways, no resistor, a reversed LED, two pins) returns None and
the general path labels the group, with its reason.

Equality with the general path is held by ``tests/test_topology_quick.py`` (the demo, the
topology fixtures and generated boards, with the quick path on and off).
"""

from __future__ import annotations

from typing import Mapping

from linter.groups import Group, PinDrive, Scenario
from linter.refs import natural_key
from linter.topology_index import CircuitIndex
from linter.topology_shape import NotABank, orient
from linter.topology_walk import walk_chain

__all__ = ["quick_group"]


def _end_pins(index: CircuitIndex, net: str | None, rails: Mapping,
              found: list[PinDrive]) -> bool:
    """True when ``net`` is a rail or a microcontroller pin's net (its pins go to ``found``)."""
    if net is None:
        return False
    if net in rails:
        return True
    mcu = index.split(net).mcu
    if not mcu:
        return False
    supply = index.supply_net
    found.extend([PinDrive(ref, pin, net, supply(ref)) for ref, pin in mcu])
    return True


def quick_group(index: CircuitIndex, led: str, order: Mapping[str, int],
                placed: set[str]) -> Group | None:
    """The group of ``led`` when it is one chain between two terminals, else None.

    ``led`` is the first unplaced LED in natural order (as in :func:`linter.topology._groups_with`);
    ``order`` is the LEDs' netlist order; ``placed`` the LEDs already in groups (not changed).
    """
    if index.role(led) != "series":
        return None
    chain = walk_chain(index, led)
    nets = chain.nets
    start, end = nets[0], nets[-1]
    if start == end:
        return None  # (both ends on one net: the general path says why)
    rails = index.rails
    found: list[PinDrive] = []
    if not _end_pins(index, start, rails, found) or not _end_pins(index, end, rails, found):
        return None
    try:
        strand = orient(index, chain)
    except NotABank:
        return None
    resistors = strand.resistors
    if not resistors:
        return None
    kind = index.kind
    leds = [ref for ref in chain.parts if kind(ref) == "led" and ref not in placed]
    leds_t = (leds[0],) if len(leds) == 1 else tuple(sorted(leds, key=order.__getitem__))
    top, bottom = strand.chain.nets[0], strand.chain.nets[-1]
    top_rail, bottom_rail = rails.get(top), rails.get(bottom)
    if top_rail is not None and bottom_rail is not None:
        if top_rail.nom <= bottom_rail.nom:
            return None  # (same voltage or reversed: the general path)
        label = "resistor" if len(strand.leds) == 1 else "string"
        scenario = Scenario("on", {}, leds_t)
    elif top_rail is None and bottom_rail is not None and bottom_rail.nom <= 0.0:
        label, level, pin_net = "pin-source", "high", top
    elif bottom_rail is None and top_rail is not None and top_rail.nom > 0.0:
        label, level, pin_net = "pin-sink", "low", bottom
    else:
        return None
    pins: tuple[PinDrive, ...] = ()
    parts = set(chain.parts)
    net_set = set(nets)
    if found:
        unique = dict.fromkeys(found)
        pins = tuple(unique) if len(unique) == 1 else \
            tuple(sorted(unique, key=lambda pin: natural_key(pin.id)))
        parts.update([pin.part for pin in pins])
        net_set.update([pin.supply for pin in pins if pin.supply in rails])
        scenario = Scenario("on", {pin.id: level for pin in pins if pin.net == pin_net},
                            leds_t)
    sorted_nets = index.natural_sorted(net_set)
    rank = index.led_rank
    first = min(leds_t, key=rank.__getitem__) if len(leds_t) > 1 else leds_t[0]
    return Group(f"G-{first}", label, leds_t, (strand.leds,),
                 tuple(sorted(parts, key=natural_key)), tuple(sorted_nets),
                 tuple([net for net in sorted_nets if net in rails]), resistors[0], pins,
                 (scenario,), None, None, None)
