"""Rule ``led-reverse``: an LED's worst-case reverse voltage above its rating."""

from __future__ import annotations

from typing import Any, Iterable

from linter.findings import Finding
from linter.results import GroupResult, LedResult
from linter.rulekit import (PerTemplate, at_corner, figures_of, flagged, led_data, renamer, say,
                            volts)
from linter.rules import Rule, register


@register
class LedReverse(Rule):
    """An LED sees more reverse voltage than it is rated for.

    The voltage across each LED is solved in every pin state and at every corner; the
    largest reverse voltage (cathode above anode) is compared with the part data's
    ``vr_max`` (5 V is the generic figure, common practice, and is said to be one). It
    happens with an LED fitted the wrong way round on a rail, an LED between two rails, or
    a bicolour pair between two pins whose partner does not clamp it. LEDs are not made to
    block: above vr_max the leakage current grows and the die is damaged. The fix is an
    ordinary diode in anti-parallel (cathode to the LED's anode), which clamps the reverse
    voltage to one diode drop (about 0.7 V, common practice), or turning the LED round.

    **Anti-pattern**

    A red LED (vr_max 5 V) fitted with its anode to ground under a 12 V rail: 12 V
    reverse::

        R1 +12V k 1k
        D1 0 k LEDRED

    **Best practice**

    Turn it round, or clamp it where the reverse state is intended::

        R1 +12V a 1k
        D1 a 0 LEDRED
    """

    id = "led-reverse"
    default_severity = "error"

    def check(self, context: Any) -> Iterable[Finding]:
        verdicts = PerTemplate(lambda base: _reversed(context, base))
        for result, over in flagged(context, verdicts):
            name = renamer(figures_of(result)[1])  # a follower's records are left unbuilt
            for led, vr_max, generic in over:
                yield self._finding(context, result, led, vr_max, generic, name(led.ref))

    def _finding(self, context: Any, result: GroupResult, led: LedResult, vr_max: float,
                 generic: bool, ref: str | None = None) -> Finding:
        """``led``: the record holding the figures (a follower's template's, see
        :func:`~linter.rulekit.figures_of`); ``ref`` its name in ``result``'s group
        (default: the record's)."""
        refs = figures_of(result)[1] if ref is not None else None
        ref = led.ref if ref is None else ref
        rating = f"{volts(vr_max)} rating" + (" (generic figure)" if generic else "")
        message = say(ref, f"{volts(led.reverse_v)} reverse at "
                           f"{at_corner(led.reverse_at, result, (ref,), refs)}, above its "
                           f"{rating} ({_why(result)})")
        values = {"reverse_v": led.reverse_v, "vr_max_v": vr_max}
        part = context.circuit.parts.get(ref)
        nets = tuple(pin.net for pin in part.pins if pin.net) if part is not None else ()
        anode = next((p.net for p in part.pins if p.name.upper() in ("A", "ANODE", "+")),
                     None) if part is not None else None
        fix = _fix(result, ref, anode)
        return Finding(rule=self.id, severity=context.severity(self), message=message,
                       parts=(ref,), nets=nets, group=result.id, values=values, fix=fix,
                       location=None if part is None else part.location)


def _reversed(context: Any, result: GroupResult) -> tuple[tuple[LedResult, float, bool], ...]:
    """(LED record, vr_max in V, whether vr_max is a generic figure) of each LED of the
    group whose reverse voltage is above its vr_max, in order. Figures and part data only:
    a follower's figures are its template's in the same order and its LEDs' part data equal
    the template's but for the note (:mod:`linter.group_key`), so the template's answer is
    the follower's (its records named through ``refs``)."""
    out = []
    for led in result.leds:
        data = led_data(context, led.ref)
        if data is None or data.vr_max is None:
            continue
        if led.reverse_v > data.vr_max:
            out.append((led, data.vr_max, "vr_max" in data.assumed))
    return tuple(out)


def _why(result: GroupResult) -> str:
    topology = result.group.topology
    if topology == "reversed":
        return "fitted with its anode on the lower rail"
    if topology == "across-rails":
        return "directly between two rails"
    if topology == "pin-bicolour":
        return "its partner in the pair does not clamp it"
    return f"in a {topology} group"


def _fix(result: GroupResult, ref: str, anode: str | None) -> str:
    clamp = (f"fit a small-signal diode in anti-parallel across {ref} (its cathode to "
             f"{anode or 'the anode'}): it holds the reverse voltage near 0.7 V")
    if result.group.topology == "reversed":
        return f"turn {ref} round (anode towards the higher rail), or {clamp}"
    return clamp
