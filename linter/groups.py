"""LED groups: the contract between recognition (:mod:`linter.topology`) and the solver.

A group is the small DC network that sets the current of one or more LEDs: the LEDs, the
series and shunt parts around them, the transistor or pin that drives them, and the rails
at its edge. Topology finds groups in a Circuit; the analysis builds one network per group
and solves it at every corner; rules read the solved groups.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal, Mapping

__all__ = ["TOPOLOGIES", "Topology", "PinDrive", "Scenario", "Group"]

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


@dataclass(frozen=True)
class PinDrive:
    """A microcontroller output pin inside a group: ``part`` ``pin`` on ``net``.

    ``supply`` is the net of the part's supply pin (the level a pin driven high reaches),
    when topology could tell which pin that is; None when unknown.
    """

    part: str
    pin: str
    net: str
    supply: str | None = None

    @property
    def id(self) -> str:
        """``U1.PA4``: how pins are named in reports."""
        return f"{self.part}.{self.pin}"


@dataclass(frozen=True)
class Scenario:
    """One state of the pins that drive a group, and the LEDs meant to be lit in it.

    ``levels`` maps a pin id (``U1.PA4``) to ``"high"`` or ``"low"``. ``lit`` names the LEDs
    meant to be on; None (the default) means every LED of the group, and an empty tuple means
    none (a reversed LED is never meant to light).
    """

    name: str
    levels: Mapping[str, Literal["high", "low"]] = field(default_factory=dict, hash=False)
    lit: tuple[str, ...] | None = None


@dataclass(frozen=True)
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
    scenarios: tuple[Scenario, ...] = (Scenario("on"),)
    reason: str | None = None
    transistor: str | None = None
    drive: str | None = None

    def __post_init__(self) -> None:
        if self.topology not in TOPOLOGIES:
            raise ValueError(f"group {self.id}: unknown topology {self.topology!r}")
        if not self.scenarios:
            raise ValueError(f"group {self.id}: needs at least one scenario")
