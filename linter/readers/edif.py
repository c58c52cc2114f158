"""EDIF 2.0.0 netlists to a :class:`linter.model.Circuit`.

Three steps, one module each: :mod:`linter.readers.sexpr` parses the text (the frequent
forms read whole into records by :mod:`linter.readers.edif_compound`),
:mod:`linter.readers.edif_forms` turns the forms into declaration records, and
:mod:`linter.readers.edif_flatten` walks the hierarchy from the design's top cell and joins
nets through ports. A flat design (the top view places only leaf cells, nothing to merge)
takes a shorter road, :mod:`linter.readers.edif_direct`, to the same Circuit (its parts and
nets made by built-in passes here, :func:`_flat_circuit`); the walk stays the plain twin
(``_circuit(doc, direct=False)``). This module names what was found and builds the Circuit:

* a part's reference is its ``designator`` (or a property named reference, refdes or
  designator), else its leaf instance name, while that is unique in the design; where a
  repeated sheet makes it ambiguous, the instance path (``S2/R7``) names each of the parts;
* a merged net takes the display name of its top-most net (the first declared at that
  depth); where two merged nets would get the same name, each takes its path (``S1/LED_A``);
* part fields come from properties, matched without regard to case, spaces, ``_`` or ``-``:
  VALUE; part number from PARTNUMBER, MPN, PART or "Part Number"; the rest are kept in
  ``Part.properties`` under lower-cased names (description, footprint, package…).
  Instance properties override those of the cell and its view.

A net that joins fewer than two pins (counting the top cell's own ports as connections to
the outside) is refused: it is a drawing error, and an LED on it could not be analysed.
"""

from __future__ import annotations

import math
import re
from collections import Counter
from dataclasses import dataclass
from itertools import accumulate, chain, compress, repeat
from operator import add, attrgetter, floordiv, is_not, itemgetter, mod, mul

from linter.errors import NetlistError
from linter.kinds import infer_kind
from linter.model import (
    Circuit, Net, Part, Pin, SourceLocation, location_packer, new_nets, new_parts, new_pins,
    packed_locations,
)
from linter.readers.edif_compound import EdifCompounds
from linter.readers.edif_direct import FlatPlan, flat_plan
from linter.readers.edif_flatten import FlatDesign, Leaf, NetWire, flatten, pin_names
from linter.readers.edif_syntax import Cell, EdifFile, Instance, View, _child, read_edif_file
from linter.readers.sexpr import Document, parse, paused_gc
from linter.units import ValueParseError, parse_number

__all__ = ["read_edif", "VALUE_KEYS", "PART_NUMBER_KEYS", "REFERENCE_KEYS"]

VALUE_KEYS = ("value",)
"""Normalised property names read as the part's value."""
PART_NUMBER_KEYS = ("partnumber", "mpn", "part")
"""Normalised property names read as the part number (PART_NUMBER and "Part Number" included)."""
REFERENCE_KEYS = ("reference", "refdes", "designator")
"""Normalised property names read as the reference designator."""
_NOT_KEPT = frozenset(VALUE_KEYS + PART_NUMBER_KEYS + REFERENCE_KEYS)
_IGNORED = re.compile(r"[\s_\-]")


def _normal(name: str) -> str:
    """Property name for matching: case-folded, without spaces, underscores or hyphens."""
    found = _NORMAL.get(name)
    if found is None:
        found = _NORMAL[name] = _IGNORED.sub("", name.casefold())
        if len(_NORMAL) > 4096:  # a file of thousands of property names: start over
            _NORMAL.clear()
    return found


_NORMAL: dict[str, str] = {}
"""Normalised property names already computed (a netlist repeats a few names per part)."""


def read_edif(text: str, source: str) -> Circuit:
    """Read an EDIF 2.0.0 level-0 netlist; ``source`` names the file in messages and locations.

    Raises
    ------
    NetlistError
        One line ``FILE:LINE:COLUMN: message`` for any text that cannot be read.
    """
    if not text or text.isspace():
        raise NetlistError(source, 1, 1, "empty file; expected an EDIF netlist")
    with paused_gc():  # the records point into a large tree; see sexpr.paused_gc
        return _read(text, source)


def _read(text: str, source: str) -> Circuit:
    """The circuit, the frequent forms read whole (:mod:`linter.readers.edif_compound`).

    A netlist that cannot be read is read again token by token, and that reading raises the
    error: its message is then the same whichever forms were read whole.
    """
    doc = parse(text, source, EdifCompounds())
    try:
        return _circuit(doc)
    except NetlistError:
        pass
    del doc
    return _circuit(parse(text, source))


def _circuit(doc: Document, direct: bool = True) -> Circuit:
    """The circuit of a parsed netlist: a flat design by the flat road
    (:mod:`linter.readers.edif_direct`) where it applies and ``direct`` is set, else by the
    plain walk (its twin, which reads every design)."""
    edif = read_edif_file(doc)
    if direct:
        plan = flat_plan(edif)
        if plan is not None:
            refs = _flat_refs(plan.instances)
            if refs is not None:
                return _flat_circuit(doc, edif, plan, refs)
    return _walked_circuit(doc, edif)


def _walked_circuit(doc: Document, edif: EdifFile) -> Circuit:
    """The circuit by the hierarchy walk (:mod:`linter.readers.edif_flatten`)."""
    source = doc.source
    flat = flatten(edif)
    refs = _part_refs(flat.leaves, doc)
    net_names, chosen = _net_names(flat, doc)
    ordered = sorted(chosen.items(), key=lambda item: item[1].order)
    design = edif.design.name.display if edif.design is not None else ""
    leaves, flat.leaves = flat.leaves, []
    _release_instances(edif)
    del edif
    places = _locations(doc, [leaf.instance.form for leaf in leaves] +
                        [wire.form for _, wire in ordered])  # one pass
    parts = _parts(leaves, refs, places, flat, net_names, doc)
    nets = _nets(parts, chosen, net_names, flat, doc, ordered, places[len(refs):])
    return Circuit(source=source, format="edif", parts=parts, nets=nets, design=design)


def _flat_refs(instances: list[Instance]) -> list[str] | None:
    """:func:`_part_refs` of a flat design's parts (a leaf's path is its instance name), or
    None where two would be equal (the plain road refuses that, located)."""
    candidates = _candidates_of(instances)
    if len(set(candidates)) == len(candidates):
        return candidates
    counts = Counter(candidates)
    refs = [c if counts[c] == 1 else instance.name.display
            for c, instance in zip(candidates, instances)]
    return refs if len(set(refs)) == len(refs) else None


def _flat_circuit(doc: Document, edif: EdifFile, plan: FlatPlan, refs: list[str]) -> Circuit:
    """The circuit of a flat design from its plan; as the plain road makes it (same parts,
    pins, nets, names, order and places: ``tests/test_edif_direct.py``).

    Pins are made for all parts at once (one object per name and net), and each net's
    (part, pin) pairs come from one sort of the connected pins by net, in part and pin order
    as the plain road lists them; parts, pins and nets are made in bulk
    (:func:`linter.model.new_parts` and its siblings).
    """
    design = edif.design.name.display if edif.design is not None else ""
    instances, names, pin_nets = plan.instances, plan.names, plan.pin_nets
    forms = [*map(_FORM, instances), *map(_FORM, plan.nets)]
    plan.instances = plan.nets = []  # type: ignore[assignment]  # the net records can go
    _release_instances(edif)
    del edif
    places = _locations(doc, forms)
    del forms
    maker = _PartMaker(None, {}, doc)  # type: ignore[arg-type]
    slot_names, pin_counts, pins = _flat_pins(maker, plan.targets, names, pin_nets)
    firsts = plan.firsts
    part_pins = list(map(pins.__getitem__, map(slice, firsts, firsts[1:] + [len(pins)])))
    del pins
    paths = list(map(_DISPLAY, instances))
    parts = maker.make_many(instances, plan.targets, refs, places[:len(refs)], paths, part_pins)
    del paths, instances, part_pins
    nets = _flat_nets(refs, pin_counts, slot_names, pin_nets, names, places[len(refs):],
                      plan.sizes)
    return Circuit(source=doc.source, format="edif", parts=parts, nets=nets, design=design)


_FORM, _DISPLAY, _VIEW = attrgetter("form"), attrgetter("name.display"), attrgetter("view")


def _flat_pins(maker: _PartMaker, targets: list, names: list[str], pin_nets: list[int | None]
               ) -> tuple[list[str], list[int], tuple[Pin, ...]]:
    """Every pin slot's name, each part's pin count, and every slot's Pin (one object per
    name and net, made in bulk; a tuple, so that a part's slice of it is its pin tuple).

    A slot's name and net are coded as one int, ``name number + width x net number``
    (``width``: the distinct pin names; an unconnected slot has net number ``len(names)``),
    so that equal pins are found by ints, without a tuple per slot.
    """
    views = list(map(_VIEW, targets))
    view_ids = list(map(id, views))  # (the views are alive: ids are unique)
    numbers: dict[str, int] = {}
    names_of, codes_of = {}, {}
    for number, view in dict(zip(view_ids, views)).items():
        names_of[number] = view_names = maker.view_pin_names(view)
        codes_of[number] = tuple(numbers.setdefault(name, len(numbers)) for name in view_names)
    del views
    slot_names = list(chain.from_iterable(map(names_of.__getitem__, view_ids)))
    pin_counts = list(map(len, map(names_of.__getitem__, view_ids)))
    width = max(len(numbers), 1)
    unconnected = {None: len(names)}  # .get(net, net): the net's number, or len(names)
    codes = list(map(add, chain.from_iterable(map(codes_of.__getitem__, view_ids)),
                     map(mul, map(unconnected.get, pin_nets, pin_nets), repeat(width))))
    distinct = list(dict.fromkeys(codes))
    pin_names, net_names = list(numbers), [*names, None]
    made = new_pins(list(map(pin_names.__getitem__, map(mod, distinct, repeat(width)))),
                    list(map(net_names.__getitem__, map(floordiv, distinct, repeat(width)))))
    pin_of = dict(zip(distinct, made))
    return slot_names, pin_counts, tuple(map(pin_of.__getitem__, codes))


def _flat_nets(refs: list[str], pin_counts: list[int], slot_names: list[str],
               pin_nets: list[int | None], names: list[str], places: list,
               sizes: Counter) -> dict[str, Net]:
    """Nets by name in declaration order, each with its (part, pin) pairs in part and pin
    order: the connected slots sorted by net (a stable sort keeps slot order within a net),
    ``sizes[n]`` of them on net ``n``."""
    connected = sorted(compress(range(len(pin_nets)), map(is_not, pin_nets, repeat(None))),
                       key=pin_nets.__getitem__)
    slot_refs = list(chain.from_iterable(map(repeat, refs, pin_counts)))
    pairs = tuple(zip(map(slot_refs.__getitem__, connected),
                      map(slot_names.__getitem__, connected)))  # (slices of a tuple are tuples)
    del slot_refs, connected
    bounds = list(accumulate(map(sizes.__getitem__, range(len(names))), initial=0))
    net_pins = list(map(pairs.__getitem__, map(slice, bounds, bounds[1:])))
    return dict(zip(names, new_nets(names, net_pins, places)))


def _parts(leaves: list[Leaf], refs: list[str], places: list[SourceLocation], flat: FlatDesign,
           net_names: dict[int, str], doc: Document) -> dict[str, Part]:
    """Parts by reference; each leaf is let go of once its part is made."""
    make = _PartMaker(flat, net_names, doc).part
    parts = {}
    for index, (ref, place) in enumerate(zip(refs, places)):
        parts[ref] = make(leaves[index], ref, place)
        leaves[index] = None  # type: ignore[call-overload]  # its instance record can go
    return parts


def _release_instances(edif: EdifFile) -> None:
    """Let go of the instance records everywhere but in the leaves, so that each goes as soon
    as its part is made, and of the net records (the placed wires keep what is still needed):
    a 100,000-part design holds tens of MB of them. Positions stay known: a record's form is
    an offset or a list the document keeps in its index."""
    edif.doc.root = None
    for library in edif.libraries.values():
        for cell in library.cells.values():
            for view in cell.views.values():
                if view.instances or view.nets:
                    view.instances, view.nets = {}, []
                    contents = _child(view.form, "contents")
                    if contents is not None:
                        contents.clear()


def _locations(doc: Document, forms: list[list | int]) -> list[SourceLocation]:
    """Where each form starts, found in one sweep through the text; one object a place (a
    sheet placed many times has its forms many times), packed
    (:func:`linter.model.packed_location`: it reads as a SourceLocation). Forms in the order
    written (a flat design's) are placed by built-in passes
    (:meth:`linter.readers.sexpr.Document.ascending_positions`, twin of the sweep)."""
    offsets = doc.offsets_of(forms)
    ascending = doc.ascending_positions(offsets)
    if ascending is not None:  # (the forms of a flat design, in the order written)
        return packed_locations(doc.source, *ascending)
    pack = location_packer(doc.source)
    order = sorted(range(len(offsets)), key=offsets.__getitem__)
    places: list[SourceLocation] = [None] * len(offsets)  # type: ignore[list-item]
    previous, place = -1, None
    for index, (line, column) in zip(order, doc.sweep(offsets[index] for index in order)):
        if offsets[index] != previous:
            previous, place = offsets[index], pack(line, column)
        places[index] = place  # type: ignore[assignment]
    return places


def _property_reference(properties: dict[str, str]) -> str | None:
    """The first non-blank property named like a reference designator, stripped."""
    for name, value in properties.items():
        if _normal(name) in REFERENCE_KEYS and value.strip():
            return value.strip()
    return None


def _candidates(leaves: list[Leaf]) -> list[str]:
    """Each leaf's designator, else its reference property, else its instance name."""
    return _candidates_of([leaf.instance for leaf in leaves])


def _candidates_of(instances: list[Instance]) -> list[str]:
    """Each instance's designator, else its reference property, else its name; the
    properties are looked at once per distinct table (tables are shared between instances).
    Where no instance has a designator or a reference property, the names by one pass."""
    if not any(map(attrgetter("designator"), instances)):
        tables = list(map(attrgetter("properties"), instances))
        distinct = dict(zip(map(id, tables), tables))  # the instances keep the tables alive
        if not any(map(_property_reference, distinct.values())):
            return list(map(attrgetter("name.display"), instances))
    by_table: dict[int, str | None] = {}  # the instances keep the tables alive: ids are unique
    found = []
    for instance in instances:
        ref = instance.designator
        if not ref:
            table = instance.properties
            ref = by_table.get(id(table), "")
            if ref == "":
                ref = by_table[id(table)] = _property_reference(table)
        found.append(ref or instance.name.display)
    return found


def _part_refs(leaves: list[Leaf], doc: Document) -> list[str]:
    """References in leaf order: designator or leaf name where unique, else the instance path."""
    candidates = _candidates(leaves)
    counts = Counter(candidates)
    refs = [c if counts[c] == 1 else "/".join(leaf.names) for c, leaf in zip(candidates, leaves)]
    seen: dict[str, Leaf] = {}
    for ref, leaf in zip(refs, leaves):
        if ref in seen:
            line, column = doc.position_of(seen[ref].instance.form)
            raise doc.error(leaf.instance.form, f"two parts are both named '{ref}' (the other "
                                                f"at {line}:{column})")
        seen[ref] = leaf
    return refs


def _net_names(flat: FlatDesign, doc: Document) -> tuple[dict[int, str], dict[int, NetWire]]:
    """Name of each merged net (by union–find root) and the wire that gave it its name."""
    chosen: dict[int, NetWire] = {}
    for wire in flat.wires:
        root = flat.find(wire.node)
        best = chosen.get(root)
        if best is None or (wire.depth, wire.order) < (best.depth, best.order):
            chosen[root] = wire
    counts = Counter(wire.display for wire in chosen.values())
    names: dict[int, str] = {}
    taken: dict[str, NetWire] = {}
    for root, wire in sorted(chosen.items(), key=lambda item: item[1].order):
        name = wire.display if counts[wire.display] == 1 else wire.full_name
        if name in taken:
            line, column = doc.position_of(taken[name].form)
            raise doc.error(wire.form, f"two nets are both named '{name}' (the other at "
                                           f"{line}:{column})")
        taken[name] = wire
        names[root] = name
    return names, chosen


@dataclass(frozen=True, slots=True)
class _Fields:
    """What a part's properties (cell, view and instance merged) say, besides its kind."""

    value: str | None
    part_number: str | None
    description: str | None
    package: str | None
    properties: dict[str, str]


def _fields(cell: Cell, view: View, instance: Instance) -> _Fields:
    merged = {**cell.properties, **view.properties, **instance.properties}
    normal = [(_normal(name), name, value) for name, value in merged.items()]
    by_key = {key: value for key, _, value in normal}
    part_number = next((by_key[k] for k in PART_NUMBER_KEYS if k in by_key), None)
    properties = {name.lower(): text for key, name, text in normal if key not in _NOT_KEPT}
    package = by_key.get("package") or by_key.get("footprint")
    return _Fields(by_key.get("value"), part_number, by_key.get("description"), package,
                   properties or _NO_PROPERTIES)


_Reading = tuple  # (kind, value, ohms, problem, cell, part number, properties)

_NO_PROPERTIES: dict[str, str] = {}
"""One empty property table for every part without properties (never changed)."""

_DIGITS = "0123456789"


def _stem(ref: str) -> str:
    """What of a reference decides its kind for :func:`linter.kinds.infer_kind`: its last
    path element without the final digits (``S2/LED10`` -> ``LED``)."""
    return ref.rpartition("/")[2].rstrip(_DIGITS)


class _PartMaker:
    """Parts of one design. Parts whose cell, view and instance properties are the same
    objects share their property reading (and its dictionary, never changed); pins with the
    same name and net, and equal values, are one object each. A part's kind and value reading
    are worked out once per property reading and reference stem (the last path element of the
    reference without its final digits: :func:`linter.kinds.infer_kind` reads only the
    letters that start that element, which the stem fixes; ``S2/R7`` and ``S3/R9`` share the
    stem ``R``)."""

    def __init__(self, flat: FlatDesign, net_names: dict[int, str], doc: Document) -> None:
        self.flat, self.net_names, self.doc = flat, net_names, doc
        self.fields: dict[tuple[int, int, int], _Fields] = {}
        self.values: dict[tuple[str, str | None], tuple[float | None, str]] = {}
        self.kinds: dict[tuple[str, tuple[int, int, int]], tuple[str, tuple[float | None, str]]] = {}
        self.pins: dict[tuple[str, str | None], Pin] = {}
        self.names: dict[int, tuple[str, ...]] = {}
        self.kept: list[object] = []  # what the ids above name, kept alive: ids stay unique

    def part(self, leaf: Leaf, ref: str, location: SourceLocation) -> Part:
        instance = leaf.instance
        path = "/".join(leaf.names) if leaf.parents else instance.name.display
        return self.make(instance, leaf.cell, leaf.view, ref, location, path, self.pins_of(leaf))

    def make(self, instance: Instance, cell: Cell, view: View, ref: str,
             location: SourceLocation, path: str, pins: tuple[Pin, ...]) -> Part:
        """The part an instance of ``cell``'s ``view`` places, with its pins made."""
        kind, value, ohms, problem, cell_name, part_number, properties = self.reading(
            instance, cell, view, ref)
        if problem:
            raise self.doc.error(instance.form, f"{ref}: {problem}")
        return Part(ref, kind, value, pins, location, ohms, path, cell_name, part_number,
                    properties)

    def reading(self, instance: Instance, cell: Cell, view: View, ref: str) -> _Reading:
        """What the part's fields are (kind, value, ohms, problem, cell, part number and
        properties), worked out once per property reading and reference stem."""
        key = (id(cell), id(view), id(instance.properties))
        stem = _stem(ref)
        known = self.kinds.get((stem, key))
        if known is None:
            fields = self.fields.get(key)
            if fields is None:
                fields = self.fields[key] = _fields(cell, view, instance)
                self.kept += (cell, view, instance.properties)
            value, cell_name = fields.value, cell.name.display
            kind = infer_kind(ref, value, fields.part_number, fields.description,
                              fields.package, cell_name)
            reading = self.values.get((kind, value))
            if reading is None:
                ohms = _ohms(kind, value)
                reading = self.values[(kind, value)] = (ohms,
                                                        _resistance_problem(kind, value, ohms))
            known = self.kinds[(stem, key)] = (kind, value, *reading, cell_name,
                                               fields.part_number, fields.properties)
        return known

    def make_many(self, instances: list[Instance], targets: list, refs: list[str],
                  places: list[SourceLocation], paths: list[str],
                  pins: list[tuple[Pin, ...]]) -> dict[str, Part]:
        """:meth:`make` of many parts (instance ``i`` placing ``targets[i]``'s cell view) by
        built-in passes: each distinct reading is worked out once, from the first part that
        has it; the first part whose reading is a problem is refused, as :meth:`make` would."""
        stems = map(str.rstrip, refs, repeat(_DIGITS))
        if any(map(str.__contains__, refs, repeat("/"))):  # paths: the last element's stem
            stems = map(_stem, refs)
        keys = zip(stems, map(id, targets),
                   map(id, map(attrgetter("properties"), instances)))
        first: dict[tuple[str, int, int], int] = {}
        firsts = list(map(first.setdefault, keys, range(len(refs))))  # the first with its key
        rows = {at: self.reading(instances[at], targets[at].cell, targets[at].view, refs[at])
                for at in first.values()}
        readings = list(map(rows.__getitem__, firsts))
        del firsts
        if any(map(itemgetter(3), rows.values())):
            at = next(at for at, row in enumerate(readings) if row[3])
            raise self.doc.error(instances[at].form, f"{refs[at]}: {readings[at][3]}")
        columns = [list(map(itemgetter(column), readings)) for column in range(7)]
        kinds, values, ohms, _, cells, part_numbers, properties = columns
        return dict(zip(refs, new_parts(refs, kinds, values, pins, places, ohms, paths, cells,
                                        part_numbers, properties)))

    def view_pin_names(self, view: View) -> tuple[str, ...]:
        """The pin names of a view, in pin-block order (worked out once per view)."""
        names = self.names.get(id(view))
        if names is None:
            names = self.names[id(view)] = tuple(name for _, _, name in pin_names(view))
            self.kept.append(view)
        return names

    def pins_of(self, leaf: Leaf) -> tuple[Pin, ...]:
        names = self.view_pin_names(leaf.view)
        parent, net_names, known = self.flat.parent, self.net_names, self.pins
        pins = []
        for node, name in enumerate(names, leaf.pins):
            while parent[node] != node:  # the root, halving the path on the way
                parent[node] = node = parent[parent[node]]
            net = net_names.get(node)
            pin = known.get((name, net))
            if pin is None:
                pin = known[(name, net)] = Pin(name, net)
            pins.append(pin)
        return tuple(pins)


def _resistance_problem(kind: str, value: str | None, ohms: float | None) -> str:
    """Why a resistor's value cannot be a resistance ('' when it can, or is simply not a number):
    a negative value, or a plain number beyond floating point (``1e400``, ``nan``, ``inf``)."""
    if kind not in ("resistor", "link") or value is None:
        return ""
    if ohms is not None and ohms < 0:
        return f"negative resistance {value!r}; a resistor's value must be 0 Ω or more"
    if ohms and not 1e-6 <= ohms <= 1e12:
        return f"resistance {value!r} lies outside 1 µΩ to 1 TΩ (0 Ω is a link)"
    try:
        number = float(value.strip().removesuffix("Ω").removesuffix("ohm"))
    except ValueError:
        return ""
    return "" if math.isfinite(number) else f"value {value!r} is not a finite resistance"


def _ohms(kind: str, value: str | None) -> float | None:
    if kind not in ("resistor", "link") or value is None:
        return None
    try:
        return parse_number(value, "Ω")
    except ValueParseError:
        return None


def _nets(parts: dict[str, Part], chosen: dict[int, NetWire], names: dict[int, str],
          flat: FlatDesign, doc: Document, ordered: list[tuple[int, NetWire]],
          places: list[SourceLocation]) -> dict[str, Net]:
    """Nets in declaration order (``ordered``: the chosen wires by order, ``places``: where
    each was declared); refuses a net with fewer than two connections."""
    joined: dict[str, list[tuple[str, str]]] = {name: [] for name in names.values()}
    for ref, part in parts.items():
        for pin in part.pins:
            if pin.net is not None:
                joined[pin.net].append((ref, pin.name))
    outside = Counter(names.get(flat.find(node))  # the top cell's own ports are nodes 0, 1...
                      for node in range(len(pin_names(flat.top_view))))
    aliases: dict[int, dict[str, None]] = {}  # insertion-ordered sets: a ground net merges
    for wire in flat.wires:                      # thousands of sheet-local wires
        root = flat.find(wire.node)
        if chosen[root] is not wire:
            aliases.setdefault(root, {})[wire.full_name] = None
    nets: dict[str, Net] = {}
    for (root, wire), place in zip(ordered, places):
        name = names[root]
        pins = joined[name]
        if len(pins) + outside[name] < 2:
            what = f"only one pin ({pins[0][0]}.{pins[0][1]})" if pins else "no pin"
            raise doc.error(wire.form, f"net '{name}' joins {what}; a net must join "
                                           "at least two pins")
        nets[name] = Net(name, tuple(pins), place,
                         tuple(aliases.get(root, ())))
    return nets
