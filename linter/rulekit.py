"""Small shared helpers for the electrical rules: the group's rail, part data, corner phrases.

Rules quote the decisive numbers with units and the corner that gives them
("D2: 25.9 mA at +12V max (13.2 V), LEDs at vf_min, above its 25 mA maximum"). These helpers
keep that wording the same across rules. Pure functions; all values SI floats.
"""

from __future__ import annotations

import struct
from collections import OrderedDict
from itertools import compress
from dataclasses import replace
from typing import Any, Callable, Iterable, Iterator

from linter.corners import Corner, Levels
from linter.partdata import BjtData, LedData, Rail, ResistorData
from linter.units import format_si

__all__ = ["part_location", "solved_groups", "group_rail", "led_data", "resistor_data", "bjt_data",
           "corner_phrase", "at_corner", "amps", "volts", "ohms", "watts", "say", "memoised",
           "sink_design", "sink_search", "forget_board", "figures_of", "renamer", "PerTemplate",
           "renamed_corner", "nameless_at_corner", "flagged", "over_rated"]


def part_location(context: Any, ref: str) -> Any:
    """Where part ``ref`` was placed in the netlist, or None for a reference not in it."""
    part = context.circuit.parts.get(ref)
    return None if part is None else part.location


def solved_groups(context: Any) -> Iterator[Any]:
    """The recognised groups of ``context`` whose operating points were solved (GroupResult).

    An unrecognised group is solved only as far as its known parts go (a plain diode in its
    path is left out), so its figures are no ground for a verdict: ``unchecked-group`` reports
    it instead.
    """
    yield from _solved_of(context)


def _solved_of(context: Any) -> tuple:
    """:func:`solved_groups` as a tuple, kept for the board's groups when they are one."""
    groups = getattr(context, "groups", ()) or ()
    if not isinstance(groups, tuple):  # a list may change between calls: nothing kept
        return _solved(groups)
    if _SOLVED[0] is not groups:  # every rule asks; the board's groups are sorted out once
        _SOLVED[:] = [groups, _solved(groups), None]
    return _SOLVED[1]


def _solved(groups: Iterable[Any]) -> tuple:
    return tuple(result for result in groups if getattr(result, "status", None) == "solved"
                 and result.group.topology != "unrecognised")


_SOLVED: list = [None, (), None]
"""(the groups last asked about, their solved and recognised results, :func:`_templates`
of those results or None until asked)."""


def _templates(results: tuple) -> tuple[tuple[int, ...], dict[int, Any]]:
    """(the id of each result's template, in order; the templates by id). A result with no
    ``origin`` is its own template."""
    ids = []
    bases: dict[int, Any] = {}
    for result in results:
        origin = result.origin
        base = result if origin is None else origin[0]
        key = id(base)
        ids.append(key)
        if key not in bases:
            bases[key] = base
    return tuple(ids), bases


def flagged(context: Any, verdicts: "PerTemplate") -> Iterator[tuple[Any, Any]]:
    """(result, its template's verdict) of each of :func:`solved_groups` whose template's
    verdict (``verdicts``, one check's :class:`PerTemplate`) is true, in order.

    The same pairs as ``((r, verdicts(r)) for r in solved_groups(context) if
    verdicts(r))``: each template's verdict is worked out once, and the followers of a
    template with a false verdict (nothing to report) are passed over together, without a
    step of Python each. The board's templates are sorted out once for every rule."""
    results = _solved_of(context)
    if _SOLVED[1] is results and _SOLVED[0] is not None:
        if _SOLVED[2] is None:
            _SOLVED[2] = _templates(results)
        ids, bases = _SOLVED[2]
    else:  # groups not kept (not a tuple): sorted out for this call only
        ids, bases = _templates(results)
    answers = {key: verdicts(base) for key, base in bases.items()}
    picked = list(map(answers.__getitem__, ids))
    return compress(zip(results, picked), picked)


def over_rated(context: Any, rated: Callable[[Any], tuple]) -> Iterator[tuple[Any, tuple, str]]:
    """(result, item, name) of each rated part over its allowance, each part judged once: a
    part that several groups hold is judged in the first of them (in group order) that rates it.

    ``rated(template_result)`` gives one tuple per rated part of a group, in order, whose first
    entry is the part's record (a follower's template's, see :func:`figures_of`) and whose
    third says whether it is over; it must read figures and ratings only (a follower's are its
    template's). The followers of a template with no part over have their part names marked
    as judged in one update, without a step of Python each."""
    def summary(base: Any) -> tuple:
        items = rated(base)
        return (items, tuple(item[0].ref for item in items),
                any(item[2] for item in items)) if items else ()

    seen: set[str] = set()
    for result, (items, names, any_over) in flagged(context, PerTemplate(summary)):
        refs = figures_of(result)[1]
        if not any_over:  # nothing to report: the parts are only judged
            seen.update(names if refs is None else map(refs.__getitem__, names))
            continue
        name = renamer(refs)
        for item in items:
            ref = name(item[0].ref)
            if ref in seen:
                continue
            seen.add(ref)
            if item[2]:
                yield result, item, ref


def forget_board() -> None:
    """Drop what the helpers keep of the board last checked (the engine calls it after the
    rules, so that a run over several boards holds one board at a time)."""
    _SOLVED[:] = [None, (), None]
    _PHRASES.clear()
    _FORMS.clear()
    from linter import fix_search
    fix_search.forget_board()


def group_rail(context: Any, result: Any) -> Rail | None:
    """The Rail the group hangs from (its highest non-ground rail), or None when unknown."""
    name = getattr(result, "rail", None)
    return None if name is None else context.rails.get(name)


def led_data(context: Any, ref: str) -> LedData | None:
    """The LED's datasheet record, or None when the part data holds none."""
    data = context.part_data.get(ref)
    return data if isinstance(data, LedData) else None


def resistor_data(context: Any, ref: str) -> ResistorData | None:
    """The resistor's record, or None."""
    data = context.part_data.get(ref)
    return data if isinstance(data, ResistorData) else None


def bjt_data(context: Any, ref: str) -> BjtData | None:
    """The bipolar transistor's record, or None."""
    data = context.part_data.get(ref)
    return data if isinstance(data, BjtData) else None


def amps(value: float) -> str:
    """``"25.9 mA"``."""
    return format_si(value, "A")


def volts(value: float) -> str:
    """``"13.2 V"``."""
    return format_si(value, "V")


def ohms(value: float) -> str:
    """``"150 Ω"``."""
    return format_si(value, "Ω")


def watts(value: float) -> str:
    """``"113 mW"``."""
    return format_si(value, "W")


def _vf_phrase(bins: dict[str, str], focus: Iterable[str] = ()) -> str | None:
    """``"LEDs at vf_min"``, or ``"D7 at vf_min, the others at vf_max"``."""
    if not bins:
        return None
    distinct = set(bins.values())
    if len(distinct) == 1:
        return f"LEDs at {distinct.pop()}"
    for ref in focus:
        if ref in bins:
            others = {b for r, b in bins.items() if r != ref}
            if len(others) == 1:
                return f"{ref} at {bins[ref]}, the others at {others.pop()}"
    return ", ".join(f"{ref} at {b}" for ref, b in bins.items())


def corner_phrase(corner: Corner | None, rails: Iterable[str] | None = None,
                  focus: Iterable[str] = ()) -> str:
    """The decisive parts of a corner in words: rails, LED bins, ambient if not 25 °C.

    ``rails`` limits the rails named (default: all of the corner's); ``focus`` names the LED
    whose bin is told apart from the others'.

    >>> corner_phrase(Corner("on", {"+12V": ("max", 13.2)}, 25.0, {"D1": "vf_min"}))
    '+12V max (13.2 V), LEDs at vf_min'
    """
    if corner is None:
        return "an unknown corner"
    wanted = None if rails is None else set(rails)
    return _phrase([(name, level_v) for name, level_v in corner.rails.items()
                    if wanted is None or name in wanted], corner, focus)


def _phrase(rails: list[tuple[str, tuple[str, float]]], corner: Corner,
            focus: Iterable[str], bins: dict[str, str] | None = None) -> str:
    """The words of ``rails`` (name, (level, V)) in order, then ``corner``'s LED bins (or
    ``bins``, LED name to bin, when given) and ambient."""
    parts = [f"{name} {level} ({v:g} V)" for name, (level, v) in rails]
    vf = _vf_phrase(dict(corner.vf) if bins is None else bins, focus)
    if vf:
        parts.append(vf)
    if corner.ambient_c != 25.0:
        parts.append(f"{corner.ambient_c:g} °C")
    return ", ".join(parts) if parts else "the nominal corner"


def at_corner(corner: Corner | None, result: Any, focus: Iterable[str] = (),
              refs: Any = None) -> str:
    """``corner_phrase`` of a group's corner: the group's rail first, then any other rail
    of the group that is off nominal (a sink's reference), LED bins, ambient.

    ``refs`` (a mapping, see :func:`figures_of`): ``corner`` is a template's, the group
    ``result`` a follower of it; the LED bins are named by the follower's references (in
    the template corner's order, as the follower's own corner holds them), the same words
    as ``at_corner`` of the follower's corner. ``focus`` names the follower's LEDs."""
    if corner is None:
        return corner_phrase(None)
    rail = getattr(result, "rail", None)
    rails = corner.rails
    key = _phrase_key(corner, rail)
    if refs is not None and key is None:  # LEDs named: the follower's names, in order
        focus = tuple(focus)
        if len(focus) <= 1:
            names = tuple(map(refs.__getitem__, corner.vf.keys()))
            if len(set(names)) == len(names):  # one to one: the template's words renamed
                position = names.index(focus[0]) if focus and focus[0] in names else None
                form = _named_form(corner, rail, position)
                if form is not None:
                    return form[0] % tuple(names[i] for i in form[1])
        return _renamed_phrase(corner, rail, focus, refs)
    if key is not None:
        entry = _PHRASES.get(key)
        if entry is not None and entry[0] is rails:
            return entry[1]
    ordered = [(rail, rails[rail])] if rail in rails else []
    ordered += [(n, level_v) for n, level_v in rails.items() if n != rail and level_v[0] != "nom"]
    text = _phrase(ordered, corner, focus)
    if key is not None:
        if len(_PHRASES) >= _PHRASES_KEPT:
            _PHRASES.clear()
        _PHRASES[key] = (rails, text)
    return text


def _phrase_key(corner: Corner, rail: Any) -> tuple | None:
    """What :func:`at_corner`'s words depend on when the corner's LEDs share one bin (then
    no LED is named, whatever ``focus``): the rail's name, the corner's rail mapping (by
    identity: corners are read-only and the entry keeps the mapping alive), the bin, and the
    ambient (a zero by its bits: ``-0.0`` prints apart from ``0.0``; a NaN finds no entry but
    itself). None otherwise (not remembered)."""
    vf = corner.vf
    if type(vf) is not Levels or type(rail) is not str:
        return None
    levels = vf.levels
    if not levels:
        bin_name = None
    else:
        bin_name = levels[0]
        if levels.count(bin_name) != len(levels):
            return None
    ambient = corner.ambient_c
    if type(ambient) is not float:
        return None
    if ambient == 0.0:  # 0.0 and -0.0 are equal keys but print apart
        ambient = _PACK_FLOAT(ambient)
    return (rail, id(corner.rails), bin_name, ambient)


_PACK_FLOAT = struct.Struct("<d").pack
_PHRASES_KEPT = 4096
"""Corner phrases kept (all dropped when full)."""
_PHRASES: dict[tuple, tuple[Any, str]] = {}


def _renamed_phrase(corner: Corner, rail: Any, focus: Iterable[str], refs: Any) -> str:
    """:func:`at_corner`'s words for a follower, written out (the plain twin of
    :func:`_named_form`)."""
    rails = corner.rails
    ordered = [(rail, rails[rail])] if rail in rails else []
    ordered += [(n, level_v) for n, level_v in rails.items() if n != rail and level_v[0] != "nom"]
    return _phrase(ordered, corner, focus, {refs[name]: level
                                           for name, level in corner.vf.items()})


def _named_form(corner: Corner, rail: Any, focus: int | None = None
                ) -> tuple[str, tuple[int, ...]] | None:
    """(a %-format, positions in the corner's LEDs): ``form % names`` (the named LEDs'
    names at those positions) is :func:`at_corner` of ``corner`` for a follower whose LEDs
    are the corner's renamed one to one, in order, with the LED at position ``focus`` as
    its focus (None: no focus), when the corner's LEDs are named; made once per corner,
    rail and focus. None when a rail's or level's text holds a NUL (the placeholders' mark)."""
    key = (id(corner), rail, focus)
    entry = _FORMS.get(key)
    if entry is not None and entry[0] is corner:
        return entry[1]
    rails = corner.rails
    ordered = [(rail, rails[rail])] if rail in rails else []
    ordered += [(n, level_v) for n, level_v in rails.items() if n != rail and level_v[0] != "nom"]
    marks = {f"\0{index}\0": level for index, (_, level) in enumerate(corner.vf.items())}
    names = list(marks)
    text = _phrase(ordered, corner, () if focus is None else (names[focus],), marks)
    form = None
    found = sorted((text.find(mark), index) for index, mark in enumerate(names)
                   if mark in text)
    if (text.count("\0") == 2 * len(found)
            and all(text.count(names[index]) == 1 for _, index in found)):
        cut = text.replace("%", "%%")
        for _, index in found:
            cut = cut.replace(names[index], "%s", 1)
        form = (cut, tuple(index for _, index in found))
    if len(_FORMS) >= _PHRASES_KEPT:
        _FORMS.clear()
    _FORMS[key] = (corner, form)
    return form


_FORMS: dict[tuple, tuple[Any, Any]] = {}
""":func:`_named_form` by (corner's id, rail), each with its corner."""


def nameless_at_corner(corner: Corner | None, result: Any) -> str | None:
    """:func:`at_corner` of ``corner`` (no focus) when its words name no part (its LEDs
    share one bin, or it has none): then the same for every follower of ``result`` (they
    share its rail and its corners' rails, bins and ambient); else None."""
    if corner is not None and _phrase_key(corner, getattr(result, "rail", None)) is None:
        return None
    return at_corner(corner, result)


def figures_of(result: Any) -> tuple[Any, Any]:
    """(the result whose records hold ``result``'s figures, the map from that result's part
    references to ``result``'s, or None for the same names).

    A follower (``origin``, :mod:`linter.result_rename`) has its template's records under
    renamed references; reading them through the template leaves the follower's own
    records unbuilt. The follower's ``group`` (names, strings, setter, pins) is its own."""
    origin = getattr(result, "origin", None)
    return (result, None) if origin is None else origin


def renamer(refs: Any) -> Callable[[str], str]:
    """The name in the follower of a template's part reference (``refs`` of
    :func:`figures_of`; None: the name itself)."""
    return _same if refs is None else refs.__getitem__


def _same(name: str) -> str:
    return name


class PerTemplate:
    """``work(template_result)`` once per template result of one check.

    A follower's answer is its template's (``work`` must read only what a follower shares
    with its template: figures, positions, part data but the note, the group's shape, the
    board); a result with no ``origin`` is its own template. Each entry keeps its template
    alive, so that the ``id`` it is filed under stays its own."""

    def __init__(self, work: Callable[[Any], Any]) -> None:
        self.work = work
        self.kept: dict[int, tuple[Any, Any]] = {}

    def __call__(self, result: Any) -> Any:
        origin = result.origin
        base = result if origin is None else origin[0]
        entry = self.kept.get(id(base))
        if entry is not None and entry[0] is base:
            return entry[1]
        value = self.work(base)
        self.kept[id(base)] = (base, value)
        return value


def renamed_corner(corner: Corner, refs: Any) -> Corner:
    """A template's ``corner`` as its follower's holds it: the same corner with the part
    names of its LED bins, gains and resistor levels renamed through ``refs`` (in the same
    order); ``corner`` itself when ``refs`` is None."""
    if refs is None:
        return corner
    return replace(corner, vf={refs[k]: v for k, v in corner.vf.items()},
                   beta={refs[k]: v for k, v in corner.beta.items()},
                   resistors={refs[k]: v for k, v in corner.resistors.items()})


def say(ref: str, text: str) -> str:
    """A finding message: ``"D2: text"``."""
    return f"{ref}: {text}"


_MEMO_SIZE = 4096
"""Entries each memoised function keeps (least recently used dropped first)."""


def memoised(function: Callable[..., Any]) -> Callable[..., Any]:
    """``function`` (pure, deterministic) remembering its last results by its arguments.

    Identical channels of a board ask the same design question with the same numbers; the
    answer is computed once. The key is the ``repr`` of the arguments, which tells apart
    every float exactly (``-0.0`` from ``0.0`` too) and any frozen record field by field;
    at most :data:`_MEMO_SIZE` results are kept.
    """
    memo: OrderedDict[str, Any] = OrderedDict()

    def call(*args: Any, **kwargs: Any) -> Any:
        key = repr((args, sorted(kwargs.items())))
        if key in memo:
            memo.move_to_end(key)
            return memo[key]
        value = function(*args, **kwargs)
        memo[key] = value
        if len(memo) > _MEMO_SIZE:
            memo.popitem(last=False)
        return value

    call.__doc__ = function.__doc__
    call.__name__ = getattr(function, "__name__", "memoised")
    return call


def _sink_design(*args: Any, **kwargs: Any) -> Any:
    from linter.fixes import sink_design as design
    return design(*args, **kwargs)


sink_design = memoised(_sink_design)
""":func:`linter.fixes.sink_design`, memoised (its E24 divider search is the costly part)."""


def _sink_search(*args: Any, **kwargs: Any) -> Any:
    from linter.fixes import sink_search as search
    return search(*args, **kwargs)


sink_search = memoised(_sink_search)
""":func:`linter.fixes.sink_search`, memoised (each sink it tries is a divider search)."""
