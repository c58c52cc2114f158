"""Group, Scenario and PinDrive (slots, written-out ``__init__``) behave as the dataclasses
``dataclasses`` would generate from the same fields: the expected values are those plain
twins, declared here with the generated ``__init__`` (the plain path of our own former code).
"""

from __future__ import annotations

import copy
import pickle
from dataclasses import FrozenInstanceError, dataclass, field, fields, replace
from typing import Mapping

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.groups import TOPOLOGIES, Group, PinDrive, Scenario


@dataclass(frozen=True)
class _PlainPin:
    part: str
    pin: str
    net: str
    supply: str | None = None


@dataclass(frozen=True)
class _PlainScenario:
    name: str
    levels: Mapping[str, str] = field(default_factory=dict, hash=False)
    lit: tuple[str, ...] | None = None


@dataclass(frozen=True)
class _PlainGroup:
    id: str
    topology: str
    leds: tuple[str, ...]
    strings: tuple[tuple[str, ...], ...]
    parts: tuple[str, ...]
    nets: tuple[str, ...]
    rails: tuple[str, ...]
    setter: str | None = None
    pins: tuple = ()
    scenarios: tuple = (_PlainScenario("on"),)
    reason: str | None = None
    transistor: str | None = None
    drive: str | None = None

    def __post_init__(self) -> None:
        if self.topology not in TOPOLOGIES:
            raise ValueError(f"group {self.id}: unknown topology {self.topology!r}")
        if not self.scenarios:
            raise ValueError(f"group {self.id}: needs at least one scenario")


def _text(record: object) -> str:
    """repr with the class names of the twins made equal."""
    return repr(record).replace("_Plain", "").replace("Pin(", "PinDrive(")


_names = st.text(alphabet="DRU1_.", min_size=1, max_size=4)
_tuples = st.lists(_names, max_size=3).map(tuple)


@settings(deadline=None)
@given(_names, _names, _names, st.none() | _names)
def test_pin_drive_is_its_plain_twin(part: str, pin: str, net: str, supply: str | None) -> None:
    record, plain = PinDrive(part, pin, net, supply), _PlainPin(part, pin, net, supply)
    assert _text(record) == _text(plain)
    assert record.id == f"{part}.{pin}"
    assert hash(record) == hash(PinDrive(part=part, pin=pin, net=net, supply=supply))
    assert PinDrive(part, pin, net) == PinDrive(part, pin, net, None)


@settings(deadline=None)
@given(_names, st.none() | st.dictionaries(_names, st.sampled_from(["high", "low"])),
       st.none() | _tuples)
def test_scenario_is_its_plain_twin(name: str, levels, lit) -> None:
    kwargs = {} if levels is None else {"levels": levels}
    record, plain = Scenario(name, lit=lit, **kwargs), _PlainScenario(name, lit=lit, **kwargs)
    assert _text(record) == _text(plain)
    assert record.levels == plain.levels
    # the default is a new dict each time, as default_factory=dict makes it
    assert Scenario("on").levels is not Scenario("on").levels
    assert Scenario("on", None).levels is None and _PlainScenario("on", None).levels is None
    assert hash(record) == hash(Scenario(name, {"other": "high"}, lit))  # levels not hashed


@settings(deadline=None)
@given(st.sampled_from(TOPOLOGIES), _tuples, _tuples, st.none() | _names,
       st.booleans(), st.none() | _names)
def test_group_is_its_plain_twin(topology, leds, parts, setter, with_pin, reason) -> None:
    pins = (PinDrive("U1", "PA0", "N"),) if with_pin else ()
    plain_pins = (_PlainPin("U1", "PA0", "N"),) if with_pin else ()
    args = ("G-x", topology, leds, (leds,), parts, ("GND",), ("GND",))
    record = Group(*args, setter=setter, pins=pins, reason=reason)
    plain = _PlainGroup(*args, setter=setter, pins=plain_pins, reason=reason)
    assert _text(record) == _text(plain)
    assert [f.name for f in fields(Group)] == [f.name for f in fields(_PlainGroup)]
    assert [f.default for f in fields(Group)][7:9] == [f.default for f in fields(_PlainGroup)][7:9]
    assert record.scenarios == (Scenario("on"),)
    assert pickle.loads(pickle.dumps(record)) == record
    assert copy.deepcopy(record) == record and hash(copy.copy(record)) == hash(record)
    assert _text(replace(record, id="")) == _text(replace(plain, id=""))


def test_group_refuses_what_its_plain_twin_refuses() -> None:
    for cls in (Group, _PlainGroup):
        with pytest.raises(ValueError, match="unknown topology 'bad'"):
            cls("G-x", "bad", (), (), (), (), ())
        with pytest.raises(ValueError, match="unknown topology"):
            cls("G-x", ["resistor"], (), (), (), (), ())  # type: ignore[arg-type]
        with pytest.raises(ValueError, match="needs at least one scenario"):
            cls("G-x", "resistor", (), (), (), (), (), scenarios=())
    group = Group("G-x", "resistor", (), (), (), (), ())
    with pytest.raises(FrozenInstanceError):
        group.id = "G-y"  # type: ignore[misc]
    assert not hasattr(group, "__dict__")  # slots: no dictionary per group
    assert not hasattr(Scenario("on"), "__dict__") and not hasattr(PinDrive("", "", ""), "__dict__")


def test_shared_empty_levels_read_as_an_empty_dict() -> None:
    import json

    from linter.groups import NO_LEVELS
    # what a reader of levels sees is what an empty dict gives (the plain value, ``{}``)
    assert NO_LEVELS == {} and isinstance(NO_LEVELS, dict) and not NO_LEVELS
    assert repr(NO_LEVELS) == repr({}) and json.dumps(NO_LEVELS) == json.dumps({})
    assert NO_LEVELS.get("U1.PA0") is None and list(NO_LEVELS.items()) == []
    assert Scenario("on", NO_LEVELS, ("D1",)) == Scenario("on", {}, ("D1",))
    assert _text(Scenario("on", NO_LEVELS)) == _text(_PlainScenario("on", {}))
    for copied in (pickle.loads(pickle.dumps(NO_LEVELS)), copy.copy(NO_LEVELS),
                   copy.deepcopy(NO_LEVELS), NO_LEVELS | {}, NO_LEVELS.copy()):
        assert type(copied) is dict and copied == {}
    for change in (lambda m: m.__setitem__("x", "high"), lambda m: m.update(x="high"),
                   lambda m: m.setdefault("x", "high"), lambda m: m.pop("x"),
                   lambda m: m.popitem(), lambda m: m.clear(), lambda m: m.__delitem__("x")):
        with pytest.raises(TypeError):
            change(NO_LEVELS)
    with pytest.raises(TypeError):
        levels = NO_LEVELS
        levels |= {"x": "high"}
    assert NO_LEVELS == {}
