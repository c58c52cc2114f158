"""One group's result made from another's: equal keys (:mod:`linter.group_key`), own names.

A result names parts in its records (``ref``), in its corners (the LED, transistor and
resistor axes), in its pins (id and net) and in its notes. Every other figure of two groups
with equal keys is the same (their models differ only in names), so the result of one is
the result of the other with those names replaced: references through ``refs``, pins and
notes rebuilt from the group's own pin drives and the template's note parts. Rail names,
scenario names and part numbers are in the key and stay as they are.

A template usually has many followers, so its result is read once into a :class:`Template`:
which of its records name a part (a level mapping with names, a corner holding one, a span
at such a corner, every part record) and which do not. A follower gets new records only for
the first kind, each made once per distinct template record; the others (spans and corners
that name no part, empty level mappings, every rail mapping, float and text) are the
template's own objects, shared.

The analysis makes followers with :meth:`Template.follower`: a :class:`FollowerResult` holding
its group, the top-level figures, ``origin`` and the Template, which builds its records on
first access (rules and reports that work per template through ``origin`` never read a
follower's records, so those are never made). :meth:`Template.renamed` builds every record at
once (the plain twin; tests/test_result_rename_lazy.py holds the two equal field by field).
"""

from __future__ import annotations

from collections import deque
from dataclasses import fields
from itertools import repeat
from operator import attrgetter
from typing import Any, Callable, Mapping, Sequence

from linter.corners import Corner, Levels
from linter.groups import Group
from linter.results import GroupResult, LedResult, PinResult, ResistorResult, Span, TransistorResult

__all__ = ["Template", "FollowerResult", "renamed", "built_fields"]


def _clone(record, changes: dict):
    """``dataclasses.replace(record, **changes)`` for a frozen slotted dataclass of ours
    without ``__post_init__`` (every result record and :class:`Corner`): the same class and
    fields, set slot by slot without the keyword handling of ``replace``."""
    cls = type(record)
    made = _NEW(cls)
    for name in cls.__slots__:
        _SET(made, name, changes[name] if name in changes else getattr(record, name))
    return made


_NEW = object.__new__
_SET = object.__setattr__


def _maker(cls: type) -> Callable[..., Any]:
    """A function ``make(*fields)`` equal to ``cls(*fields)`` for a frozen slotted dataclass
    of ours without ``__post_init__`` (every field passed, in order): the slots are set
    through their descriptors, without the frozen ``__init__``'s attribute look-ups.
    Written out for five and six fields (Span, PinResult, Corner: the many small records);
    a loop for the rest. tests/test_result_rename.py holds it to the constructor for each
    class it is made for."""
    setters = tuple(cls.__dict__[name].__set__ for name in cls.__slots__)
    new = _NEW
    if len(setters) == 5:
        s0, s1, s2, s3, s4 = setters

        def make5(a0: Any, a1: Any, a2: Any, a3: Any, a4: Any) -> Any:
            o = new(cls)
            s0(o, a0); s1(o, a1); s2(o, a2); s3(o, a3); s4(o, a4)  # noqa: E702
            return o
        return make5
    if len(setters) == 6:
        t0, t1, t2, t3, t4, t5 = setters

        def make6(a0: Any, a1: Any, a2: Any, a3: Any, a4: Any, a5: Any) -> Any:
            o = new(cls)
            t0(o, a0); t1(o, a1); t2(o, a2); t3(o, a3); t4(o, a4); t5(o, a5)  # noqa: E702
            return o
        return make6
    count = len(setters)

    def make(*values: Any) -> Any:
        if len(values) != count:
            raise TypeError(f"{cls.__name__}: {count} fields, {len(values)} given")
        o = new(cls)
        for setter, value in zip(setters, values):
            setter(o, value)
        return o
    return make


_corner = _maker(Corner)
_span = _maker(Span)
_led = _maker(LedResult)
_resistor = _maker(ResistorResult)
_pin = _maker(PinResult)
_group_result = _maker(GroupResult)


def _names_part(value: Any) -> bool:
    """Whether a corner, span or level mapping names a part of the group."""
    kind = type(value)
    if kind is Levels:
        return bool(value.names)
    if kind is Corner:
        return _names_part(value.vf) or _names_part(value.beta) or _names_part(value.resistors)
    if kind is Span:
        return _names_part(value.at_min) or _names_part(value.at_max)
    if value is None:
        return False
    if isinstance(value, Mapping):
        return bool(value)
    raise TypeError(f"cannot rename {kind.__name__}")


class Template:
    """A template result read once for renaming: a table of the objects its records quote.

    The table of a follower is ``shared`` (the template's own objects that name no part),
    then its renamed names tuples, level mappings, corners and spans, each made from earlier
    entries by position; part records quote the table by position too.
    """

    def __init__(self, result: GroupResult, note_parts: tuple[tuple[str, str], ...]) -> None:
        self.result = result
        self.note_parts = note_parts
        self.shared: list[Any] = []
        self._at: dict[int, int] = {}
        found = _Found()
        for record in (*result.leds, *result.resistors, *result.transistors, *result.pins):
            for name in _SPANS[type(record)]:
                self._visit(getattr(record, name), found)
            for name in _CORNERS[type(record)]:
                self._visit(getattr(record, name), found)
        for corner in result.not_converged:
            self._visit(corner, found)
        names, mappings, corners, spans = found.names, found.mappings, found.corners, found.spans
        at = self._at
        for value in (*names, *mappings, *corners, *spans):
            at[id(value)] = len(at)
        self.names = names
        self.leds_names = next((i for i, n in enumerate(names) if n == result.group.leds), None)
        """The position in ``names`` of the template group's LED tuple (the LED axes' names,
        usually): the follower's renamed tuple is then its group's own ``leds`` when equal."""
        self.mappings = [(at[id(m.names)], m.levels) if type(m) is Levels else (None, m)
                         for m in mappings]
        self.corners = [(c.scenario, c.rails, c.ambient_c, at[id(c.vf)], at[id(c.beta)],
                         at[id(c.resistors)]) for c in corners]
        self.spans = [(s.nom, s.min, s.max, at[id(s.at_min)], at[id(s.at_max)]) for s in spans]
        self.leds = [(x.ref, x.part_number, at[id(x.current)], at[id(x.vf)], at[id(x.power)],
                      x.lit_scenarios, x.reverse_v, at[id(x.reverse_at)], x.di_dvf, x.assumed)
                     for x in result.leds]
        self.resistors = [(x.ref, x.ohms, x.tolerance, at[id(x.current)], at[id(x.power)],
                           x.rating_w, x.package) for x in result.resistors]
        self.pins = [(at[id(x.current)], x.sourcing, x.current_max) for x in result.pins]
        self.not_converged = [at[id(c)] for c in result.not_converged]
        self.transistors = [(x, tuple((name, at[id(getattr(x, name))]) for name in _TRANSISTOR))
                            for x in result.transistors]
        del self._at    # positions are in the tables now; ids are of no use later

    def _visit(self, value: Any, found: "_Found") -> None:
        """Puts ``value`` (and what it quotes) in ``shared`` when it names no part, else in
        ``found``'s list of its kind, after what it quotes; each object once."""
        seen = found.seen
        if id(value) in seen:
            return
        seen[id(value)] = value
        if not _names_part(value):
            self._at[id(value)] = len(self.shared)
            self.shared.append(value)
        elif type(value) is Span:
            self._visit(value.at_min, found)
            self._visit(value.at_max, found)
            found.spans.append(value)
        elif type(value) is Corner:
            for mapping in (value.vf, value.beta, value.resistors):
                self._visit(mapping, found)
            found.corners.append(value)
        else:
            if type(value) is Levels and id(value.names) not in seen:
                seen[id(value.names)] = value.names
                found.names.append(value.names)
            found.mappings.append(value)

    def renamed(self, group: Group, refs: Mapping[str, str]) -> GroupResult:
        """The template's result for ``group``, every record built now (the plain twin of
        :meth:`follower`); ``refs`` maps the template's part references to the group's.
        Pin i of the result is the group's pin drive i (both in the group's pin order)."""
        result = self.result
        leds, resistors, transistors, pins, not_converged = self.records(group, refs)
        return _group_result(
            group, result.status, result.rail, leds, resistors, transistors, pins,
            result.corners, result.scheme, not_converged, self.notes(refs), result.reason,
            (result, refs))

    def follower(self, group: Group, refs: Mapping[str, str]) -> "FollowerResult":
        """:meth:`renamed` with the records left to be built on first access (see
        :class:`FollowerResult`): now only the group, the top-level figures and the origin."""
        result = self.result
        made = _NEW(FollowerResult)
        for setter, value in zip(_EAGER_SETTERS, (
                group, result.status, result.rail, result.corners, result.scheme,
                result.reason, (result, refs), self)):
            setter(made, value)
        return made

    def followers(self, groups: Sequence[Group],
                  refs: Sequence[Mapping[str, str]]) -> list["FollowerResult"]:
        """:meth:`follower` of each group with its refs map, made field by field for all at
        once (each field's setter mapped over the new objects: no Python loop per follower;
        tests/test_result_rename_lazy.py holds them equal to :meth:`follower`'s)."""
        result = self.result
        made = list(map(_NEW, repeat(FollowerResult, len(groups))))
        for setter, values in zip(_EAGER_SETTERS, (
                groups, repeat(result.status), repeat(result.rail), repeat(result.corners),
                repeat(result.scheme), repeat(result.reason), zip(repeat(result), refs),
                repeat(self))):
            deque(map(setter, made, values), 0)
        return made

    def records(self, group: Group, refs: Mapping[str, str]) -> tuple[tuple, ...]:
        """(leds, resistors, transistors, pins, not_converged) of the template renamed for
        ``group`` through ``refs``; objects naming no part are the template's own."""
        get = refs.__getitem__
        named = [tuple(map(get, names)) for names in self.names]
        at = self.leds_names
        if at is not None and named[at] == group.leds:
            named[at] = group.leds     # the same names, one tuple fewer kept
        table = self.shared + named
        table += [Levels(table[at], levels) if at is not None
                  else {get(k): v for k, v in levels.items()} for at, levels in self.mappings]
        table += [_corner(scenario, rails, ambient, table[vf], table[beta], table[resistors])
                  for scenario, rails, ambient, vf, beta, resistors in self.corners]
        table += [_span(nom, low, high, table[at_min], table[at_max])
                  for nom, low, high, at_min, at_max in self.spans]
        return (
            tuple([_led(get(ref), part, table[i], table[vf], table[p], lit, rev, table[rev_at],
                        di, assumed)
                   for ref, part, i, vf, p, lit, rev, rev_at, di, assumed in self.leds]),
            tuple([_resistor(get(ref), ohms, tol, table[i], table[p], rating, package)
                   for ref, ohms, tol, i, p, rating, package in self.resistors]),
            tuple([_clone(x, {"ref": get(x.ref), **{name: table[i] for name, i in where}})
                   for x, where in self.transistors]),
            tuple([_pin(drive.id, drive.net, table[i], sourcing, rating)
                   for (i, sourcing, rating), drive in zip(self.pins, group.pins)]),
            tuple([table[i] for i in self.not_converged]))

    def notes(self, refs: Mapping[str, str]) -> tuple[str, ...]:
        """The template model's notes with each one's part reference renamed."""
        get = refs.__getitem__
        return tuple([f"{get(ref)}: {text}" for ref, text in self.note_parts])


class _Found:
    """What :meth:`Template._visit` met that names a part, by kind, in the order met."""

    def __init__(self) -> None:
        self.seen: dict[int, Any] = {}
        self.names: list[tuple[str, ...]] = []
        self.mappings: list[Mapping] = []
        self.corners: list[Corner] = []
        self.spans: list[Span] = []


_SPANS: dict[type, tuple[str, ...]] = {
    LedResult: ("current", "vf", "power"), ResistorResult: ("current", "power"),
    TransistorResult: ("vce", "current", "power", "vgs"), PinResult: ("current",)}
"""The fields of each record that hold a Span (or None)."""
_CORNERS: dict[type, tuple[str, ...]] = {
    LedResult: ("reverse_at",), ResistorResult: (), PinResult: (),
    TransistorResult: ("saturated_at", "rail_min_at")}
"""The fields of each record that hold a Corner (or None)."""
_TRANSISTOR = (*_SPANS[TransistorResult], *_CORNERS[TransistorResult])


_RECORDS = ("leds", "resistors", "transistors", "pins", "not_converged")
"""A follower's fields built together on first access of any (they quote one table)."""
_LAZY = (*_RECORDS, "notes")
_SLOT = {name: GroupResult.__dict__[name] for name in _LAZY}
"""GroupResult's slot descriptors of the lazy fields (the subclass's properties hide them)."""
_COMPARED = tuple(f.name for f in fields(GroupResult) if f.compare)
_compared = attrgetter(*_COMPARED)


class FollowerResult(GroupResult):
    """A follower's :class:`~linter.results.GroupResult` whose records are built from its
    :class:`Template` on first access.

    Made by :meth:`Template.follower` holding only the group, status, rail, corners,
    scheme, reason, ``origin`` (the template result and the refs map) and the Template.
    Reading any of ``leds``, ``resistors``, ``transistors``, ``pins`` or ``not_converged``
    builds those five at once (:meth:`Template.records`, as :meth:`Template.renamed` does)
    into GroupResult's own slots; ``notes`` is built on its own; ``converged`` reads the
    template's corners while the records are unbuilt. Every other behaviour is
    GroupResult's: equality with any GroupResult by the compared fields (so a follower
    equals its eagerly built twin), the same hash and repr, ``as_dict`` and
    ``dataclasses.replace`` (which reads every field, so builds the records). Pickled as
    its Template, group and refs, it unpickles unbuilt.
    """

    __slots__ = ("_template",)

    def __eq__(self, other: object) -> bool:
        if isinstance(other, GroupResult):
            return _compared(self) == _compared(other)
        return NotImplemented

    __hash__ = GroupResult.__hash__

    def __repr__(self) -> str:
        text = GroupResult.__repr__(self)
        head = type(self).__qualname__
        return "GroupResult" + text[len(head):] if text.startswith(head) else text

    @property
    def converged(self) -> bool:
        """True when every corner converged (the template's count while unbuilt)."""
        try:
            failed = _NOT_CONVERGED(self)
        except AttributeError:
            failed = self.origin[0].not_converged
        return self.status == "solved" and not failed

    def __reduce_ex__(self, protocol: Any) -> Any:
        """Pickled as its Template, group and refs (a Template is pickled once for all its
        followers), unpickled unbuilt; one made otherwise (``replace``, unpickling) has no
        Template and is pickled field by field."""
        try:
            template = self._template
        except AttributeError:
            return super().__reduce_ex__(protocol)
        return (_follower, (template, _SLOT_GROUP(self), self.origin[1]))

    def _build_records(self) -> None:
        group = _SLOT_GROUP(self)
        for name, value in zip(_RECORDS, self._template.records(group, self.origin[1])):
            _SLOT[name].__set__(self, value)

    def _build_notes(self) -> None:
        _SLOT["notes"].__set__(self, self._template.notes(self.origin[1]))


def _lazy(name: str, build: Callable[[FollowerResult], None]) -> property:
    """A property over GroupResult's slot ``name``: the slot's value, built by ``build``
    when the slot is still empty; setting it sets the slot (``__init__``, ``replace``,
    unpickling)."""
    slot = _SLOT[name]
    read_slot = slot.__get__

    def read(self: FollowerResult) -> Any:
        try:
            return read_slot(self)
        except AttributeError:
            build(self)
            return read_slot(self)
    return property(read, slot.__set__, doc=f"``{name}``, built on first access.")


for _name in _RECORDS:
    setattr(FollowerResult, _name, _lazy(_name, FollowerResult._build_records))
FollowerResult.notes = _lazy("notes", FollowerResult._build_notes)  # type: ignore[assignment]
del _name
_NOT_CONVERGED = _SLOT["not_converged"].__get__
_SLOT_GROUP = GroupResult.__dict__["group"].__get__
_EAGER_SETTERS = tuple(GroupResult.__dict__[name].__set__ for name in (
    "group", "status", "rail", "corners", "scheme", "reason", "origin")) + (
    FollowerResult.__dict__["_template"].__set__,)


def _follower(template: Template, group: Group, refs: Mapping[str, str]) -> FollowerResult:
    """:meth:`Template.follower` (for unpickling)."""
    return template.follower(group, refs)


def built_fields(result: GroupResult) -> tuple[str, ...]:
    """The record fields of ``result`` that exist: all of them but in a
    :class:`FollowerResult` whose records nobody has read yet."""
    built = []
    for name, slot in _SLOT.items():
        try:
            slot.__get__(result)
        except AttributeError:
            continue
        built.append(name)
    return tuple(built)


def renamed(result: GroupResult, group: Group, refs: Mapping[str, str],
            note_parts: tuple[tuple[str, str], ...]) -> GroupResult:
    """``result`` (of the template group) for ``group``: ``refs`` maps the template's part
    references to the group's; ``note_parts`` are the template model's (ref, text) notes.
    Pin i of the result is the group's pin drive i (both in the group's pin order).
    (One follower; :class:`Template` reads the template once for many.)"""
    return Template(result, note_parts).renamed(group, refs)
