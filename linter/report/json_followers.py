"""Followers' JSON lines made from their template's line: the names put in, nothing else.

Most groups of a large board are *followers*: results made by renaming a template group's
result (:mod:`linter.result_rename`; ``GroupResult.origin`` is ``(template, refs)``). A
follower's records are the template's in the template's order, its corner mappings keep the
template's key order with the names replaced, and every figure is the template's own object;
so its :func:`~linter.report.json_groups.group_line` is the template's with each name put in
at the same place. :class:`GroupLines` writes, once per template, the line of the template
renamed to placeholder names (:func:`~linter.result_rename.renamed`, to a stand-in group
whose id, parts, setter and pins are placeholders too), cuts it at the placeholders into
pieces, and gives each follower those pieces joined with its own JSON-escaped names put in
the gaps.

A follower's own records (``leds``, ``resistors``, ``transistors``, ``pins``,
``not_converged``, ``notes``) are never read where they do not exist yet: a lazy follower
(:class:`~linter.result_rename.FollowerResult`) would build them on first access. Everything
put in comes from the follower's ``group`` and its ``refs``:

* each part reference the template names (LED, resistor and transistor records, the
  ``vf``, ``beta`` and ``resistors`` keys of every corner): ``refs[name]``;
* the follower's own group: ``id``, ``parts`` (the whole list), ``setter``;
* each pin's ``id`` and ``net``: the follower's own pin drives (``group.pins``, in order:
  renaming makes pin i of the result from drive i);
* each note's part reference: ``refs[ref]`` (renaming writes a follower's notes as the
  template's ``f"{ref}: {text}"`` with the reference renamed). A note's reference is the
  one name of the template whose text followed by ``": "`` starts the note; a note that no
  name, or more than one, starts that way sends the template's followers the plain way.
  A placeholder inside a note is filled with the name's escaped text without its quotes
  (JSON escapes a text character by character, so the escape of ``a + b`` is the escapes
  of ``a`` and ``b`` joined).

Everything else (status, rail, reason, figures, scenario, rail and level names, part
numbers, packages) is the template's, as :func:`~linter.result_rename.renamed` leaves it.

Guards (any failing one writes the group with the plain
:func:`~linter.report.json_groups.group_line`):

* the record is a :class:`~linter.results.GroupResult` with an ``origin`` whose template is
  one of the groups being written (by identity) and is itself a ``GroupResult``;
* the follower's status, rail, reason, corners and scheme are the template's (what renaming
  copies), and so is its topology (part of the key); its group has as many pin drives as
  the template has pins;
* a follower whose fields all exist (a plain ``GroupResult``, or a lazy one whose records
  and notes something has read; it may have been made otherwise than by renaming) is read
  (that builds nothing) and must agree: the same number of each kind of record as the
  template's, pins named as its drives are, notes those renaming writes. A follower with a
  field still empty is a lazy one as renaming made it (see :func:`untouched`);
* the placeholder mark (:data:`MARK`, a private-use character) does not occur anywhere in
  the template's own plain line (its names and every text around them): the marks in the
  placeholder line are then exactly the placeholders. A follower's own names are never
  searched (they are put into the cut text, not cut), so they may hold anything;
* every template name met when renaming is in the follower's ``refs``; every name put in
  is text.

Names that JSON writes as they are (no quote, backslash or control character: what
:func:`json.encoder.encode_basestring` leaves alone, tested over every code point) take a
shorter road: the form keeps a second cut whose pieces hold each text's quotes, and a
follower whose own texts (id, parts, setter, pin ids and nets, names) hold none of those
characters, found by one search over all of them joined, gets them put in unescaped. Any
other follower (a name to escape, a setter that is not text, no parts) takes the escaped
road above; both give the same bytes (tests/test_report_json_followers.py).

A template's form lives until its last follower is written (counted beforehand), and its
own line (needed for its form's guard and for its own entry) is written once and kept only
until both have used it; so memory stays bounded by the templates in use, not by the board.
"""

from __future__ import annotations

import re
import types
from dataclasses import replace
from operator import itemgetter
from typing import Any, Callable, Iterable, Mapping

from linter.groups import Group, PinDrive
from linter.report.json_groups import _TEXT, _value, group_line
from linter.result_rename import renamed
from linter.results import GroupResult

__all__ = ["MARK", "GroupLines", "follower_form", "note_parts", "untouched"]

MARK = "\ue000"
"""Around a placeholder's number (``"\\ue0007\\ue000"``): a private-use character, which
JSON writes as it is (``ensure_ascii=False``)."""

_TOKEN = re.compile('"' + MARK + "([0-9]+)" + MARK + '"|' + MARK + "([0-9]+)" + MARK)
"""A placeholder as it stands in the line: a whole text, quotes included (group 1), or a
piece of a text (group 2, a note's reference)."""

_ID, _PARTS, _SETTER = range(3)
_FIXED = 3
"""Slots 0-2: the follower's group id, parts (list body), setter; then two per pin (id,
net); then one per template name."""

_RECORDS = ("leds", "resistors", "transistors", "pins", "not_converged")

_UNSAFE = re.compile('[\x00-\x1f"\\\\]').search
"""A character :func:`json.encoder.encode_basestring` escapes (``ensure_ascii=False``): a
quote, a backslash or a control character; every other text is written as it is, in
quotes."""


def _slot_readers() -> tuple[Callable[[Any], Any], ...] | None:
    """GroupResult's own slot readers of ``notes`` and the record fields: they read what is
    stored and raise AttributeError for an empty slot, where a subclass's property (a lazy
    follower's) would build it. None if GroupResult has no such slots."""
    readers = []
    for name in ("notes", *_RECORDS):
        slot = GroupResult.__dict__.get(name)
        if not isinstance(slot, types.MemberDescriptorType):
            return None
        readers.append(slot.__get__)
    return tuple(readers)


_STORED_READERS = _slot_readers()


def untouched(result: GroupResult) -> bool:
    """Whether a field of ``result`` (``notes`` or a record field) is still empty: then
    ``result`` is a lazy follower as renaming made it, every field it has built or will
    build is its template's renamed (the constructor and ``dataclasses.replace`` fill every
    field, and a frozen record's fields are not set again). False for a result whose fields
    all exist (reading them builds nothing)."""
    if _STORED_READERS is None:
        return False
    for read in _STORED_READERS:
        try:
            read(result)
        except AttributeError:
            return True
    return False


def _token(slot: int) -> str:
    return MARK + str(slot) + MARK


def note_parts(notes: Iterable[str], names: Iterable[str]) -> tuple[tuple[str, str], ...] | None:
    """Each note as (reference, text), ``note == f"{reference}: {text}"``, the reference
    being the one name of ``names`` that starts the note so; None where a note is not text
    or no name or more than one does."""
    names = [name for name in names if type(name) is str]
    parts = []
    for note in notes:
        if type(note) is not str:
            return None
        found = [name for name in names if note.startswith(name + ": ")]
        if len(found) != 1:
            return None
        parts.append((found[0], note[len(found[0]) + 2:]))
    return tuple(parts)


class FollowerForm:
    """One template's line cut at its placeholders: ``pieces`` is the line's texts between
    them with a gap (None) for each; a follower's line is ``pieces`` with the gaps filled by
    ``pick(values)``, joined (``values`` are the follower's slot texts, escaped with quotes,
    then ``inner``'s slots without them; ``pick`` takes the value of each gap)."""

    __slots__ = ("template", "names", "pins", "scalars", "counts", "note_parts", "pieces",
                 "pick", "inner", "raw_pieces", "raw_pick")

    def __init__(self, template: GroupResult, names: tuple[str, ...],
                 parts: tuple[tuple[str, str], ...], texts: list[str], order: list[int],
                 inner: tuple[int, ...], raw_texts: list[str], raw_order: list[int]) -> None:
        self.template = template  # kept: forms are found by the template's identity
        self.names = names
        self.pins = len(template.pins)
        self.scalars, self.counts = _shell(template)
        self.note_parts = parts
        self.pieces = _gapped(texts)
        self.inner = inner
        self.pick = _picker(order)
        self.raw_pieces = _gapped(raw_texts)
        """The same cut with each whole text's quotes in the pieces: filled with the
        follower's texts as they are (:data:`_UNSAFE` in none of them)."""
        self.raw_pick = _picker(raw_order)

    def line(self, follower: GroupResult, refs: Mapping[str, str]) -> str | None:
        """The follower's JSON line; None when a guard fails (see the module docstring).
        Raises KeyError when ``refs`` lacks a name and TypeError for a name not text."""
        shape = follower.group
        drives = shape.pins
        if (len(drives) != self.pins
                or (shape.topology, follower.status, follower.rail, follower.reason,
                    follower.corners, follower.scheme) != self.scalars
                or not (untouched(follower) or self.built_agrees(follower, drives, refs))):
            return None
        parts, setter = shape.parts, shape.setter
        if parts and type(setter) is str:
            raw = [shape.id, "".join(parts), setter]
            for drive in drives:
                raw.append(drive.id)
                raw.append(drive.net)
            raw += map(refs.__getitem__, self.names)
            if _UNSAFE("".join(raw)) is None:  # every text written as it is, in quotes
                raw[_PARTS] = '", "'.join(parts)
                pieces = self.raw_pieces[:]
                pieces[1::2] = self.raw_pick(raw)
                return "".join(pieces)
        values = [_TEXT(shape.id), ", ".join(map(_TEXT, parts)), _value(setter)]
        for drive in drives:
            values.append(_TEXT(drive.id))
            values.append(_TEXT(drive.net))
        values += map(_TEXT, map(refs.__getitem__, self.names))
        if self.inner:
            values += [values[slot][1:-1] for slot in self.inner]
        pieces = self.pieces[:]
        pieces[1::2] = self.pick(values)
        return "".join(pieces)

    def built_agrees(self, follower: GroupResult, drives: tuple[PinDrive, ...],
                     refs: Mapping[str, str]) -> bool:
        """For a follower whose fields all exist (it may have been made otherwise than by
        renaming): its records are as many as the template's, its pins named as its drives
        are and its notes those renaming writes."""
        if tuple(len(getattr(follower, name)) for name in _RECORDS) != self.counts:
            return False
        if [(pin.id, pin.net) for pin in follower.pins] != [
                (drive.id, drive.net) for drive in drives]:
            return False
        return tuple(follower.notes) == tuple(
            [f"{refs[ref]}: {text}" for ref, text in self.note_parts])


def follower_form(template: GroupResult, names: Iterable[str],
                  template_line: str | None = None) -> FollowerForm | None:
    """The form of ``template``'s followers, whose ``refs`` map ``names`` (the
    template's references); None where a guard fails (the mark in the template's line, a
    note whose reference cannot be told, or a name met in renaming that is not in
    ``names``). ``template_line``: ``group_line(template)`` when already written."""
    if template_line is None:
        template_line = group_line(template)
    if MARK in template_line:
        return None
    names = tuple(names)
    parts = note_parts(template.notes, names)
    if parts is None:
        return None
    pins = len(template.pins)
    first_name = _FIXED + 2 * pins
    placeholders = {name: _token(first_name + index) for index, name in enumerate(names)}
    try:
        stand_in = Group(id=_token(_ID), topology=template.group.topology, leds=(), strings=(),
                         parts=(_token(_PARTS),), nets=(), rails=(), setter=_token(_SETTER),
                         pins=tuple(PinDrive("", "", "") for _ in range(pins)))
        placed = renamed(template, stand_in, placeholders, parts)
    except (KeyError, TypeError, ValueError, AttributeError):
        return None
    placed = replace(placed, pins=tuple(
        replace(pin, id=_token(_FIXED + 2 * index), net=_token(_FIXED + 2 * index + 1))
        for index, pin in enumerate(placed.pins)))
    pieces = _TOKEN.split(group_line(placed))
    texts = pieces[0::3]
    if MARK in "".join(texts):  # a mark that is not a placeholder
        return None
    slots = len(names) + first_name
    inner: list[int] = []
    order = []
    raw_texts = list(texts)
    raw_order = []
    for gap, (whole, piece) in enumerate(zip(pieces[1::3], pieces[2::3])):
        if whole is not None:
            order.append(int(whole))
            raw_texts[gap] += '"'  # the quotes _TEXT puts around the text
            raw_texts[gap + 1] = '"' + raw_texts[gap + 1]
        elif int(piece) >= first_name:  # a note's reference
            if int(piece) not in inner:
                inner.append(int(piece))
            order.append(slots + inner.index(int(piece)))
        else:
            return None
        raw_order.append(int(whole if whole is not None else piece))
    return FollowerForm(template, names, parts, texts, order, tuple(inner), raw_texts,
                        raw_order)


def _gapped(texts: list[str]) -> list[str | None]:
    """``texts`` with a gap (None) between each two."""
    pieces: list[str | None] = [None] * (2 * len(texts) - 1)
    pieces[0::2] = texts
    return pieces


def _picker(order: list[int]) -> Callable[[list[str]], tuple[str, ...]]:
    """The values of the slots ``order`` names, as a tuple."""
    if len(order) > 1:
        return itemgetter(*order)
    return lambda values: tuple(values[slot] for slot in order)


def _shell(result: GroupResult) -> tuple:
    """What renaming copies from the template: the topology (in the key), status, rail,
    reason, corners and scheme; and the number of each kind of record."""
    return ((result.group.topology, result.status, result.rail, result.reason, result.corners,
             result.scheme), tuple(len(getattr(result, name)) for name in _RECORDS))


class GroupLines:
    """The JSON line of each group of one report, followers through their template's form.

    ``groups`` are the records to be written (any order); :meth:`line` gives, for each of
    them, exactly :func:`~linter.report.json_groups.group_line` (see the module docstring).
    A template's own line is written once: kept from its own turn for its form, or from
    its form for its own turn, whichever comes first.
    """

    def __init__(self, groups: Iterable[Any]) -> None:
        groups = groups if isinstance(groups, (list, tuple)) else list(groups)
        counts: dict[int, int] = {}
        for group in groups:
            origin = group.origin if isinstance(group, GroupResult) else None  # _origin
            if origin is not None and type(origin[0]) is GroupResult:
                key = id(origin[0])
                counts[key] = counts.get(key, 0) + 1
        present = [id(group) for group in groups if id(group) in counts]
        self._left: dict[int, int] = {key: counts[key] for key in present}
        """Per template (by identity) among ``groups``: its followers not yet written."""
        self._forms: dict[int, FollowerForm | None] = {}
        self._lines: dict[int, str] = {}
        """A template's line, kept for the one of its form and its own turn still to come."""
        self.filled = 0
        """Lines made from a template's form so far (the rest went the plain way)."""

    def line(self, group: Any) -> str:
        origin = group.origin if isinstance(group, GroupResult) else None  # _origin
        if origin is None:
            key = id(group)
            if key not in self._left and key not in self._lines:
                return group_line(group)
            text = self._lines.pop(key, None)
            if text is None:
                text = group_line(group)
                if key not in self._forms:  # its form is still to be made
                    self._lines[key] = text
            return text
        template, refs = origin
        key = id(template)
        left = self._left.get(key)
        if left is None:  # its template is not written here, or not a plain result
            return group_line(group)
        form = self._forms.get(key, False)
        if form is False:
            text = self._lines.pop(key, None)
            if text is None:  # the template's own turn is still to come
                text = self._lines[key] = group_line(template)
            form = self._forms[key] = follower_form(template, refs, text)
        if left == 1:
            del self._left[key]
            del self._forms[key]
        else:
            self._left[key] = left - 1
        if form is None:
            return group_line(group)
        try:
            line = form.line(group, refs)
        except (KeyError, TypeError):
            line = None
        if line is None:
            return group_line(group)
        self.filled += 1
        return line


def _origin(group: Any) -> "tuple[GroupResult, Mapping[str, str]] | None":
    if not isinstance(group, GroupResult):
        return None
    return group.origin
