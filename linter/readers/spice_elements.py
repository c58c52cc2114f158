"""SPICE element cards: which letter means what, its nodes in order, its value and model.

One handler per element letter (a dispatch table). Pin names, in node order:

======  ==========================  ====================================================
letter  pins                        then
======  ==========================  ====================================================
R C L   ``1`` ``2``                 value (number or ``{expr}``), or a model name
D       ``A`` ``K``                 model
Q       ``C`` ``B`` ``E`` [``S``]   model (a fourth node is the substrate when the token
                                    after the emitter is not a model name, as in ngspice)
M       ``D`` ``G`` ``S`` ``B``     model
J       ``D`` ``G`` ``S``           model
V I     ``+`` ``-``                 ``[DC] value``, ``AC …``, ``PULSE(…)`` …
E G     ``+`` ``-`` ``C+`` ``C-``   gain (``VALUE=``/``VOL=``/``CUR=`` forms: ``+`` ``-``)
F H     ``+`` ``-``                 controlling voltage source, gain
B       ``+`` ``-``                 ``V=expr`` or ``I=expr``
X       the subcircuit's ports      subcircuit name, ``[params:] name=value …``
======  ==========================  ====================================================
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

from linter.readers.spice_lines import Card, Token
from linter.readers.spice_structure import fail_at

__all__ = ["ELEMENT_LETTERS", "ElementCard", "parse_element"]

ELEMENT_LETTERS = "BCDEFGHIJLMQRVX"
"""The element letters this reader understands."""

IsModel = Callable[[str], bool]


@dataclass(frozen=True)
class ElementCard:
    """An element card taken apart (nothing evaluated yet)."""

    name: Token
    letter: str
    pins: tuple[tuple[str, Token], ...]
    value: Token | None = None
    value_text: str | None = None
    model: Token | None = None
    params: tuple[Token, ...] = ()
    subcircuit: Token | None = None
    card: Card | None = None


def _is_assignment(token: Token) -> bool:
    return "=" in token.text and not token.text.startswith(("{", "'"))


def _nodes(card: Card, names: tuple[str, ...]) -> tuple[tuple[str, Token], ...]:
    """The first ``len(names)`` tokens after the element name, as (pin, token)."""
    found: list[Token] = []
    for token in card.tokens[1:1 + len(names)]:
        if _is_assignment(token) or token.text in "()":
            break
        found.append(token)
    if len(found) < len(names):
        raise fail_at(card, f"{card.tokens[0].text} needs {len(names)} nodes "
                            f"({' '.join(names)}), found {len(found)}")
    return tuple(zip(names, found))


def _two_terminal(card: Card, is_model: IsModel) -> ElementCard:
    pins = _nodes(card, ("1", "2"))
    rest = card.tokens[3:]
    model = None
    if rest and not _is_assignment(rest[0]) and is_model(rest[0].text):
        model, rest = rest[0], rest[1:]
    value = next((t for t in rest if not _is_assignment(t)), None)
    params = tuple(t for t in rest if _is_assignment(t))
    keyword = card.keyword[0]
    if value is None:
        value = next((t for t in params if t.folded.split("=", 1)[0] in (
            keyword, {"r": "resistance", "c": "capacitance", "l": "inductance"}[keyword])), None)
    if value is None and model is None:
        raise fail_at(card, f"{card.tokens[0].text} has no value")
    shown = value.text.split("=", 1)[-1] if value is not None else model.text  # type: ignore[union-attr]
    return ElementCard(card.tokens[0], keyword.upper(), pins, value, shown, model, params, card=card)


def _needs_model(card: Card, names: tuple[str, ...], is_model: IsModel) -> ElementCard:
    pins = _nodes(card, names)
    model_index = 1 + len(names)
    model = card.tokens[model_index] if model_index < len(card.tokens) else None
    if model is None or _is_assignment(model) or not is_model(model.text):
        if is_model(card.tokens[model_index - 1].text):  # a model where the last node belongs
            raise fail_at(card, f"{card.tokens[0].text} needs {len(names)} nodes "
                                f"({' '.join(names)}), found {len(names) - 1}")
        if model is None or _is_assignment(model):
            raise fail_at(card, f"{card.tokens[0].text} needs a model name after its "
                                f"{len(names)} nodes ({' '.join(names)})")
        raise fail_at(model, f"{card.tokens[0].text}: no .model {model.text!r}")
    params = tuple(t for t in card.tokens[model_index + 1:] if _is_assignment(t))
    return ElementCard(card.tokens[0], card.keyword[0].upper(), pins, None, model.text, model, params, card=card)


def _diode(card: Card, is_model: IsModel) -> ElementCard:
    return _needs_model(card, ("A", "K"), is_model)


def _bjt(card: Card, is_model: IsModel) -> ElementCard:
    tokens = card.tokens
    if len(tokens) > 5 and not is_model(tokens[4].text) and is_model(tokens[5].text):
        return _needs_model(card, ("C", "B", "E", "S"), is_model)
    return _needs_model(card, ("C", "B", "E"), is_model)


def _mosfet(card: Card, is_model: IsModel) -> ElementCard:
    return _needs_model(card, ("D", "G", "S", "B"), is_model)


def _jfet(card: Card, is_model: IsModel) -> ElementCard:
    return _needs_model(card, ("D", "G", "S"), is_model)


_WAVEFORMS = frozenset({"pulse", "sin", "exp", "pwl", "sffm", "am", "trrandom", "trnoise"})


def _source(card: Card, is_model: IsModel) -> ElementCard:
    pins = _nodes(card, ("+", "-"))
    rest = card.tokens[3:]
    value: Token | None = None
    for index, token in enumerate(rest):
        if token.folded == "dc" and index + 1 < len(rest):
            value = rest[index + 1]
            break
        if token.folded in ("ac", "distof1", "distof2") or token.folded in _WAVEFORMS:
            break
        if index == 0 and token.text not in "()":
            value = token
            break
    return ElementCard(card.tokens[0], card.keyword[0].upper(), pins, value, card.rest_text(3) or None,
                       card=card)


def _controlled(card: Card, is_model: IsModel) -> ElementCard:
    first = card.tokens[3] if len(card.tokens) > 3 else None
    if first is not None and first.folded.split("=", 1)[0] in ("value", "vol", "cur", "table"):
        pins = _nodes(card, ("+", "-"))
    else:
        pins = _nodes(card, ("+", "-", "C+", "C-"))
    return ElementCard(card.tokens[0], card.keyword[0].upper(), pins, None,
                       card.rest_text(1 + len(pins)) or None, card=card)


def _current_controlled(card: Card, is_model: IsModel) -> ElementCard:
    pins = _nodes(card, ("+", "-"))
    return ElementCard(card.tokens[0], card.keyword[0].upper(), pins, None, card.rest_text(3) or None,
                       card=card)


def _behavioural(card: Card, is_model: IsModel) -> ElementCard:
    pins = _nodes(card, ("+", "-"))
    return ElementCard(card.tokens[0], "B", pins, None, card.rest_text(3) or None, card=card)


def _instance(card: Card, is_model: IsModel) -> ElementCard:
    words: list[Token] = []
    params: list[Token] = []
    for token in card.tokens[1:]:
        if token.folded in ("params:", "param:"):
            continue
        (params if (params or _is_assignment(token)) else words).append(token)
    if not words:
        raise fail_at(card, f"{card.tokens[0].text} needs nodes and a subcircuit name")
    subcircuit = words[-1]
    pins = tuple((str(index), token) for index, token in enumerate(words[:-1], start=1))
    return ElementCard(card.tokens[0], "X", pins, None, subcircuit.text, None, tuple(params),
                       subcircuit, card=card)


_HANDLERS: dict[str, Callable[[Card, IsModel], ElementCard]] = {
    "r": _two_terminal, "c": _two_terminal, "l": _two_terminal, "d": _diode, "q": _bjt,
    "m": _mosfet, "j": _jfet, "v": _source, "i": _source, "e": _controlled, "g": _controlled,
    "f": _current_controlled, "h": _current_controlled, "b": _behavioural, "x": _instance,
}


def parse_element(card: Card, is_model: IsModel) -> ElementCard:
    """Take an element card apart; ``is_model`` says whether a name is a visible ``.model``.

    X pins are numbered here; the flattener renames them to the subcircuit's ports.
    """
    handler = _HANDLERS.get(card.keyword[:1])
    if handler is None:
        raise fail_at(card, f"unknown element letter {card.tokens[0].text[:1]!r} in "
                            f"{card.tokens[0].text!r}; SPICE elements read here: "
                            f"{' '.join(ELEMENT_LETTERS)}")
    return handler(card, is_model)
