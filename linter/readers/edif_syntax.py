"""EDIF 2.0.0 forms to declaration records: libraries, cells, views, ports, instances, nets.

This module reads the s-expression tree (:mod:`linter.readers.sexpr`) of one EDIF file into
plain records and checks what can be checked locally (names, array sizes, typed values,
``edifLevel``); it does not follow references between cells — :mod:`linter.readers.edif_flatten`
does. Keywords are matched in any letter case; identifiers are compared case-insensitively
(EDIF 2.0.0 identifiers are case-insensitive, which is why ``rename`` exists: it keeps the
display text, such as ``"+5V"`` for the identifier ``&_5V``).

Each record keeps the form it came from (``form``) so that later errors and locations can
point at it through :meth:`linter.readers.sexpr.Document.position_of`: the list, or for an
instance or port reference read whole (:mod:`linter.readers.edif_compound`) the offset of
its ``(``.

The records made per instance, net and port reference (:class:`Name`, :class:`Port`,
:class:`PortRef`, :class:`Net`, :class:`Instance`) are not frozen, only because a frozen
dataclass costs about four times as much to make (``object.__setattr__`` per field) and a
100,000-part netlist makes several hundred thousand of them; nothing changes one once made,
and they hash as frozen ones do (``unsafe_hash``).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from math import prod

from linter.readers.sexpr import Document, Symbol

__all__ = [
    "Name", "Port", "PortRef", "Net", "Instance", "View", "Cell", "Library", "Design",
    "EdifFile", "FormReader", "keyword", "read_edif_file", "member_display", "decode_string",
]


@dataclass(slots=True, unsafe_hash=True)
class Name:
    """A declared name: ``key`` for matching (case-folded identifier), ``display`` for people.

    ``dims`` are the sizes of an ``array`` (empty for a scalar); ``width`` their product.
    """

    key: str
    display: str
    dims: tuple[int, ...] = ()

    @property
    def width(self) -> int:
        return prod(self.dims) if self.dims else 1


@dataclass(slots=True, unsafe_hash=True)
class Port:
    name: Name
    form: list = field(repr=False)


@dataclass(slots=True, unsafe_hash=True)
class PortRef:
    """A reference to a port (of the cell itself when ``instance`` is None), or one member.

    ``port`` and ``instance`` are identifiers as written; match them with ``.casefold()``.
    """

    port: str
    member: tuple[int, ...] | None
    instance: str | None
    form: list | int = field(repr=False)  # the list, or the offset of a compound form


@dataclass(slots=True, unsafe_hash=True)
class Net:
    """A net (or net array); ``joined`` entries are port references or port lists.

    A net read whole (:mod:`linter.readers.edif_compound`) has its plain port references in
    ``pairs`` instead, port and instance ('' for a port of the cell itself) in turn, and
    ``form`` is the offset of its ``(``.
    """

    name: Name
    joined: tuple[PortRef | tuple[PortRef, ...], ...]
    form: list | int = field(repr=False)  # the list, or the offset of a compound form
    pairs: tuple[str, ...] = ()


@dataclass(slots=True, unsafe_hash=True)
class Instance:
    """A placed cell view; ``library``, ``cell``, ``view`` are identifiers as written."""

    name: Name
    library: str | None
    cell: str
    view: str
    designator: str | None
    properties: dict[str, str]
    form: list | int = field(repr=False)  # the list, or the offset of a compound form


@dataclass
class View:
    name: Name
    ports: dict[str, Port]
    instances: dict[str, Instance]
    nets: list[Net]
    properties: dict[str, str]
    has_contents: bool
    form: list = field(repr=False)


@dataclass
class Cell:
    name: Name
    library: str
    external: bool
    views: dict[str, View]
    properties: dict[str, str]
    form: list = field(repr=False)


@dataclass
class Library:
    name: Name
    external: bool
    cells: dict[str, Cell]


@dataclass(frozen=True)
class Design:
    """The top cell (identifiers as written)."""

    name: Name
    library: str | None
    cell: str
    form: list = field(repr=False)


@dataclass
class EdifFile:
    """One EDIF file: its name, libraries by key, the design (or None) and the parsed text."""

    name: Name
    libraries: dict[str, Library]
    design: Design | None
    doc: Document


_ESCAPE = re.compile(r"%([0-9]+(?:\s+[0-9]+)*)\s*%")


def decode_string(text: str) -> str:
    """A string's text with EDIF's ``%n%`` escapes (decimal character codes) decoded."""
    if "%" not in text:
        return text
    return _ESCAPE.sub(lambda m: "".join(chr(int(n)) for n in m.group(1).split()), text)


def keyword(form: object) -> str:
    """The form's keyword in lower case, or '' when ``form`` is not a list headed by a symbol."""
    if isinstance(form, list) and form and isinstance(form[0], Symbol):
        return form[0].lower()
    return ""


def _children(form: list, *keywords: str) -> list[list]:
    """The sub-forms of ``form`` whose keyword (any case) is one of ``keywords``, in order."""
    return [item for item in form if isinstance(item, list) and item
            and isinstance(item[0], Symbol) and item[0].lower() in keywords]


def _child(form: list, kw: str) -> list | None:
    """The first sub-form of ``form`` whose keyword is ``kw``, or None."""
    for item in form:
        if isinstance(item, list) and item and isinstance(item[0], Symbol) \
                and item[0].lower() == kw:
            return item
    return None


class FormReader:
    """Reads forms of one document; ``fail`` raises a NetlistError located at a form."""

    def __init__(self, doc: Document) -> None:
        self.doc = doc
        self._names: dict[str, Name] = {}  # plain identifier -> its Name (shared, frozen)

    def fail(self, form: list, message: str) -> None:
        raise self.doc.error(form, message)

    def arg(self, form: list, index: int, what: str) -> object:
        if len(form) <= index:
            self.fail(form, f"malformed '{form[0]}': expected {what}")
        return form[index]

    def string(self, token: object, form: list) -> str:
        """A stringToken: "text" or (stringDisplay "text" ...), with %n% escapes decoded."""
        if type(token) is str and "%" not in token:  # the common case: a plain string
            return token
        if keyword(token) == "stringdisplay":
            token = self.arg(token, 1, "a string")  # type: ignore[arg-type]
        if not isinstance(token, str) or isinstance(token, Symbol):
            self.fail(form, f"malformed '{form[0]}': expected a string, found {_show(token)}")
        return decode_string(token)  # type: ignore[arg-type]

    def identifier(self, token: object, form: list) -> Symbol:
        if type(token) is Symbol:
            return token
        if keyword(token) == "name":  # (name identifier (display ...))
            token = self.arg(token, 1, "an identifier")  # type: ignore[arg-type]
        if not isinstance(token, Symbol):
            self.fail(form, f"malformed '{form[0]}': expected an identifier, found {_show(token)}")
        return token  # type: ignore[return-value]

    def name_def(self, token: object, form: list) -> Name:
        """A nameDef: identifier, (name ...), (rename identifier "display"), or (array nameDef n...)."""
        if type(token) is Symbol:
            found = self._names.get(token)
            if found is None:
                display = token[1:] if token.startswith("&") else str(token)
                found = self._names[token] = Name(token.casefold(), display)
            return found
        kw = keyword(token)
        if kw == "array":
            inner = self.name_def(self.arg(token, 1, "a name"), token)  # type: ignore[arg-type]
            dims = tuple(self.integer(size, token) for size in token[2:])  # type: ignore[index]
            if not dims or min(dims) < 1:
                self.fail(token, "malformed 'array': expected one or more sizes of at least 1")  # type: ignore[arg-type]
            return Name(inner.key, inner.display, dims)
        if kw == "rename":
            ident = self.identifier(self.arg(token, 1, "an identifier"), token)  # type: ignore[arg-type]
            display = self.string(self.arg(token, 2, "a display string"), token)  # type: ignore[arg-type]
            return Name(ident.casefold(), display)
        ident = self.identifier(token, form)
        return Name(ident.casefold(), ident[1:] if ident.startswith("&") else str(ident))

    def name_ref(self, token: object, form: list) -> str:
        """A referenced identifier as written (compare with ``.casefold()``)."""
        return str(self.identifier(token, form))

    def integer(self, token: object, form: list) -> int:
        if not isinstance(token, int) or isinstance(token, bool):
            self.fail(form, f"malformed '{form[0]}': expected an integer, found {_show(token)}")
        return token  # type: ignore[return-value]

    def typed_value(self, form: list, prop: list) -> str | None:
        """Text of a typedValue: string, integer, number, boolean; None for other types.
        A value that is not a form at all (``(property TOL 5)``) is malformed."""
        if not isinstance(form, list):
            self.fail(prop, f"malformed '{prop[0]}': expected a typed value such as "
                            f"(string ...) or (integer ...), found {_show(form)}")
        kw = keyword(form)
        values = form[1:]
        if kw == "string":
            return " ".join(self.string(v, prop) for v in values)
        if kw == "integer":
            return " ".join(str(self.integer(v, prop)) for v in values)
        if kw == "number":
            return " ".join(self.scaled_number(v, prop) for v in values)
        if kw == "boolean":
            return " ".join(self.boolean(v, prop) for v in values)
        return None

    def scaled_number(self, token: object, form: list) -> str:
        """An integer, or (e mantissa exponent) = mantissa × 10^exponent, as decimal text."""
        if keyword(token) == "e":
            mantissa = self.integer(self.arg(token, 1, "a mantissa"), token)  # type: ignore[arg-type]
            exponent = self.integer(self.arg(token, 2, "an exponent"), token)  # type: ignore[arg-type]
            if abs(exponent) > 400:
                self.fail(token, f"number exponent {exponent} is out of range")  # type: ignore[arg-type]
            from decimal import Decimal  # only (e m x) numbers need it; not loaded on every run

            return format(Decimal(mantissa).scaleb(exponent), "f")
        return str(self.integer(token, form))

    def boolean(self, token: object, form: list) -> str:
        kw = keyword(token)
        if kw not in ("true", "false"):
            self.fail(form, f"malformed boolean: expected (true) or (false), found {_show(token)}")
        return kw

    def properties(self, form: list) -> dict[str, str]:
        """Properties of a form by display name; values as text (see :meth:`typed_value`)."""
        return self.property_forms(_children(form, "property"))

    def property_forms(self, forms: list[list]) -> dict[str, str]:
        """Properties from their ``property`` forms, as :meth:`properties` gives them."""
        found: dict[str, str] = {}
        for prop in forms:
            name = self.name_def(self.arg(prop, 1, "a name"), prop)
            value = self.typed_value(self.arg(prop, 2, "a value"), prop)  # type: ignore[arg-type]
            if value is not None:
                found[name.display] = value
        return found

    def check_level(self, form: list) -> None:
        for level in _children(form, "ediflevel"):
            number = self.integer(self.arg(level, 1, "a level"), level)
            if number != 0:
                self.fail(level, f"edifLevel {number} is not supported; "
                                 "only level 0 (plain netlists) can be read")


def _show(token: object) -> str:
    if isinstance(token, list):
        return f"'({token[0]} ...)'" if token else "'()'"
    return repr(str(token)) if isinstance(token, str) else repr(token)


def member_display(name: Name, index: int) -> str:
    """Display name of element ``index`` (row-major) of an array name.

    A display ending in a bus range (``D[7:0]``, ``D(0:7)``, ``D<3:0>``) names elements by
    bit number, the first element being the left end of the range (EDIF member 0 is the
    leftmost); otherwise elements are ``NAME[i]`` (``NAME[i][j]`` for two dimensions).

    >>> member_display(Name("d", "D[7:0]", (8,)), 0), member_display(Name("q", "Q", (2, 2)), 3)
    ('D[7]', 'Q[1][1]')
    """
    match = _BUS.fullmatch(name.display)
    if match and len(name.dims) == 1:
        left, right = int(match["left"]), int(match["right"])
        if abs(left - right) + 1 == name.dims[0]:
            bit = left - index if left >= right else left + index
            return f"{match['base']}[{bit}]"
    indices = []
    for size in reversed(name.dims):
        indices.append(index % size)
        index //= size
    return name.display + "".join(f"[{i}]" for i in reversed(indices))


_BUS = re.compile(r"(?P<base>.*?)[\[(<](?P<left>[0-9]+):(?P<right>[0-9]+)[\])>]")


def read_edif_file(doc: Document) -> EdifFile:
    """Declaration records of the ``(edif ...)`` form that is ``doc.root``."""
    from linter.readers.edif_forms import read_top

    return read_top(FormReader(doc))
