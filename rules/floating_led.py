"""Rule ``floating-led``: an LED with an unconnected pin or a side with no path to a rail."""

from __future__ import annotations

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

    def check(self, context: Any) -> Iterable[Finding]:
        reported: set[str] = set()
        for result in getattr(context, "groups", ()) or ():
            group = result.group
            reason = group.reason or ""
            if group.topology != "unrecognised" or not _is_floating(reason):
                continue
            reported.update(group.leds)
            yield self._finding(context, group.leds, reason, group.id)
        nets = context.circuit.nets
        for part in context.circuit.leds():
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
