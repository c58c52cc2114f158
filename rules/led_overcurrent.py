"""Rule ``led-overcurrent``: an LED's worst-case current above its rating."""

from __future__ import annotations

from typing import Any, Iterable

from linter import fix_search
from linter.findings import Finding
from linter.results import GroupResult, LedResult
from linter.rulekit import (PerTemplate, amps, at_corner, figures_of, flagged, led_data, ohms,
                            renamer, say)
from linter.rules import Rule, register

SHARED = "shared-ballast"
PULSED = "pulse-overstress"
"""LEDs in parallel on one part are that rule's finding (one cause, one finding)."""


def led_limits(context: Any, ref: str) -> tuple[float | None, float | None, bool]:
    """(if_max, if_recommended, whether if_max is a generic figure) of an LED, A."""
    data = led_data(context, ref)
    if data is None:
        return None, None, False
    return data.if_max, data.if_recommended, "if_max" in data.assumed


def target_current(context: Any, ref: str) -> float | None:
    """The current a fix aims the worst case at: the recommended top, else if_max (A)."""
    if_max, recommended, _ = led_limits(context, ref)
    known = [x for x in (if_max, recommended) if x]
    return min(known) if known else None


def is_shared(context: Any, result: GroupResult) -> bool:
    """True when ``shared-ballast`` is on and reports this group (parallel strings)."""
    return (result.group.topology == "parallel" and len(result.group.strings) > 1
            and context.enabled(SHARED))


def is_pulsed(context: Any, result: GroupResult) -> bool:
    """True when ``pulse-overstress`` is on and one of the group's nets is declared pulsed:
    its peak is judged against the pulse ratings there, not against if_max here."""
    pulsed = context.settings.pulsed
    return (bool(pulsed) and context.enabled(PULSED)
            and any(net in pulsed for net in result.group.nets))


@register
class LedOvercurrent(Rule):
    """An LED's worst-case current is above its maximum (or its recommended range).

    The current is solved at every corner (rail tolerance, resistor tolerance, the LED's
    Vf bin, ambient, transistor gain); the highest is compared with the datasheet's
    continuous maximum ``if_max`` (error) and, when the part data gives one, the top of the
    recommended range ``if_recommended`` (warning). The fix is the next standard resistor
    (IEC 60063 series of the resistor's tolerance: E24 at 5 %, E96 at 1 %) that keeps the
    worst case at or below the recommended top (else ``if_max``), found by solving the group
    again with that value, so a re-run agrees. Where a sink sets the current the emitter
    resistor is recomputed the same way. LEDs in parallel on one part are reported by
    ``shared-ballast`` instead (splitting the part is the fix).

    **Anti-pattern**

    A red LED rated 25 mA on 100 Ω from a 5 V ±5 % rail: at 5.25 V with a vf_min LED and
    the resistor 5 % low it takes about 36 mA::

        R4 +5V a 100
        D4 a 0 LEDRED

    **Best practice**

    Size the resistor for the worst corner, not the typical one: 150 Ω keeps the same LED
    below 25 mA at every corner::

        R4 +5V a 150
        D4 a 0 LEDRED
    """

    id = "led-overcurrent"
    default_severity = "error"

    def check(self, context: Any) -> Iterable[Finding]:
        # is_shared and is_pulsed, with the board's settings read once
        shared_on = context.enabled(SHARED)
        pulsed = context.settings.pulsed
        pulsed_on = bool(pulsed) and context.enabled(PULSED)
        overs: dict[int, tuple[GroupResult, tuple]] = {}
        verdicts = PerTemplate(lambda base: _over_of(context, base, overs))
        for result, _ in flagged(context, verdicts):  # groups with an LED over its limit
            group = result.group
            if shared_on and group.topology == "parallel" and len(group.strings) > 1:
                continue
            if pulsed_on and any(net in pulsed for net in group.nets):
                continue
            finding = self._group_finding(context, result, overs)
            if finding is not None:
                yield finding

    def _group_finding(self, context: Any, result: GroupResult,
                       overs: dict[int, tuple[GroupResult, tuple]] | None = None
                       ) -> Finding | None:
        """One finding per group: its LEDs over their limit, the hottest quoted.

        ``overs`` (one check's) keeps :func:`_over` by the template result it was worked
        out for (see :func:`_over_of`); without it (the plain path) it is worked out from
        the group's own figures and part data."""
        found = _over(context, result) if overs is None else _over_of(context, result, overs)
        if not found:
            return None
        base, refs = figures_of(result)
        name = renamer(refs)
        leds = base.leds  # the follower's figures, under the template's names
        over = [(leds[index], limit, level, generic) for index, limit, level, generic in found]
        level = "error" if any(item[2] == "error" for item in over) else "warning"
        hottest = max((x for x in over if x[2] == level), key=lambda x: x[0].current.max)
        return self._finding(context, result, hottest, tuple(name(x[0].ref) for x in over),
                             level)

    def _finding(self, context: Any, result: GroupResult,
                 hottest: tuple[LedResult, float, str, bool], parts: tuple[str, ...],
                 level: str) -> Finding:
        """``hottest``'s LED record is the one holding the figures (a follower's
        template's, :func:`~linter.rulekit.figures_of`); ``parts`` are the group's names."""
        base, refs = figures_of(result)
        led, limit, _, generic = hottest
        ref = renamer(refs)(led.ref)
        what = "maximum" if level == "error" else "recommended maximum"
        if generic:
            what += " (generic figure)"
        where = at_corner(led.current.at_max, result, (ref,), refs)
        others = [p for p in parts if p != ref]
        also = f" (also {', '.join(others)})" if others else ""
        message = say(ref, f"{amps(led.current.max)} at {where}, above its {amps(limit)} "
                           f"{what}; {amps(led.current.nom)} nominal{also}")
        values = {"current_max_a": led.current.max, "current_nom_a": led.current.nom,
                  "current_min_a": led.current.min, "limit_a": limit}
        fix = self._fix(context, result, values)
        severity = context.severity(self) if level == "error" else context.severity(self, "warning")
        return Finding(rule=self.id, severity=severity, message=message, parts=parts,
                       nets=(), group=result.id, values=values, fix=fix)

    def _fix(self, context: Any, result: GroupResult, values: dict) -> str | None:
        """The standard resistor that brings every LED of the group under its target."""
        base, refs = figures_of(result)
        # the template's part data (a follower's equals it but for the note)
        targets = [t for t in (target_current(context, x.ref) for x in base.leds) if t]
        ref = current_resistor(context, result)
        if not targets or ref is None:
            return None
        target = min(targets)
        name = renamer(refs)
        leds = tuple(name(x.ref) for x in base.leds)
        key = None
        if refs is not None:  # a follower: its signature from its template's, when equal
            asked = current_resistor(context, base)  # the same resistor in the template
            if asked is not None:
                key = fix_search.follower_signature(
                    context, result, fix_search.resistor_for_max_question(ref, leds, target),
                    fix_search.resistor_for_max_question(
                        asked, tuple(x.ref for x in base.leds), target))
        try:
            choice = fix_search.resistor_for_max(context, result, ref, leds, target, key)
        except RuntimeError:
            return None
        if choice is None:
            return f"no standard value of {ref} brings the current under {amps(target)}"
        values.update(fix_ohms=choice.ohms, fix_current_nom_a=choice.current_nom_a or 0.0,
                      fix_current_min_a=choice.current_min_a or 0.0,
                      fix_current_max_a=choice.current_max_a, fix_target_a=target)
        role = "" if ref == result.group.setter else " (emitter resistor)"
        return (f"make {ref}{role} {ohms(choice.ohms)} ({choice.series}): "
                f"{amps(choice.current_nom_a or 0.0)} nominal, "
                f"{amps(choice.current_min_a or 0.0)}–{amps(choice.current_max_a)} worst case")


def _over(context: Any, result: GroupResult) -> tuple[tuple[int, float, str, bool], ...]:
    """The group's LEDs above a limit, in order: (position in ``result.leds``, the limit in
    A, ``"error"`` above if_max or ``"warning"`` above the recommended top, whether if_max
    is a generic figure)."""
    over = []
    for index, led in enumerate(result.leds):
        if_max, recommended, generic = led_limits(context, led.ref)
        if if_max is not None and led.current.max > if_max:
            over.append((index, if_max, "error", generic))
        elif recommended is not None and led.current.max > recommended:
            over.append((index, recommended, "warning", False))
    return tuple(over)


def _over_of(context: Any, result: GroupResult,
             overs: dict[int, tuple[GroupResult, tuple]]) -> tuple:
    """:func:`_over` of ``result``, worked out once per template result.

    A result renamed from a template's (``origin``, :mod:`linter.result_rename`) has the
    template's LED figures in the same order, and each of its LEDs part data equal to the
    template's LED's in every field but the note (:mod:`linter.group_key`), which
    :func:`led_limits` does not read; the answer holds positions and figures only. The
    entry keeps the template alive, so that its id stays its own; ``context`` is one
    check's."""
    origin = result.origin
    base = result if origin is None else origin[0]
    entry = overs.get(id(base))
    if entry is not None and entry[0] is base:
        return entry[1]
    found = _over(context, base)
    overs[id(base)] = (base, found)
    return found


def current_resistor(context: Any, result: GroupResult) -> str | None:
    """The resistor that sets the group's current: the setter, or a sink's emitter resistor.
    (A follower's resistors are read through its template, :func:`~linter.rulekit.figures_of`.)"""
    setter = result.group.setter
    base, refs = figures_of(result)
    name = renamer(refs)
    names = {name(r.ref) for r in base.resistors}
    if setter in names:
        return setter
    transistor = result.group.transistor
    part = context.circuit.parts.get(transistor) if transistor else None
    if part is None:
        return None
    emitter = part.pin("E") or part.pin("S")
    if emitter is None or emitter.net is None:
        return None
    for ref in sorted(names):
        if emitter.net in context.circuit.parts[ref].nets:
            return ref
    return None
