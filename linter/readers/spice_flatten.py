"""Flattening a SPICE deck: every element with its instance path, nets and evaluated values.

Subcircuit instances are expanded depth-first in netlist order with an explicit stack (no
recursion). An ``X`` instance is kept whole (one part, pins named by the subcircuit's ports)
when its subcircuit name is in ``opaque`` or when the subcircuit places no element.
Internal nodes of an instance are qualified by the instance path (``X2/n1``); ports take the
net they are joined to outside; ``0``, ``gnd`` and ``.global`` nodes are the same net at every
level (ground is the net ``0``).

Parameters: top-level ``.param`` cards first, in order; an instance's scope is the top-level
parameters, then the subcircuit's defaults in order (each replaced by the instance's value
where given, evaluated in the caller's scope), then the body's ``.param`` cards in order.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Collection, Iterator, Mapping

from linter.limits import active
from linter.model import DeviceModel, SourceLocation
from linter.readers.spice_elements import ElementCard, parse_element
from linter.readers.spice_expr import ExpressionError, evaluate, strip_braces
from linter.readers.spice_lines import Card, Token
from linter.readers.spice_numbers import SpiceNumberError, read_spice_number
from linter.readers.spice_structure import ModelCard, Structure, Subcircuit, fail_at

__all__ = ["FlatElement", "NetInfo", "Flattened", "flatten", "MAX_ELEMENTS", "GROUND"]

MAX_ELEMENTS = 2_000_000
"""Hard ceiling on elements; below it ``max_parts`` (:mod:`linter.limits`) bounds both the
elements and the subcircuit instances expanded (a guard against runaway nesting)."""

GROUND = "0"
"""The key and display name of the ground net (``0`` and ``gnd``)."""


@dataclass(slots=True)
class FlatElement:
    """One element of the flattened design (or one ``X`` instance kept whole).

    Not frozen, only because a frozen dataclass costs several times as much to make (a
    deck of 100,000 elements makes 100,000 of them); nothing changes one once made.
    """

    name: str
    path: tuple[str, ...]
    letter: str
    pins: tuple[tuple[str, str], ...]
    location: SourceLocation
    value_text: str | None = None
    value_si: float | None = None
    value_token: Token | None = None
    model: DeviceModel | None = None
    subcircuit: str | None = None
    params: Mapping[str, str] = field(default_factory=dict)


@dataclass(slots=True)
class NetInfo:
    """A net's display name and the place it was first used."""

    name: str
    location: SourceLocation
    aliases: tuple[str, ...] = ()


@dataclass
class Flattened:
    """The flattening result: elements in netlist order and nets by key (lower case)."""

    elements: list[FlatElement] = field(default_factory=list)
    nets: dict[str, NetInfo] = field(default_factory=dict)


@dataclass
class _Frame:
    cards: Iterator[Card]
    path: tuple[str, ...]
    subcircuit: Subcircuit | None
    ports: dict[str, str]
    params: dict[str, float]
    models: dict[str, ModelCard]
    seen: dict[str, SourceLocation] = field(default_factory=dict)


def evaluate_token(token: Token, scope: Mapping[str, float], text: str | None = None) -> float:
    """A value token (``4k7``, ``{r*2}``, ``'a+b'``) as a float, or a located error."""
    text = token.text if text is None else text
    inner = strip_braces(text)
    try:
        if inner is not None:
            return evaluate(inner, scope)
        return read_spice_number(text)
    except ExpressionError as exc:
        raise fail_at(token, f"{exc.message} in {text!r}") from None
    except SpiceNumberError as exc:
        raise fail_at(token, str(exc)) from None


def _assign(token: Token, scope: dict[str, float], evaluate_in: Mapping[str, float]) -> None:
    name, _, text = token.text.partition("=")
    if not name or not text:
        raise fail_at(token, f"expected NAME=VALUE, found {token.text!r}")
    inner = strip_braces(text)
    try:
        scope[name.casefold()] = evaluate(inner if inner is not None else text, evaluate_in)
    except ExpressionError as exc:
        raise fail_at(token, f"{exc.message} in {text!r}") from None


def _body_params(cards: list[Card], scope: dict[str, float]) -> None:
    for card in cards:
        if card.keyword == ".param":
            for token in card.tokens[1:]:
                _assign(token, scope, scope)


class _Flattener:
    def __init__(self, structure: Structure, opaque: Collection[str],
                 plain_cards: bool = True) -> None:
        self.structure = structure
        self.opaque = {name.casefold() for name in opaque}
        self.result = Flattened()
        self.global_params: dict[str, float] = {}
        _body_params(structure.body, self.global_params)
        self.global_models: dict[str, DeviceModel] = {}
        self.limit = min(MAX_ELEMENTS, active().max_parts)
        self.expanded = 0
        self.plain_cards = plain_cards
        self.numbers: dict[str, float] = {}  # SPICE number text -> value, within this run

    def run(self) -> Flattened:
        body = [card for card in self.structure.body if card.keyword != ".param"]
        stack = [_Frame(iter(body), (), None, {}, self.global_params, {})]
        while stack:
            frame = stack[-1]
            card = next(frame.cards, None)
            if card is None:
                stack.pop()
                continue
            pushed = self._element(card, frame, stack)
            if pushed is not None:
                stack.append(pushed)
        return self.result

    def _is_model(self, frame: _Frame, name: str) -> bool:
        return name.casefold() in frame.models or name.casefold() in self.structure.models

    def _element(self, card: Card, frame: _Frame, stack: list[_Frame]) -> _Frame | None:
        if self.plain_cards:
            flat = self._plain_primitive(card, frame)
            if flat is not None:
                self.result.elements.append(flat)
                return None
        element = parse_element(card, lambda name: self._is_model(frame, name))
        key = element.name.folded
        if key in frame.seen:
            raise fail_at(element.name, f"{element.name.text} is defined twice "
                                        f"(first at {frame.seen[key]})")
        frame.seen[key] = element.name.location
        if len(self.result.elements) >= self.limit:
            raise fail_at(card, f"the design flattens to more than {self.limit} elements "
                                "(max_parts)")
        if element.letter == "X":
            return self._instance(element, frame, stack)
        self.result.elements.append(self._primitive(element, frame))
        return None

    def _net(self, token: Token, frame: _Frame) -> str:
        local = token.folded
        if local in self.structure.global_nodes:
            key, shown = (GROUND, GROUND) if local in ("0", "gnd") else (local, token.text)
        elif local in frame.ports:
            return frame.ports[local]
        elif not frame.path:  # the top level: the node is its own key
            key, shown = local, token.text
        else:
            key = "/".join([*(p.casefold() for p in frame.path), local])
            shown = "/".join([*frame.path, token.text])
        if key not in self.result.nets:
            aliases = ("GND",) if key == GROUND else ()
            self.result.nets[key] = NetInfo(shown, token.location, aliases)
        return key

    def _plain_primitive(self, card: Card, frame: _Frame) -> FlatElement | None:
        """The element of a plain card in its common shape, as :meth:`_primitive` makes it.

        ``R|C|L name n1 n2 number``, ``D name a k model``, ``Q name c b e model`` and ``M name
        d g s b model`` with a visible model: the same element, read from the card's words.
        None for any other card, and for one that would raise: the general path reads (or
        refuses) those. Nothing is recorded before the card is known to be taken.
        """
        key = card.keyword
        names = _PLAIN_SHAPES.get(key[:1])
        if names is None:
            return None
        words = card.words
        if words is None or len(words) != len(names) + 2 or key in frame.seen \
                or len(self.result.elements) >= self.limit:
            return None
        letter = key[0]
        last = words[-1]
        folded = last.casefold()
        visible = folded in frame.models or folded in self.structure.models
        value_si: float | None = None
        if letter in "rcl":
            if visible:
                return None
            value_si = self._plain_number(last, letter)
            if value_si is None:
                return None
        elif not visible:
            return None
        location = card.location
        frame.seen[key] = location
        offsets = _word_offsets(card.text, words)
        nets = self.result.nets
        keys = []
        for index in range(1, len(names) + 1):
            text = words[index]
            local = text.casefold()
            if frame.path or local in self.structure.global_nodes:  # (no ports at the top)
                keys.append(self._plain_net(card, offsets[index], text, local, frame))
                continue
            if local not in nets:
                nets[local] = NetInfo(text, card.location_at(offsets[index]), ())
            keys.append(local)
        pins = tuple(zip(names, keys))
        if value_si is not None:
            value = Token(last, card.location_at(offsets[3]), offsets[3])
            return FlatElement(words[0], frame.path, letter.upper(), pins, location, last,
                               value_si, value, None, None, {})
        model = self._model(Token(last, _NO_LOCATION), frame)
        return FlatElement(words[0], frame.path, letter.upper(), pins, location, last,
                           None, None, model, None, {})

    def _plain_number(self, text: str, letter: str) -> float | None:
        """A resistor's, capacitor's or inductor's value as :meth:`_primitive` reads it, or
        None where that would raise."""
        value = self.numbers.get(text)
        if value is None:
            try:
                value = read_spice_number(text)
            except SpiceNumberError:
                return None
            self.numbers[text] = value
        if letter == "r" and value and not \
                (0 < value and _RESISTANCE_RANGE[0] <= value <= _RESISTANCE_RANGE[1]):
            return None
        return value

    def _plain_net(self, card: Card, offset: int, text: str, local: str, frame: _Frame) -> str:
        """:meth:`_net` for a word ``text`` (folded: ``local``) at ``offset`` of a plain card."""
        if local in self.structure.global_nodes:
            key, shown = (GROUND, GROUND) if local in ("0", "gnd") else (local, text)
        elif local in frame.ports:
            return frame.ports[local]
        elif not frame.path:
            key, shown = local, text
        else:
            key = "/".join([*(p.casefold() for p in frame.path), local])
            shown = "/".join([*frame.path, text])
        if key not in self.result.nets:
            aliases = ("GND",) if key == GROUND else ()
            self.result.nets[key] = NetInfo(shown, card.location_at(offset), aliases)
        return key

    def _primitive(self, element: ElementCard, frame: _Frame) -> FlatElement:
        pins = tuple((pin, self._net(token, frame)) for pin, token in element.pins)
        value_si = None
        if element.value is not None and element.letter in "RCLVI":
            text = element.value.text.split("=", 1)[1] if "=" in element.value.text and \
                strip_braces(element.value.text) is None else element.value.text
            value_si = evaluate_token(element.value, frame.params, text)
            if element.letter == "R" and value_si is not None and value_si < 0:
                raise fail_at(element.value, f"{element.name.text}: negative resistance "
                                             f"{value_si:g} Ω; a resistor's value must be 0 Ω or more")
            if element.letter == "R" and value_si and not \
                    _RESISTANCE_RANGE[0] <= value_si <= _RESISTANCE_RANGE[1]:
                raise fail_at(element.value, f"{element.name.text}: resistance {value_si:g} Ω lies "
                                             "outside 1 µΩ to 1 TΩ (0 Ω is a link)")
            if element.letter == "V" and value_si and not \
                    _SOURCE_RANGE[0] <= abs(value_si) <= _SOURCE_RANGE[1]:
                raise fail_at(element.value, f"{element.name.text}: {value_si:g} V lies outside "
                                             "1 µV to 10 kV either way (or 0 V)")
        model = self._model(element.model, frame) if element.model is not None else None
        params = {t.text.split("=", 1)[0].casefold(): t.text.split("=", 1)[1] for t in element.params}
        return FlatElement(element.name.text, frame.path, element.letter, pins, element.name.location,
                           element.value_text, value_si, element.value, model, None, params)

    def _model(self, token: Token, frame: _Frame) -> DeviceModel:
        key = token.folded
        if key in frame.models:
            return _device_model(frame.models[key], frame.params)
        if key not in self.global_models:
            self.global_models[key] = _device_model(self.structure.models[key], self.global_params)
        return self.global_models[key]

    def _instance(self, element: ElementCard, frame: _Frame, stack: list[_Frame]) -> _Frame | None:
        assert element.subcircuit is not None
        definition = self.structure.subcircuits.get(element.subcircuit.folded)
        if definition is None:
            raise fail_at(element.subcircuit, f"{element.name.text}: unknown subcircuit "
                                              f"{element.subcircuit.text!r}")
        if len(element.pins) != len(definition.ports):
            raise fail_at(element.name, f"{element.name.text}: subcircuit {definition.name} has "
                                        f"{len(definition.ports)} ports "
                                        f"({' '.join(t.text for t in definition.ports)}), "
                                        f"found {len(element.pins)} nodes")
        nets = [self._net(token, frame) for _, token in element.pins]
        if definition.name.casefold() in self.opaque or not definition.has_elements:
            self.result.elements.append(self._whole(element, frame, definition, nets))
            return None
        chain = [f.subcircuit.name for f in stack if f.subcircuit is not None]
        if definition.name.casefold() in (name.casefold() for name in chain):
            start = [n.casefold() for n in chain].index(definition.name.casefold())
            raise fail_at(element.name, "subcircuit used inside itself: "
                                        + " -> ".join([*chain[start:], definition.name]))
        self.expanded += 1
        if self.expanded > self.limit:
            raise fail_at(element.name, f"the design expands more than {self.limit} subcircuit "
                                        "instances (max_parts)")
        params = self._instance_params(element, frame, definition)
        ports = {port.folded: net for port, net in zip(definition.ports, nets)}
        body = [card for card in definition.body if card.keyword != ".param"]
        return _Frame(iter(body), (*frame.path, element.name.text), definition, ports, params,
                      definition.models)

    def _instance_params(self, element: ElementCard, frame: _Frame, definition: Subcircuit) -> dict[str, float]:
        given = {t.text.split("=", 1)[0].casefold(): t for t in element.params}
        known = {t.text.split("=", 1)[0].casefold() for t in definition.defaults}
        for name, token in given.items():
            if name not in known:
                raise fail_at(token, f"{element.name.text}: subcircuit {definition.name} has no "
                                     f"parameter {token.text.split('=', 1)[0]!r}")
        scope = dict(self.global_params)
        for default in definition.defaults:
            name = default.text.split("=", 1)[0].casefold()
            if name in given:
                _assign(given[name], scope, frame.params)
            else:
                _assign(default, scope, scope)
        _body_params(definition.body, scope)
        return scope

    def _whole(self, element: ElementCard, frame: _Frame, definition: Subcircuit,
               nets: list[str]) -> FlatElement:
        pins = tuple((port.text, net) for port, net in zip(definition.ports, nets))
        params = {t.text.split("=", 1)[0].casefold(): t.text.split("=", 1)[1] for t in element.params}
        return FlatElement(element.name.text, frame.path, "X", pins, element.name.location,
                           None, None, None, None, definition.name, params)


_MODEL_RANGES: dict[str, tuple[float, float, bool]] = {
    "IS": (0.0, 1.0, False), "N": (0.0, 100.0, False), "RS": (0.0, 1e6, True),
    "BF": (0.0, 1e5, False), "BR": (0.0, 1e5, False), "KP": (0.0, 1e3, False),
    "VTO": (-1e3, 1e3, True), "LAMBDA": (0.0, 10.0, True),
}
"""Model parameters the solver uses: (lowest, highest, lowest allowed) of the values read:
beyond them a device is no device (a gain of 0, an emission coefficient of 1e300) and only
breaks the arithmetic."""
_SOURCE_RANGE = (1e-6, 1e4)
"""V: a voltage source's magnitude, if not 0, as for settings rails (±10 kV)."""
_RESISTANCE_RANGE = (1e-6, 1e12)
"""Ω: a resistor's value, if not 0 (a link), lies within a micro-ohm and a tera-ohm."""


def _device_model(card: ModelCard, scope: Mapping[str, float]) -> DeviceModel:
    params: dict[str, float] = {}
    for token in card.params:
        name, equals, text = token.text.partition("=")
        if equals:
            value = evaluate_token(token, scope, text)
            low, high, low_included = _MODEL_RANGES.get(name.upper(), (-math.inf, math.inf, True))
            if not low <= value <= high or (value == low and not low_included):
                raise fail_at(token, f"model {card.name}: {name.upper()}={value:g} lies outside "
                                     f"the range read ({low:g} to {high:g})")
            params[name.upper()] = value
    return DeviceModel(card.name, card.type, params, card.card.location)


_PLAIN_SHAPES: dict[str, tuple[str, ...]] = {
    "r": ("1", "2"), "c": ("1", "2"), "l": ("1", "2"), "d": ("A", "K"),
    "q": ("C", "B", "E"), "m": ("D", "G", "S", "B"),
}
"""Element letters read from a plain card's words, and their pin names (as
:mod:`~linter.readers.spice_elements` names them): name, nodes, then a value or a model."""

_NO_LOCATION = SourceLocation("", 0, 0)
"""For a model name looked up by text only (its location is never read)."""


def _word_offsets(text: str, words: list[str]) -> list[int]:
    """Where each of ``words`` (``text.split()``) starts in ``text``."""
    offsets = []
    offset = 0
    for word in words:
        offset = text.index(word, offset)
        offsets.append(offset)
        offset += len(word)
    return offsets


def flatten(structure: Structure, opaque: Collection[str] = (), *,
            plain_cards: bool = True) -> Flattened:
    """Expand the deck's hierarchy into elements and nets (see the module docstring).

    ``plain_cards=False`` reads every card through the general element parser; the result is
    the same (the shortcut for plain cards is checked against it in the tests).
    """
    return _Flattener(structure, opaque, plain_cards).run()
