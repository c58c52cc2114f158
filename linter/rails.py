"""Rails: which nets have a known voltage, and where that knowledge came from.

Sources, first wins:

1. the settings' ``[rails]`` table (``origin`` names the file and line);
2. a SPICE DC voltage source from a net to ground (``V12 +12V 0 DC 12``: origin
   ``SPICE source V12``); its tolerance is the assumed rail tolerance
   (``[assume] rail_tolerance``, ±5 % shipped) because a deck gives only the nominal;
3. the net's name: ground names (``GND``, ``0``, ``VSS``, ``AGND``, ``DGND``, ``GNDA``,
   ``PGND``) are 0 V; supply names that spell a voltage (``+5V``, ``5V0``, ``3V3``, ``+12V``,
   ``VCC_3V3``, ``P24V``, ``-15V``) get that voltage with the assumed tolerance and
   ``inferred=True``.

A net named like a supply without a voltage (``VCC``, ``VDD``, ``VBAT``, ``VIN``, ``+V``) is
not a rail: :func:`unknown_supply_nets` lists them and the ``unknown-rail`` rule reports the
ones that feed LEDs (:func:`leds_fed_by`).
"""

from __future__ import annotations

import re
from collections import deque
from itertools import compress, repeat
from operator import attrgetter, eq
from typing import TYPE_CHECKING, Mapping

from linter.model import Circuit, Part
from linter.partdata import Rail

if TYPE_CHECKING:
    from linter.config import Settings

__all__ = ["resolve_rails", "rail_from_name", "is_ground_name", "looks_like_supply",
           "unknown_supply_nets", "leds_fed_by"]

_GROUND = re.compile(r"^(?:0|[ADPS]?GND[ADP]?\d*|[AD]?VSS[AD]?)$", re.IGNORECASE)
_SUPPLY_WORD = r"(?:VCC|VDD|VIN|VBAT|VBUS|VSYS|VLED|VS|VPP|VMOT|VIO|VCCIO|VDDIO|AVDD|DVDD|AVCC|PWR)"
_VOLTAGE_NAME = re.compile(
    rf"^(?:{_SUPPLY_WORD}[_\-]?)?(?P<sign>[+\-PN])?(?P<int>\d+)"
    r"(?:(?:[.,](?P<frac>\d+)V)|(?:V(?P<frac2>\d*)))$", re.IGNORECASE)
_UNKNOWN_SUPPLY = re.compile(
    rf"^(?:\+?{_SUPPLY_WORD}\d?|\+V|V\+|VSUPPLY|SUPPLY)$", re.IGNORECASE)
_PASS_THROUGH = frozenset({"resistor", "link", "led"})
"""Kinds a supply's current is followed through when looking for the LEDs it feeds."""


def is_ground_name(name: str) -> bool:
    """True for a ground net's name.

    >>> [is_ground_name(n) for n in ("GND", "0", "AGND", "GNDA", "PGND", "VSS", "-15V")]
    [True, True, True, True, True, True, False]
    """
    return bool(_GROUND.match(name))


def rail_from_name(name: str, tolerance: float) -> Rail | None:
    """The rail a net name spells, with ``tolerance`` (fraction) around it, or None.

    >>> rail_from_name("3V3", 0.05).nom, rail_from_name("-15V", 0.05).nom
    (3.3, -15.0)
    >>> rail_from_name("VCC", 0.05) is None
    True
    """
    if is_ground_name(name):
        return Rail(name, 0.0, 0.0, 0.0, inferred=True, origin="net name (ground)")
    match = _VOLTAGE_NAME.match(name)
    if match is None:
        return None
    fraction = match["frac"] or match["frac2"] or "0"
    volts = float(f"{match['int']}.{fraction}")
    if (match["sign"] or "").upper() in ("-", "N"):
        volts = -volts
    spread = abs(volts) * tolerance
    return Rail(name, volts, volts - spread, volts + spread, inferred=True,
                origin=f"net name (±{tolerance * 100:g} % assumed)")


def looks_like_supply(name: str) -> bool:
    """True for a supply-like net name that spells no voltage (``VCC``, ``VBAT``, ``+V``)."""
    return bool(_UNKNOWN_SUPPLY.match(name))


def _source_rail(part: Part, rails: Mapping[str, Rail], tolerance: float) -> Rail | None:
    """The rail a SPICE DC voltage source sets: from its + node to a ground - node or back."""
    if part.kind != "source" or part.value_si is None or len(part.pins) != 2:
        return None
    if not (part.cell or part.ref).upper().startswith("V"):
        return None
    plus, minus = part.pins[0].net, part.pins[1].net
    if plus is None or minus is None:
        return None

    def grounded(net: str) -> bool:
        rail = rails.get(net)
        return is_ground_name(net) or (rail is not None and rail.is_ground)

    if grounded(minus) and not grounded(plus):
        net, volts = plus, part.value_si
    elif grounded(plus) and not grounded(minus):
        net, volts = minus, -part.value_si
    else:
        return None
    spread = abs(volts) * tolerance
    return Rail(net, volts, volts - spread, volts + spread, inferred=False,
                origin=f"SPICE source {part.ref} (±{tolerance * 100:g} % assumed)")


def resolve_rails(circuit: Circuit, settings: "Settings") -> dict[str, Rail]:
    """Every net of the circuit with a known voltage, by net name (settings, SPICE, names).

    The parts that may set a rail (kind ``source``) and the net names that may spell one
    (:data:`_RAIL_NAME`, the ground and voltage patterns in one) are picked out in C-level
    passes; :func:`resolve_rails_plain` looks at every part and name.
    """
    tolerance = settings.assume.rail_tolerance
    nets = circuit.nets
    rails = {name: rail for name, rail in settings.rails.items() if name in nets}
    held = circuit.parts.values()
    for part in compress(held, map(eq, map(_KIND, held), repeat("source"))):
        rail = _source_rail(part, rails, tolerance)
        if rail is not None and rail.name not in rails:
            rails[rail.name] = rail
    for name in filter(_RAIL_NAME.match, nets):
        if name not in rails:
            rail = rail_from_name(name, tolerance)
            if rail is not None:
                rails[name] = rail
    return rails


def resolve_rails_plain(circuit: Circuit, settings: "Settings") -> dict[str, Rail]:
    """:func:`resolve_rails` part by part and name by name: the reference for its tests."""
    tolerance = settings.assume.rail_tolerance
    rails = {name: rail for name, rail in settings.rails.items() if name in circuit.nets}
    for part in circuit.parts.values():
        rail = _source_rail(part, rails, tolerance)
        if rail is not None and rail.name not in rails:
            rails[rail.name] = rail
    for name in circuit.nets:
        if name not in rails:
            rail = rail_from_name(name, tolerance)
            if rail is not None:
                rails[name] = rail
    return rails


_RAIL_NAME = re.compile(f"{_GROUND.pattern}|{_VOLTAGE_NAME.pattern}", re.IGNORECASE)
"""Matches exactly the names :func:`rail_from_name` gives a rail (either pattern)."""
_KIND = attrgetter("kind")


def unknown_supply_nets(circuit: Circuit, rails: Mapping[str, Rail]) -> tuple[str, ...]:
    """Nets named like a supply but with no known voltage, in netlist order."""
    return tuple(name for name in circuit.nets if name not in rails and looks_like_supply(name))


def leds_fed_by(circuit: Circuit, net: str, rails: Mapping[str, Rail]) -> tuple[str, ...]:
    """LEDs reachable from ``net`` through resistors, links and LEDs, not crossing a rail.

    A breadth-first walk over parts of those kinds; it stops at nets of known voltage.
    """
    seen_nets = {net}
    seen_parts: set[str] = set()
    leds: list[str] = []
    queue = deque([net])
    while queue:
        current = queue.popleft()
        for ref in circuit.parts_on(current):
            part = circuit.parts[ref]
            if ref in seen_parts or part.kind not in _PASS_THROUGH:
                continue
            seen_parts.add(ref)
            if part.kind == "led":
                leds.append(ref)
            for other in part.nets:
                if other is not None and other not in seen_nets and other not in rails:
                    seen_nets.add(other)
                    queue.append(other)
    return tuple(leds)
