"""Frozen dataclasses whose methods are made from closures, not from generated source.

``dataclasses.dataclass(frozen=True)`` writes the text of six methods for every class
(``__init__``, ``__repr__``, ``__eq__``, ``__hash__``, ``__setattr__``, ``__delattr__``) and
compiles each one at import: about a millisecond a class, a tenth of a check's start-up over
the eighty-odd classes a check imports. :func:`record` lets :mod:`dataclasses` do all of its
field work (defaults, factories, ``fields()``, ``replace()``, ``__match_args__``, slots)
without generating a method, then gives the class the same six methods as closures over its
field names and sets ``__dataclass_params__`` to what ``dataclass(frozen=True, eq=eq)``
records. What the methods do is the generated methods' behaviour, rule for rule:

* ``__init__(self, <fields in order>)``: positional or keyword, defaults and default
  factories, the fields stored in order (into the instance's dictionary, where
  ``object.__setattr__`` puts them, or through the slots), then ``__post_init__()`` if the
  class has one; the same signature for :func:`inspect.signature`;
* ``__repr__``: ``Qualname(field=repr, …)`` over the fields with ``repr=True``, ``...`` for a
  recursive reference;
* ``__eq__`` (``eq=True``): the tuples of the fields with ``compare=True``, only between
  instances of the very same class (else ``NotImplemented``); ``__hash__``: the hash of the
  tuple of the fields hashed (``hash=True``, or ``compare`` when ``hash`` is None); with
  ``eq=False`` neither is made (identity, as the dataclass);
* ``__setattr__``/``__delattr__``: :class:`dataclasses.FrozenInstanceError` on a field, or
  on any name of an instance of the class itself;
* with ``slots=True``, ``__getstate__``/``__setstate__`` for pickling (as the dataclass).

A class that needs more than this is handed to :func:`dataclasses.dataclass` itself: one
with a dataclass base, one that writes any of those methods itself, one without a docstring
(the dataclass would write one from the signature), and fields with ``init=False`` or
``kw_only``. ``tests/test_records.py`` holds every record of the package to a twin made by
``dataclasses.make_dataclass`` with the same fields.
"""

from __future__ import annotations

import abc
import copy
import dataclasses
import inspect
import operator
import reprlib
from typing import Any, Callable, TypeVar

__all__ = ["record"]

T = TypeVar("T", bound=type)

_OWN_METHODS = ("__init__", "__repr__", "__eq__", "__hash__", "__setattr__", "__delattr__",
                "__getstate__", "__setstate__")
"""Methods a class may write itself; such a class is left to :func:`dataclasses.dataclass`."""


class _Factory:
    """The default shown in the signature for a field with a default factory (the
    dataclass shows ``<factory>`` too)."""

    __slots__ = ()

    def __repr__(self) -> str:
        return "<factory>"


_FACTORY = _Factory()


def record(cls: T | None = None, /, *, eq: bool = True, slots: bool = False) -> Any:
    """``dataclasses.dataclass(frozen=True, eq=eq, slots=slots)``, its methods made from
    closures (see the module's docstring). Use as ``@record`` or ``@record(eq=False)``."""
    def wrap(target: T) -> T:
        return _record(target, eq, slots)
    return wrap if cls is None else wrap(cls)


def _plain_dataclass_needed(cls: type) -> bool:
    """True for a class :func:`record` leaves to :func:`dataclasses.dataclass`."""
    if any(dataclasses.is_dataclass(base) for base in cls.__mro__[1:]):
        return True
    if not cls.__dict__.get("__doc__") or any(name in cls.__dict__ for name in _OWN_METHODS):
        return True
    annotations = cls.__dict__.get("__annotations__", {})
    if any("InitVar" in str(kind) or "KW_ONLY" in str(kind) for kind in annotations.values()):
        return True
    return any(isinstance(value, dataclasses.Field) and (not value.init or value.kw_only is True)
               for value in cls.__dict__.values())


def _record(cls: T, eq: bool, slots: bool) -> T:
    if _plain_dataclass_needed(cls):
        return dataclasses.dataclass(cls, frozen=True, eq=eq, slots=slots)  # type: ignore[return-value]
    made = dataclasses.dataclass(cls, init=False, repr=False, eq=False, frozen=False,
                                 slots=slots)
    fields = dataclasses.fields(made)
    params = copy.copy(made.__dataclass_params__)
    params.init, params.repr, params.eq, params.frozen = True, True, eq, True
    made.__dataclass_params__ = params
    made.__init__ = _init(made, fields)
    made.__repr__ = _repr(made, fields)
    if eq:
        compared = _values([f.name for f in fields if f.compare])
        hashed = _values([f.name for f in fields if (f.compare if f.hash is None else f.hash)])
        made.__eq__ = _eq(made, compared)
        made.__hash__ = _hash(made, hashed)
    made.__setattr__, made.__delattr__ = _frozen(made, frozenset(f.name for f in fields))
    if slots:
        made.__getstate__, made.__setstate__ = _state(made)
    abc.update_abstractmethods(made)
    return made


def _named(cls: type, name: str, function: Callable) -> Callable:
    function.__name__ = name
    function.__qualname__ = f"{cls.__qualname__}.{name}"
    function.__module__ = cls.__module__
    return function


def _values(names: list[str]) -> Callable[[Any], tuple]:
    """A function giving the tuple of the attributes ``names`` of an object."""
    if len(names) >= 2:
        return operator.attrgetter(*names)
    if len(names) == 1:
        name = names[0]
        return lambda obj: (getattr(obj, name),)
    return lambda obj: ()


def _init(cls: type, fields: tuple[dataclasses.Field, ...]) -> Callable:
    names = tuple(f.name for f in fields)
    count = len(names)
    defaults: dict[str, Any] = {}
    factories: dict[str, Callable[[], Any]] = {}
    for f in fields:
        if f.default_factory is not dataclasses.MISSING:
            factories[f.name] = f.default_factory
        elif f.default is not dataclasses.MISSING:
            defaults[f.name] = f.default
    post_init = hasattr(cls, "__post_init__")
    title = f"{cls.__qualname__}.__init__()"

    def complete(args: tuple, kwargs: dict) -> tuple | list:
        """Every field's value in order: the arguments, then the defaults and factories."""
        given = len(args)
        if given > count:
            raise TypeError(f"{title} takes {count + 1} positional arguments but "
                            f"{given + 1} were given")
        values = list(args)
        for name in names[given:]:
            if name in kwargs:
                values.append(kwargs.pop(name))
            elif name in defaults:
                values.append(defaults[name])
            elif name in factories:
                values.append(factories[name]())
            else:
                raise TypeError(f"{title} missing 1 required argument: {name!r}")
        for name in kwargs:
            if name in names:
                raise TypeError(f"{title} got multiple values for argument {name!r}")
            raise TypeError(f"{title} got an unexpected keyword argument {name!r}")
        return values

    if "__slots__" in cls.__dict__:   # each field stored through its slot (a frozen class's
        setters = tuple(cls.__dict__[name].__set__ for name in names)   # setattr refuses)

        def __init__(self: Any, *args: Any, **kwargs: Any) -> None:
            if kwargs or len(args) != count:
                args = complete(args, kwargs)
            for setter, value in zip(setters, args):
                setter(self, value)
            if post_init:
                self.__post_init__()
    else:   # the fields go into the instance's dictionary in order, as object.__setattr__ puts them
        def __init__(self: Any, *args: Any, **kwargs: Any) -> None:
            if kwargs or len(args) != count:
                args = complete(args, kwargs)
            self.__dict__.update(zip(names, args))
            if post_init:
                self.__post_init__()

    parameter = inspect.Parameter
    __init__.__signature__ = inspect.Signature(  # type: ignore[attr-defined]
        [parameter("self", parameter.POSITIONAL_OR_KEYWORD)]
        + [parameter(f.name, parameter.POSITIONAL_OR_KEYWORD, annotation=f.type,
                     default=(_FACTORY if f.name in factories
                              else defaults.get(f.name, parameter.empty)))
           for f in fields],
        return_annotation=None)
    return _named(cls, "__init__", __init__)


def _repr(cls: type, fields: tuple[dataclasses.Field, ...]) -> Callable:
    shown = tuple(f.name for f in fields if f.repr)

    @reprlib.recursive_repr("...")
    def __repr__(self: Any) -> str:
        inner = ", ".join(f"{name}={getattr(self, name)!r}" for name in shown)
        return f"{self.__class__.__qualname__}({inner})"
    return _named(cls, "__repr__", __repr__)


def _eq(cls: type, compared: Callable[[Any], tuple]) -> Callable:
    def __eq__(self: Any, other: Any) -> Any:
        if other.__class__ is self.__class__:
            return compared(self) == compared(other)
        return NotImplemented
    return _named(cls, "__eq__", __eq__)


def _hash(cls: type, hashed: Callable[[Any], tuple]) -> Callable:
    def __hash__(self: Any) -> int:
        return hash(hashed(self))
    return _named(cls, "__hash__", __hash__)


def _frozen(cls: type, names: frozenset[str]) -> tuple[Callable, Callable]:
    frozen_error = dataclasses.FrozenInstanceError

    def __setattr__(self: Any, name: str, value: Any) -> None:
        if type(self) is cls or name in names:
            raise frozen_error(f"cannot assign to field {name!r}")
        super(cls, self).__setattr__(name, value)

    def __delattr__(self: Any, name: str) -> None:
        if type(self) is cls or name in names:
            raise frozen_error(f"cannot delete field {name!r}")
        super(cls, self).__delattr__(name)
    return _named(cls, "__setattr__", __setattr__), _named(cls, "__delattr__", __delattr__)


def _state(cls: type) -> tuple[Callable, Callable]:
    """Pickling of a frozen slotted record: the field values in order (as the dataclass)."""
    def __getstate__(self: Any) -> list:
        return [getattr(self, f.name) for f in dataclasses.fields(self)]

    def __setstate__(self: Any, state: list) -> None:
        for f, value in zip(dataclasses.fields(self), state):
            object.__setattr__(self, f.name, value)
    return _named(cls, "__getstate__", __getstate__), _named(cls, "__setstate__", __setstate__)
