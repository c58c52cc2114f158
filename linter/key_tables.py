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
* every variable-length piece comes after its length (or is a tuple of its own), so the
  flat tuple splits one way only;
* a driving microcontroller's data number and supply pins are read once per reference; when
  every supply pin is on a rail or unconnected, the coded pins are kept as they are the same
  in every group, else their nets are numbered in each group (tests/test_key_tables_supply.py).

Two groups of one analysis get equal keys exactly when
:func:`~linter.group_key.group_key_plain` gives them equal keys, and the references come in
the same order (tests/test_key_tables.py compares both on the demo, generated boards, odd
groups and each input changed). Keys of different :class:`GroupKeys` are not comparable.

A part datum or model parameter that cannot be hashed makes :meth:`GroupKeys.key` raise
TypeError (the analysis then builds that group on its own).
"""

from __future__ import annotations

from itertools import count
from operator import attrgetter
from typing import Any, Mapping

from linter.group_key import DataKeys
from linter.groups import Group
from linter.model import Circuit
from linter.netbuild import _ADDERS
from linter.partdata import PartDataMap, Rail

__all__ = ["GroupKeys"]

_JOINING = frozenset(("link", "inductor"))
_ID = attrgetter("id")


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
        self._supplies: dict[str, tuple[int, Any, bool]] = {}   # see _supply
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

        The key is one flat tuple: topology, group rails, the number of parts, the parts
        (then the string ends outside them) each as :meth:`_read` writes it, the number of
        those ends, the drives, the strings' names, then per scenario its name, pin levels
        and LEDs lit, and last the setter. Written as plain loops: for the few parts, pins
        and strings of one group they cost less than the iterators of bulk calls; a tuple
        of names that is the very object of a string already coded is not coded again."""
        codes = self._base.copy()
        parts = group.parts
        out: list = [group.topology, group.rails, len(parts)]
        self._read(parts, out, codes)
        index = dict(zip(parts, count()))
        same = len(index) == len(parts)   # (then, unless more are added, refs is ``parts``)
        if not same:   # a reference named twice: numbered where first met
            index = dict(zip(dict.fromkeys(parts), count()))
        index_get = index.get
        strings = group.strings
        named = [tuple(map(index_get, string)) for string in strings]
        whole = True   # every string names only the group's parts
        for coded in named:
            if None in coded:
                whole = False
                break
        extra = ()
        if not whole:
            extra = [ref for ref in dict.fromkeys(
                [s[i] for s in strings if s for i in (0, -1)]) if ref not in index]
        out.append(len(extra))
        if extra:
            self._read(extra, out, codes)
            for ref in extra:
                index[ref] = len(index)
        pins = group.pins
        pin_ids: dict[str, int] = {}
        ids: list[str] = []
        if pins:
            ids = list(map(_ID, pins))
            for pin_id in ids:
                pin_ids.setdefault(pin_id, len(pin_ids))
            out.append(self._drives(pins, ids, pin_ids, index, codes))
        else:
            out.append(())
        if not whole:   # strings named again: string ends and drives are numbered now
            named = [_names(string, index_get) for string in strings]
        out.append(tuple(named))
        first = strings[0] if strings else None
        append = out.append
        for scenario in group.scenarios:
            lit = scenario.lit
            if lit is not None:
                lit = named[0] if lit is first else _names(lit, index_get)
            append((scenario.name, tuple(map(scenario.levels.get, ids)) if ids else (), lit))
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
        each pin's net code. New plain nets are numbered in ``codes`` on (the next number
        is ``len(codes) - base``; a two-pin part is written as one tuple, its pins coded
        left to right)."""
        parts_get, data_get, data_codes, model_codes = self._getters
        setdefault = codes.setdefault
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
                if len(pins) == 2:
                    one, two = pins
                    out += (kind, part.value_si, part.part_number, model_code, data_code, 2,
                            one.name, setdefault(one.net, len(codes) - base),
                            two.name, setdefault(two.net, len(codes) - base))
                else:
                    out += (kind, part.value_si, part.part_number, model_code, data_code,
                            len(pins))
                    for pin in pins:
                        out += (pin.name, setdefault(pin.net, len(codes) - base))
            elif kind in _JOINING:
                pins = part.pins
                out += (kind, len(pins))
                for pin in pins:
                    append(setdefault(pin.net, len(codes) - base))
            else:
                append(kind)

    def _drives(self, pins: tuple, ids: list[str], pin_ids: dict[str, int],
                index: dict[str, int], codes: dict[str | None, int]) -> tuple:
        """Each driving pin as :func:`~linter.group_key.group_key` codes it (its part's
        number, which pin id, its net, the part's data and supply pins' names and nets);
        new references and nets are numbered on."""
        base = len(self._base)
        setdefault = codes.setdefault
        supplies = self._supplies
        made = []
        for drive, pin_id in zip(pins, ids):
            ref = drive.part
            found = supplies.get(ref)
            if found is None:
                found = self._supply(ref)
            data_code, supply, fixed = found
            if not fixed:   # a supply pin on a plain net: numbered in this group
                supply = tuple([(name, setdefault(net, len(codes) - base))
                                for name, net in supply])
            if ref not in index:
                index[ref] = len(index)
            made.append((index[ref], pin_ids[pin_id], setdefault(drive.net, len(codes) - base),
                         data_code, supply))
        return tuple(made)

    def _supply(self, ref: str) -> tuple[int, Any, bool]:
        """(data number, supply pins, whether their nets are all rails or unconnected) of
        driving part ``ref``: the supply pins as (name, net code) pairs when they are (the
        same in every group), else as (name, net) pairs; None when the circuit lacks the
        part. Remembered per reference."""
        data = self._part_data.get(ref)
        part = self._circuit.parts.get(ref)
        data_code = self._data_code(data)
        if part is None:
            found = (data_code, None, True)
        else:
            pairs = self._keys.supply_pins(part, data)
            fixed = self._base
            if all(net in fixed for _, net in pairs):
                found = (data_code, tuple([(name, fixed[net]) for name, net in pairs]), True)
            else:
                found = (data_code, pairs, False)
        self._supplies[ref] = found
        return found
