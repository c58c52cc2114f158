"""Rule ``resistor-overload``: a resistor's worst-case dissipation above its derated rating."""

from __future__ import annotations

from typing import Any, Iterable

from linter.dissipation import Allowance, over, resistor_allowance
from linter.findings import Finding
from linter.fixes import resistor_rating
from linter.results import GroupResult, ResistorResult
from linter.rulekit import at_corner, figures_of, over_rated, part_location, say, watts
from linter.rules import Rule, register


@register
class ResistorOverload(Rule):
    """A resistor dissipates more than its derated power rating allows.

    The dissipation P = I²·R is solved at every corner (rail tolerance, resistor tolerance,
    the LEDs' Vf bins, ambient); the largest is compared with the rating derated to the
    ambient maximum — full rating up to 70 °C, falling linearly to zero at 155 °C (thick
    film, common practice) — and held to the ``[derating] resistor_power`` share (60 % by
    default, common practice). The rating comes from the BOM's power column, the part data,
    or the chip size (0603: 100 mW, 1206: 250 mW…); a resistor with no known rating is not
    judged here (``unknown-part`` says so). The fix names the smallest chip size whose
    derated rating covers the worst case, or a split across several parts.

    **Anti-pattern**

    A green LED on 1 kΩ from 12 V ±10 %: about 137 mW at the high rail, in an 0603 rated
    100 mW, which may use only 60 mW (full rating at 50 °C, 60 % share)::

        R12 +12V pwr_a 1k      ; BOM: 0603, 0.1 W
        D15 pwr_a 0 LEDGRN

    **Best practice**

    A 1206 (250 mW, 150 mW allowed at 50 °C), or a larger resistance with a lower current
    that still lights the LED::

        R12 +12V pwr_a 1k      ; BOM: 1206, 0.25 W
        D15 pwr_a 0 LEDGRN
    """

    id = "resistor-overload"
    default_severity = "error"

    def check(self, context: Any, keep: bool = True) -> Iterable[Finding]:
        """``keep``: each template part's name-free finding pieces worked out once (False:
        for every finding, the plain path)."""
        ambient = context.settings.ambient.max
        share = context.settings.derating.resistor_power
        allowances: dict[float, Allowance] = {}  # by rating: ambient and share are the board's

        def rated(base: GroupResult) -> tuple:
            """(resistor record, its allowance, whether over it) of each rated resistor of
            a template, in order: figures and ratings only, a follower's are the same."""
            out = []
            for resistor in base.resistors:
                if resistor.rating_w is None:
                    continue
                allowance = _allowance(resistor.rating_w, ambient, share, allowances)
                out.append((resistor, allowance, over(resistor.power.max, allowance)))
            return tuple(out)

        kept: dict[int, tuple] | None = {} if keep else None
        for result, (resistor, allowance, _), ref in over_rated(context, rated):
            yield self._finding(context, result, resistor, allowance, kept, ref)

    def _finding(self, context: Any, result: GroupResult, resistor: ResistorResult,
                 allowance: Allowance, kept: dict[int, tuple] | None = None,
                 ref: str | None = None) -> Finding:
        """``resistor``: the record holding the figures (a follower's template's, see
        :func:`~linter.rulekit.figures_of`); ``ref`` its name in ``result``'s group
        (default: the record's). ``kept`` (one check's): :func:`_pieces` by the record it
        was worked out for (the followers of a template share the template's record and
        allowance); without it (the plain path) worked out for this finding."""
        refs = figures_of(result)[1] if ref is not None else None
        ref = resistor.ref if ref is None else ref
        pieces = _pieces(resistor, allowance) if kept is None else _kept_pieces(
            resistor, allowance, kept)
        head, tail, values, before, after = pieces
        message = say(ref, f"{head}{at_corner(resistor.power.at_max, result, (), refs)}{tail}")
        return Finding(rule=self.id, severity=context.severity(self), message=message,
                       parts=(ref,), group=result.id, values=dict(values),
                       fix=f"{before}{ref}{after}", location=part_location(context, ref))


def _kept_pieces(resistor: ResistorResult, allowance: Allowance,
                 kept: dict[int, tuple]) -> tuple:
    """:func:`_pieces` of the record and allowance, worked out once per record object (the
    entry holds both, so that the id stays the record's; records are frozen)."""
    entry = kept.get(id(resistor))
    if entry is None or entry[0] is not resistor or entry[1] is not allowance:
        entry = kept[id(resistor)] = (resistor, allowance, _pieces(resistor, allowance))
    return entry[2]


def _pieces(resistor: ResistorResult, allowance: Allowance) -> tuple:
    """What a finding on the record says that names nothing: (message before the corner,
    message after it, values, fix before the name, fix after it). The message is
    ``say(ref, before + corner + after)``; the fix ``before + ref + after``, the same text
    as :func:`_fix` (whose values it adds)."""
    power = resistor.power
    package = f"{resistor.package}, " if resistor.package else ""
    rating = allowance.describe(f"{package}rated")
    head = f"{watts(power.max)} at "
    tail = (f", above the {watts(allowance.allowed_w)} allowed ({rating}); "
            f"{watts(power.nom)} nominal")
    values = {**allowance.values(power.max, power.nom, "rating_w"),
              "current_max_a": resistor.current.max}
    before, after = _fix_pieces(power.max, allowance, values)
    return head, tail, values, before, after


def _allowance(rating_w: float, ambient_c: float, share: float,
               known: dict[float, Allowance]) -> Allowance:
    """``resistor_allowance(rating_w, ambient_c, share)``, kept in ``known`` by rating for
    one board's ambient and share (a zero or a non-float rating is not kept: ``-0.0`` and
    ``0.0`` are equal keys)."""
    if type(rating_w) is not float or rating_w == 0.0:
        return resistor_allowance(rating_w, ambient_c, share)
    found = known.get(rating_w)
    if found is None:
        found = known[rating_w] = resistor_allowance(rating_w, ambient_c, share)
    return found


def _fix_pieces(power_w: float, allowance: Allowance, values: dict) -> tuple[str, str]:
    """:func:`_fix` as (text before the name, text after it); adds the same values."""
    choice = resistor_rating(power_w, allowance.ambient_c, allowance.share)
    if choice is None:
        return (f"no resistor rating is left at {allowance.ambient_c:g} °C ambient: lower the "
                f"current through ", " or move it off the hot area")
    values.update(fix_rating_w=choice.rating_w, fix_count=float(choice.count),
                  fix_allowed_w=choice.allowed_w)
    if choice.count == 1:
        return (f"use a {choice.text} part for ", f" ({watts(choice.allowed_w)} allowed at "
                f"{allowance.ambient_c:g} °C)")
    return f"{choice.text} for ", f" ({watts(choice.allowed_w)} allowed each)"


def _fix(ref: str, power_w: float, allowance: Allowance, values: dict) -> str:
    """The package and rating to buy (or a split), from :func:`linter.fixes.resistor_rating`."""
    choice = resistor_rating(power_w, allowance.ambient_c, allowance.share)
    if choice is None:
        return (f"no resistor rating is left at {allowance.ambient_c:g} °C ambient: lower the "
                f"current through {ref} or move it off the hot area")
    values.update(fix_rating_w=choice.rating_w, fix_count=float(choice.count),
                  fix_allowed_w=choice.allowed_w)
    if choice.count == 1:
        return (f"use a {choice.text} part for {ref} ({watts(choice.allowed_w)} allowed at "
                f"{allowance.ambient_c:g} °C)")
    return f"{choice.text} for {ref} ({watts(choice.allowed_w)} allowed each)"
