"""S-expressions with positions: compiled regexes, an explicit stack, no recursion.

The tree has the types :mod:`sexpdata` gives (``sexpdata.Symbol`` for symbols, ``str`` for
strings, ``int`` / ``float`` for numbers, plain ``list`` for lists), so sexpdata can serve
as the reference in tests. Positions live beside the tree: :meth:`Document.position_of`
gives the 1-based (line, column) of a list's opening parenthesis, computed on first use, so
parsing pays almost nothing for positions and only located lists pay at all.

How it stays fast: one ``findall`` of one compiled regex tokenizes the whole text in C;
the Python loop then only pushes and pops lists; symbols are shared through a cache
(an EDIF file repeats a few dozen keywords millions of times); the cyclic garbage collector
is paused while the tree is built (it would otherwise rescan the growing tree again and
again). Offsets of the opening parentheses come from a second regex, run once on the
first position request. A text with a syntax error is parsed a second time by a slower
loop that tracks offsets, only to say where the error is.

A reader may also hand :func:`parse` *compound forms* (:class:`CompoundForms`): a token
pattern that matches whole, well-formed lists of a frequent spelling in one regex match each,
and a builder that turns each into a record placed in the tree instead of the list (the EDIF
reader reads its instances and nets so). Those lists then never exist, and the offsets of the
lists that do are recorded as they are met.

The syntax is the one EDIF 2.0.0 uses, narrower than Lisp's. Where sexpdata reads an
atom differently, this module follows EDIF, on purpose:

* strings run from ``"`` to the next ``"``; a backslash is an ordinary character (sexpdata
  treats it as an escape; EDIF writes special characters as ``%34%``, which the EDIF reader
  decodes, not this module);
* ``;``, ``'``, ``[``, ``]`` are ordinary symbol characters (sexpdata reads a comment, a
  quote and brackets);
* ``t`` and ``nil`` are symbols (sexpdata by default reads True and an empty list:
  compare with ``sexpdata.loads(text, true=None, nil=None)``);
* numbers are ASCII: ``[+-]digits`` is an int, a decimal or exponent form a float;
  ``inf``, ``nan``, ``1_000`` and non-ASCII digits are symbols (sexpdata hands every atom to
  ``int()`` and then ``float()``, which read those as numbers).

Nesting deeper than :data:`MAX_DEPTH` is refused with a located error.
"""

from __future__ import annotations

import re
from array import array
from bisect import bisect_right
from itertools import accumulate, chain, compress, count, repeat
from operator import add, lt, methodcaller, sub
from typing import Iterable, Iterator, Protocol, Sequence

from sexpdata import Symbol

from linter.errors import NetlistError
from linter.gc_pause import paused_gc  # the trees hold no reference cycles; see there
from linter.limits import active

__all__ = ["MAX_DEPTH", "Document", "CompoundForms", "parse", "paused_gc", "Symbol"]

MAX_DEPTH = 1000
"""Deepest list nesting accepted by default (``max_nesting`` in :mod:`linter.limits` sets it). EDIF netlists nest about 10 deep; 1,000 is far beyond any
real file and far below what recursive consumers of the tree (``==``, ``repr``) survive."""

_WS = " \t\n\r\x0b\x0c"  # string.whitespace, as sexpdata uses
_TOKEN = re.compile(rf'[{_WS}]*+([()]|"[^"]*+"|[^{_WS}()"]++|")')
"""One token per match: a parenthesis, a whole string with its quotes, an atom, or a lone
quote (a string that never closes). Every character is either whitespace or in a token."""
_LOCATED_TOKEN = re.compile(rf'[{_WS}]*+(?:([()]|"[^"]*+"|[^{_WS}()"]++)|("))')
_CR_OR_STRING = re.compile(r'"[^"]*+"|\r')
_UP_TO_OPEN = re.compile(r'(?:[^("]++|"[^"]*+")*+\(?')
"""Text up to and including the next ``(`` outside strings (or to the end of the text): in a
text whose strings are all closed, successive matches cover it end to end."""
_ENDS_WITH_OPEN = methodcaller("endswith", "(")
_CHUNK = 1 << 20
"""Characters tokenized at a time (about): the token strings of a whole 30 MB netlist would
cost more memory than its tree."""
_SEARCHES = 8
"""Single :meth:`Document.offset_of` lookups made by search before an index of every list is built."""
_INT = re.compile(r"[+-]?[0-9]+")
_FLOAT = re.compile(r"[+-]?(?:[0-9]+\.[0-9]*|\.[0-9]+|[0-9]+)(?:[eE][+-]?[0-9]+)?")
_NUMBER_START = frozenset("0123456789+-.")
_MAX_INT_DIGITS = 4000  # below Python's int/str conversion limit (4300 digits)


class _SyntaxProblem(Exception):
    """Raised by the fast loop; the located loop then finds the place and the words."""


class Document:
    """A parsed text: its one top-level datum, and where each list of it starts.

    Attributes
    ----------
    text, source : str
        The text and the file name used in messages.
    root : object
        The top-level datum (for EDIF, the ``(edif ...)`` list).
    """

    def __init__(self, text: str, source: str, root: object, lists: list[list],
                 opens: array | None = None) -> None:
        self.text = text
        self.source = source
        self.root = root
        self._lists = lists  # every list, in the order of its "(" in the text
        self._ordinal: dict[int, int] | None = None
        self._open_offsets: array | None = opens  # the offset just after each list's "("
        self._line_starts: array | None = None
        self._single_lookups = 0

    def offset_of(self, node: list | int) -> int:
        """Character offset of the ``(`` that opens ``node`` (a list of this document, or a
        compound form's record, which is located by its offset: an int is returned as it is).

        The first few lookups search the lists in order; after :data:`_SEARCHES` of them an
        index of every list is built (for many lists at once, :meth:`offsets_of` is cheaper).
        """
        if type(node) is int:
            return node
        if self._ordinal is None and self._single_lookups >= _SEARCHES:
            self._ordinal = {id(item): index for index, item in enumerate(self._lists)}
        self._single_lookups += 1
        if self._ordinal is not None:
            ordinal = self._ordinal.get(id(node))
        else:
            ordinal = next((index for index, item in enumerate(self._lists) if item is node), None)
        if ordinal is None:
            raise ValueError("node is not a list of this document")
        return self._opens()[ordinal] - 1

    def offsets_of(self, nodes: Sequence[list | int]) -> list[int]:
        """Character offsets of the ``(`` of many lists of this document (or offsets as they
        are, see :meth:`offset_of`), in one pass."""
        types = set(map(type, nodes))
        if types <= {int}:
            return list(nodes)  # type: ignore[arg-type]
        if int in types:
            lists = [node for node in nodes if type(node) is not int]
            found = iter(self.offsets_of(lists))  # type: ignore[arg-type]
            return [node if type(node) is int else next(found) for node in nodes]  # type: ignore[misc]
        wanted: dict[int, int | None] = dict.fromkeys(map(id, nodes))  # a form may be placed twice
        every = list(map(id, self._lists))
        for ordinal in compress(range(len(every)), map(wanted.__contains__, every)):
            wanted[every[ordinal]] = ordinal
        if None in wanted.values():
            raise ValueError("node is not a list of this document")
        ends = self._opens()
        return [ends[wanted[id(node)]] - 1 for node in nodes]  # type: ignore[index]

    def positions_of(self, nodes: Sequence[list | int]) -> list[tuple[int, int]]:
        """1-based (line, column) of the ``(`` of many lists of this document, in one pass."""
        return [self.position(offset) for offset in self.offsets_of(nodes)]

    def _opens(self) -> array:
        """The offset just after every ``(`` outside strings, in text order (computed once).

        When the text has as many ``(`` as the tree has lists, none is inside a string, and
        the pieces between them (``str.split``) give the offsets; otherwise the matches of
        :data:`_UP_TO_OPEN` cover each chunk of the text end to end, each but the last ending
        just after one ``(`` outside strings. Either way a running sum of lengths gives the
        offsets without a Python step per parenthesis.
        """
        if self._open_offsets is None:
            text = self.text
            every_open = text.count("(") == len(self._lists)
            ends = array("q")  # the offset just after each "("
            for start, end in _chunks(text):
                if every_open:  # k-th "(" ends at start + (pieces before it) + k
                    pieces = text[start:end].split("(")
                    ends.extend(map(add, accumulate(map(len, pieces[:-1])), count(start + 1)))
                    continue
                segments = _UP_TO_OPEN.findall(text, start, end)
                after = accumulate(map(len, segments), initial=start)
                next(after)
                ends.extend(compress(after, map(_ENDS_WITH_OPEN, segments)))
            self._open_offsets = ends
        return self._open_offsets

    def position(self, offset: int) -> tuple[int, int]:
        """1-based (line, column) of a character offset; columns count characters."""
        if self._line_starts is None:
            # LF ends a line (CRLF too: the CR is the line's last character); in a text
            # without any LF (an old-Mac file) a CR outside strings ends a line
            if "\n" in self.text or "\r" not in self.text:
                ends = (match.end() for match in re.finditer("\n", self.text))
            else:
                ends = (match.end() for match in _CR_OR_STRING.finditer(self.text)
                        if match.group() == "\r")
            self._line_starts = array("q", [0])
            self._line_starts.extend(ends)
        line = bisect_right(self._line_starts, offset)
        return line, offset - self._line_starts[line - 1] + 1

    def positions(self, offsets: Sequence[int]) -> list[tuple[int, int]]:
        """:meth:`position` of many offsets, in one :meth:`sweep`."""
        order = sorted(range(len(offsets)), key=offsets.__getitem__)
        found: list[tuple[int, int]] = [(0, 0)] * len(offsets)
        for index, place in zip(order, self.sweep(offsets[index] for index in order)):
            found[index] = place
        return found

    def sweep(self, ascending: Iterable[int]) -> Iterator[tuple[int, int]]:
        """:meth:`position` of offsets given in ascending order: when every line ends with LF,
        one pass that counts the line ends between two offsets (else one lookup each)."""
        text = self.text
        if "\n" not in text and "\r" in text:  # old-Mac line ends: CRs outside strings
            yield from map(self.position, ascending)
            return
        line, at, start, count, last = 1, 0, 0, text.count, text.rfind
        for offset in ascending:
            ends = count("\n", at, offset)
            if ends:  # (only the text between two offsets is looked at)
                line += ends
                start = last("\n", at, offset) + 1
            at = offset
            yield line, offset - start + 1

    def ascending_positions(self, offsets: Sequence[int]) -> tuple[list[int], list[int]] | None:
        """Lines and columns of strictly ascending offsets, as :meth:`sweep` gives them, each a
        list made by built-in passes (no Python step per offset); None when the offsets are
        not strictly ascending or the text's lines end with CRs alone (ask :meth:`sweep`).

        An offset's line is 1 + the line ends before it (counted between each offset and the
        one before); its line starts after the last line end before it, carried over from the
        offset before when there is none between the two.
        """
        text = self.text
        if ("\n" not in text and "\r" in text) or not all(map(lt, offsets, offsets[1:])):
            return None
        starts = [0, *offsets[:-1]]
        lines = list(accumulate(map(text.count, repeat("\n"), starts, offsets), initial=1))
        del lines[0]
        line_ends = list(map(text.rfind, repeat("\n"), starts, offsets))
        if -1 in line_ends[1:]:  # two offsets on one line: carry the line start over
            line_ends = accumulate(line_ends, max)
        columns = list(map(sub, offsets, line_ends))  # offset - (start - 1): 1-based
        return lines, columns

    def position_of(self, node: list | int) -> tuple[int, int]:
        """1-based (line, column) of the ``(`` that opens ``node``."""
        return self.position(self.offset_of(node))

    def error(self, where: list | int, message: str) -> NetlistError:
        """A :class:`NetlistError` at a list of this document or at an offset (caller raises)."""
        offset = where if isinstance(where, int) else self.offset_of(where)
        line, column = self.position(offset)
        return NetlistError(self.source, line, column, message)


class CompoundForms(Protocol):
    """Whole forms read in one regex match instead of token by token (see :func:`parse`).

    ``pattern`` matches one token per match, like :data:`_TOKEN`, with optional leading
    whitespace: group ``token_group`` holds a plain token (a parenthesis, a string, an atom or
    a lone quote); any other outermost group is a compound form, a complete well-formed list
    whose atoms are all symbols or strings, nested at most :data:`COMPOUND_DEPTH` deep.
    ``build(match)`` turns a compound match into the record that stands in the tree where the
    form's list would be; the record is located by the offset ``match.start(token_group)``
    would have, which the builder reads from the match itself. A ``builders`` attribute, when
    there is one, is indexed by ``match.lastindex`` and holds ``build``'s builder of that
    form (called directly, one Python call less per form).
    """

    pattern: re.Pattern[str]
    token_group: int

    def build(self, match: re.Match[str]) -> object: ...


COMPOUND_DEPTH = 8
"""Deepest nesting a compound form may have; near :data:`MAX_DEPTH` the plain parser runs."""


class _Fallback(Exception):
    """The compound parse cannot decide alone (nesting near the limit): parse plainly."""


def parse(text: str, source: str, compounds: CompoundForms | None = None) -> Document:
    """Parse exactly one top-level datum (normally one list) from ``text``.

    With ``compounds``, forms the pattern matches whole become records instead of lists
    (see :class:`CompoundForms`); everything else is as without.

    Raises
    ------
    NetlistError
        Located at the offending character: an unterminated string, a ``)`` with no list
        open, the end of the text with lists still open, nesting beyond :data:`MAX_DEPTH`,
        a number of absurd length, no datum at all, or more than one top-level datum.

    >>> parse('(cell (rename a "A") 3)', "x").root
    [Symbol('cell'), [Symbol('rename'), Symbol('a'), 'A'], 3]
    """
    opens = None
    try:
        with paused_gc():
            if compounds is None:
                top, lists = _build(_tokens(text))
            else:
                try:
                    top, lists, opens = _build_compound(text, compounds)
                except _Fallback:
                    top, lists = _build(_tokens(text))
    except _SyntaxProblem:
        _raise_located(text, source)
        raise AssertionError("the located parser accepted what the fast parser refused") from None
    doc = Document(text, source, None, lists, opens)
    if len(top) != 1:
        _raise_located(text, source)
    doc.root = top[0]
    return doc


def _chunks(text: str, size: int = _CHUNK) -> Iterator[tuple[int, int]]:
    """(start, end) pieces of ``text`` that together cover it, each ending just after a line end
    outside strings (or at the end of the text), so that no token crosses a boundary.

    Strings have no escapes, so an odd number of quotes in a piece means its end is inside a
    string: the piece is then carried on past the string's closing quote.
    """
    start, length = 0, len(text)
    while start < length:
        end = text.find("\n", start + size)
        end = length if end < 0 else end + 1
        if text.count('"', start, end) % 2:
            close = text.find('"', end)
            end = length if close < 0 else close + 1
        yield start, end
        start = end


def _tokens(text: str) -> Iterable[str]:
    """Every token of ``text`` in order, tokenized one chunk at a time (see :func:`_chunks`)."""
    return chain.from_iterable(_TOKEN.findall(text, start, end) for start, end in _chunks(text))


def _value(token: str) -> object:
    """The datum of a token other than a parenthesis: a string's text, or an atom."""
    if token[0] == '"':
        if len(token) == 1:  # a quote that never closes
            raise _SyntaxProblem
        return token[1:-1]
    return _atom(token)


def _atom(token: str) -> object:
    if token[0] in _NUMBER_START:
        if _INT.fullmatch(token):
            if len(token) > _MAX_INT_DIGITS:
                raise _SyntaxProblem
            return int(token)
        if _FLOAT.fullmatch(token):
            return float(token)
    return Symbol(token)


def _build(tokens: Iterable[str]) -> tuple[list, list[list]]:
    """The tree from the token list; raises _SyntaxProblem without saying where."""
    top: list = []
    current = top
    stack: list[list] = []
    push, pop = stack.append, stack.pop
    lists: list[list] = []
    register = lists.append
    atoms: dict[str, object] = {}
    known = atoms.get
    max_depth = active().max_nesting
    for token in tokens:
        if token == "(":
            child: list = []
            current.append(child)
            push(current)
            register(child)
            current = child
            if len(stack) > max_depth:
                raise _SyntaxProblem
        elif token == ")":
            if not stack:
                raise _SyntaxProblem
            current = pop()
        else:  # atoms and strings are shared: keywords, values and part numbers repeat
            value = known(token)
            if value is None:
                value = atoms[token] = _value(token)
            current.append(value)
    if stack:
        raise _SyntaxProblem
    return top, lists


def _build_compound(text: str, compounds: CompoundForms) -> tuple[list, list[list], array]:
    """:func:`_build` with compound forms; also the offset just after each list's ``(``."""
    top: list = []
    current = top
    stack: list[list] = []
    push, pop = stack.append, stack.pop
    lists: list[list] = []
    register = lists.append
    opens = array("q")
    opened = opens.append
    atoms: dict[str, object] = {}
    known = atoms.get
    max_depth = active().max_nesting
    near_limit = max_depth - COMPOUND_DEPTH
    plain = compounds.token_group
    builders = getattr(compounds, "builders", None)
    if builders is None:  # one builder for every compound form
        builders = (compounds.build,) * plain
    for match in compounds.pattern.finditer(text):
        which = match.lastindex
        if which != plain:
            if len(stack) >= near_limit:
                raise _Fallback
            current.append(builders[which](match))  # type: ignore[index]
            continue
        token = match.group(plain)
        if token == "(":
            child: list = []
            current.append(child)
            push(current)
            register(child)
            opened(match.end(plain))
            current = child
            if len(stack) > max_depth:
                raise _SyntaxProblem
        elif token == ")":
            if not stack:
                raise _SyntaxProblem
            current = pop()
        else:
            value = known(token)
            if value is None:
                value = atoms[token] = _value(token)
            current.append(value)
    if stack:
        raise _SyntaxProblem
    return top, lists, opens


def _located_tokens(text: str) -> Iterator[tuple[int, str | None]]:
    """(offset, token) pairs; token None for a quote that never closes."""
    for match in _LOCATED_TOKEN.finditer(text):
        if match.lastindex == 2:
            yield match.start(2), None
        else:
            yield match.start(1), match.group(1)


def _raise_located(text: str, source: str) -> None:
    """Walk the text again with offsets and raise the first syntax error, located."""
    doc = Document(text, source, None, [])
    opens: list[int] = []
    roots = 0
    max_depth = active().max_nesting
    for offset, token in _located_tokens(text):
        if token is None:
            raise doc.error(offset, "unterminated string (no closing '\"')")
        if roots and not opens:
            if token == ")":
                raise doc.error(offset, "unexpected ')' with no list open")
            raise doc.error(offset, "unexpected text after the end of the top-level form")
        if token == "(":
            opens.append(offset)
            if len(opens) > max_depth:
                raise doc.error(offset, f"lists nested deeper than {max_depth} levels")
        elif token == ")":
            if not opens:
                raise doc.error(offset, "unexpected ')' with no list open")
            opens.pop()
        elif token[0] in _NUMBER_START and _INT.fullmatch(token) and len(token) > _MAX_INT_DIGITS:
            raise doc.error(offset, f"number with more than {_MAX_INT_DIGITS} digits")
        if not opens:
            roots += 1
    if opens:
        line, column = doc.position(opens[-1])
        end = len(text.rstrip(_WS))  # just after the last token, not after trailing blank lines
        raise doc.error(end, f"unexpected end of file: {len(opens)} list(s) still open, "
                                   f"the innermost opened at {line}:{column}")
    if roots == 0:
        raise doc.error(0, "no s-expression found (the text is empty or blank)")
