"""Rule ``unchecked-group``: an LED group whose current ledlint could not work out."""

from __future__ import annotations

from typing import Any, Iterable

from linter.findings import Finding
from linter.refs import fold_refs
from linter.rulekit import figures_of, part_location, renamed_corner
from linter.rules import Rule, register
from linter.rules.floating_led import FLOATING_PHRASES


@register
class UncheckedGroup(Rule):
    """An LED group could not be checked: its drive path is not recognised or not solved.

    ledlint judges an LED only through the operating point of the circuit that sets its
    current. Where that circuit is of a kind ledlint does not model (an LED in series with a
    plain diode, a MOSFET with a source resistor, two transistors in one path), where a figure
    it needs is missing (a resistor without a value), or where the solver did not converge at
    some corners, the group's LEDs are not checked, or not at every corner. This rule says so,
    with the reason, so that a clean report never hides an unchecked LED. (LEDs left open on
    one side are ``floating-led``.)

    **Anti-pattern**

    A drive path ledlint cannot model, passed silently::

        R1 +5V a 150
        D1 a m LEDRED
        D2 m 0 DSW        ; a plain diode in the LED's path

    **Best practice**

    Check such an LED by hand against its datasheet, and accept the finding with a waiver
    that says so (``[[waive]] rule = "unchecked-group"``, with the reason).
    """

    id = "unchecked-group"
    default_severity = "warning"

    def check(self, context: Any) -> Iterable[Finding]:
        for result in getattr(context, "groups", ()) or ():
            group = result.group
            reason = self._reason(result)
            if reason is None:
                continue
            leds = fold_refs(group.leds)
            yield Finding(rule=self.id, severity=context.severity(self),
                          message=f"{leds}: {reason}", parts=tuple(group.leds),
                          group=result.id, location=part_location(context, group.leds[0]),
                          fix="check these LEDs by hand against their datasheets, or supply "
                              "what is missing, then re-run")

    @staticmethod
    def _reason(result: Any) -> str | None:
        group = result.group
        if group.topology == "unrecognised":
            why = group.reason or "no reason recorded"
            if any(phrase in why for phrase in FLOATING_PHRASES):
                return None  # floating-led reports it
            return f"drive path not recognised ({why}); current not checked"
        if result.status != "solved":
            return f"not solved ({result.reason or 'no reason recorded'}); current not checked"
        base, refs = figures_of(result)  # a follower's records are left unbuilt
        if base.not_converged:
            count = len(base.not_converged)
            first = renamed_corner(base.not_converged[0], refs)
            return (f"the solver did not converge at {count} corner{'s' if count > 1 else ''} "
                    f"(first: {first.label()}); figures leave "
                    f"{'them' if count > 1 else 'it'} out")
        return None
