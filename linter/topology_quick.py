"""Quick paths for the commonest LED groups, each giving exactly the general path's Group.

Most groups on a board are one of a few plain shapes. :func:`quick_group` labels them
without the cluster, draft and bank records of the general path
(:func:`linter.topology._classify`):

* one chain between two terminals: ``resistor`` or ``string`` between two rails of different
  voltage (anode on the higher one), ``pin-source`` or ``pin-sink`` with a resistor in it;
* a chain from a rail into one transistor's collector (drain), the emitter (source) on a rail
  or through one chain without LEDs to a rail: ``npn-sink``, ``pnp-source``,
  ``low-side-switch``, ``high-side-switch`` (:func:`_through_transistor`);
* chains that meet at one node, each running from it to a rail: ``parallel``, or strings each
  with its own resistor (:func:`_bank_on_node`).

Each answers only when every step is the plain one; anything else (a net that is not a rail
or pin where one is needed, an unconnected end, an LED without anode and cathode names, LEDs
facing opposite ways, no resistor, a reversed LED, a problem in a base network…) returns None
and the general path labels the group, with its reason.

Equality with the general path is held by ``tests/test_topology_quick.py`` (the demo, the
topology fixtures, generated boards and changed circuits of each kind, with the quick path on
and off).
"""

from __future__ import annotations

from itertools import compress
from operator import attrgetter
from typing import Mapping

from linter.groups import NO_LEVELS, Group, PinDrive, Scenario
from linter.refs import natural_key
from linter.topology_index import LED_ANODE_NAMES, LED_CATHODE_NAMES, CircuitIndex
from linter.topology_draft import resistor_label
from linter.topology_shape import NotABank, Strand, find_bank
from linter.topology_walk import MAX_GROUP_PARTS, Chain, walk_chain, walk_control

__all__ = ["quick_group"]

_new_tuple = tuple.__new__  # (a named tuple made without its Python-level ``__new__``)
_PART_OF = attrgetter("part")
_RESISTOR = frozenset({"resistor"})


def _end_pins(index: CircuitIndex, net: str | None, rails: Mapping,
              found: list[PinDrive]) -> bool:
    """True when ``net`` is a rail or a microcontroller pin's net (its pins go to ``found``)."""
    if net is None:
        return False
    if net in rails:
        return True
    mcu = index.mcu_pairs(net)
    if not mcu:
        return False
    supply = index.supply_net
    for ref, pin in mcu:
        found.append(PinDrive(ref, pin, net, supply(ref)))
    return True


def _oriented(index: CircuitIndex, chain: Chain) -> tuple[Strand, list[str]] | None:
    """:func:`linter.topology_shape.orient` in one loop, and the chain's LEDs in chain order;
    None where orient raises (an LED without anode and cathode names, or with both on one
    net, or LEDs facing opposite ways)."""
    kind, all_parts = index.kind, index.circuit.parts
    parts, nets = chain
    leds: list[str] = []
    resistors: list[str] = []
    forward = None
    position = 0
    for ref in parts:
        part_kind = kind(ref)
        if part_kind == "led":
            pins = all_parts[ref].pins  # (index.led_pins written in line)
            if len(pins) != 2:
                return None
            first, second = pins
            one, other = first.name.casefold(), second.name.casefold()
            if one in LED_ANODE_NAMES and other in LED_CATHODE_NAMES:
                anode, cathode = first.net, second.net
            elif other in LED_ANODE_NAMES and one in LED_CATHODE_NAMES:
                anode, cathode = second.net, first.net
            else:
                return None
            if anode == cathode:
                return None
            way = anode == nets[position] and cathode == nets[position + 1]
            if forward is None:
                forward = way
            elif way != forward:
                return None
            leds.append(ref)
        elif part_kind == "resistor":
            resistors.append(ref)
        position += 1
    if forward is False:
        strand = _new_tuple(Strand, (_new_tuple(Chain, (parts[::-1], nets[::-1])),
                                     tuple(leds[::-1]), tuple(resistors[::-1])))
    else:
        strand = _new_tuple(Strand, (chain, tuple(leds), tuple(resistors)))
    return strand, leds


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
    start_done = start in rails or _end_pins(index, start, rails, found)  # (rails: no call)
    end_done = end in rails or _end_pins(index, end, rails, found)
    if not (start_done and end_done):
        if found or start_done == end_done:
            return None
        inner = end if start_done else start
        if inner is None:
            return None
        if len(index.pins_of(inner)) == 2:
            return _through_transistor(index, chain, inner, order, placed)
        return _bank_on_node(index, chain, inner, order, placed)
    oriented = _oriented(index, chain)
    if oriented is None:
        return None
    strand, leds = oriented
    resistors = strand.resistors
    if not resistors:
        return None
    if len(leds) == 1:  # (_unplaced's first case in line)
        leds_t = strand.leds if leds[0] not in placed else ()
    else:
        leds_t = _unplaced(leds, strand.leds, order, placed)
    top, bottom = strand.chain.nets[0], strand.chain.nets[-1]
    top_rail, bottom_rail = rails.get(top), rails.get(bottom)
    if top_rail is not None and bottom_rail is not None:
        if top_rail.nom <= bottom_rail.nom:
            return None  # (same voltage or reversed: the general path)
        label = "resistor" if len(strand.leds) == 1 else "string"
        scenario = Scenario("on", NO_LEVELS, leds_t)
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
        pins = tuple(dict.fromkeys(found)) if len(found) == 1 else _sorted_pins(found)
        parts.update(map(_PART_OF, pins))
        levels = {}
        for pin in pins:
            if pin.supply in rails:
                net_set.add(pin.supply)
            if pin.net == pin_net:
                levels[f"{pin.part}.{pin.pin}"] = level  # (pin.id)
        scenario = Scenario("on", levels, leds_t)
    sorted_nets, group_rails = index.sorted_nets_and_rails(net_set)
    first = min(leds_t, key=index.led_rank.__getitem__) if len(leds_t) > 1 else leds_t[0]
    return Group(f"G-{first}", label, leds_t, (strand.leds,),
                 tuple(sorted(parts, key=natural_key)), sorted_nets, group_rails,
                 resistors[0], pins, (scenario,), None, None, None)


def _unplaced(leds: list[str], string: tuple[str, ...], order: Mapping[str, int],
              placed: set[str]) -> tuple[str, ...]:
    """The chain's LEDs not yet in a group, in netlist order (as the general path's
    ``_cluster_leds``); the string's own tuple when it is the same (one tuple kept, not two)."""
    if len(leds) == 1:
        return string if leds[0] not in placed else ()
    found = sorted([led for led in leds if led not in placed], key=order.__getitem__)
    return string if list(string) == found else tuple(found)


def _sorted_pins(pins: list[PinDrive]) -> tuple[PinDrive, ...]:
    """The pins without repeats, by natural order of their ids (as Draft.pins)."""
    if not pins:
        return ()
    unique = dict.fromkeys(pins)
    if len(unique) == 1:
        return tuple(unique)
    return tuple(sorted(unique, key=lambda pin: natural_key(pin.id)))


def _through_transistor(index: CircuitIndex, chain: Chain, c_net: str,
                        order: Mapping[str, int], placed: set[str]) -> Group | None:
    """The group when the LED chain runs from a rail to one transistor's collector (drain).

    The collector net joins the chain and the transistor only; the emitter (source) is on a
    rail, or on a net joining it to one chain of series parts without LEDs whose far end is a
    rail. The label follows :func:`linter.topology_transistor.classify_transistor` step by
    step; anything it would not label as a sink, source or switch returns None.
    """
    pins = index.pins_of(c_net)
    if len(pins) != 2:
        return None
    edge = chain.parts[0] if chain.nets[0] == c_net else chain.parts[-1]
    (ref_a, pin_a), (ref_b, pin_b) = pins
    ref, pin_name = (ref_b, pin_b) if ref_a == edge else (ref_a, pin_a)
    if ref == edge or (ref_a != edge and ref_b != edge) or index.role(ref) != "transistor":
        return None
    terminals = index.transistor_pins(ref)
    if terminals is None or terminals["c"].name != pin_name:
        return None
    e_net = terminals["e"].net
    if e_net is None or e_net == c_net:
        return None
    rails = index.rails
    kind = index.kind
    chains = [chain]
    if e_net in rails:
        e_rail, emitter_resistors = e_net, ()
    else:
        e_pins = index.pins_of(e_net)
        if len(e_pins) != 2 or index.mcu_pairs(e_net):
            return None
        (ref_a, pin_a), (ref_b, pin_b) = e_pins
        other = ref_b if (ref_a, pin_a) == (ref, terminals["e"].name) else ref_a
        if other == ref or index.role(other) != "series":
            return None
        tail = walk_chain(index, other)
        far = tail.nets[-1] if tail.nets[0] == e_net else tail.nets[0]
        if far not in rails or "led" in map(kind, tail.parts):
            return None
        chains.append(tail)
        e_rail = far
        emitter_resistors = tuple(compress(tail.parts,
                                           map(_RESISTOR.__contains__, map(kind, tail.parts))))
    oriented = _oriented(index, chain)
    if oriented is None:
        return None
    strand, leds = oriented
    top, bottom = strand.chain.nets[0], strand.chain.nets[-1]
    polarity = index.polarity(ref)
    low = polarity in ("npn", "nmos")
    far_led = top if low else bottom
    near_led = bottom if low else top
    if near_led != c_net or far_led not in rails:
        return None
    upper, lower = (far_led, e_rail) if low else (e_rail, far_led)
    if rails[upper].nom <= rails[lower].nom:
        return None
    cluster_nets = set(chain.nets)
    for extra in chains[1:]:
        cluster_nets.update(extra.nets)
    cluster_nets.add(e_net)
    control = walk_control(index, ref, terminals["b"].net, cluster_nets)
    if control.problems:
        return None
    if emitter_resistors:
        if polarity in ("nmos", "pmos"):
            return None
        label, setter, reason = ("npn-sink" if low else "pnp-source"), ref, None
    else:
        label = "low-side-switch" if low else "high-side-switch"
        if strand.resistors:
            setter, reason = strand.resistors[0], None
        else:
            setter, reason = None, f"nothing but {ref} limits the current"
    if len(leds) == 1:  # (_unplaced's first case in line)
        leds_t = strand.leds if leds[0] not in placed else ()
    else:
        leds_t = _unplaced(leds, strand.leds, order, placed)
    level = "high" if low else "low"
    if control.pins:
        levels = {}
        for pin in control.pins:
            levels[f"{pin.part}.{pin.pin}"] = level  # (pin.id)
    else:
        levels = NO_LEVELS
    scenario = Scenario("on", levels, leds_t)
    if control.notes:
        reason = "; ".join([text for text in [reason, *control.notes] if text]) or None
    pins_t = _sorted_pins(control.pins)
    parts = set(control.parts)
    for each in chains:
        parts.update(each.parts)
    parts.add(ref)
    net_set = cluster_nets.union(control.nets)
    if pins_t:
        parts.update(map(_PART_OF, pins_t))
        for pin in pins_t:
            if pin.supply in rails:
                net_set.add(pin.supply)
    sorted_nets, group_rails = index.sorted_nets_and_rails(net_set)
    first = min(leds_t, key=index.led_rank.__getitem__) if len(leds_t) > 1 else leds_t[0]
    return Group(f"G-{first}", label, leds_t, (strand.leds,),
                 tuple(sorted(parts, key=natural_key)), sorted_nets, group_rails, setter, pins_t,
                 (scenario,), reason, ref, control.drive)


def _bank_on_node(index: CircuitIndex, chain: Chain, node: str, order: Mapping[str, int],
                  placed: set[str]) -> Group | None:
    """The group when every part on ``node`` is a series part whose chain runs from ``node``
    to a rail (LEDs or strings in parallel, their resistor): ``parallel``, or strings each
    with its own resistor, labelled by :func:`find_bank` and :func:`resistor_label` as the
    general path labels them between two rails."""
    rails = index.rails
    split = index.split(node)
    if split.mcu or split.controls or split.foreign:
        return None
    chains = [chain]
    seen = set(chain.parts)
    roles = index.roles
    for ref, _ in index.pins_on(node):
        if ref in seen:
            continue
        if roles[ref] != "series":
            return None
        found = walk_chain(index, ref)
        far = found.nets[-1] if found.nets[0] == node else found.nets[0]
        if far not in rails or (found.nets[0] == node) == (found.nets[-1] == node):
            return None
        chains.append(found)
        seen.update(found.parts)
        if len(seen) > MAX_GROUP_PARTS:
            return None
    strands: list[Strand] = []
    leds: list[str] = []
    for each in chains:
        oriented = _oriented(index, each)
        if oriented is None:
            return None
        strands.append(oriented[0])
        leds += oriented[1]
    terminals = {net for each in chains for net in each.nets if net in rails}
    try:
        bank = find_bank(strands, terminals)
    except NotABank:
        return None
    top, bottom = rails[bank.top], rails[bank.bottom]
    if bank.antiparallel or top.nom <= bottom.nom:
        return None
    single = "resistor" if len(bank.strings[0].leds) == 1 else "string"
    label, setter, reason = resistor_label(bank, single)
    if label in ("unrecognised", "across-rails"):
        return None
    unplaced = [led for led in leds if led not in placed]
    leds_t = (unplaced[0],) if len(unplaced) == 1 else \
        tuple(sorted(unplaced, key=order.__getitem__))
    found_strings = [s.leds for s in strands if s.leds]
    rank = index.led_rank
    strings = (found_strings[0],) if len(found_strings) == 1 else \
        tuple(sorted(found_strings, key=lambda string: rank[string[0]]))
    net_set = {node}
    for each in chains:
        net_set.update(each.nets)
    sorted_nets, group_rails = index.sorted_nets_and_rails(net_set)
    first = min(leds_t, key=rank.__getitem__) if len(leds_t) > 1 else leds_t[0]
    return Group(f"G-{first}", label, leds_t, strings, tuple(sorted(seen, key=natural_key)),
                 sorted_nets, group_rails, setter, (),
                 (Scenario("on", NO_LEVELS, leds_t),), reason, None, None)
