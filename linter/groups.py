"""LED groups: the contract between recognition (:mod:`linter.topology`) and the solver.

A group is the small DC network that sets the current of one or more LEDs: the LEDs, the
series and shunt parts around them, the transistor or pin that drives them, and the rails
at its edge. Topology finds groups in a Circuit; the analysis builds one network per group
and solves it at every corner; rules read the solved groups.

A large board has tens of thousands of groups, so :class:`Group`, :class:`Scenario` and
:class:`PinDrive` keep their fields in slots (no dictionary per record) and their
``__init__`` is written out, storing each field through the class's slot descriptor (as
:mod:`linter.model` does for its records): about twice as fast as the generated one. Fields,
defaults, equality, hashing, repr, immutability, pickling and :func:`dataclasses.replace`
are the dataclass's own (``tests/test_topology_records.py``).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Callable, Literal, Mapping

__all__ = ["TOPOLOGIES", "Topology", "PinDrive", "Scenario", "Group", "NO_LEVELS"]

Topology = Literal[
    "resistor",          # one LED and its own resistor from a rail
    "string",            # LEDs in series on one resistor
    "parallel",          # LEDs or strings in parallel sharing one resistor (or one sink)
    "npn-sink",          # NPN current sink below the LEDs, emitter resistor, base reference
    "pnp-source",        # its mirror image above the LEDs
    "low-side-switch",   # N-MOSFET or saturated NPN below the LEDs, a resistor sets the current
    "high-side-switch",  # P-MOSFET or saturated PNP above the LEDs
    "pin-source",        # LED fed from a microcontroller pin driven high
    "pin-sink",          # LED pulled down by a microcontroller pin driven low
    "pin-bicolour",      # two anti-parallel LEDs between two pins
    "reversed",          # LED placed with its anode on the lower rail
    "across-rails",      # LED directly between two rails, nothing limits the current
    "unrecognised",      # anything else: named, with the reason, never dropped
]
"""How a group's current is set."""

TOPOLOGIES: tuple[str, ...] = Topology.__args__  # type: ignore[attr-defined]

_TOPOLOGY_SET: frozenset[str] = frozenset(TOPOLOGIES)


class _NewDict:
    """Default of a field whose default is a new empty dict (dataclasses' own ``<factory>``)."""

    __slots__ = ()

    def __repr__(self) -> str:
        return "<factory>"


_NEW_DICT: Any = _NewDict()


def _slot_setters(cls: type, *names: str) -> tuple[Callable[[Any, Any], None], ...]:
    """The ``__set__`` of each named slot of ``cls``: stores a field even on a frozen instance."""
    return tuple(cls.__dict__[name].__set__ for name in names)


@dataclass(frozen=True, slots=True, init=False)
class PinDrive:
    """A microcontroller output pin inside a group: ``part`` ``pin`` on ``net``.

    ``supply`` is the net of the part's supply pin (the level a pin driven high reaches),
    when topology could tell which pin that is; None when unknown.
    """

    part: str
    pin: str
    net: str
    supply: str | None = None

    def __init__(self, part: str, pin: str, net: str, supply: str | None = None) -> None:
        _set_pin_part(self, part)
        _set_pin_pin(self, pin)
        _set_pin_net(self, net)
        _set_pin_supply(self, supply)

    @property
    def id(self) -> str:
        """``U1.PA4``: how pins are named in reports."""
        return f"{self.part}.{self.pin}"


_set_pin_part, _set_pin_pin, _set_pin_net, _set_pin_supply = _slot_setters(
    PinDrive, "part", "pin", "net", "supply")


@dataclass(frozen=True, slots=True, init=False)
class Scenario:
    """One state of the pins that drive a group, and the LEDs meant to be lit in it.

    ``levels`` maps a pin id (``U1.PA4``) to ``"high"`` or ``"low"``. ``lit`` names the LEDs
    meant to be on; None (the default) means every LED of the group, and an empty tuple means
    none (a reversed LED is never meant to light).
    """

    name: str
    levels: Mapping[str, Literal["high", "low"]] = field(default_factory=dict, hash=False)
    lit: tuple[str, ...] | None = None

    def __init__(self, name: str, levels: Mapping[str, Literal["high", "low"]] = _NEW_DICT,
                 lit: tuple[str, ...] | None = None) -> None:
        _set_scenario_name(self, name)
        _set_scenario_levels(self, {} if levels is _NEW_DICT else levels)
        _set_scenario_lit(self, lit)


class _NoLevels(dict):
    """An empty ``levels`` that refuses to be filled: one shared by every scenario without pin
    levels (a board has tens of thousands of them; a dict each was 64 bytes). It is a dict
    (equal to ``{}``, printed, pickled and written to JSON as one), so nothing reading
    levels sees a difference; any change raises TypeError."""

    __slots__ = ()

    def _refuse(self, *args: object, **kwargs: object) -> None:
        raise TypeError("NO_LEVELS is shared and cannot change")

    __setitem__ = __delitem__ = __ior__ = _refuse  # type: ignore[assignment]
    clear = pop = popitem = setdefault = update = _refuse  # type: ignore[assignment]

    def __reduce__(self) -> tuple:
        return (dict, ())  # (a copy or a pickle is a plain empty dict)


NO_LEVELS: Mapping[str, Literal["high", "low"]] = _NoLevels()
"""The shared empty ``levels`` of :class:`Scenario` (see :class:`_NoLevels`)."""

_set_scenario_name, _set_scenario_levels, _set_scenario_lit = _slot_setters(
    Scenario, "name", "levels", "lit")
_ON: tuple[Scenario, ...] = (Scenario("on"),)
"""The default scenarios of a Group (one tuple, as the generated ``__init__`` shares it)."""


@dataclass(frozen=True, slots=True, init=False)
class Group:
    """One LED group.

    Attributes
    ----------
    id : str
        Stable, from the first LED's reference: ``"G-D7"``.
    topology : Topology
    leds : tuple of str
        Every LED in the group, netlist order.
    strings : tuple of tuple of str
        The LEDs by series string, each from anode end to cathode end; a lone LED is a
        string of one. Parallel strings share the same setter.
    parts : tuple of str
        Every part of the network (LEDs, resistors, links, transistors, the pin's part).
    nets : tuple of str
        Every net of the network, rails included.
    rails : tuple of str
        The nets at its edge whose voltage is known (ground included).
    setter : str or None
        The part that sets the current (resistor, transistor, or the pin id ``U1.PA4``).
    pins : tuple of PinDrive
        Microcontroller pins in the network (modelled as supply behind output resistance).
    scenarios : tuple of Scenario
        Pin states to solve; at least one.
    reason : str or None
        For ``unrecognised`` groups (and odd ones): why, in words.
    transistor : str or None
        The transistor in the drive path (the sink, source or switch), also when the label
        names something else (a ``parallel`` bank behind a low-side switch).
    drive : str or None
        How that transistor's base or gate is driven: ``"divider"`` (resistors between
        rails), ``"pin"`` (a microcontroller pin, through a resistor or not), ``"reference"``
        (diodes with a bias resistor) or ``"rail"`` (tied to one rail, directly or through a
        resistor); None without a transistor.
    """

    id: str
    topology: str
    leds: tuple[str, ...]
    strings: tuple[tuple[str, ...], ...]
    parts: tuple[str, ...]
    nets: tuple[str, ...]
    rails: tuple[str, ...]
    setter: str | None = None
    pins: tuple[PinDrive, ...] = ()
    scenarios: tuple[Scenario, ...] = _ON
    reason: str | None = None
    transistor: str | None = None
    drive: str | None = None

    def __init__(self, id: str, topology: str, leds: tuple[str, ...],  # noqa: A002 (field)
                 strings: tuple[tuple[str, ...], ...], parts: tuple[str, ...],
                 nets: tuple[str, ...], rails: tuple[str, ...], setter: str | None = None,
                 pins: tuple[PinDrive, ...] = (), scenarios: tuple[Scenario, ...] = _ON,
                 reason: str | None = None, transistor: str | None = None,
                 drive: str | None = None) -> None:
        try:
            known = topology in _TOPOLOGY_SET
        except TypeError:  # (an unhashable value: not a topology either)
            known = False
        if not known:
            raise ValueError(f"group {id}: unknown topology {topology!r}")
        if not scenarios:
            raise ValueError(f"group {id}: needs at least one scenario")
        _set_id(self, id)
        _set_topology(self, topology)
        _set_leds(self, leds)
        _set_strings(self, strings)
        _set_parts(self, parts)
        _set_nets(self, nets)
        _set_rails(self, rails)
        _set_setter(self, setter)
        _set_pins(self, pins)
        _set_scenarios(self, scenarios)
        _set_reason(self, reason)
        _set_transistor(self, transistor)
        _set_drive(self, drive)


(_set_id, _set_topology, _set_leds, _set_strings, _set_parts, _set_nets, _set_rails,
 _set_setter, _set_pins, _set_scenarios, _set_reason, _set_transistor, _set_drive) = \
    _slot_setters(Group, "id", "topology", "leds", "strings", "parts", "nets", "rails",
                  "setter", "pins", "scenarios", "reason", "transistor", "drive")
