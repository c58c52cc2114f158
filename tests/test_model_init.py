"""The written-out ``__init__`` of SourceLocation, Pin, Part and Net (slot descriptors instead
of ``object.__setattr__`` per field) makes what the dataclass-generated one makes.

The reference is our own plain path: the same fields, defaults and options given to
:func:`dataclasses.make_dataclass`, which generates the usual frozen ``__init__``. Nothing is
pasted from the tool's output.
"""

from __future__ import annotations

import copy
import inspect
import pickle
from dataclasses import FrozenInstanceError, fields, make_dataclass, replace
from operator import attrgetter

import pytest
from hypothesis import given, strategies as st

from linter.model import DeviceModel, Net, Part, Pin, SourceLocation

_CLASSES = (SourceLocation, Pin, Part, Net)


def _plain(cls: type) -> type:
    """``cls``'s fields as a dataclass with the generated frozen ``__init__`` (the reference)."""
    spec = [(item.name, item.type, item) for item in fields(cls)]
    return make_dataclass(f"Plain{cls.__name__}", spec, frozen=True, slots=True)


PLAIN = {cls: _plain(cls) for cls in _CLASSES}


def _values(obj: object) -> tuple:
    return attrgetter(*(item.name for item in fields(obj)))(obj)  # type: ignore[arg-type]


texts = st.text(max_size=6)
maybe_texts = st.none() | texts
locations = st.builds(lambda *a: a, texts, st.integers(0, 10**6), st.integers(0, 500))
pin_args = st.tuples(texts, maybe_texts)


def _make(cls: type, args: tuple, kwargs: dict) -> tuple[object, object]:
    return cls(*args, **kwargs), PLAIN[cls](*args, **kwargs)


def _agree(ours: object, plain: object) -> None:
    assert _values(ours) == _values(plain)
    for mine, theirs in zip(_values(ours), _values(plain)):
        assert type(mine) is type(theirs)


@given(locations)
def test_source_location_as_plain(args):
    ours, plain = _make(SourceLocation, args, {})
    _agree(ours, plain)
    assert ours == SourceLocation(*args) and hash(ours) == hash(SourceLocation(*args))


@given(pin_args)
def test_pin_as_plain(args):
    ours, plain = _make(Pin, args, {})
    _agree(ours, plain)
    assert ours == Pin(name=args[0], net=args[1])


part_kwargs = st.fixed_dictionaries({}, optional={
    "value_si": st.none() | st.floats(allow_nan=False),
    "path": texts,
    "cell": texts,
    "part_number": maybe_texts,
    "properties": st.dictionaries(texts, texts, max_size=3),
    "model": st.none() | st.builds(DeviceModel, texts, texts),
})


@given(texts, texts, maybe_texts, st.lists(pin_args, max_size=4), locations, part_kwargs)
def test_part_as_plain(ref, kind, value, pins, location, kwargs):
    pins = tuple(Pin(*pin) for pin in pins)
    args = (ref, kind, value, pins, SourceLocation(*location))
    ours, plain = _make(Part, args, kwargs)
    _agree(ours, plain)
    twin = Part(*args, **kwargs)
    assert ours == twin and hash(ours) == hash(twin)
    assert replace(ours, ref=ref + "x").ref == ref + "x"
    assert replace(ours) == ours


@given(texts, st.lists(st.tuples(texts, texts), max_size=3), locations,
       st.lists(texts, max_size=2).map(tuple))
def test_net_as_plain(name, pins, location, aliases):
    args = (name, tuple(pins), SourceLocation(*location))
    for kwargs in ({}, {"aliases": aliases}):
        ours, plain = _make(Net, args, kwargs)
        _agree(ours, plain)


def test_part_default_properties_is_a_new_dict_each_time():
    # dataclasses' default_factory=dict: every part gets its own empty dict (from memory).
    location = SourceLocation("x", 1, 1)
    first, second = Part("R1", "resistor", None, (), location), Part("R2", "resistor", None, (), location)
    assert first.properties == {} and first.properties is not second.properties
    # An explicit None stays None (the sentinel is not None).
    assert Part("R3", "resistor", None, (), location, properties=None).properties is None


@pytest.mark.parametrize("cls", _CLASSES)
def test_signature_and_repr_as_plain(cls):
    ours, plain = inspect.signature(cls), inspect.signature(PLAIN[cls])
    assert str(ours.replace(return_annotation=None)) == str(plain.replace(return_annotation=None))
    assert [item.name for item in fields(cls)] == [item.name for item in fields(PLAIN[cls])]


def _sample(cls: type) -> object:
    location = SourceLocation("b.cir", 3, 7)
    return {SourceLocation: location, Pin: Pin("A", "N1"),
            Part: Part("D1", "led", "RED", (Pin("A", "N1"), Pin("K", "N2")), location,
                       properties={"package": "0603"}),
            Net: Net("N1", (("D1", "A"),), location)}[cls]


@pytest.mark.parametrize("cls", _CLASSES)
def test_still_frozen_and_copyable(cls):
    obj = _sample(cls)
    first = fields(cls)[0].name
    with pytest.raises(FrozenInstanceError):
        setattr(obj, first, "changed")
    with pytest.raises(FrozenInstanceError):
        delattr(obj, first)
    # No new attribute either (Python 3.11's frozen slots dataclass raises TypeError here,
    # as it did before the written-out __init__).
    with pytest.raises((AttributeError, TypeError)):
        obj.extra = 1  # type: ignore[attr-defined]
    assert pickle.loads(pickle.dumps(obj)) == obj
    assert copy.copy(obj) == obj and copy.deepcopy(obj) == obj
    plain = PLAIN[cls](*_values(obj))
    assert repr(obj) == repr(plain).replace(f"Plain{cls.__name__}(", f"{cls.__name__}(", 1)
