"""Flatten an EDIF design: walk the hierarchy from the top cell, join nets through ports.

The walk is iterative (an explicit stack of cell views to expand). Every net wire and every
port pin of every placed instance is a node, numbered, of a union–find structure:

* the wires of a placed view (a sheet) are one block of consecutive numbers: its nets in
  order, each net's wires in order;
* the pins of a placed instance are one block: its view's ports in order, each port's pins in
  order (the order of :func:`pin_names`). The same block is the sheet's own ports seen from
  inside and the instance's pins seen from its parent, which is how nets join across the
  hierarchy. The top cell's own ports are the block starting at 0.

The blocks of the children of one placed view are consecutive, so each view's connections
are worked out once, as (wire in its block, pin in its children's block or own port) pairs,
however often the view is placed. An instance is a leaf (a part) when its cell is in an
``external`` library or its view has no instances in its contents.

:class:`Leaf` and :class:`NetWire` (one per part and per placed net) are not frozen, as the
syntax records are not (:mod:`linter.readers.edif_syntax`).
"""

from __future__ import annotations

from array import array
from dataclasses import dataclass

from linter.limits import active
from linter.readers.edif_syntax import (
    Cell, EdifFile, Instance, Name, Net, PortRef, View, member_display,
)

__all__ = ["Leaf", "NetWire", "FlatDesign", "flatten", "pin_names"]


@dataclass(slots=True, unsafe_hash=True)
class Leaf:
    """A placed part: the display names of its parents, its instance, cell and view, and the
    first node of its pin block."""

    parents: tuple[str, ...]
    instance: Instance
    cell: Cell
    view: View
    pins: int

    @property
    def names(self) -> tuple[str, ...]:
        """Instance path as display names (``("S2", "R7")``)."""
        return (*self.parents, self.instance.name.display)


@dataclass(slots=True, unsafe_hash=True)
class NetWire:
    """One wire of a net as placed: its depth and order decide which name a merged net takes;
    ``form`` is the net's form (a list, or an offset), where messages and locations point."""

    node: int
    depth: int
    order: int
    display: str
    path_names: tuple[str, ...]
    form: list | int

    @property
    def full_name(self) -> str:
        return "/".join((*self.path_names, self.display))


@dataclass
class FlatDesign:
    """What the walk found: leaves in netlist order, net wires, and the union–find ``find``."""

    top_cell: Cell
    top_view: View
    leaves: list[Leaf]
    wires: list[NetWire]
    parent: array

    def find(self, node: int) -> int:
        """Representative of ``node``'s set (``node`` itself when nothing joins it)."""
        parent = self.parent
        while parent[node] != node:
            parent[node] = parent[parent[node]]
            node = parent[node]
        return node


def pin_names(view: View) -> list[tuple[str, int, str]]:
    """(port key, member index, pin name) of every pin of a view, in pin-block order."""
    return [(key, index, port.name.display if not port.name.dims
             else member_display(port.name, index))
            for key, port in view.ports.items() for index in range(port.name.width)]


@dataclass(frozen=True, slots=True)
class _Target:
    """What an instance places; ``ports``: the pin number of each scalar port, by key."""

    cell: Cell
    view: View
    leaf: bool
    ports: dict[str, int]


@dataclass(frozen=True, slots=True)
class _Layout:
    """A view's block sizes and connections, worked out once for every placement.

    ``wires`` and ``pins`` pair each joined wire (its number in the view's wire block) with a
    pin: its number in the children's block, or ``-1 - n`` for pin ``n`` of the view's own
    ports (two arrays of machine integers: a flat design has one pair per pin).
    """

    wire_count: int
    child_offsets: tuple[int, ...]
    child_pins: int
    wires: array
    pins: array


def _port_offsets(view: View) -> dict[str, int]:
    offsets, at = {}, 0
    for key, port in view.ports.items():
        offsets[key] = at
        at += port.name.width
    return offsets


def _pin_count(view: View) -> int:
    return sum(port.name.width for port in view.ports.values())


class _Flattener:
    def __init__(self, edif: EdifFile) -> None:
        self.edif = edif
        self.doc = edif.doc
        self.parent = array("q")
        self.targets: dict[int, dict[str, _Target]] = {}
        self.layouts: dict[int, _Layout] = {}
        self.port_offsets: dict[int, dict[str, int]] = {}
        self.scalars: dict[int, dict[str, int]] = {}
        self.pin_counts: dict[int, int] = {}
        self.resolved: dict[tuple[str | None, str, str, str], _Target] = {}

    def allocate(self, count: int) -> int:
        """The first of ``count`` new nodes, each its own set."""
        parent = self.parent
        first = len(parent)
        parent.extend(range(first, first + count))
        return first

    def fail(self, form: list, message: str) -> None:
        raise self.doc.error(form, message)

    def resolve(self, instance: Instance, cell: Cell) -> _Target:
        """The cell and view an instance places (one record for every equal reference)."""
        key = (instance.library, instance.cell, instance.view, cell.library)
        found = self.resolved.get(key)
        if found is None:
            found = self.resolved[key] = self.look_up(instance, cell)
        return found

    def look_up(self, instance: Instance, cell: Cell) -> _Target:
        library_key = instance.library.casefold() if instance.library else cell.library
        library = self.edif.libraries.get(library_key)
        who = f"instance '{instance.name.display}'"
        if library is None:
            self.fail(instance.form, f"{who}: no library '{instance.library}' in this file")
        target = library.cells.get(instance.cell.casefold())  # type: ignore[union-attr]
        if target is None:
            self.fail(instance.form, f"{who}: library '{library.name.display}' has no cell "  # type: ignore[union-attr]
                                     f"'{instance.cell}'")
        view = target.views.get(instance.view.casefold())  # type: ignore[union-attr]
        if view is None:
            self.fail(instance.form, f"{who}: cell '{target.name.display}' has no view "  # type: ignore[union-attr]
                                     f"'{instance.view}'")
        leaf = target.external or not view.instances  # type: ignore[union-attr]
        return _Target(target, view, leaf, self.scalar_ports(view))  # type: ignore[arg-type]

    def targets_of(self, cell: Cell, view: View) -> dict[str, _Target]:
        found = self.targets.get(id(view))
        if found is None:
            found = {key: self.resolve(inst, cell) for key, inst in view.instances.items()}
            self.targets[id(view)] = found
        return found

    def layout_of(self, cell: Cell, view: View) -> _Layout:
        """The view's blocks and connections (its references resolved and checked once)."""
        found = self.layouts.get(id(view))
        if found is None:
            targets = self.targets_of(cell, view)
            offsets, at = {}, 0
            for key, target in targets.items():
                offsets[key] = at
                at += self.pin_count(target.view)
            wires, pins = self.links(cell, view, targets, offsets)
            found = _Layout(sum(net.name.width for net in view.nets), tuple(offsets.values()),
                            at, wires, pins)
            self.layouts[id(view)] = found
        return found

    def links(self, cell: Cell, view: View, targets: dict[str, _Target],
              offsets: dict[str, int]) -> tuple[array, array]:
        """Wires and pins of :class:`_Layout`, in the order of the nets and their references.

        The common reference, one scalar port of an instance on a scalar net, is matched with
        plain lookups; anything else (and every reference that names something missing) takes
        :meth:`entry_pins`, which checks and refuses with a located message.
        """
        wires, pins = array("q"), array("q")
        link_wire, link_pin = wires.append, pins.append
        folded: dict[str, str] = {}  # port names repeat on every instance of a cell
        first_wire = 0
        for net in view.nets:
            scalar = net.name.width == 1
            pairs = iter(net.pairs)  # a net read whole: (port, instance or '') pairs
            for port, instance in zip(pairs, pairs):
                if instance:
                    key = instance.casefold()
                    target = targets.get(key)
                    if target is not None:
                        number = target.ports.get(folded.get(port) or
                                                  folded.setdefault(port, port.casefold()))
                        if number is not None:
                            link_wire(first_wire)
                            link_pin(offsets[key] + number)
                            continue
                self.add_links(wires, pins, first_wire, PortRef(port, None, instance or None, net.form),
                               net, cell, view, targets, offsets)  # type: ignore[arg-type]
            for entry in net.joined:
                if scalar and type(entry) is PortRef and entry.member is None \
                        and entry.instance is not None:
                    key = entry.instance.casefold()
                    target = targets.get(key)
                    if target is not None:
                        number = target.ports.get(entry.port.casefold())
                        if number is not None:
                            link_wire(first_wire)
                            link_pin(offsets[key] + number)
                            continue
                self.add_links(wires, pins, first_wire, entry, net, cell, view, targets, offsets)
            first_wire += net.name.width
        return wires, pins

    def add_links(self, wires: array, pins: array, first_wire: int,
                  entry: PortRef | tuple[PortRef, ...], net: Net, cell: Cell, view: View,
                  targets: dict[str, _Target], offsets: dict[str, int]) -> None:
        """Wires and pins of one reference (checked: a missing name is refused, located)."""
        for wire, (inst, port, pin) in enumerate(self.entry_pins(entry, net, cell, view, targets)):
            wires.append(first_wire + wire)
            pins.append(self.pin_number(inst, port, pin, view, targets, offsets))

    def offsets_of(self, view: View) -> dict[str, int]:
        found = self.port_offsets.get(id(view))
        if found is None:
            found = self.port_offsets[id(view)] = _port_offsets(view)
        return found

    def scalar_ports(self, view: View) -> dict[str, int]:
        """Pin number of each port of width 1 of a view, by port key."""
        found = self.scalars.get(id(view))
        if found is None:
            offsets = self.offsets_of(view)
            found = self.scalars[id(view)] = {key: offsets[key] for key, port in
                                              view.ports.items() if port.name.width == 1}
        return found

    def pin_count(self, view: View) -> int:
        found = self.pin_counts.get(id(view))
        if found is None:
            found = self.pin_counts[id(view)] = _pin_count(view)
        return found

    def pin_number(self, instance: str | None, port: str, pin: int, view: View,
                   targets: dict[str, _Target], offsets: dict[str, int]) -> int:
        """A pin's number in the children's block, or ``-1 - n`` for own port pin ``n``."""
        if instance is None:
            return -1 - (self.offsets_of(view)[port] + pin)
        return offsets[instance] + self.offsets_of(targets[instance].view)[port] + pin

    def entry_pins(self, entry: PortRef | tuple[PortRef, ...], net: Net, cell: Cell, view: View,
                   targets: dict[str, _Target]) -> list[tuple[str | None, str, int]]:
        refs = entry if isinstance(entry, tuple) else (entry,)
        pins = [pin for ref in refs for pin in self.ref_pins(ref, cell, view, targets)]
        if len(pins) != net.name.width:
            form = refs[0].form if refs else net.form
            self.fail(form, f"net '{net.name.display}' has {net.name.width} wire(s) but this "
                            f"reference has {len(pins)} pin(s)")
        return pins

    def ref_pins(self, ref: PortRef, cell: Cell, view: View,
                 targets: dict[str, _Target]) -> list[tuple[str | None, str, int]]:
        """(instance key or None, port key, pin) for each pin a port reference names."""
        instance = ref.instance.casefold() if ref.instance is not None else None
        if instance is None:
            ports, owner = view.ports, cell.name.display
        else:
            target = targets.get(instance)
            if target is None:
                self.fail(ref.form, f"instanceRef '{ref.instance}': cell '{cell.name.display}' "
                                    "has no instance of that name")
            ports, owner = target.view.ports, target.cell.name.display  # type: ignore[union-attr]
        key = ref.port.casefold()
        port = ports.get(key)
        if port is None:
            self.fail(ref.form, f"portRef '{ref.port}': cell '{owner}' has no port of that name")
        if ref.member is None:
            return [(instance, key, i) for i in range(port.name.width)]  # type: ignore[union-attr]
        return [(instance, key, self.member_index(ref, port.name))]  # type: ignore[union-attr]

    def member_index(self, ref: PortRef, name: Name) -> int:
        dims, member = name.dims, ref.member or ()
        if len(member) != len(dims) or any(not 0 <= i < n for i, n in zip(member, dims)):
            self.fail(ref.form, f"member {list(member)} is outside array '{name.display}' "
                                f"of size {list(dims) or 1}")
        index = 0
        for i, size in zip(member, dims):
            index = index * size + i
        return index

    def walk(self, top_cell: Cell, top_view: View) -> tuple[list[Leaf], list[NetWire]]:
        leaves: list[Leaf] = []
        wires: list[NetWire] = []
        own = self.allocate(_pin_count(top_view))
        stack = [(top_cell, top_view, (), own, (id(top_view),))]
        limit, placed = active().max_parts, 0
        parent = self.parent
        while stack:
            cell, view, names, own, ancestors = stack.pop()
            first_wire = self.place_nets(view, names, wires)
            if len(wires) > 4 * limit:
                self.fail(view.form, f"the design expands to more than {4 * limit} net pieces "
                                     "(4 x max_parts)")
            layout = self.layout_of(cell, view)
            first_pin = self.allocate(layout.child_pins)
            for wire, pin in zip(layout.wires, layout.pins):
                a = first_wire + wire
                b = first_pin + pin if pin >= 0 else own - 1 - pin
                while parent[a] != a:
                    parent[a] = a = parent[parent[a]]
                while parent[b] != b:
                    parent[b] = b = parent[parent[b]]
                if a != b:
                    parent[b] = a
            children = []
            for (key, target), offset in zip(self.targets_of(cell, view).items(),
                                             layout.child_offsets):
                instance = view.instances[key]
                placed += 1
                if placed > limit:
                    self.fail(instance.form, f"the design expands to more than {limit} "
                                             "instances (max_parts)")
                if target.leaf:
                    leaves.append(Leaf(names, instance, target.cell, target.view,
                                       first_pin + offset))
                    continue
                if id(target.view) in ancestors:
                    self.fail(instance.form, f"instance '{instance.name.display}': cell "
                                             f"'{target.cell.name.display}' contains itself")
                children.append((target.cell, target.view, names + (instance.name.display,),
                                 first_pin + offset, ancestors + (id(target.view),)))
            stack.extend(reversed(children))
        return leaves, wires

    def place_nets(self, view: View, names: tuple, wires: list[NetWire]) -> int:
        """NetWires for every wire of the view placed under ``names``; the first wire's node."""
        first = node = len(self.parent)
        depth = len(names)
        for net in view.nets:
            name = net.name
            for wire in range(name.width):
                display = name.display if not name.dims else member_display(name, wire)
                wires.append(NetWire(node, depth, len(wires), display, names, net.form))
                node += 1
        self.allocate(node - first)
        return first


def _top(edif: EdifFile) -> tuple[Cell, View]:
    """The design's top cell and its view (the first view with contents)."""
    design = edif.design
    if design is None:
        raise edif.doc.error(edif.doc.root, "no (design ...) form: cannot tell which cell is the top")  # type: ignore[arg-type]
    if design.library is None:
        libraries = list(edif.libraries.values())
    else:
        found = edif.libraries.get(design.library.casefold())
        libraries = [found] if found is not None else []
    for library in libraries:
        cell = library.cells.get(design.cell.casefold())
        if cell is not None:
            views = list(cell.views.values())
            if not views:
                raise edif.doc.error(cell.form, f"top cell '{cell.name.display}' has no view")
            with_contents = [view for view in views if view.has_contents]
            return cell, (with_contents or views)[0]
    where = f"library '{design.library}'" if design.library else "any library"
    raise edif.doc.error(design.form, f"design '{design.name.display}': no cell "
                                      f"'{design.cell}' in {where}")


def flatten(edif: EdifFile) -> FlatDesign:
    """Walk the design from its top cell; see the module docstring for the node scheme."""
    top_cell, top_view = _top(edif)
    flattener = _Flattener(edif)
    leaves, wires = flattener.walk(top_cell, top_view)
    return FlatDesign(top_cell, top_view, leaves, wires, flattener.parent)
