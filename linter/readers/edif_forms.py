"""The structural forms of EDIF 2.0.0: edif, library / external, cell, view, instance, net.

Each ``read_*`` function takes the reader of :mod:`linter.readers.edif_syntax` and one form,
and returns its record. Constructs that a plain netlist does not need and that this reader
does not implement (instance arrays, ``viewList``, ``globalPortRef``) are refused with a
located message rather than skipped, so a connection is never silently lost.
"""

from __future__ import annotations

from itertools import compress, islice, repeat
from operator import attrgetter, is_

from linter.readers.edif_syntax import (
    Cell, Design, EdifFile, Instance, Library, Name, Net, Port, PortRef, View, _child,
    _children, FormReader, _show, keyword,
)
from linter.readers.sexpr import Symbol

__all__ = ["read_top"]


def read_top(reader: FormReader) -> EdifFile:
    """The file record; refuses a text that is not an EDIF 2.0.0 level-0 netlist."""
    root = reader.doc.root
    if keyword(root) != "edif":
        found = f"'({root[0]}'" if isinstance(root, list) and root else _show(root)
        if isinstance(root, list):
            reader.fail(root, f"not an EDIF netlist: expected '(edif' at the start, found {found}")
        raise reader.doc.error(0, f"not an EDIF netlist: expected '(edif' at the start, found {found}")
    _check_version(reader, root)
    reader.check_level(root)
    name = reader.name_def(reader.arg(root, 1, "a name"), root)
    libraries: dict[str, Library] = {}
    for form in _children(root, "library", "external"):
        library = read_library(reader, form)
        if library.name.key in libraries:
            reader.fail(form, f"duplicate library name '{library.name.display}'")
        libraries[library.name.key] = library
    design_form = _child(root, "design")
    design = read_design(reader, design_form) if design_form is not None else None
    return EdifFile(name, libraries, design, reader.doc)


def _check_version(reader: FormReader, root: list) -> None:
    version = _child(root, "edifversion")
    if version is not None and list(version[1:]) != [2, 0, 0]:
        text = ".".join(str(v) for v in version[1:])
        reader.fail(version, f"EDIF version {text} is not supported; only 2.0.0 can be read")


def read_library(reader: FormReader, form: list) -> Library:
    external = keyword(form) == "external"
    name = reader.name_def(reader.arg(form, 1, "a name"), form)
    reader.check_level(form)
    cells: dict[str, Cell] = {}
    for cell_form in _children(form, "cell"):
        cell = read_cell(reader, cell_form, name.key, external)
        if cell.name.key in cells:
            reader.fail(cell_form, f"duplicate cell name '{cell.name.display}' in library "
                                   f"'{name.display}'")
        cells[cell.name.key] = cell
    return Library(name, external, cells)


def read_cell(reader: FormReader, form: list, library: str, external: bool) -> Cell:
    name = reader.name_def(reader.arg(form, 1, "a name"), form)
    views: dict[str, View] = {}
    for view_form in _children(form, "view"):
        view = read_view(reader, view_form, name)
        views[view.name.key] = view
    return Cell(name, library, external, views, reader.properties(form), form)


def read_view(reader: FormReader, form: list, cell: Name) -> View:
    name = reader.name_def(reader.arg(form, 1, "a name"), form)
    ports: dict[str, Port] = {}
    interface = _child(form, "interface")
    for port_form in _children(interface or [], "port"):
        port = Port(reader.name_def(reader.arg(port_form, 1, "a name"), port_form), port_form)
        if port.name.key in ports:
            reader.fail(port_form, f"duplicate port name '{port.name.display}' in cell "
                                   f"'{cell.display}'")
        ports[port.name.key] = port
    instances: dict[str, Instance] = {}
    nets: list[Net] = []
    contents = _child(form, "contents")
    if contents is not None and _records_only(contents):
        # every instance and net read whole: taken by built-in passes when no name repeats
        # (the loop below is the twin: tests/test_edif_compound.py reads both ways)
        types = list(map(type, contents))
        placed = list(compress(contents, map(is_, types, repeat(Instance))))
        instances = dict(zip(map(_KEY, placed), placed))
        if len(instances) == len(placed):
            nets = list(compress(contents, map(is_, types, repeat(Net))))
            return View(name, ports, instances, nets, reader.properties(form), True, form)
        instances = {}
    for item in contents or ():
        if type(item) is Instance:  # read whole by the parser
            _add_instance(reader, item, instances, cell)
            continue
        kw = keyword(item)
        if kw == "instance":
            _add_instance(reader, item, instances, cell)
        elif kw == "net":
            nets.append(read_net(reader, item))
        elif type(item) is Net:  # read whole by the parser
            nets.append(item)
    return View(name, ports, instances, nets, reader.properties(form), contents is not None, form)


_KEY = attrgetter("name.key")


def _records_only(contents: list) -> bool:
    """Whether every item after the keyword is an instance or a net read whole."""
    return set(map(type, islice(contents, 1, None))) <= {Instance, Net}


def _add_instance(reader: FormReader, form: list | Instance, instances: dict[str, Instance],
                  cell: Name) -> None:
    instance = form if type(form) is Instance else read_instance(reader, form)  # type: ignore[arg-type]
    form = instance.form
    first = instances.get(instance.name.key)
    if first is not None:
        line, column = reader.doc.position_of(first.form)
        reader.fail(form, f"duplicate instance name '{instance.name.display}' in cell "
                          f"'{cell.display}' (first at {line}:{column})")
    instances[instance.name.key] = instance


def _sub_forms(form: list) -> tuple[list | None, list | None, list[list]]:
    """The first ``viewRef`` and ``designator`` of an instance, and its ``property`` forms: one pass."""
    view_ref = designator = None
    properties: list[list] = []
    for item in form:
        if isinstance(item, list) and item and isinstance(item[0], Symbol):
            kw = item[0].lower()
            if kw == "property":
                properties.append(item)
            elif kw == "viewref":
                view_ref = view_ref or item
            elif kw == "designator":
                designator = designator or item
    return view_ref, designator, properties


def read_instance(reader: FormReader, form: list) -> Instance:
    name_token = reader.arg(form, 1, "a name")
    if keyword(name_token) == "array":
        reader.fail(form, "instance arrays are not supported")
    name = reader.name_def(name_token, form)
    view_ref, designator_form, property_forms = _sub_forms(form)
    if view_ref is None:
        what = "viewList" if _child(form, "viewlist") is not None else "no viewRef"
        reader.fail(form, f"instance '{name.display}': {what} is not supported; expected "
                          "(viewRef view (cellRef cell (libraryRef library)))")
    view = reader.name_ref(reader.arg(view_ref, 1, "a view name"), view_ref)  # type: ignore[arg-type]
    cell_ref = _child(view_ref, "cellref")  # type: ignore[arg-type]
    if cell_ref is None:
        reader.fail(view_ref, f"instance '{name.display}': viewRef without cellRef is not supported")  # type: ignore[arg-type]
    cell = reader.name_ref(reader.arg(cell_ref, 1, "a cell name"), cell_ref)  # type: ignore[arg-type]
    library_ref = _child(cell_ref, "libraryref")  # type: ignore[arg-type]
    library = None
    if library_ref is not None:
        library = reader.name_ref(reader.arg(library_ref, 1, "a library name"), library_ref)
    designator = None
    if designator_form is not None:
        designator = reader.string(reader.arg(designator_form, 1, "a string"), designator_form)
    return Instance(name, library, cell, view, designator, reader.property_forms(property_forms),
                    form)


def read_net(reader: FormReader, form: list) -> Net:
    name = reader.name_def(reader.arg(form, 1, "a name"), form)
    joined: list[PortRef | tuple[PortRef, ...]] = []
    for joined_form in _children(form, "joined"):
        for item in joined_form[1:]:
            if type(item) is PortRef:  # read whole by the parser
                joined.append(item)
                continue
            kw = keyword(item)
            if kw == "portref":
                joined.append(read_port_ref(reader, item))
            elif kw == "portlist":
                joined.append(tuple(_port_list_entry(reader, entry, item) for entry in item[1:]))
            else:
                reader.fail(item if isinstance(item, list) else joined_form,
                            f"net '{name.display}': {_show(item)} in joined is not supported")
    for sub_net in _children(form, "net"):  # a net within a net is part of it
        joined.extend(read_net(reader, sub_net).joined)
    return Net(name, tuple(joined), form)


def _port_list_entry(reader: FormReader, entry: object, port_list: list) -> PortRef:
    if type(entry) is PortRef:  # read whole by the parser
        return entry
    if keyword(entry) == "portref":
        return read_port_ref(reader, entry)  # type: ignore[arg-type]
    port, member = _port_name_ref(reader, entry, port_list)
    return PortRef(port, member, None, port_list)


def read_port_ref(reader: FormReader, form: list) -> PortRef:
    if len(form) == 2 and type(form[1]) is Symbol:  # (portRef P): a port of the cell itself
        return PortRef(str(form[1]), None, None, form)
    if len(form) == 3 and type(form[1]) is Symbol:  # the common (portRef P (instanceRef I))
        ref = form[2]
        if type(ref) is list and len(ref) == 2 and type(ref[0]) is Symbol \
                and type(ref[1]) is Symbol and ref[0].lower() == "instanceref":
            return PortRef(str(form[1]), None, str(ref[1]), form)
    port, member = _port_name_ref(reader, reader.arg(form, 1, "a port name"), form)
    instance_ref = _child(form, "instanceref")
    instance = None
    if instance_ref is not None:
        token = reader.arg(instance_ref, 1, "an instance name")
        if keyword(token) == "member":
            reader.fail(instance_ref, "instance arrays are not supported (instanceRef to a member)")
        instance = reader.name_ref(token, instance_ref)
        if _child(instance_ref, "instanceref") is not None:
            reader.fail(instance_ref, "nested instanceRef (a reference into a sub-sheet) "
                                      "is not supported")
    return PortRef(port, member, instance, form)


def _port_name_ref(reader: FormReader, token: object, form: list) -> tuple[str, tuple[int, ...] | None]:
    if keyword(token) == "member":
        member_form: list = token  # type: ignore[assignment]
        port = reader.name_ref(reader.arg(member_form, 1, "an array name"), member_form)
        indices = tuple(reader.integer(i, member_form) for i in member_form[2:])
        if not indices:
            reader.fail(member_form, "malformed 'member': expected one or more indices")
        return port, indices
    if not isinstance(token, Symbol):
        reader.fail(form, f"malformed '{form[0]}': expected a port name, found {_show(token)}")
    return reader.name_ref(token, form), None


def read_design(reader: FormReader, form: list) -> Design:
    name = reader.name_def(reader.arg(form, 1, "a name"), form)
    cell_ref = _child(form, "cellref")
    if cell_ref is None:
        reader.fail(form, "malformed 'design': expected (cellRef cell (libraryRef library))")
    cell = reader.name_ref(reader.arg(cell_ref, 1, "a cell name"), cell_ref)  # type: ignore[arg-type]
    library_ref = _child(cell_ref, "libraryref")  # type: ignore[arg-type]
    library = None
    if library_ref is not None:
        library = reader.name_ref(reader.arg(library_ref, 1, "a library name"), library_ref)
    return Design(name, library, cell, form)
