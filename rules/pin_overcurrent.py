"""Rule ``pin-overcurrent``: a microcontroller pin, or its package, above its current rating."""

from __future__ import annotations

from operator import attrgetter
from typing import Any, Iterable

from linter import eseries, fix_search
from linter.findings import Finding
from linter.fixes import resistor_for_current_solved
from linter.partdata import McuData
from linter.refs import fold_refs
from linter.results import GroupResult, PinResult
from linter.rulekit import (PerTemplate, amps, at_corner, figures_of, flagged, ohms, part_location,
                            renamer, say)
from linter.rules import Rule, register


@register
class PinOvercurrent(Rule):
    """A microcontroller pin, or the sum over its package, carries more than it is rated for.

    Each output pin is solved as its supply (or ground) behind the output resistance; its
    worst-case current is compared with the part data's ``pin_current_max``. Then the
    package: with every LED on at once, the pins' worst-case currents add up in the supply
    and ground pins, compared with ``package_current_max`` (each group counted once: in a
    bicolour pair the same current leaves one pin and enters the other). Generic figures are
    said to be generic. The fix for a pin is the standard resistor value that brings it
    within its limit (found by solving the group again), or a transistor switch that takes
    the LED current off the pin; for the package, the current to move off it.

    **Anti-pattern**

    A blue LED pulled down by a pin through 47 Ω from 5 V: up to about 40 mA into a pin
    rated 20 mA::

        R4 +5V a 47
        D4 a pa3 LEDBLUE
        XU1 +5V 0 ... pa3 ... MCU

    **Best practice**

    A resistor that keeps the worst case within the pin's rating (here about 100 Ω for
    20 mA), or an NPN switch whose base the pin drives through a resistor::

        R4 +5V a 100
        D4 a pa3 LEDBLUE
    """

    id = "pin-overcurrent"
    default_severity = "error"

    def check(self, context: Any) -> Iterable[Finding]:
        contributions: dict[str, list[tuple[PinResult, GroupResult]]] = {}
        # a template's pins above their rating (positions), and all its pins: a follower's
        # pins are its template's figures in the same order (see _pins)
        verdicts = PerTemplate(lambda base: (tuple(i for i, pin in enumerate(base.pins)
                                                   if pin.current_max is not None
                                                   and pin.current.max > pin.current_max),
                                             base.pins))
        for result, (over, pins) in flagged(context, verdicts):  # groups with pins
            # the pins' ids: a follower's its own drives' (as many as _pins pairs up)
            ids = list(map(_ID, pins if result.origin is None
                           else result.group.pins[:len(pins)]))
            for index in over:
                if index < len(ids):
                    yield self._pin_finding(context, result, _pin(result, index))
            for part, index in _largest_per_part(ids, pins).items():
                contributions.setdefault(part, []).append((result, index, pins[index].current))
        for part, entries in sorted(contributions.items()):
            # the package total from the figures alone; the pin records made only when over
            # (a pin's span is its figures' record's, _pin)
            if not _package_over(context, part, [current for _, _, current in entries]):
                continue
            finding = self._package_finding(
                context, part, [(_pin(result, index), result) for result, index, _ in entries])
            if finding is not None:
                yield finding

    def _pin_finding(self, context: Any, result: GroupResult, pin: PinResult) -> Finding:
        part = pin.id.split(".", 1)[0]
        data = context.part_data.get(part)
        generic = isinstance(data, McuData) and "pin_current_max" in data.assumed
        direction = "sourced" if pin.sourcing else "sunk"
        limit = f"{amps(pin.current_max)} pin rating" + (" (generic figure)" if generic else "")
        refs = figures_of(result)[1]
        at = pin.current.at_max  # a follower's: its template's corner, named through refs
        message = say(pin.id, f"{amps(pin.current.max)} {direction} at "
                              f"{at_corner(at, result, (), refs)}, above its {limit}; "
                              f"{amps(pin.current.nom)} nominal ({', '.join(result.group.leds)})")
        values = {"current_max_a": pin.current.max, "current_nom_a": pin.current.nom,
                  "limit_a": pin.current_max}
        fix = _pin_fix(context, result, pin, values)
        return Finding(rule=self.id, severity=context.severity(self), message=message,
                       parts=(part, *result.group.leds), nets=(pin.net,), group=result.id,
                       values=values, fix=fix, location=part_location(context, part))

    def _package_finding(self, context: Any, part: str,
                         pins: list[tuple[PinResult, GroupResult]]) -> Finding | None:
        data = context.part_data.get(part)
        if not isinstance(data, McuData) or data.package_current_max is None:
            return None
        total = sum(pin.current.max for pin, _ in pins)
        limit = data.package_current_max
        if total <= limit:
            return None
        generic = " (generic figure)" if "package_current_max" in data.assumed else ""
        names = fold_refs(pin.id for pin, _ in pins)
        message = say(part, f"{amps(total)} through the package with every LED on at worst "
                            f"(pins {names}), above its {amps(limit)} package rating{generic}")
        values = {"current_total_a": total, "limit_a": limit,
                  "excess_a": total - limit}
        moved = _to_move(pins, total - limit)
        fix = (f"take at least {amps(total - limit)} off {part}: drive the LEDs on "
               f"{fold_refs(pin.id for pin, _ in moved)} through transistor switches fed from "
               f"the rail, or lower their currents")
        return Finding(rule=self.id, severity=context.severity(self), message=message,
                       parts=(part,), nets=tuple(sorted({pin.net for pin, _ in pins})),
                       values=values, fix=fix, location=part_location(context, part))


_ID = attrgetter("id")


def _package_over(context: Any, part: str, currents: list[Any]) -> bool:
    """Whether :meth:`PinOvercurrent._package_finding` gives a finding for ``part`` whose
    pins' spans are ``currents`` (in order): its package rating is known and the pins'
    highest currents add up (in that order) to more."""
    data = context.part_data.get(part)
    if not isinstance(data, McuData) or data.package_current_max is None:
        return False
    return sum(current.max for current in currents) > data.package_current_max


def _largest_pin_per_part(result: GroupResult) -> dict[str, PinResult]:
    """The group's largest pin current per microcontroller part (a group counted once)."""
    largest: dict[str, PinResult] = {}
    for pin in _pins(result):
        part = pin.id.split(".", 1)[0]
        if part not in largest or pin.current.max > largest[part].current.max:
            largest[part] = pin
    return largest


def _largest_per_part(ids: list[str], pins: tuple[PinResult, ...]) -> dict[str, int]:
    """:func:`_largest_pin_per_part` as positions: ``ids`` the group's pin ids, ``pins``
    the records holding their figures (a follower's template's), in the same order."""
    if len(ids) == 1:  # one pin: the largest of its part
        return {ids[0].split(".", 1)[0]: 0}
    largest: dict[str, int] = {}
    for index, pin_id in enumerate(ids):
        part = pin_id.split(".", 1)[0]
        if part not in largest or pins[index].current.max > pins[largest[part]].current.max:
            largest[part] = index
    return largest


def _pin(result: GroupResult, index: int) -> PinResult:
    """``_pins(result)[index]``, made alone (a follower's from its template's figures and
    its own pin drive)."""
    base, refs = figures_of(result)
    if refs is None:
        return result.pins[index]
    pin, drive = base.pins[index], result.group.pins[index]
    return PinResult(drive.id, drive.net, pin.current, pin.sourcing, pin.current_max)


def _pins(result: GroupResult) -> tuple[PinResult, ...]:
    """The group's pin records; a follower's (:func:`~linter.rulekit.figures_of`) made
    from its template's figures and its own pin drives (pin i is drive i, the follower's
    own records left unbuilt), their spans the template's (name a corner's parts through
    ``refs``)."""
    base, refs = figures_of(result)
    if refs is None:
        return result.pins
    return tuple(PinResult(drive.id, drive.net, pin.current, pin.sourcing, pin.current_max)
                 for pin, drive in zip(base.pins, result.group.pins))


def _to_move(pins: list[tuple[PinResult, GroupResult]], excess: float
             ) -> list[tuple[PinResult, GroupResult]]:
    """The fewest largest contributors whose currents together cover ``excess`` (A)."""
    chosen: list[tuple[PinResult, GroupResult]] = []
    covered = 0.0
    for item in sorted(pins, key=lambda item: -item[0].current.max):
        chosen.append(item)
        covered += item[0].current.max
        if covered >= excess:
            break
    return chosen


def _pin_fix(context: Any, result: GroupResult, pin: PinResult, values: dict) -> str:
    switch = (f"or drive {', '.join(result.group.leds)} through a transistor switch "
              f"(the pin drives its base or gate through a resistor)")
    setter = result.group.setter
    base, refs = figures_of(result)
    name = renamer(refs)
    if setter not in {name(r.ref) for r in base.resistors}:
        return f"add a series resistor sized for {amps(pin.current_max)} at worst, {switch}"
    choice = _resistor_for_pin(context, result, setter, pin)
    if choice is None:
        return f"no standard value of {setter} brings {pin.id} within its rating; {switch}"
    values.update(fix_ohms=choice.ohms, fix_current_max_a=choice.current_max_a)
    return (f"make {setter} {ohms(choice.ohms)} ({choice.series}): {pin.id} then carries at "
            f"most {amps(choice.current_max_a)}; {switch}")


def _resistor_for_pin(context: Any, result: GroupResult, ref: str, pin: PinResult):
    """Smallest standard value of ``ref`` keeping the pin's solved worst case within rating."""
    def search():
        tolerance = fix_search.tolerance_of(context, ref)
        series = eseries.series_for_tolerance(tolerance)
        solved = fix_search.solved_walk(context, result, ref, series)

        def current(value: float) -> tuple[float, float, float]:
            span = next(p for p in solved(value).pins if p.id == pin.id).current
            return span.nom, span.min, span.max

        return resistor_for_current_solved(current, pin.current_max, fix_search.resistor_ohms(result, ref),
                                           series=series, tolerance=tolerance, max_steps=200)

    try:
        return fix_search.remembered(context, result,
                                     ("pin-overcurrent", ref, pin.id, pin.current_max), search)
    except (RuntimeError, StopIteration):
        return None
