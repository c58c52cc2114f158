"""The fast paths of loading agree with the plain ways they replace.

Each fast path (chunked tokenizing, list positions from running sums, remembered value
readings, the paused collector) is checked against the straightforward computation it
stands for, on hand-made and generated texts.
"""

from __future__ import annotations

import gc
import re
from functools import partial

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.gc_pause import paused_gc
from linter.readers import sexpr
from linter.units import ValueParseError, number_or_none, parse_number

_OPEN_OR_STRING = re.compile(r'"[^"]*"|\(')


def _opens_outside_strings(text: str) -> list[int]:
    """Offsets of every '(' outside strings, by a left-to-right scan (the plain way)."""
    return [m.start() for m in _OPEN_OR_STRING.finditer(text) if m.group() == "("]


def _lists_in_preorder(root: object) -> list[list]:
    found, pending = [], [root]
    while pending:
        item = pending.pop()
        if isinstance(item, list):
            found.append(item)
            pending.extend(reversed(item))
    return found


_PIECES = ["(a", ")", ' "x(y\n)z" ', "\n", " b ", '"("', '(c "d")', " 12 ", "\r\n", '""']
"""Pieces of text: lists, strings holding parentheses and line ends, atoms, line ends."""


def _text(pieces: list[str]) -> str:
    """One well-formed list holding the pieces (their own ')' left out), every list closed."""
    body = "(r " + "".join(piece for piece in pieces if piece != ")")
    outside = re.sub(r'"[^"]*"', "", body)
    return body + ")" * (outside.count("(") - outside.count(")"))


@settings(max_examples=150, deadline=None)
@given(pieces=st.lists(st.sampled_from(_PIECES), max_size=30), size=st.integers(1, 9))
def test_chunked_tokens_are_the_whole_text_tokens(pieces, size):
    text = "".join(pieces) + '"never closed'
    chunked = [t for start, end in sexpr._chunks(text, size)
               for t in sexpr._TOKEN.findall(text, start, end)]
    assert chunked == sexpr._TOKEN.findall(text)


@settings(max_examples=150, deadline=None)
@given(pieces=st.lists(st.sampled_from(_PIECES), max_size=30), size=st.integers(1, 9))
def test_list_offsets_are_the_opening_parentheses(pieces, size):
    text = _text(pieces)
    doc = sexpr.parse(text, "gen")
    original = sexpr._chunks
    sexpr._chunks = partial(original, size=size)  # many chunk boundaries
    try:
        nodes = _lists_in_preorder(doc.root)
        assert doc.offsets_of(nodes) == _opens_outside_strings(text)
    finally:
        sexpr._chunks = original


def test_offsets_with_and_without_parentheses_in_strings():
    # counted by hand: the lists open at 0, 8 and 23; the '(' inside "a(b" is not a list
    with_string = '(edif x (status "a(b") (library L))'
    doc = sexpr.parse(with_string, "f")
    assert doc.offsets_of([doc.root, doc.root[2], doc.root[3]]) == [0, 8, 23]
    plain = "(a (b) (c (d)))"  # counted by hand: 0, 3, 7, 10
    doc = sexpr.parse(plain, "f")
    assert doc.offsets_of([doc.root, doc.root[1], doc.root[2], doc.root[2][1]]) == [0, 3, 7, 10]
    assert [doc.offset_of(node) for node in _lists_in_preorder(doc.root)] == [0, 3, 7, 10]


def test_a_form_placed_twice_is_located_twice_and_a_stranger_is_refused():
    doc = sexpr.parse("(a (b) (c))", "f")
    assert doc.offsets_of([doc.root[1], doc.root[1]]) == [3, 3]  # counted by hand
    with pytest.raises(ValueError):
        doc.offsets_of([[]])


def test_strings_and_atoms_are_shared_in_the_tree():
    root = sexpr.parse('(a "4k7" "4k7" x x)', "f").root
    assert root[1] is root[2] and root[3] is root[4]
    assert root[1] == "4k7" and type(root[1]) is str and isinstance(root[3], sexpr.Symbol)


def test_remembered_readings_give_the_same_value_and_the_same_refusal():
    # 4k7 = 4.7 kΩ (IEC 60062 RKM code)
    assert parse_number("4k7", "Ω") == parse_number("4k7", "Ω") == pytest.approx(4700.0)
    for _ in range(2):
        with pytest.raises(ValueParseError) as refused:
            parse_number("LB0603BL")
        assert str(refused.value) == "cannot read 'LB0603BL' as a number"
    assert number_or_none("LB0603BL") is None
    assert number_or_none("100n", "F") == pytest.approx(100e-9)  # SI prefix n = 1e-9


@pytest.mark.parametrize("text", ["RED", "m 5", "GREEN LED", "KM8C28"])
def test_a_text_that_does_not_start_with_a_number_is_no_value(text):
    with pytest.raises(ValueParseError):
        parse_number(text)


def test_a_temperature_coefficient_takes_the_fast_path():
    # -2 mV/K = -0.002 V/K (SI prefix m = 1e-3); a red LED's Vf drift, from memory
    assert parse_number("-2 mV/K", "V/K") == pytest.approx(-0.002)
    with pytest.raises(ValueParseError):
        parse_number("-2 mV/K", "V")


def test_the_collector_is_paused_in_the_block_and_restored_after():
    was = gc.isenabled()
    gc.enable()
    try:
        with paused_gc():
            assert not gc.isenabled()
            with paused_gc():
                assert not gc.isenabled()
            assert not gc.isenabled()  # the inner pause leaves the outer one in charge
        assert gc.isenabled()
        with pytest.raises(KeyError):
            with paused_gc():
                raise KeyError("x")
        assert gc.isenabled()
        gc.disable()
        with paused_gc():
            pass
        assert not gc.isenabled()  # a collector that was off stays off
    finally:
        if was:
            gc.enable()
        else:
            gc.disable()
