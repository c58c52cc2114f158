"""Rule ``shared-ballast``: LEDs or strings in parallel on one current-setting part."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Callable, Iterable

from linter import eseries, fix_search
from linter.fix_batch import solve_circuits
from linter.findings import Finding
from linter.fixes import per_led_resistors
from linter.refs import natural_key, natural_sorted
from linter.results import GroupResult, LedResult
from linter.rulekit import (PerTemplate, amps, at_corner, figures_of, flagged, group_rail,
                            led_data, ohms, renamer, watts)
from linter.rules import Rule, register
from linter.rules.led_overcurrent import target_current

MAX_FIX_STEPS = 40
"""Series steps the per-LED resistor search climbs before it gives up."""


def fold(refs: tuple[str, ...]) -> str:
    """``"D7–D10"`` for a run listed in order, else the references joined by commas."""
    return f"{refs[0]}–{refs[-1]}" if len(refs) > 2 else ", ".join(refs)


ASK = object()
"""Default of a ``first`` argument: work :func:`_first_split` out."""


@register
class SharedBallast(Rule):
    """LEDs (or strings) in parallel share one resistor or sink.

    Parallel LEDs split one current by their forward voltages, and Vf spreads by a few
    hundred millivolts between parts of one bin (more between bins) while the current
    rises exponentially with it: the LED with the lowest Vf hogs the current, heats, its Vf
    falls further, and it takes even more. The analysis solves the bank with one LED at
    vf_min and the rest at vf_max and reports the hottest LED's worst-case current against
    its rating, the shared part's total current and power, and each LED's nominal share.
    The fix gives each LED (or string) its own resistor, chosen from the series of the
    shared resistor's tolerance for the intended current (the nominal share), checked by
    solving the split circuit at every corner; a shared sink becomes one sink per string.

    **Anti-pattern**

    Four yellow LEDs on one 39 Ω resistor from 5 V: about 18 mA each on paper, but one
    low-Vf part can take several times its share::

        R6 +5V bar 39
        D7 bar 0 LEDYEL
        D8 bar 0 LEDYEL
        D9 bar 0 LEDYEL
        D10 bar 0 LEDYEL

    **Best practice**

    One resistor per LED, each sized for the LED's own current::

        R6A +5V a1 180
        D7 a1 0 LEDYEL
        R6B +5V a2 180
        D8 a2 0 LEDYEL
    """

    id = "shared-ballast"
    default_severity = "error"

    def check(self, context: Any) -> Iterable[Finding]:
        # parallel banks of several strings (a follower's shape is its template's)
        banks = PerTemplate(lambda base: base.group.topology == "parallel"
                            and len(base.group.strings) > 1)
        results = [result for result, _ in flagged(context, banks)]
        verdicts = PerTemplate(lambda base: _verdict(context, base))
        keys = _solve_first_splits(context, results, verdicts)
        severity = context.severity(self)  # the same for every finding of the board
        for result in results:
            yield self._finding(context, result, *keys.get(id(result), (fix_search.ASK, ASK)),
                                severity=severity, verdicts=verdicts)

    def _finding(self, context: Any, result: GroupResult, key: Any = fix_search.ASK,
                 first: Any = ASK, severity: str | None = None,
                 verdicts: Callable[[GroupResult], "_Verdict"] | None = None) -> Finding:
        """``key``: the fix search's signature for the first resistor tried, when known;
        ``first``: :func:`_first_split` of the group, when known; ``verdicts`` (one
        check's :class:`~linter.rulekit.PerTemplate`): the group's :class:`_Verdict` once
        per template (without it, the plain path, worked out from the group's own
        figures). The follower's records are not read: figures come from the template's
        (:func:`~linter.rulekit.figures_of`), names from the follower's group and ``refs``."""
        group = result.group
        base, refs = figures_of(result)
        verdict = _verdict(context, result) if verdicts is None else verdicts(result)
        name = renamer(refs)
        tied = verdict.tied
        leds = tuple(natural_sorted(group.leds))
        index = tied[0] if len(tied) == 1 else _first_in_order(
            [name(base.leds[i].ref) for i in tied], tied, leds)
        hottest = base.leds[index]
        hottest_ref = name(hottest.ref)
        shared = group.setter or "one part"
        count = len(group.strings)
        share = verdict.share
        values = {"count": float(count), "share_nom_a": share,
                  "hottest_current_max_a": hottest.current.max}
        where = at_corner(hottest.current.at_max, result, (hottest_ref,), refs)
        text = (f"{fold(leds)} share {shared}: {hottest_ref} takes up to "
                f"{amps(hottest.current.max)} ({where})")
        data = led_data(context, hottest.ref)  # the template's: equal but for the note
        if data is not None and data.if_max:
            values["if_max_a"] = data.if_max
            text += f", {hottest.current.max / data.if_max:.1f}× its {amps(data.if_max)} maximum"
        text += f"; {amps(share)} each nominal"
        if verdict.shared_part is not None:
            current_max, power_max = verdict.shared_part
            values.update(shared_current_max_a=current_max, shared_power_max_w=power_max)
            text += (f"; {shared} carries up to {amps(current_max)} and dissipates up to "
                     f"{watts(power_max)}")
        fix = self._fix(context, result, share, values, key,
                        verdict.first if first is ASK else first, verdict)
        if severity is None:
            severity = context.severity(self)
        return Finding(rule=self.id, severity=severity, message=text,
                       parts=(shared, *leds) if group.setter else leds,
                       group=result.id, values=values, fix=fix)

    def _fix(self, context: Any, result: GroupResult, share: float, values: dict,
             key: Any, first: Any, verdict: "_Verdict") -> str | None:
        shared = result.group.setter
        if shared is None:
            return None
        if verdict.by_resistor:
            return self._per_led(context, result, shared, values, key, first, verdict.limit)
        return self._per_string_sink(result, shared, share)

    def _per_led(self, context: Any, result: GroupResult, shared: str, values: dict,
                 key: Any, first: tuple[float, float, str] | None,
                 limit: float | None) -> str | None:
        """One resistor per string: nominal current near the share, worst case under the
        LED's limit (``limit``, A, None when unknown), confirmed by solving the split
        circuit."""
        if first is None:
            return None
        ohms_each, tolerance, series = first
        for _ in range(MAX_FIX_STEPS):
            currents = self._split_currents(context, result, shared, ohms_each, tolerance, key)
            key = fix_search.ASK  # the signature known ahead is the first value's only
            if currents is None:
                return None
            if limit is None or currents[2] <= limit:
                values.update(fix_ohms=ohms_each, fix_current_nom_a=currents[0],
                              fix_current_min_a=currents[1], fix_current_max_a=currents[2])
                return (f"give each LED its own resistor: {len(result.group.strings)} × "
                        f"{ohms(ohms_each)} ({series}) from {result.rail} in place of "
                        f"{shared}: {amps(currents[0])} each nominal, "
                        f"{amps(currents[1])}–{amps(currents[2])} worst case")
            ohms_each = eseries.above(ohms_each * 1.001, series)
        return None

    @staticmethod
    def _split_currents(context: Any, result: GroupResult, shared: str, ohms_each: float,
                        tolerance: float, key: Any = fix_search.ASK
                        ) -> tuple[float, float, float] | None:
        return fix_search.remembered(
            context, result, _split_question(shared, ohms_each, tolerance),
            lambda: SharedBallast._solve_split(context, result, shared, ohms_each), key)

    @staticmethod
    def _solve_split(context: Any, result: GroupResult, shared: str, ohms_each: float
                     ) -> tuple[float, float, float] | None:
        circuit, data = _split_problem(context, result, shared, ohms_each)
        return _split_figures(fix_search.resolve_circuit(context, circuit, data))

    @staticmethod
    def _per_string_sink(result: GroupResult, shared: str, share: float) -> str:
        return (f"give each of the {len(result.group.strings)} strings its own sink "
                f"set to {amps(share)} in place of the shared {shared}")


@dataclass(frozen=True, slots=True)
class _Verdict:
    """What a group's finding says that names no part, worked out on the result holding
    its figures (a follower's template): ``tied`` the positions in its LEDs of the highest
    maximum current to the nanoampere (the hottest is the one of them first in natural
    order of the group's own names); ``share`` (A, :func:`_share`); ``shared_part`` the
    shared part's (highest current A, highest power W), None when it is no resistor or
    transistor of the group; ``by_resistor`` whether it is a resistor of the group;
    ``first`` :func:`_first_split` (resistor only); ``limit`` the lowest target current of
    the LEDs (A, None when unknown; resistor only).

    A follower has its template's figures in the same order, its strings, setter and rail
    under the renamed references, and part data equal to the template's but for the note
    (not read): the template's verdict is the follower's."""

    tied: tuple[int, ...]
    share: float
    shared_part: tuple[float, float] | None
    by_resistor: bool
    first: tuple[float, float, str] | None
    limit: float | None


def _verdict(context: Any, result: GroupResult) -> _Verdict:
    """:class:`_Verdict` of ``result`` from its own records."""
    leds = result.leds
    rounded = [round(x.current.max * 1e9) for x in leds]
    top = max(rounded)
    tied = tuple(i for i, r in enumerate(rounded) if r == top)
    share = _share(result)
    shared = result.group.setter
    by_resistor = False
    shared_part = None
    first = limit = None
    resistor = next((r for r in result.resistors if r.ref == shared), None)
    if resistor is not None:
        by_resistor = True
        shared_part = (resistor.current.max, resistor.power.max)
        first = _first_split(context, result, shared, share)
        if first is not None:
            limits = [t for t in (target_current(context, x.ref) for x in leds) if t]
            limit = min(limits) if limits else None
    else:
        transistor = next((t for t in result.transistors if t.ref == shared), None)
        if transistor is not None:
            shared_part = (transistor.current.max, transistor.power.max)
    return _Verdict(tied, share, shared_part, by_resistor, first, limit)


def _first_in_order(names: list[str], positions: tuple[int, ...],
                    ordered: tuple[str, ...]) -> int:
    """The position (of ``positions``) whose name (``names``, one per position) is lowest
    in natural order, the first of them on equal keys: ``min(positions, key=natural_key of
    its name)``. ``ordered``: names in natural order without repeats; when the names are
    distinct and all in it, the first of it among them is that name (a name's key is its
    own, with the name itself last), and no key is worked out again."""
    at = dict(zip(names, positions))
    if len(at) == len(names) and at.keys() <= set(ordered):
        for name in ordered:
            if name in at:
                return at[name]
    return positions[min(range(len(positions)), key=lambda k: natural_key(names[k]))]


def _hottest(leds: Iterable[LedResult]) -> LedResult:
    """The LED of the highest maximum current, compared to the nanoampere; among equal LEDs
    the lowest reference in natural order (the first in the netlist on equal keys), whatever
    the order of the netlist. The same LED as ``max(sorted(leds, key=natural_key of ref),
    key=rounded current)``; the names are sorted only when currents tie."""
    leds = list(leds)
    rounded = [round(x.current.max * 1e9) for x in leds]
    top = max(rounded)
    tied = [x for x, r in zip(leds, rounded) if r == top]
    if len(tied) == 1:
        return tied[0]
    return min(tied, key=lambda x: natural_key(x.ref))


def _share(result: GroupResult) -> float:
    """Each string's nominal share (A): the mean nominal current of the strings' first LEDs."""
    group = result.group
    firsts = {s[0] for s in group.strings}
    return sum(x.current.nom for x in result.leds if x.ref in firsts) / len(group.strings)


def _first_split(context: Any, result: GroupResult, shared: str, share: float
                 ) -> tuple[float, float, str] | None:
    """(first resistor each, Ω; tolerance; series) of the per-string search, or None when
    there is no rail, no share or no value."""
    rail = group_rail(context, result)
    leds = [result.led(ref) for ref in result.group.strings[0]]
    tolerance = fix_search.tolerance_of(context, shared)
    series = eseries.series_for_tolerance(tolerance)
    if rail is None or share <= 0:
        return None
    start = per_led_resistors(len(result.group.strings), rail.nom,
                              sum(x.vf.nom for x in leds), share, series, 0.0)
    return None if start is None else (start.choice.ohms, tolerance, series)


def _split_question(shared: str, ohms_each: float, tolerance: float) -> tuple:
    return ("shared-ballast split", shared, ohms_each, tolerance)


def _split_problem(context: Any, result: GroupResult, shared: str, ohms_each: float
                   ) -> tuple[Any, dict]:
    """The split sub-circuit and the new resistors' part data."""
    circuit, names = fix_search.split_resistor(context.circuit, result.group, shared, ohms_each)
    return circuit, {name: fix_search.resistor_record(context, shared, ohms_each)
                     for name in names.values()}


def _split_figures(solved: tuple[GroupResult, ...]) -> tuple[float, float, float] | None:
    """(highest nominal, lowest minimum, highest maximum) LED current (A) of the split
    circuit, or None when a part of it is not solved."""
    if not solved or any(g.status != "solved" for g in solved):
        return None
    leds = [led for g in solved for led in g.leds]
    return (max(x.current.nom for x in leds), min(x.current.min for x in leds),
            max(x.current.max for x in leds))


def _solve_first_splits(context: Any, results: list[GroupResult],
                        verdicts: Callable[[GroupResult], _Verdict] | None = None
                        ) -> dict[int, tuple]:
    """The first split of every group's search solved ahead, all in one batch per structure
    (:func:`linter.fix_batch.solve_circuits`) and remembered as the search would remember
    it; returns each group's (signature for that first question, :func:`_first_split`) by
    ``id(result)``, for the groups whose shared part is a resistor.

    Only questions not remembered yet are solved, each once. Should any fail, nothing is
    kept: the searches then solve one by one as before. ``verdicts``: each group's
    :class:`_Verdict` (default: worked out from its own records).
    """
    if verdicts is None:
        def verdicts(result: GroupResult) -> _Verdict:
            return _verdict(context, result)
    keys: dict[int, Any] = {}
    pending: dict[bytes, tuple[GroupResult, str, float]] = {}
    asked: dict[int, tuple[GroupResult, tuple]] = {}  # each template's question, one object
    for result in results:
        shared = result.group.setter
        verdict = verdicts(result)
        if shared is None or not verdict.by_resistor:
            continue
        first = verdict.first
        if first is None:
            keys[id(result)] = (fix_search.ASK, None)
            continue
        ohms_each, tolerance, _ = first
        template = figures_of(result)[0]  # the same question in the template's names
        entry = asked.get(id(template))
        if (entry is None or entry[0] is not template or entry[1][2] is not ohms_each
                or entry[1][3] is not tolerance):  # (the verdict's own numbers: one object)
            entry = asked[id(template)] = (template, _split_question(
                template.group.setter, ohms_each, tolerance))
        key = fix_search.follower_signature(
            context, result, _split_question(shared, ohms_each, tolerance), entry[1])
        keys[id(result)] = (key, first)
        if key is not None and key not in pending and not fix_search.is_remembered(key):
            pending[key] = (result, shared, ohms_each)
    if len(pending) < 2:  # one alone gains nothing from a batch
        return keys
    try:
        problems = [_split_problem(context, result, shared, ohms_each)
                    for result, shared, ohms_each in pending.values()]
        solved = solve_circuits(context, problems)
    except Exception:  # noqa: BLE001 - the plain searches meet (and report) it themselves
        return keys
    for key, groups in zip(pending, solved):
        fix_search.remember(key, _split_figures(groups))
    return keys
