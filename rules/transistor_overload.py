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

    def check(self, context: Any, keep: bool = True) -> Iterable[Finding]:
        """``keep``: each template part's name-free finding pieces worked out once (False:
        for every finding, the plain path)."""
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

        kept: dict[int, tuple] | None = {} if keep else None
        for result, (transistor, allowance, _, generic), ref in over_rated(context, rated):
            yield self._finding(context, result, transistor, allowance, generic, kept, ref)

    def _finding(self, context: Any, result: GroupResult, transistor: TransistorResult,
                 allowance: Allowance, generic: bool, kept: dict[int, tuple] | None = None,
                 ref: str | None = None) -> Finding:
        """``transistor``: the record holding the figures (a follower's template's, see
        :func:`~linter.rulekit.figures_of`); ``ref`` its name in ``result``'s group
        (default: the record's). ``kept`` (one check's, the same ``context``):
        :func:`_pieces` by the record it was worked out for (the followers of a template
        share its record and allowance); without it (the plain path) the finding is
        written from the figures."""
        if kept is not None:
            return self._finding_of_pieces(context, result, transistor, allowance, generic,
                                           kept, ref)
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


    def _finding_of_pieces(self, context: Any, result: GroupResult,
                           transistor: TransistorResult, allowance: Allowance, generic: bool,
                           kept: dict[int, tuple], ref: str | None) -> Finding:
        """:meth:`_finding` from the record's :func:`_pieces`, kept in ``kept``."""
        refs = figures_of(result)[1] if ref is not None else None
        ref = transistor.ref if ref is None else ref
        regulating = result.group.topology in REGULATING
        entry = kept.get(id(transistor))
        if (entry is None or entry[0] is not transistor or entry[1] is not allowance
                or entry[2] is not generic or entry[3] is not regulating):
            entry = kept[id(transistor)] = (
                transistor, allowance, generic, regulating,
                _pieces(context, transistor, allowance, generic, regulating))
        head, tail, values, fix = entry[4]
        message = say(ref, f"{head}{at_corner(transistor.power.at_max, result, (), refs)}{tail}")
        return Finding(rule=self.id, severity=context.severity(self), message=message,
                       parts=(ref,), group=result.id, values=dict(values), fix=ref.join(fix),
                       location=part_location(context, ref))


def _pieces(context: Any, transistor: TransistorResult, allowance: Allowance, generic: bool,
            regulating: bool) -> tuple:
    """What a finding on the record says that names nothing: (message before the corner,
    message after it, values, the fix's texts between the places of the name). The
    message is ``say(ref, before + corner + after)``, the fix ``ref.join(texts)``, as
    :meth:`TransistorOverload._finding` and :func:`_fix` write them for a group whose
    topology is (``regulating``) or is not one of :data:`REGULATING`."""
    power = transistor.power
    drop = "Vds" if transistor.kind in ("nmos", "pmos") else "Vce"
    rating = allowance.describe("pd_max" + (" (generic figure)" if generic else ""))
    head = f"{watts(power.max)} at "
    tail = (f", above the {watts(allowance.allowed_w)} allowed ({rating}); {drop} up to "
            f"{volts(transistor.vce.max)} at up to {amps(transistor.current.max)}")
    values = {**allowance.values(power.max, power.nom),
              "vce_max_v": transistor.vce.max, "current_max_a": transistor.current.max}
    needed = allowance.rating_needed(power.max)
    if needed is None:
        return head, tail, values, (
            f"no pd_max is left at {allowance.ambient_c:g} °C ambient: take the dissipation "
            f"off ", " (a series resistor or more LEDs in the string)")
    values["fix_pd_max_w"] = needed
    text = f"use a transistor (package) with pd_max of at least {watts(needed)}"
    collector = _collector_pieces(context, regulating, transistor, allowance, values)
    if collector is None:
        return head, tail, values, (text,)
    first, second, third = collector
    return head, tail, values, (first, second, f"{third}; or {text}")


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
    pieces = _collector_pieces(context, True, transistor, allowance, values)
    return None if pieces is None else ref.join(pieces)


def _collector_pieces(context: Any, regulating: bool, transistor: TransistorResult,
                      allowance: Allowance, values: dict) -> tuple[str, str, str] | None:
    """:func:`_collector_resistor` as the texts between the two places of the
    transistor's name (``regulating``: whether the group's topology is one of
    :data:`REGULATING`); adds the same values."""
    if not regulating or transistor.rail_min is None:
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
    return (f"put {ohms(ohms_needed)} (E24) in series with the collector of ",
            f": it takes {volts(current_at_power * ohms_needed)} and leaves about "
            f"{watts(max(left, 0.0))} in ",
            f"; {transistor.headroom_rail} may then "
            f"fall to {volts(new_min)} (minimum {volts(rail.min)})")
