"""The keys of the groups of one analysis: :func:`linter.group_key.group_key`'s, coded flat.

:func:`~linter.group_key.group_key` nests a tuple per part and per pin and writes each part
data record and rail as the tuple of its fields, so every key is large and hashing it walks
all of that again. :class:`GroupKeys` reads the same things in the same order, as plain
loops, into one flat tuple per group:

* each part data record and each SPICE model's parameters is a number, handed out by a dict
  of their keys the first time the object is met (remembered by identity, the object kept):
  equal numbers exactly for equal keys;
* a rail net is a negative number (its place in the ``rails`` mapping), an unconnected pin
  -1, a plain net the count of plain nets before its first appearance;
* every variable-length piece comes after its length, so the flat tuple splits one way only.

Two groups of one analysis get equal keys exactly when
:func:`~linter.group_key.group_key_plain` gives them equal keys, and the references come in
the same order (tests/test_key_tables.py compares both on the demo, generated boards, odd
groups and each input changed). Keys of different :class:`GroupKeys` are not comparable.

A part datum or model parameter that cannot be hashed makes :meth:`GroupKeys.key` raise
TypeError (the analysis then builds that group on its own).
"""

from __future__ import annotations

from itertools import count
from typing import Any, Mapping

from linter.group_key import DataKeys
from linter.groups import Group
from linter.model import Circuit
from linter.netbuild import _ADDERS
from linter.partdata import PartDataMap, Rail

__all__ = ["GroupKeys"]

_JOINING = frozenset(("link", "inductor"))


def _names(texts: tuple, index_get: Any) -> tuple:
    """Each text by its reference's number, or as ``("l", text)`` when it is none of the
    group's references (as :func:`~linter.group_key.group_key` names them)."""
    coded = tuple(map(index_get, texts))
    if None in coded:
        return tuple([("l", text) if code is None else code
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
        self._model_codes: dict[int, int] = {}   # id of a SPICE model → its number
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
        """The number of a SPICE model's parameters, by identity."""
        found = self._model_codes.get(id(model))
        if found is None:
            made = tuple(model.params.items())
            found = self._model_codes[id(model)] = self._interned.setdefault(
                ("m", made), len(self._interned))
            self._kept.append(model)
        return found

    def key(self, group: Group) -> tuple[tuple, tuple[str, ...]]:
        """(key, refs) of ``group``: keys equal exactly when
        :func:`~linter.group_key.group_key_plain`'s are; ``refs`` as it gives them.

        The key is one flat tuple, each variable-length piece after its length:
        topology, group rails, the parts (then the string ends outside them) each as
        :meth:`_read` writes it, the drives, the strings, the scenarios, the setter. Written
        as plain loops: for the few parts, pins and strings of one group they cost less than
        the iterators of bulk calls."""
        codes = self._base.copy()
        parts = group.parts
        strings = group.strings
        out: list = [group.topology, group.rails, len(parts)]
        self._read(parts, out, codes)
        index = dict(zip(parts, count()))
        same = len(index) == len(parts)   # (then, unless more are added, refs is ``parts``)
        if not same:   # a reference named twice: numbered where first met
            index = dict(zip(dict.fromkeys(parts), count()))
        extra = ()
        for string in strings:
            if string and (string[0] not in index or string[-1] not in index):
                extra = [ref for ref in dict.fromkeys(
                    [s[i] for s in strings if s for i in (0, -1)]) if ref not in index]
                break
        out.append(len(extra))
        if extra:
            self._read(extra, out, codes)
            for ref in extra:
                index[ref] = len(index)
        pins = group.pins
        pin_ids: dict[str, int] = {}
        ids: list[str] = []
        if pins:
            ids = [drive.id for drive in pins]
            for pin_id in ids:
                pin_ids.setdefault(pin_id, len(pin_ids))
            out.append(self._drives(pins, ids, pin_ids, index, codes))
        else:
            out.append(())
        index_get = index.get
        append = out.append
        append(len(strings))
        for string in strings:
            append(len(string))
            for led in string:
                code = index_get(led)
                append(("l", led) if code is None else code)
        scenarios = group.scenarios
        append(len(scenarios))
        for scenario in scenarios:
            lit = scenario.lit
            if lit is not None:
                lit = _names(lit, index_get)
            levels = scenario.levels
            append((scenario.name, tuple([levels.get(i) for i in ids]), lit))
        setter = group.setter
        if setter in pin_ids:
            append(("p", pin_ids[setter]))
        else:
            code = index_get(setter) if setter is not None else None
            append(("l", setter) if code is None else code)
        return tuple(out), parts if same and len(index) == len(parts) else tuple(index)

    def _read(self, refs: Any, out: list, codes: dict) -> None:
        """Append each part to ``out``: None when the circuit lacks it; else its kind, then,
        for a modelled kind, its value, part number, model and data numbers, number of pins
        and each pin's name and net code; for a link or inductor, its number of pins and
        each pin's net code. New plain nets are numbered in ``codes`` on."""
        parts_get, data_get, data_codes, model_codes = self._getters
        codes_get = codes.get
        base = len(self._base)
        append = out.append
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
                if model is not None:
                    model_code = model_codes(id(model))
                    if model_code is None:
                        model_code = self._model_code(model)
                else:
                    model_code = None
                pins = part.pins
                out += (kind, part.value_si, part.part_number, model_code, data_code,
                        len(pins))
                for pin in pins:
                    net = pin.net
                    code = codes_get(net)
                    if code is None:
                        code = codes[net] = len(codes) - base
                    out += (pin.name, code)
            elif kind in _JOINING:
                pins = part.pins
                out += (kind, len(pins))
                for pin in pins:
                    net = pin.net
                    code = codes_get(net)
                    if code is None:
                        code = codes[net] = len(codes) - base
                    append(code)
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
