"""Flatten an EDIF design: walk the hierarchy from the top cell, join nets through ports.

The walk is iterative (an explicit stack of cell views to expand). Every net wire and every
port pin of every placed instance is a node of a union–find structure:

* ``("n", path, net_index, i)`` — wire ``i`` of net number ``net_index`` of the view placed
  at instance path ``path`` (a tuple of instance keys; ``()`` is the top cell);
* ``("p", path, port_key, i)`` — pin ``i`` of port ``port_key`` of the view placed at
  ``path``. The same node is the port seen from inside a sub-sheet and the instance pin
  seen from its parent, which is how nets join across the hierarchy.

An instance is a leaf (a part) when its cell is in an ``external`` library or its view has
no instances in its contents. Each view's references are resolved and checked once, however
often the view is placed.
"""

from __future__ import annotations

from dataclasses import dataclass

from linter.limits import active
from linter.readers.edif_syntax import (
    Cell, EdifFile, Instance, Name, Net, PortRef, View, member_display,
)

__all__ = ["Leaf", "NetWire", "FlatDesign", "flatten"]


@dataclass(frozen=True, slots=True)
class Leaf:
    """A placed part: its instance path (keys and display names), instance, cell and view."""

    keys: tuple[str, ...]
    names: tuple[str, ...]
    instance: Instance
    cell: Cell
    view: View


@dataclass(frozen=True, slots=True)
class NetWire:
    """One wire of a net as placed: its depth and order decide which name a merged net takes."""

    node: tuple
    depth: int
    order: int
    display: str
    path_names: tuple[str, ...]
    net: Net

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
    parent: dict[tuple, tuple]

    def find(self, node: tuple) -> tuple | None:
        """Representative of ``node``'s set, or None for a node nothing joins."""
        parent = self.parent
        if node not in parent:
            return None
        while parent[node] != node:
            parent[node] = parent[parent[node]]
            node = parent[node]
        return node


@dataclass(frozen=True, slots=True)
class _Target:
    cell: Cell
    view: View
    leaf: bool


class _Flattener:
    def __init__(self, edif: EdifFile) -> None:
        self.edif = edif
        self.doc = edif.doc
        self.parent: dict[tuple, tuple] = {}
        self.targets: dict[int, dict[str, _Target]] = {}
        self.links: dict[int, list[tuple[int, int, str | None, str, int]]] = {}

    def fail(self, form: list, message: str) -> None:
        raise self.doc.error(form, message)

    def union(self, a: tuple, b: tuple) -> None:
        parent = self.parent
        for node in (a, b):
            if node not in parent:
                parent[node] = node
        root_a, root_b = self._root(a), self._root(b)
        if root_a != root_b:
            parent[root_b] = root_a

    def _root(self, node: tuple) -> tuple:
        parent = self.parent
        while parent[node] != node:
            parent[node] = parent[parent[node]]
            node = parent[node]
        return node

    def resolve(self, instance: Instance, cell: Cell) -> _Target:
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
        return _Target(target, view, leaf)  # type: ignore[arg-type]

    def targets_of(self, cell: Cell, view: View) -> dict[str, _Target]:
        found = self.targets.get(id(view))
        if found is None:
            found = {key: self.resolve(inst, cell) for key, inst in view.instances.items()}
            self.targets[id(view)] = found
        return found

    def links_of(self, cell: Cell, view: View) -> list[tuple[int, int, str | None, str, int]]:
        """(net index, wire, instance key or None, port key, pin) for every joined pin of a view."""
        found = self.links.get(id(view))
        if found is None:
            targets = self.targets_of(cell, view)
            found = []
            for index, net in enumerate(view.nets):
                for entry in net.joined:
                    pins = self.entry_pins(entry, net, cell, view, targets)
                    found.extend((index, wire, inst, port, pin) for wire, (inst, port, pin) in enumerate(pins))
            self.links[id(view)] = found
        return found

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
        stack = [(top_cell, top_view, (), (), (id(top_view),))]
        limit, placed = active().max_parts, 0
        while stack:
            cell, view, keys, names, ancestors = stack.pop()
            self.place_nets(view, keys, names, wires)
            if len(wires) > 4 * limit:
                self.fail(view.form, f"the design expands to more than {4 * limit} net pieces "
                                     "(4 x max_parts)")
            for index, wire, inst, port, pin in self.links_of(cell, view):
                self.union(("n", keys, index, wire), ("p", keys + (inst,) if inst else keys, port, pin))
            children = []
            for key, target in self.targets_of(cell, view).items():
                instance = view.instances[key]
                placed += 1
                if placed > limit:
                    self.fail(instance.form, f"the design expands to more than {limit} "
                                             "instances (max_parts)")
                if target.leaf:
                    leaves.append(Leaf(keys + (key,), names + (instance.name.display,),
                                       instance, target.cell, target.view))
                    continue
                if id(target.view) in ancestors:
                    self.fail(instance.form, f"instance '{instance.name.display}': cell "
                                             f"'{target.cell.name.display}' contains itself")
                children.append((target.cell, target.view, keys + (key,),
                                 names + (instance.name.display,), ancestors + (id(target.view),)))
            stack.extend(reversed(children))
        return leaves, wires

    @staticmethod
    def place_nets(view: View, keys: tuple, names: tuple, wires: list[NetWire]) -> None:
        for index, net in enumerate(view.nets):
            for wire in range(net.name.width):
                display = net.name.display if not net.name.dims else member_display(net.name, wire)
                wires.append(NetWire(("n", keys, index, wire), len(keys), len(wires), display,
                                     names, net))


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
