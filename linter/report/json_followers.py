"""Followers' JSON lines made from their template's line: the names put in, nothing else.

Most groups of a large board are *followers*: results made by renaming a template group's
result (:mod:`linter.result_rename`; ``GroupResult.origin`` is ``(template, refs)``). A
follower's records are the template's in the template's order, its corner mappings keep the
template's key order with the names replaced, and every figure is the template's own object;
so its :func:`~linter.report.json_groups.group_line` is the template's with each name put in
at the same place. :class:`GroupLines` writes, once per template, the line of the template
renamed to placeholder names (:func:`~linter.result_rename.renamed`, to a stand-in group
whose id, parts, setter and pins are placeholders too), cuts it at the placeholders into a
``%`` format, and gives each follower that format filled with its own JSON-escaped names.

What is put in, and where it comes from:

* each part reference the template names (LED, resistor and transistor records, the
  ``vf``, ``beta`` and ``resistors`` keys of every corner): ``refs[name]`` of the follower;
* the follower's own group: ``id``, ``parts`` (the whole list), ``setter``;
* each pin's ``id`` and ``net``: the follower's own pin records;
* ``notes`` (the whole list): the follower's own.

Everything else (status, rail, reason, figures, scenario, rail and level names, part
numbers, packages) is the template's, as :func:`~linter.result_rename.renamed` leaves it.

Guards (any failing one writes the group with the plain
:func:`~linter.report.json_groups.group_line`):

* the record is a :class:`~linter.results.GroupResult` with an ``origin`` whose template is
  one of the groups being written (by identity) and is itself a ``GroupResult``;
* the follower's status, rail, reason, corners, scheme and record counts are the template's
  (what renaming copies), and so is its topology (part of the key);
* the placeholder mark (:data:`MARK`, a private-use character) does not occur anywhere in
  the template's own plain line (its names and every text around them): the marks in the
  placeholder line are then exactly the placeholders. A follower's own names are never
  searched (they are put into the cut text, not cut), so they may hold anything;
* every template name met when renaming is in the follower's ``refs``.

A template's format lives until its last follower is written (counted beforehand),
so memory stays bounded by the templates in use, not by the board.
"""

from __future__ import annotations

import re
from dataclasses import replace
from operator import itemgetter
from typing import Any, Iterable, Mapping

from linter.groups import Group, PinDrive
from linter.report.json_groups import _TEXT, _value, group_line
from linter.result_rename import renamed
from linter.results import GroupResult

__all__ = ["MARK", "GroupLines", "follower_form"]

MARK = "\ue000"
"""Around a placeholder's number (``"\\ue0007\\ue000"``): a private-use character, which
JSON writes as it is (``ensure_ascii=False``)."""

_TOKEN = re.compile('"' + MARK + "([0-9]+)" + MARK + '"')
"""A placeholder as it stands in the line, quotes included."""

_ID, _PARTS, _SETTER, _NOTES = range(4)
_FIXED = 4
"""Slots 0-3: the follower's group id, parts (list body), setter, notes (list body); then
two per pin (id, net); then one per template name."""


def _token(slot: int) -> str:
    return MARK + str(slot) + MARK


class FollowerForm:
    """One template's line cut at its placeholders: ``text % pick(values)`` is a follower's
    line (``text`` is the line with ``%`` doubled and each placeholder ``%s``; ``pick``
    takes the value of each ``%s`` from the follower's slot values)."""

    __slots__ = ("template", "names", "shell", "text", "pick")

    def __init__(self, template: GroupResult, names: tuple[str, ...], text: str,
                 order: list[int]) -> None:
        self.template = template  # kept: forms are found by the template's identity
        self.names = names
        self.shell = _shell(template)
        self.text = text
        self.pick = itemgetter(*order) if len(order) > 1 else (lambda values: tuple(
            values[slot] for slot in order))

    def line(self, follower: GroupResult, refs: Mapping[str, str]) -> str:
        """The follower's JSON line (raises KeyError when ``refs`` lacks a name)."""
        shape = follower.group
        try:  # names are text: the C escaper straight away
            values = [_TEXT(shape.id), ", ".join(map(_TEXT, shape.parts)),
                      _value(shape.setter), ", ".join(map(_TEXT, follower.notes))]
            for pin in follower.pins:
                values.append(_TEXT(pin.id))
                values.append(_TEXT(pin.net))
            values += map(_TEXT, [refs[name] for name in self.names])
        except TypeError:  # anything else: as the plain writer writes it
            values = [_value(shape.id), ", ".join([_value(part) for part in shape.parts]),
                      _value(shape.setter),
                      ", ".join([_value(note) for note in follower.notes])]
            for pin in follower.pins:
                values.append(_value(pin.id))
                values.append(_value(pin.net))
            values += [_value(refs[name]) for name in self.names]
        return self.text % self.pick(values)


def follower_form(template: GroupResult, names: Iterable[str]) -> FollowerForm | None:
    """The form of ``template``'s followers, whose ``refs`` map ``names`` (the
    template's references); None where a guard fails (the mark in the template's line, or a
    name met in renaming that is not in ``names``)."""
    if MARK in group_line(template):
        return None
    names = tuple(names)
    pins = len(template.pins)
    first_name = _FIXED + 2 * pins
    placeholders = {name: _token(first_name + index) for index, name in enumerate(names)}
    try:
        stand_in = Group(id=_token(_ID), topology=template.group.topology, leds=(), strings=(),
                         parts=(_token(_PARTS),), nets=(), rails=(), setter=_token(_SETTER),
                         pins=tuple(PinDrive("", "", "") for _ in range(pins)))
        placed = renamed(template, stand_in, placeholders, ())
    except (KeyError, TypeError, ValueError, AttributeError):
        return None
    placed = replace(placed, notes=(_token(_NOTES),), pins=tuple(
        replace(pin, id=_token(_FIXED + 2 * index), net=_token(_FIXED + 2 * index + 1))
        for index, pin in enumerate(placed.pins)))
    pieces = _TOKEN.split(group_line(placed))
    texts = pieces[0::2]
    if MARK in "".join(texts):  # a mark that is not a whole placeholder
        return None
    order = [int(slot) for slot in pieces[1::2]]
    text = "%s".join([piece.replace("%", "%%") for piece in texts])
    return FollowerForm(template, names, text, order)


def _shell(result: GroupResult) -> tuple:
    """What renaming copies from the template at the top level (status, rail, reason,
    corners, scheme, the number of each kind of record) and the topology (in the key)."""
    return (result.group.topology, result.status, result.rail, result.reason, result.corners,
            result.scheme,
            len(result.leds), len(result.resistors), len(result.transistors),
            len(result.pins), len(result.not_converged))


class GroupLines:
    """The JSON line of each group of one report, followers through their template's form.

    ``groups`` are the records to be written (any order); :meth:`line` gives, for each of
    them, exactly :func:`~linter.report.json_groups.group_line` (see the module docstring).
    """

    def __init__(self, groups: Iterable[Any]) -> None:
        groups = list(groups)
        present = {id(group) for group in groups}
        self._left: dict[int, int] = {}
        for group in groups:
            origin = _origin(group)
            if origin is not None and id(origin[0]) in present:
                self._left[id(origin[0])] = self._left.get(id(origin[0]), 0) + 1
        self._forms: dict[int, FollowerForm | None] = {}
        self.filled = 0
        """Lines made from a template's form so far (the rest went the plain way)."""

    def line(self, group: Any) -> str:
        origin = _origin(group)
        if origin is None:
            return group_line(group)
        template, refs = origin
        key = id(template)
        left = self._left.get(key)
        if left is None or type(template) is not GroupResult:
            return group_line(group)
        form = self._forms.get(key, False)
        if form is False:
            form = self._forms[key] = follower_form(template, refs)
        if left == 1:
            del self._left[key]
            del self._forms[key]
        else:
            self._left[key] = left - 1
        if form is None or _shell(group) != form.shell:
            return group_line(group)
        try:
            line = form.line(group, refs)
        except KeyError:
            return group_line(group)
        self.filled += 1
        return line


def _origin(group: Any) -> "tuple[GroupResult, Mapping[str, str]] | None":
    if type(group) is not GroupResult:
        return None
    return group.origin
