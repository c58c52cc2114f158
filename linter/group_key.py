"""The electrical key of an LED group, so that groups built and solved alike are done once.

:func:`group_key` lists everything :func:`linter.netbuild.build_model` and the reduction read
about a group, with its part references and its plain net names replaced by their order of
first appearance (rail nets stay as they are, with their :class:`~linter.partdata.Rail`'s
fields as a tuple, which hashes without calling Python code).
Two groups with equal keys build isomorphic models: the same network, figures, axes and
scenarios, differing only in those names; their results differ only in the names, which
:mod:`linter.result_rename` puts back.

What the key holds (each a read of :mod:`linter.netbuild`, in its order):

* the group: topology, setter, its rails, the LED strings, its pins (part, which pin id,
  net) and, per scenario, its name, the level of each of the group's pins and the LEDs lit;
* per part of the group (and any string end outside it): whether the circuit has it, its
  kind; for kinds that are modelled, its value, part number, SPICE model parameters, pins
  (name and net, in order) and part data (every field but ``note``, a text naming the part
  that the model never reads); for links and inductors, their pins' nets;
* per driving microcontroller: its part data and its supply pins' names and nets.

The ambient range is the same for the whole analysis and is not in the key.
"""

from __future__ import annotations

from dataclasses import fields
from typing import Any, Mapping

from linter.groups import Group
from linter.model import Circuit, Part
from linter.netbuild import _ADDERS, supply_pin_names
from linter.partdata import McuData, PartDataMap, Rail

__all__ = ["DataKeys", "group_key", "group_key_plain"]

_JOINING = ("link", "inductor")
"""Kinds whose pins' nets are merged into one node."""

_DATA_FIELDS: dict[type, tuple[str, ...]] = {}


class _Encoder:
    """Numbers references and plain nets by first appearance."""

    def __init__(self, rails: Mapping[str, Rail], data_keys: "DataKeys") -> None:
        self.rails = rails
        self.data = data_keys.key
        self.refs: dict[str, int] = {}
        self.nets: dict[str, int] = {}

    def ref(self, name: str) -> int:
        found = self.refs.get(name)
        if found is None:
            found = self.refs[name] = len(self.refs)
        return found

    def name(self, name: str | None) -> Any:
        """A reference of the group by its number; any other text as it is."""
        found = self.refs.get(name) if name is not None else None
        return ("l", name) if found is None else found

    def net(self, net: str | None) -> Any:
        if net is None:
            return None
        rail = self.rails.get(net)
        if rail is not None:
            return ("r", net, self.data(rail))
        found = self.nets.get(net)
        if found is None:
            found = self.nets[net] = len(self.nets)
        return found


class DataKeys:
    """:func:`_data_key` of each part data record met in one analysis, remembered by
    identity; each record is kept (so that its id is not reused while this lives) and equal
    keys are stored once."""

    def __init__(self) -> None:
        self.by_id: dict[int, Any] = {}
        self.kept: list[Any] = []
        self.interned: dict[Any, Any] = {}
        self.supplies: dict[tuple[int, int], tuple[Any, tuple[tuple[str, str | None], ...]]] = {}
        self._rails: Mapping[str, Rail] | None = None
        self._rail_codes: dict[str | None, Any] = {}

    def supply_pins(self, part: Part, data: Any) -> tuple[tuple[str, str | None], ...]:
        """(name, net) of the pins of microcontroller ``part`` that ``data`` (its part data,
        or None) names as supply pins, in pin order; remembered by the identity of both
        (each kept)."""
        key = (id(part), id(data))
        found = self.supplies.get(key)
        if found is None:
            mcu = data if isinstance(data, McuData) else McuData()
            names = supply_pin_names(mcu)
            found = self.supplies[key] = ((part, data), tuple(
                (p.name, p.net) for p in part.pins if p.name.casefold() in names))
        return found[1]

    def key(self, data: Any) -> Any:
        found = self.by_id.get(id(data), _MISSING)
        if found is _MISSING:
            made = _data_key(data)
            try:
                made = self.interned.setdefault(made, made)
            except TypeError:   # an unhashable figure: the group key will not be hashed
                pass
            found = self.by_id[id(data)] = made
            self.kept.append(data)
        return found

    def rail_codes(self, rails: Mapping[str, Rail]) -> dict[str | None, Any]:
        """A new dict coding None as None and each rail net ``name`` as ``("r", name,
        key(rail))``; the first one made for a ``rails`` mapping is kept (by identity,
        with the mapping) and copied for the next calls."""
        if self._rails is not rails:
            self._rails = rails
            self._rail_codes = {None: None, **{
                name: ("r", name, self.key(rail)) for name, rail in rails.items()
                if rail is not None}}
        return dict(self._rail_codes)


_MISSING = object()


def _data_key(data: Any) -> Any:
    """A part data record as a tuple of its fields but ``note``."""
    if data is None:
        return None
    kind = type(data)
    names = _DATA_FIELDS.get(kind)
    if names is None:
        names = _DATA_FIELDS[kind] = tuple(f.name for f in fields(data) if f.name != "note")
    return (kind.__name__,) + tuple(getattr(data, n) for n in names)


def _part_key(enc: _Encoder, part: Part | None, data: Any) -> tuple:
    if part is None:
        return ("missing",)
    if part.kind in _JOINING:
        return (part.kind, tuple(enc.net(p.net) for p in part.pins))
    if part.kind not in _ADDERS:
        return (part.kind,)
    model = part.model
    return (part.kind, part.value_si, part.part_number,
            tuple(model.params.items()) if model is not None else None,
            tuple((p.name, enc.net(p.net)) for p in part.pins), enc.data(data))


def _drive_key(enc: _Encoder, circuit: Circuit, part_data: PartDataMap, drive,
               pin: int) -> tuple:
    """A driving pin: its part, which of the group's pin ids it is (names are the group's
    own: only whether two drives name the same pin counts), its net, the part's data and
    supply pins."""
    data = part_data.get(drive.part)
    mcu = data if isinstance(data, McuData) else McuData()
    part = circuit.parts.get(drive.part)
    names = supply_pin_names(mcu)
    supply = None if part is None else tuple(
        (p.name, enc.net(p.net)) for p in part.pins if p.name.casefold() in names)
    return (enc.ref(drive.part), pin, enc.net(drive.net), enc.data(data), supply)


def group_key_plain(group: Group, circuit: Circuit, part_data: PartDataMap,
                    rails: Mapping[str, Rail], data_keys: DataKeys | None = None
                    ) -> tuple[tuple, tuple[str, ...]]:
    """:func:`group_key` written step by step, one encoder call per name (the plain twin
    the tests hold :func:`group_key` to)."""
    enc = _Encoder(rails, DataKeys() if data_keys is None else data_keys)
    parts = circuit.parts
    for ref in group.parts:
        enc.ref(ref)
    inside = [_part_key(enc, parts.get(ref), part_data.get(ref)) for ref in group.parts]
    outside = tuple(_part_key(enc, parts.get(ref), part_data.get(ref))
                    for ref in dict.fromkeys(s[i] for s in group.strings if s for i in (0, -1))
                    if ref not in enc.refs and enc.ref(ref) >= 0)
    pin_ids: dict[str, int] = {}
    for drive in group.pins:
        pin_ids.setdefault(drive.id, len(pin_ids))
    drives = tuple(_drive_key(enc, circuit, part_data, d, pin_ids[d.id]) for d in group.pins)
    scenarios = tuple(
        (s.name, tuple(s.levels.get(d.id) for d in group.pins),
         None if s.lit is None else tuple(enc.name(x) for x in s.lit))
        for s in group.scenarios)
    setter = group.setter
    setter_key = ("p", pin_ids[setter]) if setter in pin_ids else enc.name(setter)
    key = (group.topology, setter_key, group.rails,
           tuple(tuple(enc.name(x) for x in s) for s in group.strings),
           tuple(inside), outside, drives, scenarios)
    return key, tuple(enc.refs)


_MISSING_PART = ("missing",)


def group_key(group: Group, circuit: Circuit, part_data: PartDataMap,
              rails: Mapping[str, Rail], data_keys: DataKeys | None = None
              ) -> tuple[tuple, tuple[str, ...]]:
    """(key, refs): equal keys build models equal but for the names (see the module);
    ``refs`` the group's part references in their order in the key.

    ``data_keys``, kept across the calls of one analysis, reads each part data record
    and each rail once and finds each microcontroller's supply pins once; a group's net
    codes start from a copy of the rail nets' codes, plain nets numbered after them. The
    same key as :func:`group_key_plain` (tests/test_analysis_memo.py compares them on the
    demo and on generated boards), with the encoder's steps written in line."""
    keys = DataKeys() if data_keys is None else data_keys
    data_key = keys.key
    known_data = keys.by_id.get
    parts_get = circuit.parts.get
    data_get = part_data.get
    refs = {ref: index for index, ref in enumerate(dict.fromkeys(group.parts))}
    codes = keys.rail_codes(rails)   # None and every rail net coded; plain nets numbered
    base = len(codes)

    def part_key(ref: str) -> tuple:
        part = parts_get(ref)
        if part is None:
            return _MISSING_PART
        kind = part.kind
        joining = kind in _JOINING
        if not joining and kind not in _ADDERS:
            return (kind,)
        pins = []
        for pin in part.pins:
            name = pin.net
            code = codes.get(name, _MISSING)
            if code is _MISSING:
                code = codes[name] = len(codes) - base
            pins.append((pin.name, code))
        if joining:
            return (kind, tuple([code for _, code in pins]))
        model = part.model
        data = data_get(ref)
        code = known_data(id(data), _MISSING)
        return (kind, part.value_si, part.part_number,
                tuple(model.params.items()) if model is not None else None,
                tuple(pins), data_key(data) if code is _MISSING else code)

    def net(name: str | None) -> Any:
        code = codes.get(name, _MISSING)
        if code is _MISSING:
            code = codes[name] = len(codes) - base
        return code

    inside = [part_key(ref) for ref in group.parts]
    outside = []
    for ref in dict.fromkeys(s[i] for s in group.strings if s for i in (0, -1)):
        if ref not in refs:
            refs[ref] = len(refs)
            outside.append(part_key(ref))
    pin_ids: dict[str, int] = {}
    pins = group.pins
    for drive in pins:
        pin_ids.setdefault(drive.id, len(pin_ids))
    drives = []
    for drive in pins:
        ref = drive.part
        data = data_get(ref)
        part = parts_get(ref)
        supply = None if part is None else tuple(
            [(name, net(pin_net)) for name, pin_net in keys.supply_pins(part, data)])
        if ref not in refs:
            refs[ref] = len(refs)
        drives.append((refs[ref], pin_ids[drive.id], net(drive.net), data_key(data), supply))
    refs_get = refs.get

    def name(text: str | None) -> Any:
        found = refs_get(text) if text is not None else None
        return ("l", text) if found is None else found

    scenarios = tuple(
        (s.name, tuple([s.levels.get(d.id) for d in pins]),
         None if s.lit is None else tuple([name(x) for x in s.lit]))
        for s in group.scenarios)
    setter = group.setter
    setter_key = ("p", pin_ids[setter]) if setter in pin_ids else name(setter)
    key = (group.topology, setter_key, group.rails,
           tuple([tuple([name(x) for x in s]) for s in group.strings]),
           tuple(inside), tuple(outside), tuple(drives), scenarios)
    return key, tuple(refs)
