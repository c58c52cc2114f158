"""Rule ``sink-compliance``: a current sink or source that runs out of voltage at some corner."""

from __future__ import annotations

from typing import Any, Iterable

from linter.findings import Finding
from linter.fixes_sink import EMITTER_V_FLOOR
from linter.partdata import Rail
from linter.results import GroupResult, TransistorResult
from linter.rulekit import (PerTemplate, amps, at_corner, bjt_data, figures_of, flagged, ohms,
                            renamer, say, sink_design, solved_groups, volts)
from linter.rules import Rule, register
from linter.rules.string_headroom import reference_rail

REGULATORS = ("npn-sink", "pnp-source", "parallel")
"""Topologies whose transistor may set the current (``parallel`` only when it is the setter)."""


@register
class SinkCompliance(Rule):
    """A current sink (or source) saturates at some corner and stops regulating.

    A transistor sink holds its current only while V_ce ≥ V_ce(sat); the lowest rail that
    keeps it there is rail_min = ΣVf(max) + I_e·R_e + V_ce(sat). When the rail's minimum is
    below that — a long string, high-Vf parts, a generous emitter voltage — the transistor
    saturates and the current falls to whatever the leftover voltage gives. The solver
    finds the corner where it happens and the current there; the rule reports both with the
    rail the sink needs. The fix is computed: fewer LEDs per string, a lower emitter voltage
    (a new divider and emitter resistor from the E-series, still above 0.5 V so Vbe's
    spread does not dominate), or the rail needed.

    **Anti-pattern**

    Four red LEDs (up to 2.45 V each) under a sink with 1.8 V on its emitter, from 12 V
    ±10 %: 9.8 + 1.8 + 0.2 = 11.8 V needed, 10.8 V available at the low end::

        D11 +12V a LEDRED
        D12 a b LEDRED
        D13 b c LEDRED
        D14 c col LEDRED
        Q1 col base e QNPN
        R10 +5V base 1k
        R11 base 0 1k
        R9 e 0 91

    **Best practice**

    Three LEDs per string on that rail (7.35 + 1.8 + 0.2 = 9.35 V), or a lower emitter
    voltage (about 0.6 V: divider 3.3k/1k from 5 V, emitter 30 Ω), or a higher rail.
    """

    id = "sink-compliance"
    default_severity = "error"

    def check(self, context: Any, by_template: bool = True) -> Iterable[Finding]:
        """``by_template``: only the groups whose template has a transistor out of
        regulation at a known rail (:func:`_may_leave`, the loop's own conditions on the
        template's records, which a follower's figures are) are looked at
        (:func:`~linter.rulekit.flagged`); False: every solved group, the plain loop."""
        results = solved_groups(context)
        if by_template:
            results = (result for result, _ in flagged(
                context, PerTemplate(lambda base: _may_leave(context, base))))
        for result in results:
            if result.group.topology not in REGULATORS:
                continue
            base, refs = figures_of(result)  # a follower's records are left unbuilt
            rename = renamer(refs)
            for transistor in base.transistors:
                if rename(transistor.ref) != result.group.transistor \
                        or transistor.rail_min is None:
                    continue
                rail = context.rails.get(transistor.headroom_rail or "")
                if rail is None:
                    continue
                if transistor.saturated or rail.min < transistor.rail_min:
                    yield self._finding(context, result, transistor, rail)

    def _finding(self, context: Any, result: GroupResult, q: TransistorResult,
                 rail: Rail) -> Finding:
        """``q``: the record holding the figures (a follower's template's, see
        :func:`~linter.rulekit.figures_of`); names are the group's."""
        base, refs = figures_of(result)
        ref = renamer(refs)(q.ref)
        name = q.headroom_rail
        where = at_corner(q.saturated_at or q.rail_min_at, result, (), refs)
        values = {"rail_min_needed_v": q.rail_min, "rail_min_v": rail.min,
                  "current_nom_a": q.current.nom}
        text = (f"leaves regulation at {where}: it needs {name} ≥ {volts(q.rail_min)}, "
                f"the rail's minimum is {volts(rail.min)}")
        if q.current_when_saturated is not None:
            values["current_when_saturated_a"] = q.current_when_saturated
            text += (f"; the LEDs get {amps(q.current_when_saturated)} there instead of "
                     f"{amps(q.current.nom)} nominal")
        fix = self._fix(context, result, q, rail, values)
        parts = (ref, *result.group.leds)
        return Finding(rule=self.id, severity=context.severity(self), message=say(ref, text),
                       parts=parts, group=result.id, values=values, fix=fix)

    def _fix(self, context: Any, result: GroupResult, q: TransistorResult, rail: Rail,
             values: dict) -> str:
        string = max(result.group.strings, key=len)
        base, refs = figures_of(result)
        name = renamer(refs)
        leds = {name(x.ref): x for x in base.leds}
        vf = [leds[ref].vf.max for ref in string]
        vce_sat = q.vce_sat or 0.0
        v_emitter = q.rail_min - sum(vf) - vce_sat
        allowed = rail.min - sum(vf) - vce_sat
        values.update(emitter_v=v_emitter, emitter_v_allowed=allowed)
        options = []
        fits = int((rail.min - v_emitter - vce_sat) // max(vf))
        if 0 < fits < len(string):
            values["fix_leds_per_string"] = float(fits)
            options.append(f"{fits} LED{'s' if fits > 1 else ''} per string (up to "
                           f"{volts(fits * max(vf) + v_emitter + vce_sat)} needed)")
        lower = self._lower_emitter(context, result, q, rail, sum(vf), allowed, values)
        if lower:
            options.append(lower)
        options.append(f"a {q.headroom_rail} that stays at or above {volts(q.rail_min)}")
        return "use " + ", or ".join(options)

    @staticmethod
    def _lower_emitter(context: Any, result: GroupResult, q: TransistorResult, rail: Rail,
                       vf_sum: float, allowed: float, values: dict) -> str | None:
        """A new divider and emitter resistor with the emitter voltage the rail allows."""
        if q.kind != "npn" or allowed < EMITTER_V_FLOOR or result.group.drive != "divider":
            return None
        others = [context.rails[n] for n in result.group.rails
                  if n in context.rails and n != q.headroom_rail and not context.rails[n].is_ground]
        reference = others[0] if others else reference_rail(context, rail)
        transistor = bjt_data(context, renamer(figures_of(result)[1])(q.ref))
        design = sink_design(rail.min, vf_sum, q.current.nom, reference.nom,
                             v_rail_max=rail.max, reference_name=reference.name,
                             reference_tolerance=(reference.max - reference.min) / 2 / reference.nom,
                             transistor=transistor, resistor_tolerance=0.01)
        if design is None or not design.regulates:
            return None
        values.update(fix_r_top_ohms=design.r_top, fix_r_bottom_ohms=design.r_bottom,
                      fix_r_emitter_ohms=design.r_emitter, fix_emitter_v=design.v_emitter)
        return (f"an emitter voltage of {volts(design.v_emitter)} (divider "
                f"{ohms(design.r_top)}/{ohms(design.r_bottom)} from {reference.name}, emitter "
                f"{ohms(design.r_emitter)} {design.series}, needs {volts(design.rail_min_v)})")


def _may_leave(context: Any, base: GroupResult) -> bool:
    """Whether a transistor of ``base`` (a template) leaves regulation at a rail the board
    knows: :meth:`SinkCompliance.check`'s conditions but the name and the topology."""
    for transistor in base.transistors:
        if transistor.rail_min is None:
            continue
        rail = context.rails.get(transistor.headroom_rail or "")
        if rail is not None and (transistor.saturated or rail.min < transistor.rail_min):
            return True
    return False
