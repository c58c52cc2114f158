"""Rule ``unknown-rail``: LEDs fed from a net that looks like a supply but has no voltage."""

from __future__ import annotations

from typing import Any, Iterable

from linter.findings import Finding
from linter.rails import leds_fed_by, unknown_supply_nets
from linter.refs import fold_refs
from linter.rules import Rule, register


@register
class UnknownRail(Rule):
    """LEDs hang from a net that looks like a supply but whose voltage nobody stated.

    A net named ``VCC``, ``VDD``, ``VBAT``, ``VIN`` or ``+V`` spells no voltage, so the
    current of every LED it feeds (through resistors, links and other LEDs) cannot be
    computed. Nets that spell a voltage (``+5V``, ``3V3``) are read from their name; others
    need a line in the settings.

    **Anti-pattern**

    ``R1 VCC LED_A 330`` and ``D1 LED_A 0 RED`` with no ``[rails]`` entry for ``VCC``.

    **Best practice**

    State the rail and its tolerance in ``ledlint.toml``::

        [rails]
        "VCC" = "5 V ±5%"
    """

    id = "unknown-rail"
    default_severity = "warning"

    def check(self, context: Any) -> Iterable[Finding]:
        circuit = context.circuit
        for net in unknown_supply_nets(circuit, context.rails):
            leds = leds_fed_by(circuit, net, context.rails)
            if not leds:
                continue
            yield Finding(
                rule=self.id, severity=context.severity(self), parts=leds, nets=(net,),
                message=f"net {net} looks like a supply but has no known voltage; "
                        f"the current of {fold_refs(leds)} cannot be computed",
                fix=f'state it under [rails] in ledlint.toml, e.g. "{net}" = "5 V ±5%"',
                location=circuit.nets[net].location)
