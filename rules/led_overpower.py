"""Rule ``led-overpower``: an LED's worst-case dissipation above its derated pd_max."""

from __future__ import annotations

from typing import Any, Iterable

from linter import eseries, fix_search
from linter.dissipation import Allowance, over, semiconductor_allowance
from linter.findings import Finding
from linter.fixes import resistor_for_current_solved
from linter.results import GroupResult, LedResult
from linter.rulekit import (PerTemplate, amps, at_corner, figures_of, flagged, led_data, ohms,
                            part_location, renamer, say, volts, watts)
from linter.rules import Rule, register


@register
class LedOverpower(Rule):
    """An LED dissipates more than its derated pd_max allows.

    Only where the part data gives the LED's ``pd_max``: without it nothing is judged (no
    generic figure is taken). The dissipation I·Vf is solved at every corner; the largest
    is compared with pd_max derated to the ambient maximum — full at 25 °C, falling
    linearly to zero at 150 °C (small packages, common practice) — held to the
    ``[derating] transistor_power`` share (60 % by default, common practice; LEDs are
    semiconductor junctions like transistors). The fix is the standard value of the
    current-setting resistor that keeps the worst case within the allowance, found by
    solving the group again, or else the current the LED may take.

    **Anti-pattern**

    A 0603 LED with pd_max 75 mW at 30 mA and 2.4 V (72 mW) in a 60 °C enclosure, where only
    about 32 mW are allowed::

        R1 +5V a 82
        D1 a 0 LD0603RD

    **Best practice**

    Size the current for the hot end: 240 Ω keeps the same LED at about 15 mA and 30 mW at
    the worst corner, inside the allowance::

        R1 +5V a 240
        D1 a 0 LD0603RD
    """

    id = "led-overpower"
    default_severity = "error"

    def check(self, context: Any) -> Iterable[Finding]:
        ambient = context.settings.ambient.max
        share = context.settings.derating.transistor_power
        verdicts = PerTemplate(lambda base: _hot(context, base, ambient, share))
        for result, hot in flagged(context, verdicts):
            yield self._finding(context, result, list(hot))

    def _finding(self, context: Any, result: GroupResult,
                 hot: list[tuple[LedResult, Allowance]]) -> Finding:
        """One finding per group: the LED furthest over its allowance quoted, all named.
        ``hot``'s records are those holding the figures (a follower's template's, see
        :func:`~linter.rulekit.figures_of`); names are the group's."""
        refs = figures_of(result)[1]
        name = renamer(refs)
        led, allowance = max(hot, key=lambda item: item[0].power.max / item[1].allowed_w)
        ref = name(led.ref)
        power = led.power
        others = [name(x.ref) for x, _ in hot if x.ref != led.ref]
        also = f" (also {', '.join(others)})" if others else ""
        message = say(ref, f"{watts(power.max)} at "
                               f"{at_corner(power.at_max, result, (ref,), refs)}, above the "
                               f"{watts(allowance.allowed_w)} allowed "
                               f"({allowance.describe('pd_max')}); {watts(power.nom)} nominal"
                               f"{also}")
        values = {**allowance.values(power.max, power.nom),
                  "current_max_a": led.current.max, "vf_max_v": led.vf.max}
        return Finding(rule=self.id, severity=context.severity(self), message=message,
                       parts=tuple(name(x.ref) for x, _ in hot), group=result.id,
                       values=values, fix=_fix(context, result, hot, led, allowance, values),
                       location=part_location(context, ref))


def _hot(context: Any, result: GroupResult, ambient: float, share: float
         ) -> tuple[tuple[LedResult, Allowance], ...]:
    """(LED record, its allowance) of each LED of the group dissipating more than its
    derated pd_max allows at ``ambient`` (°C) and ``share``, in order. Figures and part
    data only: a follower's figures are its template's in the same order and its LEDs' part
    data equal the template's but for the note (:mod:`linter.group_key`), so the template's
    answer is the follower's (its records named through ``refs``)."""
    hot: list[tuple[LedResult, Allowance]] = []
    for led in result.leds:
        data = led_data(context, led.ref)
        if data is None or data.pd_max is None or "pd_max" in data.assumed:
            continue
        allowance = semiconductor_allowance(data.pd_max, ambient, share)
        if over(led.power.max, allowance):
            hot.append((led, allowance))
    return tuple(hot)


def _fix(context: Any, result: GroupResult, hot: list[tuple[LedResult, Allowance]],
         led: LedResult, allowance: Allowance, values: dict) -> str:
    """The setter resistor found by solving again, else the current to stay under (I = P/Vf).
    Records as :meth:`LedOverpower._finding`'s."""
    base, refs = figures_of(result)
    name = renamer(refs)
    vf_hot = led.power.max / led.current.max if led.current.max > 0 else led.vf.max
    limit = allowance.allowed_w / vf_hot
    values["fix_current_max_a"] = limit
    plain = (f"keep {name(led.ref)} at or below about {amps(limit)} at worst "
             f"({watts(allowance.allowed_w)} at {volts(vf_hot)})")
    setter = result.group.setter
    if setter not in {name(r.ref) for r in base.resistors}:
        return plain
    limits = {name(x.ref): a.allowed_w for x, a in hot}
    choice = _resistor_for_power(context, result, setter, limits)
    if choice is None:
        return plain
    values["fix_ohms"] = choice.ohms
    worst = choice.current_max_a * allowance.allowed_w
    return (f"make {setter} {ohms(choice.ohms)} ({choice.series}): {name(led.ref)} then "
            f"dissipates at most {watts(worst)} ({watts(allowance.allowed_w)} allowed)")


def _resistor_for_power(context: Any, result: GroupResult, ref: str,
                        limits: dict[str, float]):
    """Smallest standard value of ``ref`` for which every LED named in ``limits`` keeps its
    solved worst-case power (W) within its allowance (W). The choice's "current" fields
    hold the largest ratio power/allowance (dimensionless; at most 1)."""
    def search():
        tolerance = fix_search.tolerance_of(context, ref)
        series = eseries.series_for_tolerance(tolerance)
        solved = fix_search.solved_walk(context, result, ref, series)

        def ratio(value: float) -> tuple[float, float, float]:
            again = solved(value)
            spans = [(again.led(r).power, allowed) for r, allowed in limits.items()]
            return (max(s.nom / a for s, a in spans), min(s.min / a for s, a in spans),
                    max(s.max / a for s, a in spans))

        return resistor_for_current_solved(ratio, 1.0, fix_search.resistor_ohms(result, ref),
                                           series=series, tolerance=tolerance, max_steps=200)

    try:
        return fix_search.remembered(context, result,
                                     ("led-overpower", ref, sorted(limits.items())), search)
    except RuntimeError:
        return None
