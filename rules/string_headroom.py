"""Rule ``string-headroom``: LEDs on a resistor whose current swings too much over corners."""

from __future__ import annotations

import math
import struct
from dataclasses import dataclass
from operator import attrgetter
from typing import Any, Iterable

from linter.config import RuleOption
from linter.findings import Finding
from linter.fixes import SinkDesign, rail_for_resistor
from linter.partdata import Rail
from linter.results import GroupResult, LedResult
from linter.rulekit import (PerTemplate, amps, at_corner, figures_of, flagged, group_rail,
                            nameless_at_corner, ohms, renamer, sink_search, volts, watts)
from linter.rules import Rule, register
from linter import fix_search


SKIPPED = ("parallel", "pin-source", "pin-sink", "pin-bicolour")
"""Topologies left out: a shared resistor is ``shared-ballast``'s finding; an indicator
driven straight from a microcontroller pin has no rail to regulate from (the pin is its
supply) and no place for a sink, so its swing is not reported."""


def reference_rail(context: Any, fallback: Rail) -> Rail:
    """The rail a sink's divider should hang from: the tightest non-ground rail (relative
    tolerance) of at least 2 V, lower voltage first on a tie; else ``fallback``."""
    def spread(rail: Rail) -> float:
        return (rail.max - rail.min) / rail.nom

    usable = [r for r in context.rails.values() if not r.is_ground and r.nom >= 2.0
              and r.nom <= fallback.nom]
    return min(usable, key=lambda r: (spread(r), r.nom), default=fallback)


def _reference_rail(context: Any, fallback: Rail) -> Rail:
    """:func:`reference_rail`, worked out once per rail of the board's rails (the rails
    mapping and ``fallback`` by identity; the entries keep both alive)."""
    rails = context.rails
    entry = _REFERENCES.get(id(fallback))
    if entry is not None and entry[0] is rails and entry[1] is fallback:
        return entry[2]
    found = reference_rail(context, fallback)
    if len(_REFERENCES) >= 64:
        _REFERENCES.clear()
    _REFERENCES[id(fallback)] = (rails, fallback, found)
    return found


_REFERENCES: dict[int, tuple[Any, Rail, Rail]] = {}


@register
class StringHeadroom(Rule):
    """LEDs on a resistor whose current swings by more than ``ratio`` across the corners.

    A resistor sets I = (V − ΣVf)/R: the smaller the headroom V − ΣVf, the more the rail's
    tolerance and the Vf spread move the current (dI/dVf = −1/R per volt of string
    voltage). The rule solves every corner and reports the lowest and highest current, the
    headroom at nominal and at the worst corner, and dI/dVf; a ratio above ``ratio``
    (default 1.5) is poor regulation: visible brightness steps between boards and a
    string that may run dim or hot. (Darkness and damage are ``led-undercurrent`` and
    ``led-overcurrent``.) The fix is a computed NPN current sink (divider from the tightest
    rail, E-series emitter resistor, transistor dissipation) whose own current swings
    within ``ratio`` over its corners (reference and resistor tolerances, Vbe ± 0.1 V,
    gain), with the rail it needs; where no sink within the search does, it says so and
    quotes the closest swing. Also the rail at which a plain resistor would hold the swing
    within ``ratio``, or fewer LEDs per string where the rail's minimum cannot hold a sink
    in regulation. LEDs driven straight from a microcontroller pin, and parallel LEDs on a
    shared resistor, are left to other rules.

    **Anti-pattern**

    Three white LEDs (about 3.15 V each) on 150 Ω from 12 V ±10 %: 1.5 V of headroom, so
    the current runs from about 7 mA to 28 mA::

        R13 +12V a 150
        D16 a b LEDWHT
        D17 b c LEDWHT
        D18 c 0 LEDWHT

    **Best practice**

    A current sink below the string (base from a divider on a regulated rail, emitter
    resistor setting the current), with its compliance checked at the rail minimum::

        D16 +12V b LEDWHT
        D17 b c LEDWHT
        Q4 c base e QNPN
        R20 +5V base 1.5k
        R21 base 0 1k
        R22 e 0 68
    """

    id = "string-headroom"
    default_severity = "warning"
    options = (RuleOption("ratio", "", 1.5, "largest accepted max/min current ratio"),)

    def check(self, context: Any) -> Iterable[Finding]:
        ratio = float(context.option(self, "ratio"))
        severity = context.severity(self)  # the same for every finding of the board
        _REFERENCES.clear()  # the board's rails are read afresh for each check
        swings: dict[int, tuple[GroupResult, Swing | None]] = {}

        def swing(base: GroupResult) -> "Swing | None":
            """The template's swing, None for a group this rule passes over (topology and
            setter: a follower's are its template's, see :meth:`_swing_of`)."""
            if base.group.topology in SKIPPED or not _set_by_resistor(base):
                return None
            return self._swing_of(context, base, ratio, swings)

        for result, _ in flagged(context, PerTemplate(swing)):
            finding = self._group_finding(context, result, ratio, severity, swings)
            if finding is not None:
                yield finding

    def _group_finding(self, context: Any, result: GroupResult, limit: float,
                       severity: str | None = None,
                       swings: dict[int, tuple[GroupResult, "Swing | None"]] | None = None
                       ) -> Finding | None:
        """The group's finding, or None. ``swings`` (one check's: the same ``context``,
        ``limit`` and rule settings throughout) keeps each :class:`Swing` by the template
        result it was worked out for (see :meth:`_swing_of`); without it (the plain path)
        the swing is worked out from the group's own figures. A follower's records are not
        read: its figures are its template's (:func:`~linter.rulekit.figures_of`), its
        names its group's and the template's renamed by ``refs``."""
        swing = (self._swing(context, result, limit) if swings is None
                 else self._swing_of(context, result, limit, swings))
        if swing is None:
            return None
        base, refs = figures_of(result)
        name = renamer(refs)
        leds = base.leds
        worst = leds[swing.worst]
        ref = name(worst.ref)
        group = result.group
        setter = group.setter
        strings = group.strings
        string = (strings[0] if len(strings) == 1 and ref in strings[0]  # (the only one)
                  else next(s for s in strings if ref in s))
        label = ref if len(string) == 1 else f"{string[0]}–{string[-1]}"
        current = worst.current
        low_at, high_at = swing.low_at, swing.high_at
        if low_at is None:
            low_at = at_corner(current.at_min, result, (), refs)
        if high_at is None:
            high_at = at_corner(current.at_max, result, (), refs)
        text = (f"{label}: {swing.low} ({low_at}) to {swing.high} ({high_at}), "
                f"{swing.middle}{setter}{swing.tail}")
        fix = None if swing.fix is None else swing.fix.text(setter)
        if severity is None:
            severity = context.severity(self)
        # the swing's values are shared by the template's followers: no one changes them
        return Finding(rule=self.id, severity=severity, message=text,
                       parts=(*map(name, map(_REF, map(leds.__getitem__, swing.swinging))),
                              setter),
                       group=result.id, values=swing.values, fix=fix)

    def _swing_of(self, context: Any, result: GroupResult, limit: float,
                  swings: dict[int, tuple[GroupResult, "Swing | None"]]) -> "Swing | None":
        """:meth:`_swing` of ``result``, worked out once per template result, from the
        template's own records.

        A result renamed from a template's (``origin``, :mod:`linter.result_rename`) has
        the template's figures LED by LED, resistor by resistor, in the same order, and
        its group the template's strings, setter and rail under the renamed references
        (:mod:`linter.group_key`: equal keys); its setter's part data equals the
        template's but for the note, which is not read. A swing holds figures and
        positions only, so the template's is the follower's. The entry keeps the template
        alive, so that its id stays its own; ``context`` and ``limit`` are one check's."""
        origin = result.origin
        base = result if origin is None else origin[0]
        entry = swings.get(id(base))
        if entry is not None and entry[0] is base:
            return entry[1]
        swing = self._swing(context, base, limit)
        swings[id(base)] = (base, swing)
        return swing

    def _swing(self, context: Any, result: GroupResult, limit: float) -> "Swing | None":
        """The name-free part of the group's finding (None: no LED swings beyond
        ``limit``)."""
        ratios = {id(led): _ratio(led) for led in result.leds if led.lit_scenarios}
        swinging = [i for i, led in enumerate(result.leds)
                    if ratios.get(id(led), -math.inf) > limit]
        if not swinging:
            return None
        worst_index = max(swinging, key=lambda i: ratios[id(result.leds[i])])
        worst = result.leds[worst_index]
        ratio = ratios[id(worst)]
        string = next(s for s in result.group.strings if worst.ref in s)
        leds = [result.led(ref) for ref in string]
        rail = group_rail(context, result)
        values = {"current_min_a": worst.current.min, "current_max_a": worst.current.max,
                  "current_nom_a": worst.current.nom, "ratio": ratio, "limit": limit}
        if worst.di_dvf is not None:
            values["di_dvf_a_per_v"] = worst.di_dvf
        head = ""
        if rail is not None:
            values["headroom_nom_v"] = rail.nom - sum(x.vf.nom for x in leds)
            values["headroom_min_v"] = rail.min - sum(x.vf.max for x in leds)
            head = (f"; headroom {volts(values['headroom_nom_v'])} nominal, "
                    f"{volts(values['headroom_min_v'])} at {result.rail} min with vf_max")
        slope = ("" if worst.di_dvf is None else
                 f"; dI/dVf {amps(abs(worst.di_dvf))}/V")
        fix = None if rail is None else self._fix_answer(context, result, leds, rail, limit)
        if fix is not None:
            values.update(fix.values)
        return Swing(tuple(swinging), worst_index, amps(worst.current.min),
                     amps(worst.current.max), nameless_at_corner(worst.current.at_min, result),
                     nameless_at_corner(worst.current.at_max, result),
                     f"{_ratio_text(ratio, limit)}× (limit {limit:g}×) on ", f"{head}{slope}",
                     values, fix)

    def _fix_answer(self, context: Any, result: GroupResult, leds: list[LedResult], rail: Rail,
                    limit: float) -> "FixAnswer":
        """The fix (its sentence with the setter's place left open, and its figures),
        worked out once per distinct question: :func:`fix_answer` of the same numbers and
        names is the same."""
        tolerance = fix_search.tolerance_of(context, result.group.setter)
        vf_min = sum(x.vf.min for x in leds)
        vf_max = sum(x.vf.max for x in leds)
        reference = _reference_rail(context, rail)
        fields = (result.rail, rail.min, rail.nom, rail.max, reference.name, reference.min,
                  reference.nom, reference.max, tolerance, vf_min, vf_max,
                  max(x.vf.max for x in leds), leds[0].current.nom, len(leds), limit)
        key = _question_key(fields)
        answer = None if key is None else _ANSWERS.get(key)
        if answer is None:
            answer = fix_answer(FixQuestion(*fields))
            if key is not None:
                if len(_ANSWERS) >= _ANSWERS_KEPT:
                    _ANSWERS.clear()
                _ANSWERS[key] = answer
        return answer


@dataclass(frozen=True, slots=True)
class FixQuestion:
    """Everything :func:`fix_answer` reads: the group's rail (name, V), the sink's
    reference rail (name, V), the setter's tolerance, the string's ΣVf (min, max) and
    largest Vf(max) in V, the first LED's nominal current in A, the LEDs in the string and
    the ratio limit. The setter's name is not in it (the answer leaves a place for it)."""

    rail_name: str
    rail_min: float
    rail_nom: float
    rail_max: float
    reference_name: str
    reference_min: float
    reference_nom: float
    reference_max: float
    tolerance: float
    vf_min: float
    vf_max: float
    vf_max_each: float
    current_nom: float
    leds: int
    limit: float

    def key(self) -> tuple | None:
        """A dict key telling every float apart bit for bit (``-0.0`` from ``0.0``), or
        None when a figure is no float."""
        return _question_key((self.rail_name, self.rail_min, self.rail_nom, self.rail_max,
                              self.reference_name, self.reference_min, self.reference_nom,
                              self.reference_max, self.tolerance, self.vf_min, self.vf_max,
                              self.vf_max_each, self.current_nom, self.leds, self.limit))


def _question_key(fields: tuple) -> tuple | None:
    """:meth:`FixQuestion.key` of the question with these fields, in order."""
    (rail_name, rail_min, rail_nom, rail_max, reference_name, reference_min, reference_nom,
     reference_max, tolerance, vf_min, vf_max, vf_max_each, current_nom, leds, limit) = fields
    if type(rail_name) is not str or type(reference_name) is not str or type(leds) is not int:
        return None
    try:
        numbers = _PACK(rail_min, rail_nom, rail_max, reference_min, reference_nom,
                        reference_max, tolerance, vf_min, vf_max, vf_max_each, current_nom,
                        limit)
    except (struct.error, TypeError):
        return None
    return (numbers, rail_name, reference_name, leds)


@dataclass(frozen=True, slots=True)
class FixAnswer:
    """A fix sentence with the setter's place left open (``before`` + setter + ``after``;
    ``before`` None: the sentence names no setter) and the figures it adds to a finding's
    values, in order."""

    before: str | None
    after: str
    values: tuple[tuple[str, float], ...]

    def text(self, setter: str) -> str:
        """The sentence for the setter named ``setter``."""
        return self.after if self.before is None else f"{self.before}{setter}{self.after}"


@dataclass(frozen=True, slots=True)
class Swing:
    """What a group's finding says that names no part: the positions (in the result's
    LEDs) of the swinging LEDs and of the worst, the texts of its lowest and highest
    current and of their corners (``low_at``, ``high_at``; None where the words name
    LEDs: each group names its own), the text from the ratio to just before the setter's name (``middle``) and
    after it (``tail``: headroom and slope), the finding's values in order, and its fix
    (None when the group's rail is unknown)."""

    swinging: tuple[int, ...]
    worst: int
    low: str
    high: str
    low_at: str | None
    high_at: str | None
    middle: str
    tail: str
    values: dict
    fix: FixAnswer | None


_REF = attrgetter("ref")
_PACK = struct.Struct("<12d").pack
_ANSWERS_KEPT = 4096
"""Fix answers kept (by their question's key), all dropped when full."""
_ANSWERS: dict[tuple, FixAnswer] = {}

_SETTER = "\0setter\0"
"""Stands in for the setter's name while an answer is written."""


def fix_answer(question: FixQuestion) -> FixAnswer:
    """The sink, plain-resistor rail and fewer-LEDs fixes for ``question``.

    The plain path of :meth:`StringHeadroom._fix_answer` (tests compare the two)."""
    q = question
    rail = Rail(q.rail_name, q.rail_nom, q.rail_min, q.rail_max)
    limit = q.limit
    values: dict = {}
    search = sink_search(limit, q.rail_min, q.vf_max, q.current_nom, q.reference_nom,
                         v_rail_max=q.rail_max, vf_string_min=q.vf_min,
                         reference_name=q.reference_name,
                         reference_tolerance=(q.reference_max - q.reference_min) / 2
                         / q.reference_nom,
                         resistor_tolerance=q.tolerance)
    design = search.design
    plain = rail_for_resistor(q.vf_min, q.vf_max, limit, rail_min_ratio=q.rail_min / q.rail_nom,
                              rail_max_ratio=q.rail_max / q.rail_nom,
                              resistor_tolerance=q.tolerance)
    parts = []
    if design is not None:
        parts.append(_sink_text(design, _SETTER, q.rail_name, rail, values))
    elif search.preferred is not None:
        closest = ""
        if math.isfinite(search.best_ratio):
            values["sink_best_ratio"] = search.best_ratio
            closest = f" (the closest swings {search.best_ratio:.2f}×)"
        parts.append(f"no NPN sink from {q.reference_name} within the search holds "
                     f"{limit:g}×{closest}")
    if plain is not None:
        values["rail_for_resistor_v"] = plain
        parts.append(f"a plain resistor holds {limit:g}× only from a {volts(plain)} nominal "
                     f"{q.rail_name} (same tolerance)")
    sink = design or search.preferred
    if sink is not None and not sink.regulates:
        fewer = _leds_that_fit(q.vf_max_each, q.vf_max, rail, sink)
        if 0 < fewer < q.leds:
            values["fix_leds_per_string"] = float(fewer)
            parts.append(f"or {fewer} LED{'s' if fewer > 1 else ''} per string")
    text = "; ".join(parts) if parts else "no computed fix"
    before, marked, after = text.partition(_SETTER)
    return FixAnswer(before if marked else None, after if marked else text,
                     tuple(values.items()))


def _set_by_resistor(result: GroupResult) -> bool:
    """Whether the group's setter is one of its resistors (by the result's own records)."""
    setter = result.group.setter
    return any(r.ref == setter for r in result.resistors)


def _ratio_text(ratio: float, limit: float) -> str:
    """The ratio to two decimals, or three where two would print the limit itself (1.505)."""
    text = f"{ratio:.2f}"
    return f"{ratio:.3f}" if float(text) <= limit else text


def _ratio(led: LedResult) -> float:
    return math.inf if led.current.min <= 0 else led.current.max / led.current.min


def _sink_text(design: SinkDesign, setter: str, rail_name: str, rail: Rail, values: dict) -> str:
    values.update(sink_r_top_ohms=design.r_top, sink_r_bottom_ohms=design.r_bottom,
                  sink_r_emitter_ohms=design.r_emitter, sink_reference_v=design.v_reference,
                  sink_current_nom_a=design.current_nom_a,
                  sink_current_min_a=design.current_min_a,
                  sink_current_max_a=design.current_max_a,
                  sink_transistor_power_w=design.transistor_power_w,
                  sink_rail_min_v=design.rail_min_v)
    text = (f"replace {setter} by an NPN sink below the string: divider "
            f"{ohms(design.r_top)}/{ohms(design.r_bottom)} from {design.reference_name}, emitter "
            f"{ohms(design.r_emitter)} ({design.series}), {amps(design.current_min_a)}–"
            f"{amps(design.current_max_a)}, transistor up to {watts(design.transistor_power_w)}; "
            f"it needs {rail_name} ≥ {volts(design.rail_min_v)}")
    if not design.regulates:
        text += f", above the {volts(rail.min)} minimum"
    return text


def _leds_that_fit(each: float, vf_max: float, rail: Rail, design: SinkDesign) -> int:
    """How many LEDs (each at most ``each`` V at its highest Vf; the string's ΣVf(max) is
    ``vf_max``) a sink can regulate at the rail minimum."""
    spare = rail.min - (design.rail_min_v - vf_max)
    return max(0, int(spare // each))
