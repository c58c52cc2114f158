"""Pins, parts and nets made in bulk (``linter.model.new_pins``, ``new_parts``, ``new_nets``:
slot setters mapped over new objects) are the objects their constructors make one by one.

The reference is our own plain path: ``Pin(...)``, ``Part(...)`` and ``Net(...)`` called per
row with the same values (``tests/test_model_init.py`` holds those to the generated
dataclass ``__init__``). Every field is compared by value and by type, the location as stored
(packed or not), and hashing, equality and ``dataclasses.replace`` are checked on the result.
"""

from __future__ import annotations

from dataclasses import fields, replace

import pytest
from hypothesis import given, strategies as st

from linter.model import (
    Net, Part, Pin, SourceLocation, new_nets, new_parts, new_pins, packed_location,
    stored_location,
)

texts = st.text(max_size=5)
maybe_texts = st.none() | texts
places = st.one_of(
    st.builds(SourceLocation, texts, st.integers(0, 10**6), st.integers(0, 500)),
    st.builds(packed_location, st.sampled_from(["a.edif", "b.cir"]), st.integers(0, 10**6),
              st.integers(0, 2**20 - 1)),
)
pins = st.lists(st.builds(Pin, texts, maybe_texts), max_size=3).map(tuple)


def _same(made: object, plain: object) -> None:
    """Equal field by field, each of the same type, the location as stored; equal and hashed
    alike."""
    for item in fields(plain):  # type: ignore[arg-type]
        if item.name == "location":
            mine, theirs = stored_location(made), stored_location(plain)  # type: ignore[arg-type]
        else:
            mine, theirs = getattr(made, item.name), getattr(plain, item.name)
        assert mine == theirs and type(mine) is type(theirs)
    assert made == plain and hash(made) == hash(plain)  # (a Part's hash leaves out properties)
    assert replace(made) == plain  # type: ignore[type-var]


@given(st.lists(st.tuples(texts, maybe_texts), max_size=8))
def test_pins_in_bulk_are_the_pins_one_by_one(rows):
    made = new_pins([name for name, _ in rows], [net for _, net in rows])
    assert len(made) == len(rows)
    for pin, (name, net) in zip(made, rows):
        _same(pin, Pin(name, net))


part_rows = st.tuples(texts, texts, maybe_texts, pins, places,
                      st.none() | st.floats(allow_nan=False), texts, texts, maybe_texts,
                      st.dictionaries(texts, texts, max_size=2))


@given(st.lists(part_rows, max_size=6))
def test_parts_in_bulk_are_the_parts_one_by_one(rows):
    columns = [list(column) for column in zip(*rows)] if rows else [[] for _ in range(10)]
    made = new_parts(*columns)
    assert len(made) == len(rows)
    for part, row in zip(made, rows):
        plain = Part(*row)
        _same(part, plain)
        assert part.model is None and part.properties is row[9]  # shared, as Part keeps it


@given(st.lists(st.tuples(texts, st.lists(st.tuples(texts, texts), max_size=3).map(tuple),
                          places), max_size=6))
def test_nets_in_bulk_are_the_nets_one_by_one(rows):
    columns = [list(column) for column in zip(*rows)] if rows else [[], [], []]
    made = new_nets(*columns)
    assert len(made) == len(rows)
    for net, row in zip(made, rows):
        _same(net, Net(*row))
        assert net.aliases == ()


def test_columns_of_different_lengths_are_refused():
    with pytest.raises(ValueError, match="different lengths"):
        new_pins(["A", "K"], ["N1"])
    with pytest.raises(ValueError, match="different lengths"):
        new_nets(["N1"], [()], [])
