"""The keys of all the groups of one analysis, from per-part tables made in one pass.

:func:`linter.group_key.group_key` encodes every part of every group on its own: reading
its fields and pins, numbering its nets, and building a nested tuple that is hashed again
for each group. On a large board the same few part shapes repeat thousands of times.
:class:`GroupKeys` reads every part of the circuit once, with bulk operations, into two
tables:

* the *shape* of each part: a small number standing for exactly what
  :func:`~linter.group_key.group_key` reads about it but its nets: for a modelled kind,
  (kind, value, part number, SPICE model parameters, pin names, part data key); for a link
  or an inductor, (kind, number of pins); any other kind, (kind,); equal numbers for
  equal tuples (numbers are handed out by a dict, so equality is the tuples' own);
* the nets of each part that the key reads (none for a kind that is not modelled or
  joined).

A group's key is then its shapes, its nets numbered by first appearance (one flat tuple;
each shape tells how many nets are its own, so the split is fixed), its drives, scenarios,
strings and setter as :func:`~linter.group_key.group_key` codes them, and its rail nets by
their place in the ``rails`` mapping. Two groups of one analysis get equal keys exactly when
:func:`~linter.group_key.group_key_plain` gives them equal keys (the flat tuple and the
shape numbers are a one-to-one coding of its nested tuples within one analysis), and the
references come in the same order (tests/test_key_tables.py compares both on the demo,
generated boards and odd groups). Keys of different :class:`GroupKeys` are not comparable.

A part datum or model parameter that cannot be hashed makes the constructor raise
TypeError (the caller then keys each group with :func:`~linter.group_key.group_key`).
"""

from __future__ import annotations

from itertools import chain, count
from operator import attrgetter
from typing import Any, Mapping

from linter.group_key import DataKeys
from linter.groups import Group
from linter.model import Circuit
from linter.netbuild import _ADDERS
from linter.partdata import PartDataMap, Rail

__all__ = ["GroupKeys"]

_JOINING = frozenset(("link", "inductor"))
_FIELDS = attrgetter("kind", "value_si", "part_number", "model", "pins")
_PIN_NAME = attrgetter("name")
_PIN_NET = attrgetter("net")


def _names(texts: tuple, index_get: Any) -> tuple:
    """Each text by its reference's number, or as ``("l", text)`` when it is none of the
    group's references (as :func:`~linter.group_key.group_key` names them)."""
    coded = tuple(map(index_get, texts))
    if None in coded:
        return tuple([("l", text) if code is None or text is None else code
                      for text, code in zip(texts, coded)])
    return coded


class GroupKeys:
    """Keys of groups of one circuit, part data and rails mapping (see the module)."""

    def __init__(self, circuit: Circuit, part_data: PartDataMap, rails: Mapping[str, Rail],
                 data_keys: DataKeys | None = None) -> None:
        self._keys = DataKeys() if data_keys is None else data_keys
        self._circuit = circuit
        self._part_data = part_data
        self._interned: dict[Any, int] = {}
        self._data_codes: dict[int, int] = {}    # id of a part datum → its number
        self._model_codes: dict[int, int] = {}   # id of a SPICE model (or None) → its number
        self._kept: list[Any] = []   # those objects (so that their ids are not reused)
        self._getters = (circuit.parts.get, part_data.get, self._data_codes.get,
                         self._model_codes.get)
        self._base: dict[str | None, int] = {None: -1}
        for name, rail in rails.items():
            if rail is not None:
                self._base[name] = -1 - len(self._base)

    def _data_code(self, data: Any) -> int:
        """The number of ``data``'s key (:meth:`DataKeys.key`), by identity."""
        found = self._data_codes.get(id(data))
        if found is None:
            made = self._keys.key(data)
            found = self._data_codes[id(data)] = self._interned.setdefault(
                ("d", made), len(self._interned))
            self._kept.append(data)
        return found

    def _model_code(self, model: Any) -> int:
        """The number of a SPICE model's parameters (None: no model), by identity."""
        found = self._model_codes.get(id(model))
        if found is None:
            made = None if model is None else tuple(model.params.items())
            found = self._model_codes[id(model)] = self._interned.setdefault(
                ("m", made), len(self._interned))
            self._kept.append(model)
        return found

    def key(self, group: Group) -> tuple[tuple, tuple[str, ...]]:
        """(key, refs) of ``group``: keys equal exactly when
        :func:`~linter.group_key.group_key_plain`'s are; ``refs`` as it gives them.

        Written as plain loops: for the few parts, pins and strings of one group they cost
        less than building the iterators of bulk calls."""
        codes = self._base.copy()
        parts = group.parts
        fields: list = []
        nets: list = []
        self._read(parts, fields, nets, codes)
        index = dict(zip(parts, count()))
        if len(index) != len(parts):   # a reference named twice: numbered where first met
            index = dict(zip(dict.fromkeys(parts), count()))
        strings = group.strings
        outside: list = []
        for string in strings:
            if string and (string[0] not in index or string[-1] not in index):
                extra = [ref for ref in dict.fromkeys(
                    [s[i] for s in strings if s for i in (0, -1)]) if ref not in index]
                self._read(extra, outside, nets, codes)
                for ref in extra:
                    index[ref] = len(index)
                break
        pins = group.pins
        drives: tuple = ()
        pin_ids: dict[str, int] = {}
        ids: list[str] = []
        if pins:
            ids = [drive.id for drive in pins]
            for pin_id in ids:
                pin_ids.setdefault(pin_id, len(pin_ids))
            drives = self._drives(pins, ids, pin_ids, index, codes)
        index_get = index.get
        named: list = []
        for string in strings:
            named.append(len(string))
            for led in string:
                code = index_get(led)
                named.append(("l", led) if code is None else code)
        scenarios = []
        for scenario in group.scenarios:
            lit = scenario.lit
            if lit is not None:
                lit = _names(lit, index_get)
            levels = scenario.levels
            scenarios.append((scenario.name, tuple([levels.get(i) for i in ids]), lit))
        setter = group.setter
        if setter in pin_ids:
            setter_key: Any = ("p", pin_ids[setter])
        else:
            setter_key = index_get(setter) if setter is not None else None
            if setter_key is None:
                setter_key = ("l", setter)
        key = (group.topology, setter_key, group.rails, tuple(named), tuple(fields),
               tuple(outside), tuple(nets), drives, tuple(scenarios))
        return key, tuple(index)

    def _read(self, refs: Any, fields: list, nets: list, codes: dict) -> None:
        """Append each part's fields (flat, see the module) to ``fields`` and the codes of
        the nets the key reads to ``nets``, numbering new plain nets in ``codes`` on."""
        parts_get, data_get, data_codes, model_codes = self._getters
        codes_get = codes.get
        base = len(self._base)
        append = fields.append
        add_net = nets.append
        for ref in refs:
            part = parts_get(ref)
            if part is None:
                append(None)
                continue
            kind = part.kind
            if kind in _ADDERS:
                data = data_get(ref)
                data_code = data_codes(id(data))
                if data_code is None:
                    data_code = self._data_code(data)
                model = part.model
                model_code = model_codes(id(model))
                if model_code is None:
                    model_code = self._model_code(model)
                pins = part.pins
                fields += (kind, part.value_si, part.part_number, model_code, data_code,
                           len(pins))
                for pin in pins:
                    append(pin.name)
                    net = pin.net
                    code = codes_get(net)
                    if code is None:
                        code = codes[net] = len(codes) - base
                    add_net(code)
            elif kind in _JOINING:
                pins = part.pins
                fields += (kind, len(pins))
                for pin in pins:
                    net = pin.net
                    code = codes_get(net)
                    if code is None:
                        code = codes[net] = len(codes) - base
                    add_net(code)
            else:
                append(kind)

    def _drives(self, pins: tuple, ids: list[str], pin_ids: dict[str, int],
                index: dict[str, int], codes: dict[str | None, int]) -> tuple:
        """Each driving pin as :func:`~linter.group_key.group_key` codes it (its part's
        number, which pin id, its net, the part's data and supply pins' names and nets);
        new references and nets are numbered on."""
        base = len(self._base)

        def net(name: str | None) -> int:
            code = codes.get(name)
            if code is None:
                code = codes[name] = len(codes) - base
            return code

        parts_get = self._circuit.parts.get
        data_get = self._part_data.get
        made = []
        for drive, pin_id in zip(pins, ids):
            ref = drive.part
            data = data_get(ref)
            part = parts_get(ref)
            supply = None if part is None else tuple(
                [(name, net(pin_net)) for name, pin_net in self._keys.supply_pins(part, data)])
            if ref not in index:
                index[ref] = len(index)
            made.append((index[ref], pin_ids[pin_id], net(drive.net), self._data_code(data),
                         supply))
        return tuple(made)
