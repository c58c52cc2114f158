"""Every :func:`linter.records.record` class of the package behaves as the frozen dataclass
it stands for.

The reference is the plain path of our own code: a twin made by
:func:`dataclasses.make_dataclass` from the same fields (the same ``Field`` objects, the
same ``frozen``/``eq``/``slots`` options, the class's ``__post_init__``), whose methods are
the ones :mod:`dataclasses` generates. Both are built from the same arguments and must agree
on the fields stored, repr, equality, hash, ``replace``, pickling, copying, the signature,
``__dataclass_params__``, the frozen refusals and the errors of a bad call.
"""

from __future__ import annotations

import copy
import dataclasses
import importlib
import inspect
import pickle
import pkgutil
import sys

import numpy as np
import pytest

import linter
import linter.records as records


def _package_records() -> list[type]:
    for module in pkgutil.walk_packages(linter.__path__, "linter."):
        importlib.import_module(module.name)
    from linter.rules import all_rules

    all_rules()   # the rule modules (linter.rules lives in its own folder)
    found = {}
    for name, module in list(sys.modules.items()):
        if not name.startswith("linter"):
            continue
        for value in vars(module).values():
            init = getattr(value, "__dict__", {}).get("__init__")   # its own, not a base's
            if (isinstance(value, type) and dataclasses.is_dataclass(value)
                    and getattr(getattr(init, "__code__", None), "co_filename", None)
                    == records.__file__):
                found[f"{value.__module__}.{value.__qualname__}"] = value
    return [found[key] for key in sorted(found)]


RECORDS = _package_records()


_MADE = {"__dict__", "__weakref__", "__init__", "__repr__", "__eq__", "__hash__", "__setattr__",
         "__delattr__", "__getstate__", "__setstate__", "__dataclass_fields__",
         "__dataclass_params__", "__match_args__", "__slots__", "__module__", "__qualname__",
         "__annotations__"}
"""What dataclasses (or Python) makes for a class: not copied into its twin."""


def _twin(cls: type) -> type:
    """The dataclass-generated twin of ``cls`` (same fields and options)."""
    spec = [(f.name, f.type, f) for f in dataclasses.fields(cls)]
    names = {f.name for f in dataclasses.fields(cls)}
    namespace = {key: value for key, value in cls.__dict__.items()
                 if key not in names and key not in _MADE}   # its methods and properties
    slots = "__slots__" in cls.__dict__
    twin = dataclasses.make_dataclass(cls.__name__, spec, namespace=namespace, frozen=True,
                                      eq=cls.__dataclass_params__.eq, slots=slots)
    twin.__qualname__ = cls.__qualname__
    return twin


def _outcome(make):
    try:
        return make(), None
    except Exception as exc:  # noqa: BLE001 - both sides must fail alike
        return None, (type(exc), str(exc).replace("_twin", ""))


def _comparable(value: object) -> object:
    if isinstance(value, np.ndarray):   # a default array: compared by its bytes
        return ("ndarray", value.dtype.str, value.shape, value.tobytes())
    return value


def _state(obj: object) -> tuple:
    return tuple((f.name, _comparable(getattr(obj, f.name))) for f in dataclasses.fields(obj))


def _calls(cls: type) -> list[tuple[tuple, dict]]:
    """Argument sets: every field given positionally, by keyword, only the required ones,
    one too many, a missing one, a repeated one, an unknown keyword."""
    fields = dataclasses.fields(cls)
    values = [f"value-{index}" for index in range(len(fields))]
    required = [f for f in fields if f.default is dataclasses.MISSING
                and f.default_factory is dataclasses.MISSING]
    calls = [(tuple(values), {}), ({}, dict(zip((f.name for f in fields), values))),
             (tuple(values[:len(required)]), {}), (tuple(values) + ("extra",), {}),
             ((), {"no_such_field": 1})]
    calls[1] = ((), calls[1][1])
    if fields:
        calls.append((tuple(values[:-1]), {}) if required else ((), {}))
        calls.append(((values[0],), {fields[0].name: values[0]}))
    return calls


def test_the_package_has_records() -> None:
    assert len(RECORDS) >= 10


@pytest.mark.parametrize("cls", RECORDS, ids=lambda c: f"{c.__module__}.{c.__qualname__}")
def test_record_is_its_dataclass_twin(cls: type) -> None:
    twin = _twin(cls)
    assert repr(cls.__dataclass_params__) == repr(twin.__dataclass_params__)
    assert str(inspect.signature(cls)) == str(inspect.signature(twin))
    assert [f.name for f in dataclasses.fields(cls)] == [f.name for f in dataclasses.fields(twin)]
    assert getattr(cls, "__match_args__", None) == getattr(twin, "__match_args__", None)
    assert cls.__dict__.get("__slots__") == twin.__dict__.get("__slots__")
    for args, kwargs in _calls(cls):
        ours, our_error = _outcome(lambda: cls(*args, **kwargs))
        theirs, their_error = _outcome(lambda: twin(*args, **kwargs))
        assert (our_error is None) == (their_error is None), (args, kwargs, our_error, their_error)
        if our_error is not None:
            assert our_error[0] is their_error[0]
            continue
        assert _state(ours) == _state(theirs)
        assert repr(ours) == repr(theirs)
        again = cls(*args, **kwargs)
        twin_again = twin(*args, **kwargs)
        assert (ours == again) == (theirs == twin_again)
        assert (ours != again) == (theirs != twin_again)
        assert ours.__eq__(object()) is NotImplemented or not cls.__dataclass_params__.eq
        if cls.__dataclass_params__.eq:
            hashes = _outcome(lambda: hash(ours)), _outcome(lambda: hash(theirs))
            assert hashes[0] == hashes[1]
        else:
            assert hash(ours) != hash(again) or ours is again
        for name in [f.name for f in dataclasses.fields(cls)] + ["not_a_field"]:
            with pytest.raises(dataclasses.FrozenInstanceError):
                setattr(ours, name, 1)
            with pytest.raises(dataclasses.FrozenInstanceError):
                delattr(ours, name)
        for f in dataclasses.fields(cls):
            changed = _outcome(lambda: _state(dataclasses.replace(ours, **{f.name: "new"})))
            assert changed == _outcome(
                lambda: _state(dataclasses.replace(theirs, **{f.name: "new"})))
        assert _state(copy.deepcopy(ours)) == _state(ours)
        try:
            pickled = pickle.dumps(ours)
        except (pickle.PicklingError, TypeError, AttributeError):
            continue   # a field value (or the class) that does not pickle: nothing to compare
        assert _state(pickle.loads(pickled)) == _state(ours)


def test_a_class_writing_its_own_methods_is_left_to_dataclasses() -> None:
    @records.record
    class Own:
        """Writes its own repr."""

        value: int

        def __repr__(self) -> str:
            return "mine"

    assert repr(Own(1)) == "mine"
    assert Own.__init__.__code__.co_filename != records.__file__   # dataclasses made it
    assert Own(1) == Own(1) and hash(Own(1)) == hash(Own(1))


def test_a_subclass_of_a_record_is_a_frozen_dataclass() -> None:
    @records.record
    class Base:
        """A record."""

        first: int

    @dataclasses.dataclass(frozen=True)
    class Child(Base):
        """Its frozen subclass."""

        second: int = 2

    assert Child(1) == Child(1, 2) and Child(1) != Base(1)
    with pytest.raises(dataclasses.FrozenInstanceError):
        Child(1).first = 3


def test_recursive_repr_is_cut_as_the_dataclass_cuts_it() -> None:
    @records.record
    class Box:
        """Holds anything."""

        content: list

    box = Box([])
    box.content.append(box)
    assert repr(box) == f"{Box.__qualname__}(content=[...])"
