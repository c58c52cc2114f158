"""The shape of the passive part of an LED group: which way its LEDs point, how its chains meet.

A *bank* is one or more LED chains (strings) that all run between the same two nets, plus
at most one resistor chain on each side leading to a *terminal*: a rail, a microcontroller
pin, or the transistor terminal that closes the path. A bank is *anti-parallel* when some
strings point one way between those two nets and the others the opposite way (a bicolour
pair). Anything else is not a bank, and the group is reported as unrecognised with the
reason :func:`find_bank` gives.
"""

from __future__ import annotations

from typing import NamedTuple

from linter.topology_index import CircuitIndex
from linter.topology_walk import Chain

__all__ = ["Strand", "Bank", "orient", "find_bank", "NotABank"]


class NotABank(ValueError):
    """The chains do not form a bank; ``str()`` says why, in words for the report."""


class Strand(NamedTuple):
    """A chain turned so that its LEDs point from ``chain.nets[0]`` to ``chain.nets[-1]``.

    ``leds`` run from anode end to cathode end; ``resistors`` are the chain's resistors in
    the same order (links are not resistors). A named tuple, as :class:`Chain` is.
    """

    chain: Chain
    leds: tuple[str, ...]
    resistors: tuple[str, ...]

    @property
    def start(self) -> str | None:
        return self.chain.nets[0]

    @property
    def end(self) -> str | None:
        return self.chain.nets[-1]


class Bank(NamedTuple):
    """LED strings between two nets and the resistor chains that feed them (a named tuple).

    ``top`` is the terminal reached from the strings' anode net (for an anti-parallel bank:
    from the first string's anode net), ``bottom`` the one reached from the other net.
    ``shared`` lists the resistors of the feeding chains, which every string's current
    passes through.
    """

    strings: tuple[Strand, ...]
    top: str
    bottom: str
    feeds: tuple[Strand, ...]
    shared: tuple[str, ...]
    antiparallel: bool
    anode_net: str

    def lit_from_top(self) -> tuple[Strand, ...]:
        """The strings that light when ``top`` is the higher terminal."""
        return tuple(s for s in self.strings if s.start == self.anode_net)


def _led_direction(index: CircuitIndex, chain: Chain, position: int) -> int:
    """+1 when the LED at ``position`` points along the chain, −1 against; raises otherwise."""
    ref = chain.parts[position]
    ends = index.led_pins(ref)
    if ends is None:
        names = ", ".join(pin.name for pin in index.part(ref).pins)
        raise NotABank(f"{ref}: pin names {names} do not say which is the anode "
                       f"(A/K, ANODE/CATHODE or +/- expected)")
    anode, cathode = ends
    if anode.net == cathode.net:
        raise NotABank(f"{ref}: anode and cathode are both on net {anode.net}")
    if (anode.net, cathode.net) == (chain.nets[position], chain.nets[position + 1]):
        return 1
    return -1


def orient(index: CircuitIndex, chain: Chain) -> Strand:
    """The chain as a :class:`Strand`, turned so that its LEDs point along it."""
    kind = index.kind
    leds: list[str] = []
    directions: list[int] = []
    for position, ref in enumerate(chain.parts):
        if kind(ref) == "led":
            leds.append(ref)
            directions.append(_led_direction(index, chain, position))
    if leds:
        if min(directions) != max(directions):
            forward = [ref for ref, way in zip(leds, directions) if way > 0]
            backward = [ref for ref, way in zip(leds, directions) if way < 0]
            raise NotABank(f"{', '.join(forward)} and {', '.join(backward)} face opposite "
                           f"ways in one series path")
        if directions[0] < 0:
            chain = Chain(chain.parts[::-1], chain.nets[::-1])
            leds.reverse()
    resistors = tuple([ref for ref in chain.parts if kind(ref) == "resistor"])
    return Strand(chain, tuple(leds), resistors)


def _feed(net: str, others: list[Strand], terminals: set[str], used: list[Strand]) -> str:
    """The terminal reached from ``net`` through one resistor chain (or ``net`` itself)."""
    if net in terminals:
        return net
    touching = [s for s in others if net in (s.start, s.end) and s not in used]
    if len(touching) != 1:
        names = "; ".join(" ".join(s.chain.parts) for s in touching) or "nothing else"
        raise NotABank(f"net {net} joins the LEDs to {names}: not one resistor path "
                       f"to a rail, pin or sink")
    strand = touching[0]
    used.append(strand)
    far = strand.end if strand.start == net else strand.start
    if far is None or far not in terminals:
        raise NotABank(f"{' '.join(strand.chain.parts)} from net {net} ends at net {far}, "
                       f"which is not a rail, pin or sink")
    return far


def find_bank(strands: list[Strand], terminals: set[str]) -> Bank:
    """The bank the strands form, with ``terminals`` as the edge; raises :class:`NotABank`."""
    strings = [s for s in strands if s.leds]
    others = [s for s in strands if not s.leds]
    ends = {(s.start, s.end) for s in strings}
    first = strings[0]
    anode_net, cathode_net = first.start, first.end
    if anode_net is None or cathode_net is None or anode_net == cathode_net:
        raise NotABank(f"{first.leds[0]}: both ends of its path are on net {anode_net}")
    if not ends <= {(anode_net, cathode_net), (cathode_net, anode_net)}:
        leds = ", ".join(led for s in strings for led in s.leds)
        raise NotABank(f"LEDs {leds} do not share one pair of nets: not a recognised shape")
    used: list[Strand] = []
    top = _feed(anode_net, others, terminals, used)
    bottom = _feed(cathode_net, others, terminals, used)
    if top == bottom:
        raise NotABank(f"both ends of the path through {first.leds[0]} reach net {top}")
    spare = [s for s in others if s not in used]
    if spare:
        raise NotABank(f"{' '.join(spare[0].chain.parts)} (nets {spare[0].start}, "
                       f"{spare[0].end}) is not in series with the LEDs")
    shared = tuple(ref for s in used for ref in s.resistors)
    return Bank(tuple(strings), top, bottom, tuple(used), shared,
                antiparallel=len(ends) > 1, anode_net=anode_net)
