"""Rule ``led-undercurrent``: an LED that stays dark, or nearly, at some corner."""

from __future__ import annotations

from typing import Any, Callable, Iterable

from linter import fix_search
from linter.config import RuleOption
from linter.findings import Finding
from linter.refs import fold_refs, natural_sorted
from linter.results import GroupResult, LedResult
from linter.rulekit import (PerTemplate, amps, at_corner, figures_of, flagged, ohms, renamer, say,
                            volts)
from linter.rules import Rule, register
from linter.rules.led_overcurrent import current_resistor, is_shared, target_current
from linter.unionfind import UnionFind

DARK_A = 1e-6
"""A, below this an LED is said not to conduct (no visible light at all; from memory)."""
RAIL_SEARCH_SPAN = 3.0
"""The rail search looks up to this multiple of the rail's maximum (dimensionless)."""


@register
class LedUndercurrent(Rule):
    """An LED does not light, or lights below a visible floor, at some corner.

    The lowest current over every corner is compared with ``visible_floor`` (default
    0.5 mA, common practice for a small indicator seen indoors). Below it at some corner
    (typically the rail at its minimum with the LEDs at vf_max, when the rail hardly
    exceeds the string's forward voltage) is a warning; below it at the nominal corner —
    the LED cannot light as designed — is an error. The fix is computed with the solver:
    the standard resistor (series of its tolerance) that lifts the minimum over the floor
    without taking the maximum over the LED's rating, else the rail minimum that would.
    LEDs in parallel on one part, starved by a Vf spread, are ``shared-ballast``'s finding;
    this rule then checks only their nominal current.

    **Anti-pattern**

    Three white LEDs (about 3.2 V each) on 470 Ω from 9 V ±10 %: at 8.1 V with the LEDs at
    vf_max the rail is below the string's forward voltage and nothing lights::

        R1 +9V a 470
        D1 a b LEDWHT
        D2 b c LEDWHT
        D3 c 0 LEDWHT

    **Best practice**

    Leave headroom for the worst corner: two white LEDs per string on that rail, or a
    higher rail, or a current sink with its compliance checked::

        R1 +9V a 120
        D1 a b LEDWHT
        D2 b 0 LEDWHT
    """

    id = "led-undercurrent"
    default_severity = "error"
    options = (RuleOption("visible_floor", "A", 0.5e-3,
                          "lowest current (A) at which an indicator still counts as lit"),)

    def check(self, context: Any) -> Iterable[Finding]:
        yield from self._shorted(context)
        floor = float(context.option(self, "visible_floor"))
        verdicts = PerTemplate(lambda base: _verdict(context, base, floor))
        for result, _ in flagged(context, verdicts):  # groups with an LED below the floor
            finding = self._group_finding(context, result, floor, verdicts)
            if finding is not None:
                yield finding

    def _group_finding(self, context: Any, result: GroupResult, floor: float,
                       verdicts: Callable[[GroupResult], Any] | None = None) -> Finding | None:
        """``verdicts`` (one check's :class:`~linter.rulekit.PerTemplate`): :func:`_verdict`
        once per template; without it (the plain path) from the group's own figures."""
        verdict = _verdict(context, result, floor) if verdicts is None else verdicts(result)
        if verdict is None:
            return None
        positions, nominal = verdict
        base = figures_of(result)[0]
        return self._finding(context, result, [base.leds[i] for i in positions], floor,
                             nominal)

    def _shorted(self, context: Any, unlinked: bool = True) -> Iterable[Finding]:
        """LEDs whose two pins are joined through 0 Ω links: they can never light.
        ``unlinked``: on a board without links (every net its own set) compare the two
        nets themselves, not their sets' roots (False: the roots always)."""
        circuit = context.circuit
        joined = _link_clusters(circuit)
        alone = unlinked and not joined.links  # find(net) is net for every net
        for led in circuit.leds():
            nets = [pin.net for pin in led.pins if pin.net is not None]
            if len(nets) != 2:
                continue
            if alone:
                if nets[0] != nets[1]:
                    continue
            elif joined.find(nets[0]) != joined.find(nets[1]):
                continue
            links = natural_sorted(joined.links_between(nets[0], nets[1]))
            via = f"through {fold_refs(links)} (0 Ω)" if links else "by a single net"
            yield Finding(rule=self.id, severity=context.severity(self),
                          message=say(led.ref, f"anode and cathode are joined {via}: it "
                                               "cannot light at any corner"),
                          parts=(led.ref, *links), location=led.location,
                          values={"current_nom_a": 0.0},
                          fix=f"remove or move {fold_refs(links)}" if links
                          else "connect the anode and cathode to their own nets")

    def _finding(self, context: Any, result: GroupResult, leds: list[LedResult], floor: float,
                 nominal: bool) -> Finding:
        """``leds``: the records holding the figures of the LEDs below the floor (a
        follower's template's, :func:`~linter.rulekit.figures_of`)."""
        refs = figures_of(result)[1]
        name = renamer(refs)
        worst = min(leds, key=lambda x: x.current.nom if nominal else x.current.min)
        worst_ref = name(worst.ref)
        current = worst.current.nom if nominal else worst.current.min
        where = "the nominal corner" if nominal else at_corner(worst.current.at_min, result,
                                                               (worst_ref,), refs)
        state = ("does not conduct" if current < DARK_A
                 else f"gets {amps(current)}, below the {amps(floor)} visible floor")
        tail = "" if nominal else f"; {amps(worst.current.nom)} nominal"
        others = [name(x.ref) for x in leds if x.ref != worst.ref]
        also = f" (also {', '.join(others)})" if others else ""
        message = say(worst_ref, f"{state} at {where}{tail}{also}")
        values = {"current_min_a": worst.current.min, "current_nom_a": worst.current.nom,
                  "current_max_a": worst.current.max, "floor_a": floor}
        severity = context.severity(self) if nominal else context.severity(self, "warning")
        return Finding(rule=self.id, severity=severity, message=message,
                       parts=tuple(name(x.ref) for x in leds), group=result.id, values=values,
                       fix=self._fix(context, result, floor, values))

    def _fix(self, context: Any, result: GroupResult, floor: float, values: dict) -> str | None:
        base, refs = figures_of(result)
        lit = [x.ref for x in base.leds if x.lit_scenarios]
        # the template's part data (a follower's equals it but for the note)
        targets = [t for t in (target_current(context, ref) for ref in lit) if t]
        name = renamer(refs)
        leds = tuple(name(ref) for ref in lit)
        ceiling = min(targets) if targets else None
        ref = current_resistor(context, result)
        try:
            if ref is not None and ref == result.group.setter:
                choice = fix_search.resistor_for_min(context, result, ref, leds, floor, ceiling)
                if choice is not None:
                    values.update(fix_ohms=choice.ohms, fix_current_min_a=choice.current_min_a
                                  or 0.0, fix_current_max_a=choice.current_max_a)
                    return (f"make {ref} {ohms(choice.ohms)} ({choice.series}): at least "
                            f"{amps(choice.current_min_a or 0.0)}, at most "
                            f"{amps(choice.current_max_a)}")
            return self._rail_fix(context, result, leds, floor, values)
        except RuntimeError:
            return None

    def _rail_fix(self, context: Any, result: GroupResult, leds: tuple[str, ...], floor: float,
                  values: dict) -> str | None:
        name = result.rail
        rail = context.rails.get(name) if name else None
        if rail is None or rail.is_ground:
            return None
        needed = fix_search.rail_for_min(context, result, name, leds, floor,
                                         max(rail.max, 1.0) * RAIL_SEARCH_SPAN)
        if needed is None:
            return f"no {name} level up to {volts(rail.max * RAIL_SEARCH_SPAN)} lights it"
        values.update(fix_rail_min_v=needed)
        return (f"keep {name} at or above {volts(needed)} (its minimum is {volts(rail.min)}), "
                f"or put fewer LEDs in the string")


def _verdict(context: Any, result: GroupResult, floor: float
             ) -> tuple[tuple[int, ...], bool] | None:
    """(positions in ``result.leds`` of the lit LEDs below ``floor``, A; whether at the
    nominal corner) of the group's finding, or None. Figures and the group's shape only: a
    follower's (same figures in the same order, same topology, strings and nets in
    kind) is its template's."""
    lit = [(i, led) for i, led in enumerate(result.leds) if led.lit_scenarios]
    dark_nominal = tuple(i for i, led in lit if led.current.nom < floor)
    if dark_nominal:
        return dark_nominal, True
    if is_shared(context, result):
        return None
    dim = tuple(i for i, led in lit if led.current.min < floor)
    return (dim, False) if dim else None


class _Joins(UnionFind):
    """Nets joined by 0 Ω links, remembering which link joined what."""

    def __init__(self) -> None:
        super().__init__()
        self.links: list[tuple[str, str, str]] = []

    def join_link(self, link: str, a: str, b: str) -> None:
        self.links.append((link, a, b))
        self.join(a, b)

    def links_between(self, a: str, b: str) -> list[str]:
        """Links inside the cluster that holds ``a`` and ``b`` (all of them: the short)."""
        root = self.find(a)
        return [link for link, x, _ in self.links if self.find(x) == root]


def _link_clusters(circuit: Any) -> _Joins:
    joins = _Joins()
    for part in circuit.parts.values():
        if part.kind == "link":
            nets = [pin.net for pin in part.pins if pin.net is not None]
            if len(nets) == 2:
                joins.join_link(part.ref, nets[0], nets[1])
    return joins
