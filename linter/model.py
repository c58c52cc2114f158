"""The circuit model every stage after the readers works on.

Readers (:mod:`linter.readers`) turn a netlist into a :class:`Circuit`; nothing after them
looks at netlist syntax again. All objects are frozen: enrichment (BOM, part data) makes a
new Circuit with :func:`dataclasses.replace`. Solved operating points live in analysis
results, never here.

The connectivity is also offered as a bipartite networkx graph (:attr:`Circuit.graph`):
part nodes ``("part", ref)`` and net nodes ``("net", name)``, one edge per pin carrying the
pin name(s) in the edge attribute ``pins``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property
from typing import TYPE_CHECKING, Literal, Mapping

if TYPE_CHECKING:  # networkx costs start-up time; only the graph property imports it
    import networkx as nx

__all__ = [
    "SourceLocation",
    "PartKind",
    "PART_KINDS",
    "Pin",
    "DeviceModel",
    "Part",
    "Net",
    "ReaderNote",
    "Circuit",
]

PartKind = Literal[
    "led", "diode", "resistor", "link", "capacitor", "inductor",
    "npn", "pnp", "nmos", "pmos", "transistor", "mcu", "ic",
    "source", "connector", "switch", "other",
]
"""What a part is, as far as ledlint cares.

``link`` is a part that carries current with no drop worth modelling (0 Ω jumper, ferrite
bead, fuse); ``transistor`` is a transistor of unknown polarity; ``ic`` an integrated circuit
without part data; ``mcu`` one whose part data says it drives pins; ``source`` an independent
source from a SPICE deck.
"""

PART_KINDS: frozenset[str] = frozenset(PartKind.__args__)  # type: ignore[attr-defined]


@dataclass(frozen=True, slots=True)
class SourceLocation:
    """Where an object was written: the file as given, 1-based line and column."""

    file: str
    line: int
    column: int

    def __str__(self) -> str:
        return f"{self.file}:{self.line}:{self.column}"


@dataclass(frozen=True, slots=True)
class Pin:
    """One terminal of a part and the net it is joined to.

    ``name`` is the port or pin name as the netlist gives it (``A``, ``K``, ``PA4``, ``3``);
    ``net`` is the net's display name, or None for an unconnected pin.
    """

    name: str
    net: str | None


@dataclass(frozen=True)
class DeviceModel:
    """A SPICE ``.model`` card attached to the parts that use it.

    ``params`` maps upper-case parameter names (``IS``, ``N``, ``RS``, ``BF``…) to SI floats.
    """

    name: str
    type: str
    params: Mapping[str, float] = field(default_factory=dict, hash=False)
    location: SourceLocation | None = None


@dataclass(frozen=True, slots=True)
class Part:
    """A placed component.

    Attributes
    ----------
    ref : str
        The designator an engineer sees on the board (``D4``), or a hierarchical path
        (``S2/R7``) where a repeated sheet makes the leaf ambiguous.
    kind : PartKind
        What the part is (see :data:`PartKind`).
    value : str or None
        The value text as written in the netlist (``4k7``, ``LX-R0603``).
    value_si : float or None
        The reader's numeric reading of ``value`` in SI units (Ω for a resistor), or None.
    pins : tuple of Pin
        In the order the netlist gives them.
    location : SourceLocation
        The instance or element that placed the part.
    path : str
        Full hierarchical instance path (``S2/R7``); equals ``ref`` in a flat design.
    cell : str
        Library cell, SPICE element type or subcircuit name.
    part_number : str or None
        Manufacturer or house part number, keys part data.
    properties : Mapping[str, str]
        Every other property the netlist carries, names lower-cased.
    model : DeviceModel or None
        The SPICE ``.model`` the element uses.
    """

    ref: str
    kind: str
    value: str | None
    pins: tuple[Pin, ...]
    location: SourceLocation
    value_si: float | None = None
    path: str = ""
    cell: str = ""
    part_number: str | None = None
    properties: Mapping[str, str] = field(default_factory=dict, hash=False)
    model: DeviceModel | None = None

    def pin(self, name: str) -> Pin | None:
        """The pin called ``name`` (case-insensitive), or None."""
        wanted = name.casefold()
        for pin in self.pins:
            if pin.name.casefold() == wanted:
                return pin
        return None

    @property
    def nets(self) -> tuple[str | None, ...]:
        """The nets of the pins, in pin order."""
        return tuple(pin.net for pin in self.pins)


@dataclass(frozen=True, slots=True)
class Net:
    """A node: its display name, the (part ref, pin name) pairs it joins, where it was declared."""

    name: str
    pins: tuple[tuple[str, str], ...]
    location: SourceLocation
    aliases: tuple[str, ...] = ()


@dataclass(frozen=True)
class ReaderNote:
    """Something a reader saw that is valid input but worth a finding (``spice-scale-trap``).

    The rule of the same id turns it into a finding; ``values`` are SI floats.
    """

    rule: str
    parts: tuple[str, ...]
    message: str
    location: SourceLocation
    values: Mapping[str, float] = field(default_factory=dict, hash=False)


@dataclass(frozen=True)
class Circuit:
    """A flattened design: parts by reference, nets by name, and what the reader noticed."""

    source: str
    format: Literal["edif", "spice"]
    parts: Mapping[str, Part] = field(hash=False)
    nets: Mapping[str, Net] = field(hash=False)
    notes: tuple[ReaderNote, ...] = ()
    design: str = ""

    @cached_property
    def graph(self) -> "nx.Graph":
        """Bipartite graph: ``("part", ref)`` and ``("net", name)`` nodes, one edge per joined pin set.

        >>> c = Circuit("x", "spice", {"R1": Part("R1", "resistor", "1k",
        ...     (Pin("1", "A"), Pin("2", "B")), SourceLocation("x", 1, 1))},
        ...     {"A": Net("A", (("R1", "1"),), SourceLocation("x", 1, 1)),
        ...      "B": Net("B", (("R1", "2"),), SourceLocation("x", 1, 1))})
        >>> sorted(c.graph.neighbors(("part", "R1")))
        [('net', 'A'), ('net', 'B')]
        """
        import networkx as nx

        graph = nx.Graph()
        graph.add_nodes_from((("part", ref), {"kind": part.kind}) for ref, part in self.parts.items())
        graph.add_nodes_from(("net", name) for name in self.nets)
        edges: dict[tuple[tuple[str, str], tuple[str, str]], list[str]] = {}
        for ref, part in self.parts.items():
            for pin in part.pins:
                if pin.net is not None:
                    edges.setdefault((("part", ref), ("net", pin.net)), []).append(pin.name)
        graph.add_edges_from((a, b, {"pins": tuple(names)}) for (a, b), names in edges.items())
        return graph

    def parts_on(self, net: str) -> tuple[str, ...]:
        """References of the parts with a pin on ``net``, in netlist order, without repeats."""
        found = self.nets.get(net)
        if found is None:
            return ()
        return tuple(dict.fromkeys(ref for ref, _ in found.pins))

    def leds(self) -> tuple[Part, ...]:
        """Every part of kind ``led``, in netlist order."""
        return tuple(part for part in self.parts.values() if part.kind == "led")
