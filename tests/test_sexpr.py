"""The position-tracking s-expression parser, against sexpdata as the reference reader.

sexpdata differs from EDIF's s-expressions on purpose in a few atoms (see the module
docstring of linter.readers.sexpr); the generator below leaves exactly those out, and
sexpdata is called with ``true=None, nil=None`` so that ``t`` and ``nil`` stay symbols.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
import sexpdata
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.errors import NetlistError
from linter.readers.sexpr import MAX_DEPTH, Document, parse

ROOT = Path(__file__).resolve().parent.parent
EDIF_FIXTURES = sorted(p for p in ROOT.glob("fixtures/**/*.edif") if "bad" not in p.parts)


def reference(text: str) -> object:
    """sexpdata's reading of ``text`` with t/nil kept as symbols."""
    return sexpdata.loads(text, true=None, nil=None)


# Symbols: EDIF identifier characters plus a few more that sexpdata also takes literally.
# Left out, with the reason: ; ' [ ] \ (sexpdata: comment, quote, brackets, escape),
# underscores in digit strings and non-ASCII (Python's int()/float() read "1_0" and "٣" as
# numbers), and the words inf / nan / infinity / t / nil (float() or sexpdata's defaults).
_SYMBOL_CHARS = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_&$%*/<>=!?#@:"
_FLOAT_WORDS = {"inf", "nan", "infinity", "t", "nil", "+inf", "-inf", "+nan", "-nan",
                "+infinity", "-infinity"}
symbols = st.text(_SYMBOL_CHARS, min_size=1, max_size=8).filter(
    lambda s: s.casefold() not in _FLOAT_WORDS and not s[0].isdigit()).map(sexpdata.Symbol)
# Number-like atoms: both readers must agree which of these are ints, floats or symbols.
# (An overflowing "1e999" reads as inf, whose repr "inf" is a symbol here: left out.)
numberish = st.text("0123456789+-.eE", min_size=1, max_size=6).map(
    lambda s: sexpdata.loads(s, true=None, nil=None)).filter(
    lambda x: not isinstance(x, float) or math.isfinite(x))
strings = st.text(st.characters(blacklist_characters='"\\', blacklist_categories=("Cs",)),
                  max_size=10)
atoms = st.one_of(symbols, st.integers(-10**12, 10**12), numberish, strings,
                  st.floats(allow_nan=False, allow_infinity=False))
trees = st.recursive(atoms, lambda inner: st.lists(inner, max_size=5), max_leaves=30)
spaces = st.sampled_from([" ", "\n", "\t", "  \r\n", "\x0b", "\x0c "])


def render(tree: object, draw_space) -> str:
    """Text for ``tree`` with drawn whitespace (iterative: a stack of pending pieces)."""
    out: list[str] = []
    pending: list[object] = [tree]
    while pending:
        item = pending.pop()
        if isinstance(item, tuple):  # a literal piece of text
            out.append(item[0])
        elif isinstance(item, list):
            pending.append((")",))
            for child in reversed(item):
                pending.append(child)
                pending.append((draw_space(),))
            out.append("(")
        elif isinstance(item, sexpdata.Symbol):
            out.append(str(item))
        elif isinstance(item, str):
            out.append(f'"{item}"')
        else:
            out.append(repr(item))
    return "".join(out)


@settings(max_examples=300)
@given(tree=trees, data=st.data())
def test_same_tree_as_sexpdata(tree, data):
    text = render(tree, lambda: data.draw(spaces))
    ours = parse(text, "gen").root
    assert ours == reference(text)  # reference: sexpdata.loads


def _opens_outside_strings(text: str) -> list[int]:
    """Offsets of '(' outside strings, by a plain character walk (independent of the parser)."""
    found, inside = [], False
    for offset, char in enumerate(text):
        if char == '"':
            inside = not inside
        elif char == "(" and not inside:
            found.append(offset)
    return found


def _lists_in_preorder(root: object) -> list[list]:
    found, pending = [], [root]
    while pending:
        item = pending.pop()
        if isinstance(item, list):
            found.append(item)
            pending.extend(reversed(item))
    return found


@settings(max_examples=200)
@given(tree=st.lists(trees, max_size=4), data=st.data())
def test_list_positions_are_their_opening_parentheses(tree, data):
    text = render(tree, lambda: data.draw(spaces))
    doc = parse(text, "gen")
    offsets = [doc.offset_of(node) for node in _lists_in_preorder(doc.root)]
    assert offsets == _opens_outside_strings(text)
    for offset in offsets:
        line, column = doc.position(offset)
        assert text.split("\n")[line - 1][column - 1] == "("


def test_positions_by_hand():
    text = '(edif x\n  (status "a(b")\n\t(library L))'
    doc = parse(text, "f.edif")
    assert doc.position_of(doc.root) == (1, 1)
    assert doc.position_of(doc.root[2]) == (2, 3)  # counted by hand
    assert doc.position_of(doc.root[3]) == (3, 2)  # a tab is one character
    with pytest.raises(ValueError):
        doc.offset_of([])


def test_atoms_by_hand():
    # expected types from sexpdata's documentation: symbols, strings, ints, floats
    root = parse('(a "b c" 12 -7 1.5 .5 1e3 1e 1_0 inf t nil "" \\x)', "f").root
    S = sexpdata.Symbol
    assert root == [S("a"), "b c", 12, -7, 1.5, 0.5, 1000.0, S("1e"), S("1_0"), S("inf"),
                    S("t"), S("nil"), "", S("\\x")]
    assert [type(x) for x in root[2:5]] == [int, int, float]


@pytest.mark.parametrize("path", EDIF_FIXTURES, ids=lambda p: p.name)
def test_fixtures_same_tree_as_sexpdata(path):
    text = path.read_text(encoding="utf-8")
    assert parse(text, str(path)).root == reference(text)  # reference: sexpdata.loads


def test_there_are_edif_fixtures():
    assert len(EDIF_FIXTURES) >= 3


# Expected messages: the wording chosen in linter/readers/sexpr.py; positions counted by hand.
@pytest.mark.parametrize("text, expected", [
    ("(a\n  (b", "f:2:5: unexpected end of file: 2 list(s) still open, the innermost opened at 2:3"),
    ("(a))", "f:1:4: unexpected ')' with no list open"),
    (")", "f:1:1: unexpected ')' with no list open"),
    ("(a)\n(b)", "f:2:1: unexpected text after the end of the top-level form"),
    ("(a) b", "f:1:5: unexpected text after the end of the top-level form"),
    ('(a\n "xyz)', "f:2:2: unterminated string (no closing '\"')"),
    ("", "f:1:1: no s-expression found (the text is empty or blank)"),
    (" \n ", "f:1:1: no s-expression found (the text is empty or blank)"),
    ("(" * (MAX_DEPTH + 1), f"f:1:{MAX_DEPTH + 1}: lists nested deeper than 1000 levels"),
    ("(a " + "9" * 4001 + ")", "f:1:4: number with more than 4000 digits"),
])
def test_syntax_errors_are_located(text, expected):
    with pytest.raises(NetlistError) as caught:
        parse(text, "f")
    assert str(caught.value) == expected


def test_deep_nesting_is_a_located_error_not_a_recursion_error():
    text = "(" * 100_000 + ")" * 100_000
    with pytest.raises(NetlistError) as caught:
        parse(text, "deep")
    assert str(caught.value) == "deep:1:1001: lists nested deeper than 1000 levels"


def test_nesting_at_the_limit_is_accepted():
    text = "(" * MAX_DEPTH + ")" * MAX_DEPTH
    node = parse(text, "f").root
    for _ in range(MAX_DEPTH - 1):
        node = node[0]
    assert node == []


@settings(max_examples=200, deadline=None)
@given(st.lists(st.sampled_from(["(", ")", "a", " ", "\n", "\r\n", "\r", '"x\ny"', "\t"]),
                max_size=40),
       st.data())
def test_many_positions_at_once_are_the_single_positions(pieces, data):
    # expected: Document.position, the one-offset lookup the syntax-error tests pin down
    text = "".join(pieces)
    doc = Document(text, "f", None, [])
    offsets = data.draw(st.lists(st.integers(0, max(len(text) - 1, 0)), max_size=12))
    assert doc.positions(offsets) == [doc.position(offset) for offset in offsets]


def test_positions_on_one_long_line_look_only_between_offsets():
    # a sweep that scanned back to the line start for every offset would take minutes here
    text = "(a " * 2_000_000
    offsets = list(range(0, len(text), 3))
    positions = Document(text, "f", None, []).positions(offsets)
    assert positions[-1] == (1, len(text) - 2)  # 1-based column of the last "("


@settings(max_examples=300, deadline=None)
@given(st.lists(st.sampled_from(["(", ")", "a", " ", "\n", "\r\n", "\r", '"x\ny"', "\t"]),
                max_size=40),
       st.data())
def test_ascending_positions_are_the_sweep_s(pieces, data):
    # expected: Document.sweep, the plain path of our own code (pinned down above against
    # the one-offset lookup); None (ask the sweep) for offsets out of order or CR-only texts
    text = "".join(pieces)
    doc = Document(text, "f", None, [])
    offsets = data.draw(st.lists(st.integers(0, max(len(text) - 1, 0)), max_size=12))
    found = doc.ascending_positions(offsets)
    if any(a >= b for a, b in zip(offsets, offsets[1:])) or ("\n" not in text and "\r" in text):
        assert found is None
        offsets = sorted(set(offsets))
        found = doc.ascending_positions(offsets)
        if "\n" not in text and "\r" in text:
            assert found is None
            return
    assert found is not None
    lines, columns = found
    assert list(zip(lines, columns)) == list(doc.sweep(offsets))


def test_ascending_positions_on_one_long_line_look_only_between_offsets():
    # as the sweep: scanning back to the line start for every offset would take minutes here
    text = "(a " * 2_000_000 + "\n(b"
    offsets = list(range(0, 3 * 2_000_000, 3)) + [len(text) - 2]  # every "("
    lines, columns = Document(text, "f", None, []).ascending_positions(offsets)
    assert (lines[-2], columns[-2]) == (1, len(text) - 5) and (lines[-1], columns[-1]) == (2, 1)
