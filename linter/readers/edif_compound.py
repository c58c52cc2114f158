"""The most frequent EDIF forms read whole, in one regex match each.

A 100,000-part netlist is mostly ``instance`` forms (about 40 tokens each) and ``net`` forms
of ``portRef``s (six tokens each). :class:`EdifCompounds` gives
:func:`linter.readers.sexpr.parse` a token pattern that matches the plain spelling of each of
them as a single token and turns it straight into the record :mod:`linter.readers.edif_forms`
would have made from its list, so that their lists never exist:

* ``(instance NAME (viewRef V (cellRef C [(libraryRef L)])) ITEM...)`` where NAME is an
  identifier or ``(rename identifier "text")`` and each ITEM is
  ``(property NAME (string "text"))`` or ``(designator "text")``;
* ``(net NAME (joined PORTREF...))``, its port references kept as name pairs
  (:attr:`linter.readers.edif_syntax.Net.pairs`), not as records;
* ``PORTREF``, that is ``(portRef P [(instanceRef I)])``, anywhere else.

Any other spelling (a member, an array, a typed value other than one string, a comment, an
unusual layout such as no space after a keyword) is not matched and is read token by token
as before, so the records are the same either way; only what is matched is faster and
smaller. Keywords match in any ASCII letter case, as the form reader's ``keyword`` does;
identifiers are atoms that can only read as symbols (not starting with a digit, sign or
point). A record stands in the tree where its list would have been and is located by the
offset of its ``(``.
"""

from __future__ import annotations

import re
from itertools import chain

from linter.readers.edif_syntax import Instance, Name, Net, PortRef, decode_string

__all__ = ["EdifCompounds"]

_WS = " \t\n\r\x0b\x0c"  # the s-expression whitespace (linter.readers.sexpr)
_W = f"[{_WS}]"
_IDENT = rf'[^{_WS}()"0-9+\-.][^{_WS}()"]*+'
_STRING = r'"([^"]*+)"'


def _kw(word: str) -> str:
    """A keyword in any ASCII letter case (only: the ``a`` flag), followed by the end of its
    atom. (The case-blind literal is matched faster than a class per letter.)"""
    return rf'(?ai:{word})(?![^{_WS}()"])'


def _ws_form(*pieces: str) -> str:
    """``( piece piece ... )`` with optional whitespace around and between the pieces."""
    return rf"\({_W}*+" + rf"{_W}*+".join(pieces) + rf"{_W}*+\)"


def _name_def() -> str:
    """An identifier, or (rename identifier "text"): groups identifier; renamed, text."""
    return rf"(?:({_IDENT})|" + _ws_form(_kw("rename"), f"({_IDENT})", _STRING) + ")"


_BARE_STRING = r'"[^"]*+"'
_PROPERTY = _ws_form(_kw("property"), rf"(?:{_IDENT}|" + _ws_form(_kw("rename"), _IDENT,
                                                                   _BARE_STRING) + ")",
                     _ws_form(_kw("string"), _BARE_STRING))
_DESIGNATOR = _ws_form(_kw("designator"), _BARE_STRING)
_INSTANCE = _ws_form(
    _kw("instance"), _name_def(),
    _ws_form(_kw("viewRef"), f"({_IDENT})",
             _ws_form(_kw("cellRef"), f"({_IDENT})",
                      "(?:" + _ws_form(_kw("libraryRef"), f"({_IDENT})") + ")?")),
    rf"((?:(?:{_PROPERTY}|{_DESIGNATOR}){_W}*+)*+)")
"""Groups: 1 the form, 2 a plain name, 3 and 4 a renamed name and its text, 5 view, 6 cell,
7 library (or None), 8 the properties and designators, as written."""


def _port_ref(group: str) -> str:
    """(portRef P [(instanceRef I)]); ``group`` is "(" to capture P and I, or "(?:"."""
    return _ws_form(_kw("portRef"), f"{group}{_IDENT})",
                    "(?:" + _ws_form(_kw("instanceRef"), f"{group}{_IDENT})") + ")?")


_PORT_REF = _port_ref("(")
_NET = _ws_form(_kw("net"), _name_def(),
                _ws_form(_kw("joined"), rf"((?:{_W}*+{_port_ref('(?:')})*+)"))
"""Groups: 9 the form, 10 a plain name, 11 and 12 a renamed name and its text, 13 the port
references, as written."""
_PLAIN = r'[()]|"[^"]*+"|[^' + _WS + r'()"]++|"'
"""Group 17: a plain token, exactly as :data:`linter.readers.sexpr._TOKEN` reads one."""

_ITEM = re.compile(
    _ws_form(_kw("property"), _name_def(), _ws_form(_kw("string"), _STRING))
    + "|" + _ws_form(_kw("designator"), _STRING))
"""One item of group 8: groups plain name, renamed name, its text, value; or designator."""
_PAIR = re.compile(_PORT_REF)
"""One port reference of group 13 (or a whole one, groups 14 to 16): port, instance. The
strict reading; :data:`_PAIRS` reads group 13 (tests/test_edif_compound.py: the same pairs)."""

_PAIRS = re.compile(rf"\({_W}*+[A-Za-z]++{_W}++([^{_WS}()\"]++)"
                    rf"(?:{_W}*+\({_W}*+[A-Za-z]++{_W}++([^{_WS}()\"]++))?").findall
"""The (port, instance or '') of each port reference of group 13, a text the pattern has
matched whole: each reference opens with a keyword (letters), whitespace and its port, then
maybe a nested keyword, whitespace and the instance (what :data:`_PAIR` finds, without
checking again what the pattern has checked)."""

TOKEN_GROUP = 17
PATTERN = re.compile(rf"{_W}*+(?:({_INSTANCE})|({_NET})|({_PORT_REF})|({_PLAIN}))")
_MAX_SHARED = 10_000
"""Distinct property sets remembered for sharing (a netlist repeats a few hundred)."""


class _Atoms(dict):
    """Texts by themselves: ``atoms[text]`` is the first equal text met (one object for equal
    names); a text not met before is added by :meth:`__missing__`."""

    def __missing__(self, text: str) -> str:
        self[text] = text
        return text


class EdifCompounds:
    """The compound forms of one parse (see the module docstring); equal property sets and
    texts are shared, one object each.

    ``builders[k]`` is the builder of a match whose ``lastindex`` is ``k`` (1 an instance,
    9 a net, 14 a port reference; None elsewhere): :func:`linter.readers.sexpr.parse` calls it
    directly, one Python call per form; :meth:`build` is the same by one more call.
    """

    pattern = PATTERN
    token_group = TOKEN_GROUP

    def __init__(self) -> None:
        self._items: dict[str, tuple[str | None, dict[str, str]]] = {}
        self._texts: dict[str, str] = {}
        self._atoms: _Atoms = _Atoms()
        self._references: dict[tuple[str | None, str, str], tuple[str | None, str, str]] = {}
        builders: list = [None] * TOKEN_GROUP
        builders[1], builders[9], builders[14] = self._instance_builder(), self._net_builder(), \
            self._port_ref_builder()
        self.builders: tuple = tuple(builders)

    def build(self, match: re.Match[str]) -> object:
        return self.builders[match.lastindex](match)  # type: ignore[index]

    def _port_ref_builder(self):
        share = self._atoms.setdefault

        def port_ref(match: re.Match[str]) -> PortRef:
            instance = match.group(16)
            port = match.group(15)
            return PortRef(share(port, port), None,
                           instance if instance is None else share(instance, instance),
                           match.start(14))

        return port_ref

    def _net_builder(self):
        """``net(match)``: the Net of a net form read whole; its pairs one object per name
        (no Python call for a name seen before)."""
        names, chained, pairs_of = self._atoms.__getitem__, chain.from_iterable, _PAIRS

        def net(match: re.Match[str]) -> Net:
            ident, renamed, display, joined = match.group(10, 11, 12, 13)
            if ident is not None:
                name = Name(ident.casefold(), ident[1:] if ident[0] == "&" else ident)
            else:
                name = Name(renamed.casefold(), decode_string(display))
            return Net(name, (), match.start(9), tuple(map(names, chained(pairs_of(joined)))))

        return net

    def _instance_builder(self):
        """``instance(match)``: the Instance of an instance form read whole; its name one
        object with the port references' spelling of it, its library, cell and view names
        and its property table shared."""
        share, tables, references = self._atoms.setdefault, self._items.get, self._references.get
        properties_of, shared_reference = self._properties, self._shared_reference

        def instance(match: re.Match[str]) -> Instance:
            ident, renamed, display, view, cell, library, items = match.group(2, 3, 4, 5, 6, 7, 8)
            if ident is not None:
                ident = share(ident, ident)  # (mostly a new name)
                name = Name(ident.casefold(), ident[1:] if ident[0] == "&" else ident)
            else:
                name = Name(renamed.casefold(), decode_string(display))
            designator, properties = tables(items) or properties_of(items)
            reference = (library, cell, view)
            library, cell, view = references(reference) or shared_reference(reference)
            return Instance(name, library, cell, view, designator, properties, match.start(1))

        return instance

    def _shared_reference(self, reference: tuple[str | None, str, str]
                          ) -> tuple[str | None, str, str]:
        """(library, cell, view) as first met, its names one object each."""
        found = self._references.get(reference)
        if found is None:
            library, cell, view = reference
            share = self._atoms.__getitem__
            found = self._references[reference] = (
                library if library is None else share(library), share(cell), share(view))
        return found

    def _properties(self, items: str) -> tuple[str | None, dict[str, str]]:
        """Designator (the first) and properties by display name, later ones winning; equal
        texts give the same (shared, never changed) dictionary."""
        found = self._items.get(items)
        if found is not None:
            return found
        designator: str | None = None
        properties: dict[str, str] = {}
        for ident, renamed, display, value, given in _ITEM.findall(items):
            if not ident and not renamed:  # a designator (findall gives "" for a group left out)
                if designator is None:
                    designator = self._text(given)
                continue
            key = (ident[1:] if ident.startswith("&") else ident) if ident else \
                decode_string(display)
            properties[key] = self._text(value)
        found = (designator, properties)
        if len(self._items) < _MAX_SHARED:
            self._items[items] = found
        return found

    def _text(self, text: str) -> str:
        """A string's text, %n% escapes decoded, one object for equal texts."""
        found = self._texts.get(text)
        if found is None:
            found = decode_string(text)
            if len(self._texts) < 4 * _MAX_SHARED:
                self._texts[text] = found
        return found
