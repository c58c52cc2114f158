"""Rule ``floating-led``: an LED with an unconnected pin or a side with no path to a rail."""

from __future__ import annotations

from itertools import chain, compress, repeat
from operator import attrgetter, eq
from typing import Any, Iterable

from linter.findings import Finding
from linter.rules import Rule, register

FLOATING_PHRASES = ("has no path to a rail", "is not connected")
"""Words in a group's reason (linter.topology_walk) that mean a side of it is left open."""


@register
class FloatingLed(Rule):
    """An LED is left floating: a pin unconnected, or a side with no path to a rail.

    An LED whose anode or cathode is on no net, on a net of its own, or on a net from which
    no path leads to a rail, a pin or a sink never lights — or lights from leakage and
    noise only. It is usually a missing wire in the schematic, a net name typed two ways,
    or a part left from an older revision. Topology names the LED's group ``unrecognised``
    with the reason; this rule reports it with that reason.

    **Anti-pattern**

    The cathode net ``LED_K`` goes nowhere (the connection to the driver was lost)::

        R1 +5V a 330
        D1 a led_k LEDRED

    **Best practice**

    Every LED's path runs from a rail (or pin) to ground (or a pin or sink)::

        R1 +5V a 330
        D1 a 0 LEDRED
    """

    id = "floating-led"
    default_severity = "warning"

    def check(self, context: Any, screen: bool = True) -> Iterable[Finding]:
        """``screen``: pass over the recognised groups and the LED pins in built-in steps
        (:func:`_unrecognised`, :func:`may_be_open`); False: the plain loops (the same
        findings)."""
        reported: set[str] = set()
        groups = getattr(context, "groups", ()) or ()
        for result in _unrecognised(groups) if screen else groups:
            group = result.group
            reason = group.reason or ""
            if group.topology != "unrecognised" or not _is_floating(reason):
                continue
            reported.update(group.leds)
            yield self._finding(context, group.leds, reason, group.id)
        nets = context.circuit.nets
        leds = context.circuit.leds()
        if screen and not may_be_open(leds, nets):
            return
        for part in leds:
            if part.ref in reported:
                continue
            open_pins = [pin.name for pin in part.pins if not _joined(nets, pin.net)]
            if open_pins:
                reason = f"{part.ref}: pin {', '.join(open_pins)} is not connected"
                yield self._finding(context, (part.ref,), reason, None)

    def _finding(self, context: Any, leds: tuple[str, ...], reason: str,
                 group: str | None) -> Finding:
        first = context.circuit.parts.get(leds[0])
        message = reason if reason.startswith(f"{leds[0]}:") else f"{leds[0]}: {reason}"
        if len(leds) > 1:
            message += f" (the group of {', '.join(leds)})"
        return Finding(rule=self.id, severity=context.severity(self), message=message,
                       parts=tuple(leds), group=group,
                       fix="connect the open side to its driver (a resistor to a rail, a pin "
                           "or a sink), or remove the part if it is left from an old revision",
                       location=None if first is None else first.location)


_TOPOLOGY = attrgetter("group.topology")
_PINS = attrgetter("pins")
_NET = attrgetter("net")


def _unrecognised(groups: Iterable[Any]) -> Iterable[Any]:
    """The results of ``groups`` whose group's topology is ``"unrecognised"``, in order,
    picked without a step of Python per result (the check's loop asks the same again)."""
    groups = tuple(groups)
    return compress(groups, map(eq, map(_TOPOLOGY, groups), repeat("unrecognised")))


def may_be_open(leds: Iterable[Any], nets: Any) -> bool:
    """False only when no pin of ``leds`` is open in the sense of :func:`_joined` (on no net,
    or on a net of the circuit with fewer than two pins): then the check's loop over the
    LEDs finds nothing. Built-in passes over the pins and the nets, no step of Python each."""
    on = set(map(_NET, chain.from_iterable(map(_PINS, leds))))
    if None in on:
        return True
    lonely = compress(nets.keys(), map((2).__gt__, map(len, map(_PINS, nets.values()))))
    return not on.isdisjoint(lonely)


def _is_floating(reason: str) -> bool:
    return any(phrase in reason for phrase in FLOATING_PHRASES)


def _connected(context: Any, net: str | None) -> bool:
    """True when the net exists and joins at least one other pin."""
    return _joined(context.circuit.nets, net)


def _joined(nets: Any, net: str | None) -> bool:
    """:func:`_connected` with the circuit's nets mapping at hand."""
    if net is None:
        return False
    found = nets.get(net)
    return found is None or len(found.pins) > 1
