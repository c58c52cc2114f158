"""A Part's or Net's location stored packed (:func:`linter.model.packed_location`) reads, compares,
hashes, prints, pickles and copies as the SourceLocation it packs.

The reference is the plain path of our own code: the same Part or Net made with
``SourceLocation(file, line, column)``.
"""

from __future__ import annotations

import copy
import pickle
from dataclasses import replace

from hypothesis import given, strategies as st

from linter.model import Net, Part, Pin, SourceLocation, packed_location, stored_location

files = st.text(max_size=8)
lines = st.integers(0, 10**12)
columns = st.integers(0, (1 << 20) + 5)  # past the packed range too


def _pair(cls, file, line, column):
    if cls is Part:
        args = ("R1", "resistor", "1k", (Pin("1", "A"), Pin("2", "B")))
        return Part(*args, packed_location(file, line, column)), \
            Part(*args, SourceLocation(file, line, column))
    args = ("A", (("R1", "1"), ("R2", "2")))
    return Net(*args, packed_location(file, line, column)), \
        Net(*args, SourceLocation(file, line, column))


@given(st.sampled_from([Part, Net]), files, lines, columns)
def test_packed_reads_as_plain(cls, file, line, column):
    packed, plain = _pair(cls, file, line, column)
    place = packed.location
    assert type(place) is SourceLocation and place == plain.location
    assert (place.file, place.line, place.column) == (file, line, column)
    assert type(place.line) is int and type(place.column) is int
    assert packed == plain and hash(packed) == hash(plain) and repr(packed) == repr(plain)
    assert pickle.loads(pickle.dumps(packed)) == plain
    assert copy.copy(packed) == plain and copy.deepcopy(packed) == plain
    assert replace(packed) == plain
    again = replace(packed, location=stored_location(packed))
    assert again == plain and stored_location(again) is stored_location(packed)


def test_outside_the_packed_range_stays_a_source_location():
    # column 2**20 and a negative line do not pack (the packing's own limits).
    assert type(packed_location("f", 1, 1 << 20)) is SourceLocation
    assert type(packed_location("f", -1, 1)) is SourceLocation
    assert type(packed_location("f", 1, 1)) is not SourceLocation


def test_a_source_location_is_stored_as_given():
    place = SourceLocation("f", 3, 4)
    part = Part("R1", "resistor", None, (), place)
    assert part.location is place and stored_location(part) is place


def test_files_are_kept_apart():
    first, second = packed_location("a.cir", 5, 1), packed_location("b.cir", 5, 1)
    assert Net("N", (), first).location.file == "a.cir"
    assert Net("N", (), second).location.file == "b.cir"


def test_past_the_numbered_files_places_stay_source_locations(monkeypatch):
    # 1,024 files numbered already (the packing's own limit): a new file is not packed.
    import linter.model as model

    monkeypatch.setattr(model, "_PLACE_FILES", [f"f{n}" for n in range(1024)])
    monkeypatch.setattr(model, "_FILE_NUMBERS", {f"f{n}": n for n in range(1024)})
    place = packed_location("new.cir", 3, 4)
    assert type(place) is SourceLocation and place == SourceLocation("new.cir", 3, 4)
    assert Part("R1", "resistor", None, (), place).location == SourceLocation("new.cir", 3, 4)
    assert Net("N", (), packed_location("f1023", 5, 6)).location == SourceLocation("f1023", 5, 6)


@given(files, st.lists(st.tuples(st.integers(-2, 10**12), columns), max_size=8))
def test_many_places_packed_at_once_are_each_packed(file, places):
    # expected: packed_location one place at a time, the plain path of our own code
    from linter.model import packed_locations

    lines = [line for line, _ in places]
    cols = [column for _, column in places]
    found = packed_locations(file, lines, cols)
    assert found == [packed_location(file, line, column) for line, column in places]
    assert list(map(type, found)) == [type(packed_location(file, line, column))
                                     for line, column in places]
