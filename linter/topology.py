"""LED groups: which LEDs share a drive path, and what sets their current.

:func:`find_groups` starts from every LED (natural reference order), gathers the chains and
the transistor around it (:mod:`linter.topology_walk`), reads the passive part as a bank
(:mod:`linter.topology_shape`) and labels the group with one of
:data:`linter.groups.TOPOLOGIES`. Every LED lands in exactly one group; what cannot be
labelled is an ``unrecognised`` group whose ``reason`` says what was found.

Labels, by the edge of the bank (top = the anode side, bottom = the cathode side):

* rail above rail: ``resistor`` (one LED) or ``string`` with a resistor; ``parallel`` when
  several strings share a resistor; ``across-rails`` with no resistor at all; ``reversed``
  when the anode's rail is the lower one.
* pin above a 0 V (or lower) rail: ``pin-source``; rail above a pin: ``pin-sink``; pins on both
  sides: ``pin-bicolour`` (one scenario per direction; an anti-parallel pair lights one LED
  in each). Several strings sharing a resistor are ``parallel`` here too.
* a transistor below (NPN, N-MOSFET) or above (PNP, P-MOSFET) the bank: with an emitter
  resistor ``npn-sink`` / ``pnp-source`` (the transistor is the setter, all strings on it
  belong to the group); without one ``low-side-switch`` / ``high-side-switch`` (the resistor
  is the setter), except that several strings sharing one resistor behind a switch are
  labelled ``parallel`` (sharing is what the rules must see) with ``transistor`` naming the
  switch. A MOSFET with a source resistor is not recognised.

Microcontroller pins are the edge of a group: two groups on one pin are two groups, each
listing the pin, and the pin-current check adds them up. So is a net that reaches a part no
walk passes through (a connector, a source or an IC on a supply whose voltage was not
given, a plain diode): the group is ``unrecognised`` and the reason names the net and part.
Capacitors are open at DC and ignored. A transistor's base or gate network shared with
other transistors (one divider biasing several sinks) belongs to each of their groups, and
``reason`` says so.
"""

from __future__ import annotations

from itertools import compress, repeat
from operator import attrgetter, eq
from typing import Mapping

from linter.gc_pause import paused_gc
from linter.groups import NO_LEVELS, Group, Scenario
from linter.model import Circuit
from linter.partdata import PartData, Rail
from linter.refs import natural_key
from linter.topology_draft import Draft, pin_ids, resistor_label
from linter.topology_index import CircuitIndex
from linter.topology_quick import quick_group
from linter.topology_shape import Bank, NotABank, find_bank, orient
from linter.topology_transistor import classify_transistor
from linter.topology_walk import Cluster, grow_cluster

__all__ = ["find_groups"]

_KIND_OF = attrgetter("kind")
_REF_OF = attrgetter("ref")


def find_groups(circuit: Circuit, rails: Mapping[str, Rail],
                part_data: Mapping[str, PartData], quick: bool = True) -> tuple[Group, ...]:
    """Every LED of ``circuit`` in exactly one :class:`~linter.groups.Group`.

    Parameters
    ----------
    circuit : Circuit
        LEDs are the parts of kind ``led`` (kinds are taken as given).
    rails : Mapping[str, Rail]
        Nets of known voltage, ground included.
    part_data : Mapping[str, PartData]
        By part reference: tells transistor polarity and which parts are microcontrollers.
    quick : bool
        Label the plain shapes by :func:`linter.topology_quick.quick_group` (the same groups;
        False keeps every group on the general path, the plain twin tests compare with).

    Returns
    -------
    tuple of Group
        Sorted by the first LED's reference in natural order (``D2`` before ``D10``).

    Notes
    -----
    Walks only from LEDs and stops at rails and pins, so the cost follows the parts near
    LEDs, not the size of the board.
    """
    with paused_gc():  # many small acyclic records; see linter.gc_pause
        return _groups(circuit, rails, part_data, quick)


def _groups(circuit: Circuit, rails: Mapping[str, Rail],
            part_data: Mapping[str, PartData], quick: bool) -> tuple[Group, ...]:
    index = CircuitIndex(circuit, rails, part_data)
    try:
        return _groups_with(index, circuit, quick)
    finally:
        index.release()  # (its caches would otherwise outlive it until a collection)


def _groups_with(index: CircuitIndex, circuit: Circuit, quick: bool) -> tuple[Group, ...]:
    parts = circuit.parts  # the LEDs, as Circuit.leds picks them, by built-in maps:
    leds = list(map(_REF_OF, compress(parts.values(),
                                      map(eq, map(_KIND_OF, parts.values()), repeat("led")))))
    order = dict(zip(leds, range(len(leds))))  # netlist order of the LEDs
    ranked = sorted(leds, key=natural_key)  # (keys made here and let go of: not cached)
    index.led_rank = dict(zip(ranked, range(len(ranked))))
    placed: set[str] = set()
    groups: list[Group] = []
    for led in ranked:
        if led in placed:
            continue
        group = quick_group(index, led, order, placed) if quick else None
        if group is None:
            group = _classify(index, grow_cluster(index, led), order, placed)
        placed.update(group.leds)
        groups.append(group)
    # Already in the order of their ids: ``led`` is the first unplaced LED in natural order,
    # it is in its own cluster, and a group's LEDs are unplaced ones, so its id is ``G-led``.
    return tuple(groups)


def _cluster_leds(index: CircuitIndex, cluster: Cluster, order: Mapping[str, int],
                  placed: set[str]) -> tuple[str, ...]:
    kind = index.kind
    found = [ref for chain in cluster.chains for ref in chain.parts
             if kind(ref) == "led" and ref not in placed]
    if len(found) == 1:
        return (found[0],)
    return tuple(sorted(found, key=order.__getitem__))


def _classify(index: CircuitIndex, cluster: Cluster, order: Mapping[str, int],
              placed: set[str]) -> Group:
    """Label one cluster (see the module docstring)."""
    leds = _cluster_leds(index, cluster, order, placed)
    draft = Draft(index, cluster, leds)
    if cluster.problems:
        return draft.unrecognised("; ".join(dict.fromkeys(cluster.problems)))
    try:
        strands = [orient(index, chain) for chain in cluster.chains]
    except NotABank as problem:
        return draft.unrecognised(str(problem))
    draft.strands = strands
    if len(cluster.transistors) > 1:
        return draft.unrecognised("the drive path runs through several transistors: "
                                  + ", ".join(sorted(cluster.transistors, key=natural_key)))
    if cluster.transistors:
        return classify_transistor(draft, cluster.transistors[0])
    terminals = {net for net in cluster.nets if net in index.rails}
    terminals.update(pin.net for pin in cluster.pins)
    try:
        bank = find_bank(strands, terminals)
    except NotABank as problem:
        return draft.unrecognised(str(problem))
    return _classify_passive(draft, bank)


def _classify_passive(draft: Draft, bank: Bank) -> Group:
    """Label a group with no transistor from its bank's two terminals."""
    rails = draft.index.rails
    top_rail, bottom_rail = rails.get(bank.top), rails.get(bank.bottom)
    if bank.antiparallel or (top_rail is None and bottom_rail is None):
        return _classify_pin_pair(draft, bank)
    if top_rail is not None and bottom_rail is not None:
        return _classify_rails(draft, bank, top_rail, bottom_rail)
    return _classify_one_pin(draft, bank, top_rail, bottom_rail)


def _classify_rails(draft: Draft, bank: Bank, top: Rail, bottom: Rail) -> Group:
    if top.nom == bottom.nom:
        return draft.unrecognised(f"{draft.leds[0]}: both ends reach rails at {top.nom:g} V "
                                  f"({bank.top}, {bank.bottom})")
    if top.nom < bottom.nom:
        setter = bank.shared[0] if bank.shared else None
        return draft.group("reversed", setter=setter,
                           scenarios=(Scenario("on", NO_LEVELS, ()),),
                           reason=f"anode side on {bank.top} ({top}), cathode side on "
                                  f"{bank.bottom} ({bottom})")
    single = "resistor" if len(bank.strings[0].leds) == 1 else "string"
    label, setter, reason = resistor_label(bank, single)
    if label == "unrecognised":
        return draft.unrecognised(reason or "")
    if label == "across-rails":
        reason = f"nothing limits the current between {bank.top} and {bank.bottom}"
    return draft.group(label, setter=setter, reason=reason)


def _classify_one_pin(draft: Draft, bank: Bank, top: Rail | None,
                      bottom: Rail | None) -> Group:
    """A pin at one end, a rail at the other: ``pin-source`` or ``pin-sink``."""
    pins = draft.pins()
    if top is None and bottom is not None and bottom.nom <= 0.0:
        label, level, pin_net = "pin-source", "high", bank.top
    elif bottom is None and top is not None and top.nom > 0.0:
        label, level, pin_net = "pin-sink", "low", bank.bottom
    else:
        rail_net = bank.bottom if top is None else bank.top
        return draft.unrecognised(f"a pin drives the LEDs against rail {rail_net}, which "
                                  f"cannot light them")
    ids = pin_ids(pins, pin_net)
    chosen, setter, reason = resistor_label(bank, label)
    if chosen == "unrecognised":
        return draft.unrecognised(reason or "")
    if chosen == "across-rails":
        chosen, setter = label, ids[0]
        reason = "no resistor: only the pin's output resistance limits the current"
    scenario = Scenario("on", {pin_id: level for pin_id in ids}, draft.leds)
    return draft.group(chosen, setter=setter, scenarios=(scenario,), reason=reason)


def _classify_pin_pair(draft: Draft, bank: Bank) -> Group:
    """Pins on both sides: one scenario per direction."""
    pins = draft.pins()
    top_ids, bottom_ids = pin_ids(pins, bank.top), pin_ids(pins, bank.bottom)
    if not top_ids or not bottom_ids:
        return draft.unrecognised(f"anti-parallel LEDs {', '.join(draft.leds)} between "
                                  f"{bank.top} and {bank.bottom}: only between two pins are "
                                  f"they recognised")
    from_top = {led for s in bank.lit_from_top() for led in s.leds}
    scenarios = []
    for high, low, lit in ((top_ids, bottom_ids, from_top),
                           (bottom_ids, top_ids, set(draft.leds) - from_top)):
        levels = {pin_id: "high" for pin_id in high} | {pin_id: "low" for pin_id in low}
        name = f"{'+'.join(high)} high"
        scenarios.append(Scenario(name, levels, tuple(led for led in draft.leds if led in lit)))
    label, setter, reason = resistor_label(bank, "pin-bicolour")
    if label == "unrecognised":
        return draft.unrecognised(reason or "")
    if label == "across-rails":
        setter = top_ids[0]
        reason = "no resistor: only the pins' output resistance limits the current"
    return draft.group("pin-bicolour", setter=setter, scenarios=tuple(scenarios), reason=reason)
