"""What each part is to LED group recognition, and which pins sit on each net.

:class:`CircuitIndex` answers the questions the walks in :mod:`linter.topology_walk` ask
over and over (which pins are on this net, is this part a transistor, which pin is the
anode) from dictionaries filled on first use, so that a walk costs time in proportion to
the parts it visits, never to the size of the board.

Pin names (case-insensitive):

* LED: anode ``A``, ``ANODE``, ``+``; cathode ``K``, ``C``, ``CATHODE``, ``-``. Numbered
  pins (``1``/``2``) are not read: libraries disagree on which number is the anode, so such
  an LED is reported as unrecognised rather than guessed.
* bipolar transistor: ``C``/``B``/``E`` or ``COLLECTOR``/``BASE``/``EMITTER``; a substrate
  pin (``S``, ``SUB``, as SPICE's optional fourth node) is ignored.
* MOSFET: ``D``/``G``/``S`` or ``DRAIN``/``GATE``/``SOURCE``; a bulk pin (``B``, ``BULK``,
  ``SUB``) is ignored (taken as tied to the source, as it is on discrete parts).
* microcontroller supply: the pins named in the part data's ``supply_pins``, else a pin
  called ``VDD``, ``VCC`` or ``VDDIO`` (common practice).

Capacitors are open at DC: their pins are left out of every net.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import compress
from operator import attrgetter, itemgetter
from typing import Any, Callable, Literal, Mapping

from linter.model import Circuit, Part, Pin
from linter.partdata import BjtData, McuData, MosfetData, PartData, Rail
from linter.refs import natural_key, split_key

__all__ = [
    "CircuitIndex",
    "NetSplit",
    "Role",
    "SERIES_KINDS",
    "DC_OPEN_KINDS",
    "LED_ANODE_NAMES",
    "LED_CATHODE_NAMES",
]

Role = Literal["series", "transistor", "mcu", "open", "foreign"]
"""How a walk treats a part: passes through it, stops at it, or ignores it."""

SERIES_KINDS: frozenset[str] = frozenset({"resistor", "link", "led"})
"""Two-terminal kinds a drive path passes through."""

DC_OPEN_KINDS: frozenset[str] = frozenset({"capacitor"})
"""Kinds that carry no current at DC; left out of the nets."""

LED_ANODE_NAMES: frozenset[str] = frozenset({"a", "anode", "+"})
LED_CATHODE_NAMES: frozenset[str] = frozenset({"k", "c", "cathode", "-"})

_BJT_ROLES: dict[str, str] = {"c": "c", "collector": "c", "b": "b", "base": "b",
                              "e": "e", "emitter": "e"}
_FET_ROLES: dict[str, str] = {"d": "c", "drain": "c", "g": "b", "gate": "b",
                              "s": "e", "source": "e"}
_FET_BULK: frozenset[str] = frozenset({"b", "bulk", "sub", "substrate"})
_BJT_SUBSTRATE: frozenset[str] = frozenset({"s", "sub", "substrate"})
_SUPPLY_NAMES: tuple[str, ...] = ("VDD", "VCC", "VDDIO")

Polarity = Literal["npn", "pnp", "nmos", "pmos"]

_ROLE_BY_KIND: dict[str, Role] = {
    **{kind: "open" for kind in DC_OPEN_KINDS},
    "npn": "transistor", "pnp": "transistor", "nmos": "transistor", "pmos": "transistor",
    "mcu": "mcu",
}
"""The role of a part by its kind, for kinds outside :data:`SERIES_KINDS` (others: foreign)."""


@dataclass(frozen=True, slots=True)
class NetSplit:
    """The pins of one net by what a walk does with them.

    ``mcu``: microcontroller pins; ``controls``: transistors whose base or gate is on the
    net; ``rest``: every other (reference, pin) pair; ``foreign``: those of ``rest`` whose
    part no walk passes through (connector, source, IC, plain diode…). A bias net shared by
    thousands of sinks is split once, not once per sink. ``control_set`` is ``controls`` as
    a set, for membership tests (made when the split is; slots, no per-split dict).
    """

    mcu: tuple[tuple[str, str], ...]
    controls: tuple[str, ...]
    rest: tuple[tuple[str, str], ...]
    foreign: tuple[tuple[str, str], ...] = ()
    control_set: frozenset[str] = frozenset()


_NO_CONTROLS: frozenset[str] = frozenset()

_KIND_OF = attrgetter("kind")
_PINS_OF = attrgetter("pins")
_NAME_OF_KEY = itemgetter(1)
_SMALL_NET = 8
"""Nets of up to this many pins are read directly by :meth:`CircuitIndex.mcu_pairs` and
:meth:`CircuitIndex.pins_of` (a larger one through the memos, read once)."""


def role_of(kind: str, pin_count: int) -> Role:
    """How a walk treats a part of ``kind`` with ``pin_count`` pins."""
    if kind in SERIES_KINDS:
        return "series" if pin_count == 2 else "foreign"
    return _ROLE_BY_KIND.get(kind, "foreign")


class _RoleTable(dict):
    """(kind, pin count) → :func:`role_of`, filled on first use (a board has a few dozen
    pairs: the roles of all its parts are then one built-in map)."""

    def __missing__(self, pair: tuple[str, int]) -> Role:
        role = self[pair] = role_of(*pair)
        return role


"""Digit runs (as :mod:`linter.refs` splits designators)."""


class _RailKeys(dict):
    """Rail name → its :func:`~linter.refs.natural_key` (kept); any other name's key made when
    asked (:func:`~linter.refs.split_key`, not kept), so one built-in map keys a set of nets."""

    __slots__ = ()

    def __missing__(self, name: str) -> tuple:
        return split_key(name)


class _Memo(dict):
    """A dict that fills itself: a missing key's value is ``compute(key)``, then kept.

    Its bound ``__getitem__`` answers a known key without a Python-level call, which matters
    for look-ups made hundreds of thousands of times on a large board.
    """

    def __init__(self, compute: Callable[[str], Any]) -> None:
        super().__init__()
        self.compute = compute

    def __missing__(self, key: str) -> Any:
        value = self[key] = self.compute(key)
        return value


class CircuitIndex:
    """Cached look-ups over one Circuit, its rails and its part data (by reference).

    Transistor terminals are named by their bipolar role whatever the device: ``c``
    (collector or drain), ``b`` (base or gate), ``e`` (emitter or source).

    Attributes
    ----------
    kind : callable, ref -> str
        The part's kind, with a transistor of unknown kind resolved by its part data and a
        part whose data is a microcontroller's read as ``mcu`` (cached).
    role : callable, ref -> Role
        How a walk treats the part (cached).
    sort_key : callable, name -> tuple
        :func:`linter.refs.natural_key` of a reference or net name (cached).
    pins_on : callable, net -> tuple of (ref, pin name)
        The pairs on the net, capacitors left out (cached).
    split : callable, net -> NetSplit
        The net's pins split into microcontroller pins, transistor controls, the rest
        (cached).
    mcu_on : callable, net -> tuple of (ref, pin name)
        The microcontroller pins on the net, as ``split(net).mcu`` (cached).
    """

    kind: Callable[[str], str]
    role: Callable[[str], Role]
    sort_key: Callable[[str], tuple]
    pins_on: Callable[[str], tuple[tuple[str, str], ...]]
    split: Callable[[str], NetSplit]
    mcu_on: Callable[[str], tuple[tuple[str, str], ...]]

    def __init__(self, circuit: Circuit, rails: Mapping[str, Rail],
                 part_data: Mapping[str, PartData]) -> None:
        self.circuit = circuit
        self.rails = rails
        self.part_data = part_data
        self._terminals: dict[str, dict[str, Pin] | None] = {}
        self._supplies: dict[str, str | None] = {}
        self._from_parts: dict[str, list[tuple[str, str]]] | None = None
        self._kinds = self._all_kinds()
        self._roles = self._all_roles()
        self.kind = self._kinds.__getitem__
        self.role = self._roles.__getitem__
        self.roles: Mapping[str, Role] = self._roles  # (read-only use: the walks' inner loops)
        self.sort_key = _Memo(natural_key).__getitem__
        self.pins_on = _Memo(self._pins_on).__getitem__
        self.split = _Memo(self._split).__getitem__
        self.mcu_on = _Memo(self._mcu_on).__getitem__
        self.led_rank: dict[str, int] = {}  # LED → its place in natural order (set by topology)
        self._rail_keys = _RailKeys({net: natural_key(net) for net in rails})
        self._rail_tuples: dict[tuple[str, ...], tuple[str, ...]] = {}
        self.walk_tables = (rails, circuit.nets, self._roles, circuit.parts, self.series_pins)
        """What a chain walk reads at each step: rails, nets, roles, parts, series_pins."""

    def natural_sorted(self, names: set[str] | list[str]) -> list[str]:
        """``names`` (no repeats) in natural order, as ``sorted(names, key=natural_key)``.

        The keys end with the name itself, so sorting the keys sorts the names; only the
        rails' keys are kept (a rail is in most groups, any other name in one or two: keeping
        every key would hold tens of MiB on a large board for little gain).
        """
        rail_keys, key = self._rail_keys, natural_key
        return [pair[1] for pair in sorted([rail_keys.get(name) or key(name) for name in names])]

    def sorted_nets_and_rails(self, names: set[str]) -> tuple[tuple[str, ...], tuple[str, ...]]:
        """``(tuple(natural_sorted(names)), rails_among(...))`` in one call, without a Python
        step a name but its key (a rail's kept, another's made by ``split_key``) (the twin:
        those two methods; ``tests/test_topology_calls.py``).
        """
        keys = list(map(self._rail_keys.__getitem__, names))
        keys.sort()
        ordered = tuple(map(_NAME_OF_KEY, keys))
        found = tuple(filter(self.rails.__contains__, ordered))
        return ordered, self._rail_tuples.setdefault(found, found)

    def mcu_pairs(self, net: str) -> tuple[tuple[str, str], ...]:
        """``mcu_on(net)``, a small listed net read directly (not kept: a chain's end is asked
        about once): its microcontroller pins are those of its listed pins (``pins_on`` leaves
        out open and unknown parts only). Twin: :attr:`mcu_on` (``tests/test_topology_calls.py``).
        """
        declared = self.circuit.nets.get(net)
        if declared is None or len(pins := declared.pins) > _SMALL_NET:
            return self.mcu_on(net)
        roles = self._roles
        found = None
        for pair in pins:
            if roles.get(pair[0]) == "mcu":
                if found is None:
                    found = [pair]
                else:
                    found.append(pair)
        return () if found is None else tuple(found)

    def pins_of(self, net: str) -> tuple[tuple[str, str], ...]:
        """``pins_on(net)``, a small listed net of known parts none of them open read directly:
        its own pins (the memo otherwise). Twin: :attr:`pins_on`."""
        declared = self.circuit.nets.get(net)
        if declared is None or len(pins := declared.pins) > _SMALL_NET:
            return self.pins_on(net)
        roles = self._roles
        for pair in pins:
            role = roles.get(pair[0])
            if role is None or role == "open":
                return self.pins_on(net)
        return pins

    def rails_among(self, sorted_nets: list[str]) -> tuple[str, ...]:
        """The rails of ``sorted_nets``, in their order, as one shared tuple per combination
        (a board's groups sit on a few rail pairs: one tuple each, not one per group)."""
        found = tuple([net for net in sorted_nets if net in self.rails])
        return self._rail_tuples.setdefault(found, found)

    def release(self) -> None:
        """Drop every remembered answer.

        The caches refer back to the index (through its bound methods), so without this the
        index and everything it remembered (tens of MiB on a large board) would wait for the
        garbage collector, which topology pauses, instead of going when the groups are made.
        """
        for lookup in (self.sort_key, self.pins_on, self.split, self.mcu_on):
            memo = lookup.__self__  # type: ignore[attr-defined]
            memo.clear()
            memo.compute = None
        self._kinds.clear()
        self._roles.clear()
        self.led_rank = {}
        self._terminals.clear()
        self._supplies.clear()
        self._rail_tuples.clear()
        self._from_parts = None
        self.walk_tables = ()

    # -- parts -------------------------------------------------------------------------
    def part(self, ref: str) -> Part:
        """The part called ``ref``."""
        return self.circuit.parts[ref]

    def _all_kinds(self) -> dict[str, str]:
        """Every part's kind, with part data applied.

        Made by built-in maps over the parts (no Python-level step a part); the part data
        are walked only where their type can change a kind (transistor or microcontroller
        data), picked by :func:`itertools.compress` over the records' types.
        """
        parts = self.circuit.parts
        kinds = dict(zip(parts, map(_KIND_OF, parts.values())))
        records = self.part_data
        types = set(map(type, records.values()))
        telling = {kind for kind in types if issubclass(kind, (BjtData, MosfetData, McuData))}
        if not telling:
            return kinds
        picked = compress(records.items(), map(telling.__contains__, map(type, records.values())))
        for ref, data in picked:
            kind = kinds.get(ref)
            if kind is None:
                continue
            if kind == "transistor" and isinstance(data, (BjtData, MosfetData)):
                kinds[ref] = data.polarity
            elif kind != "mcu" and isinstance(data, McuData):
                kinds[ref] = "mcu"
        return kinds

    def _all_roles(self) -> dict[str, Role]:
        """Every part's role, from its kind and its pin count (:class:`_RoleTable`), by
        built-in maps over the parts."""
        parts = self.circuit.parts
        counts = map(len, map(_PINS_OF, parts.values()))
        return dict(zip(parts, map(_RoleTable().__getitem__, zip(self._kinds.values(), counts))))

    # -- nets --------------------------------------------------------------------------
    def _pins_on(self, net: str) -> tuple[tuple[str, str], ...]:
        declared = self.circuit.nets.get(net)
        raw = declared.pins if declared is not None else self._pins_from_parts(net)
        roles = self._roles  # (a pin of a part the Circuit does not have is left out too)
        for pair in raw:
            if roles.get(pair[0], "open") == "open":
                return tuple([pair for pair in raw if roles.get(pair[0], "open") != "open"])
        return raw  # (the net's own tuple when nothing is left out: no copy)

    def _pins_from_parts(self, net: str) -> tuple[tuple[str, str], ...]:
        """Fallback for a net a pin names but the Circuit does not list (built once)."""
        if self._from_parts is None:
            table: dict[str, list[tuple[str, str]]] = {}
            for ref, part in self.circuit.parts.items():
                for pin in part.pins:
                    if pin.net is not None:
                        table.setdefault(pin.net, []).append((ref, pin.name))
            self._from_parts = table
        return tuple(self._from_parts.get(net, ()))

    def _split(self, net: str) -> NetSplit:
        mcu, controls, rest, foreign = [], [], [], []
        roles = self._roles
        for pair in self.pins_on(net):
            role = roles[pair[0]]
            if role == "series":
                rest.append(pair)
            elif role == "mcu":
                mcu.append(pair)
            elif role == "transistor" and self._is_control(*pair):
                controls.append(pair[0])
            else:
                rest.append(pair)
                if role == "foreign":
                    foreign.append(pair)
        pins = self.pins_on(net)
        return NetSplit(tuple(mcu), tuple(controls),
                        pins if len(rest) == len(pins) else tuple(rest), tuple(foreign),
                        frozenset(controls) if controls else _NO_CONTROLS)

    def _mcu_on(self, net: str) -> tuple[tuple[str, str], ...]:
        """``split(net).mcu`` without the rest of the split (a walk that only asks whether a
        net is a pin's makes no NetSplit)."""
        roles = self._roles
        return tuple([pair for pair in self.pins_on(net) if roles[pair[0]] == "mcu"])

    def _is_control(self, ref: str, pin_name: str) -> bool:
        terminals = self.transistor_pins(ref)
        return terminals is not None and terminals["b"].name == pin_name

    def rail(self, net: str | None) -> Rail | None:
        """The rail on ``net``, or None."""
        return None if net is None else self.rails.get(net)

    def series_pins(self, net: str) -> tuple[tuple[str, str], tuple[str, str]] | None:
        """The two (ref, pin) pairs of a series node (see :meth:`is_series_node`), else None.

        Not cached: a chain walk asks about each series node once, and the common node (a
        net the Circuit lists with exactly two pins) is answered from the net itself.
        """
        if net in self.rails:
            return None
        declared = self.circuit.nets.get(net)
        if declared is not None and len(declared.pins) == 2:
            (ref_a, _), (ref_b, _) = pins = declared.pins
            roles = self._roles
            if roles.get(ref_a) == "series" and roles.get(ref_b) == "series":
                return pins  # type: ignore[return-value]  # (what pins_on would give)
        pins = self.pins_on(net)
        if len(pins) != 2:
            return None
        roles = self._roles
        if roles[pins[0][0]] == "series" and roles[pins[1][0]] == "series":
            return pins  # type: ignore[return-value]
        return None

    def is_series_node(self, net: str) -> bool:
        """True for a net that only joins two pins of two two-terminal parts."""
        if net in self.rails:
            return False
        pins = self.pins_on(net)
        if len(pins) != 2:
            return False
        role = self.role
        return role(pins[0][0]) == "series" and role(pins[1][0]) == "series"

    # -- pins --------------------------------------------------------------------------
    def other_pin(self, ref: str, pin_name: str) -> Pin:
        """The pin of two-terminal part ``ref`` that is not ``pin_name``."""
        first, second = self.circuit.parts[ref].pins
        return second if first.name == pin_name else first

    def led_pins(self, ref: str) -> tuple[Pin, Pin] | None:
        """(anode, cathode) of an LED, or None when its pin names do not say (not cached: an
        LED is asked about once, when its group is labelled)."""
        pins = self.circuit.parts[ref].pins
        if len(pins) != 2:
            return None
        first, second = pins
        one, other = first.name.casefold(), second.name.casefold()
        if one in LED_ANODE_NAMES and other in LED_CATHODE_NAMES:
            return pins  # (the part's own pair, already anode first: no new tuple)
        if other in LED_ANODE_NAMES and one in LED_CATHODE_NAMES:
            return second, first
        return None  # (the two name sets share no name)

    def transistor_pins(self, ref: str) -> dict[str, Pin] | None:
        """``{"c": …, "b": …, "e": …}`` (drain, gate, source for a MOSFET), or None (cached)."""
        if ref not in self._terminals:
            self._terminals[ref] = self._transistor_pins(ref)
        return self._terminals[ref]

    def _transistor_pins(self, ref: str) -> dict[str, Pin] | None:
        kind = self.kind(ref)
        names = _BJT_ROLES if kind in ("npn", "pnp") else _FET_ROLES
        found: dict[str, Pin] = {}
        for pin in self.circuit.parts[ref].pins:
            key = pin.name.casefold()
            ignored = _FET_BULK if kind in ("nmos", "pmos") else _BJT_SUBSTRATE
            if key in ignored:
                continue
            role = names.get(key)
            if role is None or role in found:
                return None
            found[role] = pin
        return found if len(found) == 3 else None

    def polarity(self, ref: str) -> Polarity | None:
        """``npn``, ``pnp``, ``nmos`` or ``pmos``; None for a transistor of unknown polarity."""
        kind = self.kind(ref)
        return kind if kind in ("npn", "pnp", "nmos", "pmos") else None  # type: ignore[return-value]

    def supply_net(self, ref: str) -> str | None:
        """The net of a microcontroller's supply pin, when its data or a VDD/VCC name says
        (cached: a microcontroller drives many groups)."""
        if ref not in self._supplies:
            self._supplies[ref] = self._supply_net(ref)
        return self._supplies[ref]

    def _supply_net(self, ref: str) -> str | None:
        data = self.part_data.get(ref)
        wanted = data.supply_pins if isinstance(data, McuData) and data.supply_pins \
            else _SUPPLY_NAMES
        part = self.circuit.parts[ref]
        for name in wanted:
            pin = part.pin(name)
            if pin is not None and pin.net is not None:
                return pin.net
        return None
