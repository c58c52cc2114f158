"""Joining the bill of materials onto the Circuit, and what disagrees between them.

:func:`apply_bom` copies what the BOM knows (package, power rating, tolerance, part number,
do-not-populate) into :attr:`linter.model.Part.properties` and lists every discrepancy: a part
missing on either side, a value that differs, a quantity that does not count the references,
a reference listed twice. Values are compared as numbers where both sides read as numbers
(``4k7`` = ``4.7k`` = ``4700`` = ``4K7``; ``330R`` = ``330``), otherwise as text without case.
Where the two disagree the analysis keeps the netlist's value: the netlist is what was drawn.
"""

from __future__ import annotations

import math
from collections import deque
from itertools import chain, compress, count, filterfalse, repeat
from operator import attrgetter, is_, itemgetter
from dataclasses import dataclass, field, replace
from typing import Literal, Mapping, Sequence

from linter.model import Circuit, Part, SourceLocation, stored_location, stored_location_getter
from linter.readers.bom import Bom, BomLine
from linter.refs import fold_refs
from linter.units import format_si, number_or_none

__all__ = ["BomDiscrepancy", "DiscrepancyKind", "apply_bom", "apply_bom_plain", "VALUE_MATCH_REL", "values_agree"]

DiscrepancyKind = Literal["missing-from-bom", "missing-from-netlist", "value", "quantity",
                          "duplicate", "part-number"]

VALUE_MATCH_REL = 1e-6
"""Relative difference (dimensionless) below which two numeric values are the same value;
it only absorbs floating-point rounding (``0.1u`` against ``100n``)."""

_UNIT_BY_KIND = {"resistor": "Ω", "link": "Ω", "capacitor": "F", "inductor": "H"}
_BOM_PROPERTIES = ("package", "power", "tolerance", "part_number", "description")


@dataclass(frozen=True)
class BomDiscrepancy:
    """One disagreement between netlist and BOM; ``values`` are SI floats where numeric."""

    kind: DiscrepancyKind
    refs: tuple[str, ...]
    message: str
    location: SourceLocation | None
    values: Mapping[str, float] = field(default_factory=dict, hash=False)


def apply_bom(circuit: Circuit, bom: Bom, *, fresh: bool = False,
              ) -> tuple[Circuit, tuple[BomDiscrepancy, ...]]:
    """A new Circuit carrying the BOM's facts, and the discrepancies between the two.

    Netlist parts of kind ``source`` in a SPICE deck (the deck's own supplies) are not
    expected in the BOM. A BOM line's references that name parts are made the circuit's own
    reference strings (equal texts, one object each: :func:`_share_refs`).

    The join is worked out once per BOM line when the line's parts read alike (equal value,
    reading, kind, part number, properties and model: all :func:`_join` reads of a part, the
    common case), else once per line and part reading, and handed to the line's parts in
    bulk. ``fresh=True`` says the circuit's Part objects are the caller's alone (just read,
    seen by nothing else): the joined properties and part number are then stored into them in
    place (C-level passes) instead of a new Part made for each; the given ``circuit`` must
    not be used afterwards. :func:`apply_bom_plain` is the same join part by part, the
    reference for the tests.
    """
    groups, problems = _found_lines(circuit, bom)
    parts = circuit.parts
    joined_parts = None if fresh else dict(parts)
    flagged: dict[str, tuple] = {}  # joined parts that _compare must look at -> their join
    facts: dict[int, dict[str, str]] = {}  # BOM line (by identity) -> its facts
    listed = 0
    for line, refs, held in groups:
        listed += len(held)
        readings = list(map(_READING, held))
        if readings.count(readings[0]) == len(readings):  # (identical objects compare at once)
            join = _join(held[0], line, facts)
            if join[1]:
                flagged.update(dict.fromkeys(refs, join))
            if fresh:
                deque(map(_SET_PROPERTIES, held, repeat(join[2], len(held))), maxlen=0)
                if join[3] is not readings[0][3]:  # (a part number the parts lack)
                    deque(map(_SET_NUMBER, held, repeat(join[3], len(held))), maxlen=0)
                continue
            joins: list[tuple] | repeat = repeat(join, len(held))
        else:
            joins = _joins_by_reading(held, readings, line, facts)
            flagged.update((ref, join) for ref, join in zip(refs, joins) if join[1])
        for ref, part, (_, _, joined, number) in zip(refs, held, joins):
            if fresh:
                _SET_PROPERTIES(part, joined)
                _SET_NUMBER(part, number)
            else:
                joined_parts[ref] = _Part(  # type: ignore[index]
                    part.ref, part.kind, part.value, part.pins, _stored(part, _Part),
                    part.value_si, part.path, part.cell, number, joined, part.model)
    if flagged or listed != len(parts):
        found = dict(chain.from_iterable(zip(refs, repeat(line)) for line, refs, _ in groups))
        _part_problems(circuit, found, flagged, problems)
    return (replace(circuit, parts=dict(parts) if joined_parts is None else joined_parts),
            tuple(problems))


def _joins_by_reading(held: list[Part], readings: list[tuple], line: BomLine,
                      facts: dict[int, dict[str, str]]) -> list[tuple]:
    """:func:`_join` of each part of one BOM line whose parts do not all read alike, once per
    reading (mappings and models by identity)."""
    joins: dict[tuple, tuple] = {}
    result = []
    for part, (value, value_si, kind, number, properties, model) in zip(held, readings):
        key = (value, value_si, kind, number, id(properties), id(model))
        join = joins.get(key)
        if join is None:
            join = joins[key] = _join(part, line, facts)
        result.append(join)
    return result


def _part_problems(circuit: Circuit, found: Mapping[str, BomLine],
                   flagged: Mapping[str, tuple], problems: list[BomDiscrepancy]) -> None:
    """The part-side discrepancies, in circuit order: parts the BOM does not list (but a SPICE
    deck's own sources) and the joined parts ``flagged`` for :func:`_compare`."""
    parts = circuit.parts
    wanted = set(flagged).union(filterfalse(found.__contains__, parts))
    spice = circuit.format == "spice"
    for ref in compress(parts, map(wanted.__contains__, parts)):
        part = parts[ref]
        join = flagged.get(ref)
        if join is not None:
            problems.extend(_compare(part, found[ref], join[0]))
        elif not (spice and part.kind == "source"):
            problems.append(BomDiscrepancy(
                "missing-from-bom", (ref,),
                f"{ref} is in the netlist but not in the BOM", part.location))


def _folded(texts: Sequence[str]) -> list[str]:
    """``[text.casefold() for text in texts]`` by one casefold of the texts joined (case
    folding maps each character on its own); one by one where a text holds a NUL."""
    folded = "\0".join(texts).casefold().split("\0")
    return folded if len(folded) == len(texts) else list(map(str.casefold, texts))


def _found_lines(circuit: Circuit, bom: Bom,
                 ) -> tuple[list[tuple[BomLine, list[str], list[Part]]], list[BomDiscrepancy]]:
    """Each BOM line with the circuit references it is the first to list and their parts
    (lines listing none left out; a reference names the part whose reference is alike but
    for case, the last such), and the BOM-side discrepancies (quantities, references not in
    the netlist, references listed twice), in BOM order.

    When every BOM reference names a part and none is listed twice (the common case), all
    lines are taken at once: one case folding, one look-up pass, parts by position. Otherwise
    line by line (:func:`_found_line_by_line`).
    """
    names = list(circuit.parts)
    by_fold = dict(zip(_folded(names), count()))  # (the last of names alike but for case)
    lines = bom.lines
    every = list(chain.from_iterable(map(_REFS, lines)))
    places = list(map(by_fold.get, _folded(every)))
    if None in places or len(set(places)) != len(places):  # (unknown or listed twice)
        return _found_line_by_line(dict(zip(by_fold, map(names.__getitem__, by_fold.values()))),
                                   circuit.parts, lines)
    refs = _picked(names, places)
    held = _picked(list(circuit.parts.values()), places)
    problems: list[BomDiscrepancy] = []
    groups: list[tuple[BomLine, list[str], list[Part]]] = []
    end = 0
    shared = all(map(is_, every, refs))
    for line in lines:
        if line.quantity is not None:
            problems.extend(_check_quantity(line))
        start, end = end, end + len(line.refs)
        if start != end:
            taken = refs[start:end]
            groups.append((line, taken, held[start:end]))
            if not shared:
                _share_equal_refs(line, taken)
    return groups, problems


def _picked(items: list, places: list[int]) -> list:
    """``[items[place] for place in places]`` in one C call."""
    if len(places) < 2:
        return [items[place] for place in places]
    return list(itemgetter(*places)(items))


def _found_line_by_line(by_fold: Mapping[str, str], parts: Mapping[str, Part],
                        lines: Sequence[BomLine],
                        ) -> tuple[list[tuple[BomLine, list[str], list[Part]]],
                                   list[BomDiscrepancy]]:
    """:func:`_found_lines` one line at a time (``by_fold``: the circuit's references by
    their case-folded text): a line whose references all name parts not listed before,
    each once, in one C-level update; any other reference by reference (:func:`_take_refs`).
    """
    found: dict[str, BomLine] = {}
    groups: list[tuple[BomLine, list[str], list[Part]]] = []
    problems: list[BomDiscrepancy] = []
    for line in lines:
        if line.quantity is not None:
            problems.extend(_check_quantity(line))
        refs = list(map(by_fold.get, _folded(line.refs)))
        if None in refs or any(map(found.__contains__, refs)):
            taken = _take_refs(line, refs, found, problems)
        else:
            before = len(found)
            found.update(zip(refs, repeat(line)))
            taken = refs  # type: ignore[assignment]
            if len(found) - before != len(refs):  # (a reference twice in this line)
                for ref in refs:
                    found.pop(ref, None)  # type: ignore[arg-type]
                taken = _take_refs(line, refs, found, problems)
        if taken:
            groups.append((line, taken, list(map(parts.__getitem__, taken))))
        _share_equal_refs(line, refs)
    return groups, problems


def _share_equal_refs(line: BomLine, refs: list[str | None]) -> None:
    """:func:`_share_refs`, at once where the line's texts are the circuit's already or all
    equal to them."""
    bom_refs = line.refs
    if all(map(is_, bom_refs, refs)):
        return
    if len(refs) == len(bom_refs) and None not in refs and tuple(refs) == bom_refs:
        object.__setattr__(line, "refs", tuple(refs))  # (what _share_refs gives)
    else:
        _share_refs(line, refs)


def _take_refs(line: BomLine, refs: list[str | None], found: dict[str, BomLine],
               problems: list[BomDiscrepancy]) -> list[str]:
    """``line``'s references one by one: ``refs`` are the circuit's references they name
    (None for none); a first listing goes into ``found`` (and the list returned), the others
    into ``problems``."""
    taken = []
    for bom_ref, ref in zip(line.refs, refs):
        if ref is None:
            problems.append(BomDiscrepancy(
                "missing-from-netlist", (bom_ref,),
                f"{bom_ref} is in the BOM (line {line.line}) but not in the netlist",
                line.location))
        elif ref in found:
            problems.append(BomDiscrepancy(
                "duplicate", (ref,),
                f"{ref} is listed twice in the BOM (lines {found[ref].line} and {line.line})",
                line.location))
        else:
            found[ref] = line
            taken.append(ref)
    return taken


def apply_bom_plain(circuit: Circuit, bom: Bom) -> tuple[Circuit, tuple[BomDiscrepancy, ...]]:
    """:func:`apply_bom` part by part, nothing shared but the line facts' texts: the
    reference its tests compare with."""
    by_fold = {ref.casefold(): ref for ref in circuit.parts}
    found: dict[str, BomLine] = {}
    problems: list[BomDiscrepancy] = []
    for line in bom.lines:
        problems.extend(_check_quantity(line))
        refs = [by_fold.get(bom_ref.casefold()) for bom_ref in line.refs]
        _take_refs(line, refs, found, problems)
        _share_refs(line, refs)
    parts = dict(circuit.parts)
    for ref, part in circuit.parts.items():
        line = found.get(ref)
        if line is None:
            if not (circuit.format == "spice" and part.kind == "source"):
                problems.append(BomDiscrepancy(
                    "missing-from-bom", (ref,),
                    f"{ref} is in the netlist but not in the BOM", part.location))
            continue
        same_value = line.value is None or part.value is None or _value_matches(part, line)
        problems.extend(_compare(part, line, same_value))
        parts[ref] = _enrich(part, line, same_value)
    return replace(circuit, parts=parts), tuple(problems)


_READING = attrgetter("value", "value_si", "kind", "part_number", "properties", "model")
"""Everything :func:`_join` reads of a part."""
_REFS = attrgetter("refs")
_SET_PROPERTIES = Part.__dict__["properties"].__set__
_SET_NUMBER = Part.__dict__["part_number"].__set__


_Part = Part
_stored = stored_location_getter(Part)


def _share_refs(line: BomLine, refs: list[str | None]) -> None:
    """Make ``line.refs`` the circuit's equal reference strings where it has them (``refs``:
    the circuit's reference each names, alike but for case, or None): one object for each
    text instead of two, about 5 MiB on a 100,000-part board. Equality, hashing and every
    text stay as they were (a reference written in another case keeps its own)."""
    shared = tuple(ref if ref == bom_ref else bom_ref for bom_ref, ref in zip(line.refs, refs))
    if any(mine is not theirs for mine, theirs in zip(line.refs, shared)):
        object.__setattr__(line, "refs", shared)


def _join(part: Part, line: BomLine, facts: dict[int, dict[str, str]],
          ) -> tuple[bool, bool, Mapping[str, str], str | None]:
    """What ``part`` gets from ``line``: whether the values agree, whether :func:`_compare`
    must look at it, its joined properties and its part number."""
    if line.value is None or part.value is None:
        same_value = True
    else:
        same_value = _value_matches(part, line)
    compare = (not same_value and not line.dnp) or bool(
        part.part_number and line.part_number and part.part_number != line.part_number)
    line_facts = facts.get(id(line))
    if line_facts is None:
        line_facts = facts[id(line)] = _line_facts(line)
    joined = _enriched_properties(part.properties, line, same_value, line_facts)
    return same_value, compare, joined, part.part_number or line.part_number


def _check_quantity(line: BomLine) -> list[BomDiscrepancy]:
    count = len(line.refs)
    if line.quantity is None or line.quantity == count or (line.dnp and line.quantity == 0):
        return []
    return [BomDiscrepancy(
        "quantity", line.refs,
        f"BOM line {line.line} gives quantity {line.quantity} for {count} "
        f"reference{'s' if count != 1 else ''} ({fold_refs(line.refs)})",
        line.location, {"quantity": float(line.quantity), "references": float(count)})]


def _line_facts(line: BomLine) -> dict[str, str]:
    """The properties a BOM line gives each of its parts, in :data:`_BOM_PROPERTIES` order."""
    found = {name: text for name, text in zip(_BOM_PROPERTIES, _READ_LINE(line))
             if text is not None}
    if line.dnp:
        found["dnp"] = "yes"
    return found


def _enrich(part: Part, line: BomLine, same_value: bool,
            facts: Mapping[str, str] | None = None) -> Part:
    """The part with the BOM's facts in its properties (and part number where it had none).

    ``same_value`` says whether the BOM's value agrees with the netlist's (or either is absent);
    ``facts`` is :func:`_line_facts` of ``line`` when the caller has it already.
    """
    properties = _enriched_properties(part.properties, line, same_value,
                                      _line_facts(line) if facts is None else facts)
    return _changed(part, properties, part.part_number or line.part_number)


def _enriched_properties(properties: Mapping[str, str], line: BomLine, same_value: bool,
                         facts: Mapping[str, str]) -> dict[str, str]:
    """A part's properties with the facts of its BOM line (``facts``, :func:`_line_facts`)
    and, where the values disagree, the BOM's value as ``bom_value``.

    The result depends on nothing else, so :func:`apply_bom` makes it once per BOM line,
    agreement and properties mapping (empty ones all alike) and the parts of that line share
    it, as parts of one netlist cell share theirs: 19 distinct mappings instead of 100,000
    (about 21 MiB) on the 100k-part benchmark board.
    """
    joined = {**properties, **facts}
    if not same_value:
        joined["bom_value"] = line.value  # type: ignore[assignment]
    return joined


_READ_LINE = attrgetter(*_BOM_PROPERTIES)


def _changed(part: Part, properties: Mapping[str, str], part_number: str | None) -> Part:
    """``dataclasses.replace(part, properties=…, part_number=…)`` without its per-call
    introspection (the other fields passed on as they are, in field order; the location as
    stored, packed or not)."""
    return Part(part.ref, part.kind, part.value, part.pins, stored_location(part), part.value_si,
                part.path, part.cell, part_number, properties, part.model)


def _compare(part: Part, line: BomLine, same_value: bool) -> list[BomDiscrepancy]:
    problems: list[BomDiscrepancy] = []
    if not same_value and not line.dnp:
        problems.append(_value_discrepancy(part, line))
    from_model = part.model is not None and part.part_number == part.model.name
    if part.part_number and line.part_number and not from_model and \
            part.part_number.casefold() != line.part_number.casefold():
        problems.append(BomDiscrepancy(
            "part-number", (part.ref,),
            f"{part.ref}: BOM part number {line.part_number} (line {line.line}) disagrees with "
            f"the netlist's {part.part_number}; the analysis uses the netlist's",
            line.location))
    return problems


def _netlist_number(part: Part) -> float | None:
    if part.value_si is not None:
        return part.value_si
    return _number(part.value, _UNIT_BY_KIND.get(part.kind))


def _number(text: str | None, unit: str | None) -> float | None:
    return None if text is None else number_or_none(text, unit)


def values_agree(first: float, second: float) -> bool:
    """Equal within :data:`VALUE_MATCH_REL` (relative), or both zero.

    >>> values_agree(4700.0, 4.7e3)
    True
    """
    return math.isclose(first, second, rel_tol=VALUE_MATCH_REL, abs_tol=0.0)


def _value_matches(part: Part, line: BomLine) -> bool:
    assert line.value is not None and part.value is not None
    if part.value_si is None and line.value == part.value:
        return True  # one text read the same way on both sides: no need to read it
    netlist = _netlist_number(part)
    bom = _number(line.value, _UNIT_BY_KIND.get(part.kind))
    if netlist is not None and bom is not None:
        return values_agree(netlist, bom)
    names = {text.casefold() for text in (part.value, part.part_number, line.part_number) if text}
    if line.value.casefold() in names:
        return True
    # A SPICE element's "value" may be its .model name: nothing the BOM's value can match.
    return part.model is not None and part.value.casefold() == part.model.name.casefold()


def _value_discrepancy(part: Part, line: BomLine) -> BomDiscrepancy:
    assert line.value is not None and part.value is not None
    unit = _UNIT_BY_KIND.get(part.kind, "")
    netlist = _netlist_number(part)
    bom = _number(line.value, _UNIT_BY_KIND.get(part.kind))
    values: dict[str, float] = {}
    netlist_text, bom_text = part.value, line.value
    if netlist is not None and bom is not None:
        values = {"netlist_value": netlist, "bom_value": bom}
        netlist_text = f"{part.value} ({format_si(netlist, unit)})"
        bom_text = f"{line.value} ({format_si(bom, unit)})"
    return BomDiscrepancy(
        "value", (part.ref,),
        f"{part.ref}: BOM value {bom_text} (line {line.line}) disagrees with the netlist's "
        f"{netlist_text}; the analysis uses the netlist's value",
        line.location, values)
