"""Cards to structure: the top-level body, subcircuit definitions, ``.model`` cards, globals.

A ``.subckt NAME PORT... [params:] [name=default...]`` card opens a definition that ``.ends``
closes; a definition written inside another one is treated as global (its name must be
unique). ``.model`` cards belong to the body they are written in (top level: every body can
use them; inside a subcircuit: that subcircuit). ``.param`` cards stay in their body, in
order. Other dot cards (analyses, options, outputs) say nothing about the circuit and are
skipped.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from linter.errors import NetlistError
from linter.readers.spice_lines import Card, Token

__all__ = ["ModelCard", "Subcircuit", "Structure", "structure_of", "fail_at"]


def fail_at(token: Token | Card, message: str) -> NetlistError:
    """A :class:`NetlistError` located at a token or card."""
    location = token.location
    return NetlistError(location.file, location.line, location.column, message)


@dataclass(frozen=True)
class ModelCard:
    """A ``.model NAME TYPE (PARAM=VALUE ...)`` card, values not yet evaluated."""

    name: str
    type: str
    params: tuple[Token, ...]
    card: Card


@dataclass
class Subcircuit:
    """A ``.subckt`` definition: ports, parameter defaults, body cards and local models."""

    name: str
    ports: tuple[Token, ...]
    defaults: tuple[Token, ...]
    card: Card
    body: list[Card] = field(default_factory=list)
    models: dict[str, ModelCard] = field(default_factory=dict)

    @property
    def has_elements(self) -> bool:
        """True when the body places at least one element (a box with no body has none)."""
        return any(not card.keyword.startswith(".") for card in self.body)


@dataclass
class Structure:
    """The whole deck, organised: what the reader flattens."""

    title: str
    body: list[Card] = field(default_factory=list)
    subcircuits: dict[str, Subcircuit] = field(default_factory=dict)
    models: dict[str, ModelCard] = field(default_factory=dict)
    global_nodes: set[str] = field(default_factory=lambda: {"0", "gnd"})


def _is_assignment(token: Token) -> bool:
    return "=" in token.text and not token.text.startswith(("{", "'"))


def _model(card: Card) -> ModelCard:
    tokens = card.tokens
    if len(tokens) < 3:
        raise fail_at(card, ".model needs a name and a type")
    params = tuple(t for t in tokens[3:] if t.text not in "()")
    for token in params:
        if not _is_assignment(token):
            if token.folded in ("level",) or token.text.isidentifier():
                continue  # flags such as 'off'; only name=value pairs are kept
            raise fail_at(token, f"model parameter {token.text!r} is not NAME=VALUE")
    return ModelCard(tokens[1].text, tokens[2].text.upper(), params, card)


def _subcircuit(card: Card) -> Subcircuit:
    tokens = card.tokens
    if len(tokens) < 2:
        raise fail_at(card, ".subckt needs a name")
    ports: list[Token] = []
    defaults: list[Token] = []
    for token in tokens[2:]:
        if token.folded in ("params:", "param:"):
            continue
        if _is_assignment(token):
            defaults.append(token)
        elif defaults:
            raise fail_at(token, f"port {token.text!r} after the parameters of .subckt {tokens[1].text}")
        else:
            ports.append(token)
    return Subcircuit(tokens[1].text, tuple(ports), tuple(defaults), card)


def structure_of(title: str, cards: tuple[Card, ...]) -> Structure:
    """Sort the cards of a deck into bodies, subcircuits and models."""
    result = Structure(title)
    open_stack: list[Subcircuit] = []
    for card in cards:
        keyword = card.keyword
        if keyword == ".subckt":
            _open(result, open_stack, card)
        elif keyword == ".ends":
            _close(open_stack, card)
        elif keyword == ".model":
            model = _model(card)
            scope = open_stack[-1].models if open_stack else result.models
            scope[model.name.casefold()] = model
        elif keyword == ".global":
            result.global_nodes.update(token.folded for token in card.tokens[1:])
        elif keyword == ".param" or not keyword.startswith("."):
            (open_stack[-1].body if open_stack else result.body).append(card)
    if open_stack:
        raise fail_at(open_stack[-1].card, f".subckt {open_stack[-1].name} has no .ends")
    return result


def _open(result: Structure, open_stack: list[Subcircuit], card: Card) -> None:
    subcircuit = _subcircuit(card)
    key = subcircuit.name.casefold()
    earlier = result.subcircuits.get(key)
    if earlier is not None:
        raise fail_at(card, f"subcircuit {subcircuit.name!r} is defined twice "
                            f"(first at {earlier.card.location})")
    result.subcircuits[key] = subcircuit
    open_stack.append(subcircuit)


def _close(open_stack: list[Subcircuit], card: Card) -> None:
    if not open_stack:
        raise fail_at(card, ".ends without .subckt")
    closing = open_stack.pop()
    if len(card.tokens) > 1 and card.tokens[1].folded != closing.name.casefold():
        raise fail_at(card.tokens[1], f".ends {card.tokens[1].text} closes .subckt {closing.name}")
