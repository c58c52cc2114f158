"""Rule ``transistor-overload``: a transistor's worst-case dissipation above its derated pd_max."""

from __future__ import annotations

from typing import Any, Iterable

from linter import eseries
from linter.dissipation import Allowance, over, semiconductor_allowance
from linter.findings import Finding
from linter.partdata import BjtData, MosfetData
from linter.results import GroupResult, TransistorResult
from linter.rulekit import (amps, at_corner, figures_of, ohms, over_rated, part_location, say,
                            volts, watts)
from linter.rules import Rule, register

REGULATING = ("npn-sink", "pnp-source")
"""Topologies whose transistor regulates the current: a collector resistor leaves it unchanged."""


@register
class TransistorOverload(Rule):
    """A transistor dissipates more than its derated pd_max allows.

    The dissipation (Ic·Vce + Ib·Vbe for a bipolar transistor, Id·Vds for a MOSFET) is
    solved at every corner; the largest is compared with the part's ``pd_max`` derated to
    the ambient maximum — full at 25 °C, falling linearly to zero at 150 °C (small-signal
    packages, common practice) — and held to the ``[derating] transistor_power`` share (60 %
    by default, common practice). A pd_max that is a generic figure is said to be one. The
    fix names the pd_max a replacement must have, and for a current sink (or source) the
    resistor in series with the collector that takes part of the voltage off the
    transistor: the sink regulates the same current, so its dissipation falls by Ic²·R, as
    long as the lowest rail still leaves it Vce_sat.

    **Anti-pattern**

    One red LED under an NPN sink from 24 V: the transistor drops about 20 V at 20 mA,
    0.4 W, in a SOT-23 rated 250 mW::

        D1 +24V k 
        Q1 k b e TN45S
        R9 e 0 91

    **Best practice**

    A resistor between the LED and the collector takes most of the surplus voltage (here
    820 Ω drops about 16 V and leaves Q1 about 0.1 W), or a string of more LEDs uses it::

        D1 +24V k
        R20 k c 820
        Q1 c b e TN45S
        R9 e 0 91
    """

    id = "transistor-overload"
    default_severity = "error"

    def check(self, context: Any) -> Iterable[Finding]:
        ambient = context.settings.ambient.max
        share = context.settings.derating.transistor_power

        def rated(base: GroupResult) -> tuple:
            """(transistor record, its allowance, whether over it, whether pd_max is
            generic) of each transistor of a template with a pd_max, in order: figures and
            part data (a follower's equal but for the note) only."""
            out = []
            for transistor in base.transistors:
                data = context.part_data.get(transistor.ref)
                if not isinstance(data, (BjtData, MosfetData)) or data.pd_max is None:
                    continue
                allowance = semiconductor_allowance(data.pd_max, ambient, share)
                out.append((transistor, allowance, over(transistor.power.max, allowance),
                            "pd_max" in data.assumed))
            return tuple(out)

        for result, (transistor, allowance, _, generic), ref in over_rated(context, rated):
            yield self._finding(context, result, transistor, allowance, generic, ref)

    def _finding(self, context: Any, result: GroupResult, transistor: TransistorResult,
                 allowance: Allowance, generic: bool, ref: str | None = None) -> Finding:
        """``transistor``: the record holding the figures (a follower's template's, see
        :func:`~linter.rulekit.figures_of`); ``ref`` its name in ``result``'s group
        (default: the record's)."""
        refs = figures_of(result)[1] if ref is not None else None
        ref = transistor.ref if ref is None else ref
        power = transistor.power
        drop = "Vds" if transistor.kind in ("nmos", "pmos") else "Vce"
        rating = allowance.describe("pd_max" + (" (generic figure)" if generic else ""))
        message = say(ref,
                      f"{watts(power.max)} at {at_corner(power.at_max, result, (), refs)}, "
                      f"above the {watts(allowance.allowed_w)} allowed ({rating}); {drop} up to "
                      f"{volts(transistor.vce.max)} at up to {amps(transistor.current.max)}")
        values = {**allowance.values(power.max, power.nom),
                  "vce_max_v": transistor.vce.max, "current_max_a": transistor.current.max}
        fix = _fix(context, result, transistor, allowance, values, ref)
        return Finding(rule=self.id, severity=context.severity(self), message=message,
                       parts=(ref,), group=result.id, values=values, fix=fix,
                       location=part_location(context, ref))


def _fix(context: Any, result: GroupResult, transistor: TransistorResult,
         allowance: Allowance, values: dict, ref: str | None = None) -> str:
    """``ref``: the transistor's name in ``result``'s group (default: the record's)."""
    ref = transistor.ref if ref is None else ref
    needed = allowance.rating_needed(transistor.power.max)
    if needed is None:
        return (f"no pd_max is left at {allowance.ambient_c:g} °C ambient: take the dissipation "
                f"off {ref} (a series resistor or more LEDs in the string)")
    values["fix_pd_max_w"] = needed
    text = f"use a transistor (package) with pd_max of at least {watts(needed)}"
    collector = _collector_resistor(context, result, transistor, allowance, values, ref)
    return text if collector is None else f"{collector}; or {text}"


def _collector_resistor(context: Any, result: GroupResult, transistor: TransistorResult,
                        allowance: Allowance, values: dict,
                        ref: str | None = None) -> str | None:
    """A series resistor at the collector of a regulating transistor, when the rail allows.

    While the transistor regulates, Ic is fixed and a resistor R at its collector lowers Vce
    by Ic·R, so P falls by Ic²·R (W = A²·Ω). At the corner of most dissipation
    Ic ≥ P_max / Vce_max, so R = (P_max − P_allowed) / (P_max/Vce_max)² is enough (rounded
    up to E24, IEC 60063). The lowest rail that keeps it regulating rises by Ic_max·R.
    """
    ref = transistor.ref if ref is None else ref
    if result.group.topology not in REGULATING or transistor.rail_min is None:
        return None
    power, vce = transistor.power.max, transistor.vce.max
    if not vce > 0:
        return None
    current_at_power = power / vce
    ohms_needed = eseries.above((power - allowance.allowed_w) / current_at_power ** 2, "E24")
    rail = context.rails.get(transistor.headroom_rail or "")
    new_min = transistor.rail_min + transistor.current.max * ohms_needed
    if rail is None or new_min > rail.min:
        return None
    values.update(fix_collector_ohms=ohms_needed, fix_rail_min_v=new_min)
    left = power - current_at_power ** 2 * ohms_needed
    return (f"put {ohms(ohms_needed)} (E24) in series with the collector of {ref}: "
            f"it takes {volts(current_at_power * ohms_needed)} and leaves about "
            f"{watts(max(left, 0.0))} in {ref}; {transistor.headroom_rail} may then "
            f"fall to {volts(new_min)} (minimum {volts(rail.min)})")
