"""Walks from an LED: series chains, the cluster of chains around it, a transistor's drive.

* :func:`walk_chain` follows series nodes (a net joining exactly two pins of two-terminal
  parts, not a rail) both ways from one part: the result is a :class:`Chain` from end net to
  end net.
* :func:`grow_cluster` gathers every chain and transistor that meets the LED's chain at a
  net that is neither a rail nor a microcontroller pin: LEDs in parallel, the resistor they
  share, the transistor below them and its emitter resistor. Rails and pins are the edge.
* :func:`walk_control` follows a transistor's base or gate through resistors, links and
  diodes to rails and pins: the divider, the gate resistor and pull-down, the reference.

Each walk is iterative and visits each part once; none looks beyond the parts it reaches.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass, field
from itertools import islice
from typing import NamedTuple

from linter.groups import PinDrive
from linter.model import Pin
from linter.topology_index import CircuitIndex, NetSplit

__all__ = ["Chain", "Cluster", "Control", "walk_chain", "walk_chain_plain", "grow_cluster",
           "walk_control", "MAX_GROUP_PARTS", "MAX_CONTROL_PARTS"]

MAX_GROUP_PARTS = 256
"""A cluster larger than this is reported as unrecognised rather than walked further."""

MAX_CONTROL_PARTS = 16
"""A base or gate network larger than this is reported as unrecognised."""

_new_tuple = tuple.__new__

SHOWN_SHARERS = 3
"""How many of the transistors sharing a bias net a note names."""

_TERMINAL_WORDS = {"b": "base", "c": "collector", "e": "emitter"}
_FET_WORDS = {"b": "gate", "c": "drain", "e": "source"}


class Chain(NamedTuple):
    """Two-terminal parts in series: ``parts[i]`` joins ``nets[i]`` and ``nets[i + 1]``.

    A named tuple (immutable, and made several times faster than a frozen dataclass: a large
    board makes one for every series path it walks).
    """

    parts: tuple[str, ...]
    nets: tuple[str | None, ...]


@dataclass(slots=True)
class Cluster:
    """What :func:`grow_cluster` found around one LED (mutable while it grows)."""

    chains: list[Chain] = field(default_factory=list)
    transistors: list[str] = field(default_factory=list)
    nets: set[str] = field(default_factory=set)
    pins: list[PinDrive] = field(default_factory=list)
    problems: list[str] = field(default_factory=list)
    seen: set[str] = field(default_factory=set)


@dataclass(slots=True, init=False)
class Control:
    """A transistor's base or gate network and how it drives the transistor (made empty;
    ``__init__`` written out: one is made for every transistor a walk meets)."""

    parts: list[str] = field(default_factory=list)
    nets: list[str] = field(default_factory=list)
    rails: list[str] = field(default_factory=list)
    pins: list[PinDrive] = field(default_factory=list)
    drive: str | None = None
    problems: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    def __init__(self) -> None:
        self.parts = []
        self.nets = []
        self.rails = []
        self.pins = []
        self.drive = None
        self.problems = []
        self.notes = []


def terminal_word(index: CircuitIndex, ref: str, role: str) -> str:
    """``base`` / ``gate`` (and so on) for a transistor terminal role ``b``, ``c``, ``e``."""
    words = _FET_WORDS if index.polarity(ref) in ("nmos", "pmos") else _TERMINAL_WORDS
    return words[role]


def _extend(tables: tuple, ref: str, pin: Pin, seen: set[str]) -> tuple[list[str], list]:
    """Parts and nets beyond ``ref``'s ``pin`` while the nets are series nodes
    (``tables``: :attr:`CircuitIndex.walk_tables`)."""
    parts: list[str] = []
    nets: list[str | None] = [pin.net]
    rails, declared_nets, roles, all_parts, series_pins = tables
    while True:
        net = pin.net
        if net is None or net in rails:
            return parts, nets
        # the common series node (a listed net of two series pins) as series_pins answers it
        declared = declared_nets.get(net)
        if declared is not None and len(pair := declared.pins) == 2 \
                and roles.get(pair[0][0]) == "series" and roles.get(pair[1][0]) == "series":
            pass
        else:
            pair = series_pins(net)
            if pair is None:
                return parts, nets
        (ref_a, pin_a), (ref_b, pin_b) = pair
        if ref_a == ref and pin_a == pin.name:
            ref, following_pin = ref_b, pin_b
        else:
            ref, following_pin = ref_a, pin_a
        if ref in seen:
            return parts, nets
        seen.add(ref)
        parts.append(ref)
        first, second = all_parts[ref].pins  # (series parts have two pins)
        pin = second if first.name == following_pin else first
        nets.append(pin.net)


def walk_chain(index: CircuitIndex, start: str) -> Chain:
    """The series chain through two-terminal part ``start``.

    For R1 from ``+5V`` to ``A1`` and D1 from ``A1`` to ``GND``, the chain through either part
    is ``Chain(parts=("R1", "D1"), nets=("+5V", "A1", "GND"))`` (or its reverse, depending on
    the pin order of ``start``).

    :func:`walk_chain_plain` (two :func:`_extend` walks) written in one loop over the two
    directions; a listed net of two pins not both series is no series node, answered without
    :meth:`CircuitIndex.series_pins` (``pins_on`` keeps at most those two pins, and a series
    node needs two series ones). Equal chains: ``tests/test_topology_walk_fast.py``.
    """
    rails, declared_nets, roles, all_parts, series_pins = index.walk_tables
    first, second = all_parts[start].pins
    seen = {start}
    found: list[list] = []
    for pin in (second, first):
        ref = start
        parts: list[str] = []
        nets: list[str | None] = [pin.net]
        while True:
            net = pin.net
            if net is None or net in rails:
                break
            declared = declared_nets.get(net)
            if declared is not None and len(pair := declared.pins) == 2:
                if roles.get(pair[0][0]) != "series" or roles.get(pair[1][0]) != "series":
                    break  # (pins_on keeps at most these two: a series node only if both are)
            else:
                pair = series_pins(net)
                if pair is None:
                    break
            (ref_a, pin_a), (ref_b, pin_b) = pair
            if ref_a == ref and pin_a == pin.name:
                ref, following_pin = ref_b, pin_b
            else:
                ref, following_pin = ref_a, pin_a
            if ref in seen:
                break
            seen.add(ref)
            parts.append(ref)
            one, two = all_parts[ref].pins  # (series parts have two pins)
            pin = two if one.name == following_pin else one
            nets.append(pin.net)
        found.append(parts)
        found.append(nets)
    ahead_parts, ahead_nets, back_parts, back_nets = found
    back_parts.reverse()
    back_parts.append(start)
    back_parts += ahead_parts
    back_nets.reverse()
    back_nets += ahead_nets
    return _new_tuple(Chain, (tuple(back_parts), tuple(back_nets)))  # (Chain(...) without its
    # Python-level __new__)


def walk_chain_plain(index: CircuitIndex, start: str) -> Chain:
    """The series chain through two-terminal part ``start`` (the plain twin of
    :func:`walk_chain`: one :func:`_extend` each way).

    For R1 from ``+5V`` to ``A1`` and D1 from ``A1`` to ``GND``, the chain through either part
    is ``Chain(parts=("R1", "D1"), nets=("+5V", "A1", "GND"))`` (or its reverse, depending on
    the pin order of ``start``).
    """
    tables = index.walk_tables
    first, second = tables[3][start].pins
    seen = {start}
    ahead_parts, ahead_nets = _extend(tables, start, second, seen)
    back_parts, back_nets = _extend(tables, start, first, seen)
    back_parts.reverse()
    back_parts.append(start)
    back_parts += ahead_parts
    back_nets.reverse()
    back_nets += ahead_nets
    return Chain(tuple(back_parts), tuple(back_nets))


def _mcu_pins(index: CircuitIndex, net: str) -> list[PinDrive]:
    """Microcontroller pins on ``net``."""
    return [PinDrive(ref, pin, net, index.supply_net(ref)) for ref, pin in index.split(net).mcu]


def _visit_net(index: CircuitIndex, cluster: Cluster, net: str, queue: deque,
               limit: int) -> None:
    """Take in what meets the cluster at a net that is neither a rail nor a pin.

    A net that reaches a part no walk passes through (a connector, a source, an IC: often a
    supply whose voltage was not given) is the edge of the cluster, with a problem.
    """
    pins = index.pins_on(net)
    if len(pins) == 1:
        cluster.problems.append(_dead_end_message(index, net, *pins[0]))
        return
    foreign = index.split(net).foreign
    if foreign:
        cluster.problems.append(_foreign_message(index, net, *foreign[0]))
        return
    for ref, pin_name in pins:
        if ref in cluster.seen:
            continue
        if index.role(ref) == "series":
            _add_chain(index, cluster, walk_chain(index, ref), queue)
        else:
            _add_transistor(index, cluster, ref, pin_name, net, queue)
        if len(cluster.seen) > limit:
            return


def _foreign_message(index: CircuitIndex, net: str, ref: str, pin_name: str) -> str:
    kind = index.kind(ref)
    if kind == "transistor":
        return (f"{ref}: transistor of unknown polarity on net {net} (give its part data: "
                f"npn, pnp, nmos or pmos)")
    if kind in ("source", "connector", "ic"):
        return (f"rail of net {net} has no known voltage (it reaches {ref}.{pin_name}, "
                f"a {kind}; give the rail a voltage)")
    return f"net {net} reaches {ref} ({kind}), which is not modelled in a drive path"


def _dead_end_message(index: CircuitIndex, net: str, ref: str, pin_name: str) -> str:
    """``D9: cathode net LED_K has no path to a rail or sink``."""
    side = f"net {net} (pin {pin_name})"
    if index.kind(ref) == "led":
        ends = index.led_pins(ref)
        if ends is not None:
            side = f"{'anode' if ends[0].name == pin_name else 'cathode'} net {net}"
    return f"{ref}: {side} has no path to a rail or sink"


def _add_chain(index: CircuitIndex, cluster: Cluster, chain: Chain, queue: deque) -> None:
    cluster.chains.append(chain)
    cluster.seen.update(chain.parts)
    for net, ref in ((chain.nets[0], chain.parts[0]), (chain.nets[-1], chain.parts[-1])):
        if net is not None:
            queue.append(net)
            continue
        for pin in index.part(ref).pins:
            if pin.net is None:
                message = f"{ref}: pin {pin.name} is not connected"
                if message not in cluster.problems:
                    cluster.problems.append(message)


def _add_transistor(index: CircuitIndex, cluster: Cluster, ref: str, pin_name: str,
                    net: str, queue: deque) -> None:
    cluster.seen.add(ref)
    cluster.transistors.append(ref)
    terminals = index.transistor_pins(ref)
    if terminals is None:
        names = ", ".join(pin.name for pin in index.part(ref).pins)
        cluster.problems.append(f"{ref}: pin names {names} do not say which terminal is which")
        return
    if terminals["b"].name == pin_name:
        word = terminal_word(index, ref, "b")
        cluster.problems.append(f"{ref}: its {word} sits on net {net} in the LED path "
                                f"(feedback is not recognised)")
    for role in ("c", "e"):
        if terminals[role].net is None:
            cluster.problems.append(f"{ref}: {terminal_word(index, ref, role)} is not connected")
        else:
            queue.append(terminals[role].net)


def _lone_led(index: CircuitIndex, cluster: Cluster, led: str) -> Cluster:
    """An LED without exactly two pins: a cluster of its own, with the problem."""
    pins = index.part(led).pins
    cluster.chains.append(Chain((led,), (None, None)))
    cluster.seen.add(led)
    cluster.nets.update(pin.net for pin in pins if pin.net is not None)
    names = ", ".join(pin.name for pin in pins) or "none"
    cluster.problems.append(f"{led}: an LED with {len(pins)} pins ({names}) is not recognised "
                            f"(two pins, anode and cathode, expected)")
    return cluster


def grow_cluster(index: CircuitIndex, led: str, limit: int = MAX_GROUP_PARTS) -> Cluster:
    """Every chain and transistor joined to ``led``'s chain away from rails and pins."""
    cluster = Cluster()
    if index.role(led) != "series":
        return _lone_led(index, cluster, led)
    queue: deque[str] = deque()
    _add_chain(index, cluster, walk_chain(index, led), queue)
    nets, rails, split = cluster.nets, index.rails, index.split  # (nets: those visited so far)
    while queue:
        net = queue.popleft()
        if net in nets:
            continue
        nets.add(net)
        if net in rails:
            continue
        if split(net).mcu:
            cluster.pins.extend(_mcu_pins(index, net))
            continue
        _visit_net(index, cluster, net, queue, limit)
        if len(cluster.seen) > limit:
            cluster.problems.append(f"the network around {led} has more than {limit} parts")
            break
    for chain in cluster.chains:
        nets.update(chain.nets)
    nets.discard(None)  # (an unconnected end; no other None is ever added)
    return cluster


def walk_control(index: CircuitIndex, transistor: str, net: str | None,
                 path_nets: set[str]) -> Control:
    """The base or gate network of ``transistor``, from its control net ``net``."""
    control = Control()
    word = terminal_word(index, transistor, "b")
    if net is None:
        control.problems.append(f"{transistor}: {word} is not connected")
        return control
    rails, split, supply_net = index.rails, index.split, index.supply_net
    nets, parts = control.nets, control.parts
    queue: deque[str] = deque([net])
    visited = {net}
    while queue:
        here = queue.popleft()
        nets.append(here)
        if here in rails:
            control.rails.append(here)
            continue
        if here in path_nets:
            control.problems.append(f"{transistor}: {word} network reaches net {here} of the "
                                    f"LED path (feedback is not recognised)")
            continue
        pins_here = split(here)
        if pins_here.mcu:  # (as _mcu_pins gives them)
            control.pins.extend([PinDrive(ref, pin, here, supply_net(ref))
                                 for ref, pin in pins_here.mcu])
            continue
        for following in _control_step(index, control, transistor, here, pins_here):
            if following not in visited:
                visited.add(following)
                queue.append(following)
        if len(parts) > MAX_CONTROL_PARTS:
            control.problems.append(f"{transistor}: {word} network has more than "
                                    f"{MAX_CONTROL_PARTS} parts")
            break
    control.drive = _drive_kind(index, control, transistor, word)
    return control


_CONTROL_KINDS = frozenset({"resistor", "link", "diode"})
"""Kinds a control walk passes through (two-pin ones)."""


def _control_step(index: CircuitIndex, control: Control, transistor: str, net: str,
                  split: NetSplit) -> list[str]:
    """Parts on one net of a control network (``split``: the net's pins split); returns the
    nets beyond them."""
    beyond: list[str] = []
    if len(split.rest) + len(split.controls) == 1:
        control.problems.append(f"{transistor}: net {net} has no path to a rail or pin")
    kind_of, all_parts, parts = index.kind, index.circuit.parts, control.parts
    for ref, pin_name in split.rest:
        if ref == transistor or ref in parts:
            continue
        kind = kind_of(ref)
        if kind in _CONTROL_KINDS and len(pins := all_parts[ref].pins) == 2:
            parts.append(ref)
            first, second = pins  # (the other pin, as CircuitIndex.other_pin gives it)
            other = (second if first.name == pin_name else first).net
            if other is None:
                control.problems.append(f"{ref}: pin is not connected")
            else:
                beyond.append(other)
        else:
            control.problems.append(f"{transistor}: {terminal_word(index, transistor, 'b')} "
                                    f"network reaches {ref} ({kind}), which is not recognised")
    _note_shared_bias(control, transistor, split)
    return beyond


def _note_shared_bias(control: Control, transistor: str, split: NetSplit) -> None:
    """One note naming (the first few of) the other transistors on the same bias net."""
    count = len(split.controls) - (transistor in split.control_set)
    if count <= 0:
        return
    shown = ", ".join(islice((ref for ref in split.controls if ref != transistor),
                             SHOWN_SHARERS))
    more = f" and {count - SHOWN_SHARERS} more" if count > SHOWN_SHARERS else ""
    control.notes.append(f"{transistor} shares its bias with {shown}{more}")


def _drive_kind(index: CircuitIndex, control: Control, transistor: str, word: str) -> str | None:
    """``pin``, ``reference``, ``divider`` or ``rail``; None (and a problem) when undriven."""
    if control.pins:
        return "pin"
    if any(index.kind(ref) == "diode" for ref in control.parts):
        return "reference"
    if len(set(control.rails)) >= 2:
        return "divider"
    if control.rails:
        return "rail"
    control.problems.append(f"{transistor}: {word} (net {control.nets[0]}) is driven by "
                            f"no rail or pin")
    return None
