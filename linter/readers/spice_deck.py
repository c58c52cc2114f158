"""A SPICE deck as one stream of cards: the title, ``.include`` and ``.lib`` resolved, ``.end``.

``.include FILE`` (also ``.inc``) and ``.lib FILE SECTION`` are resolved relative to the
folder of the file that names them. The resolved real path (symbolic links followed) must lie
inside the project folder ``root``, so neither ``..`` nor a link can reach other files. An
include that is already open (directly or through others) is a loop and is refused. Included
files have no title line. ``.lib FILE SECTION`` reads the lines between ``.lib SECTION`` and
``.endl`` of FILE; ``.lib FILE`` alone reads the whole file. An included file is named in
locations and messages the way the user named the top file: its path relative to the top
file's folder, joined to the folder part of ``source`` (``boards/panel.cir`` including
``models.inc`` gives ``boards/models.inc``), so that both are found from the same place.
Reading uses an explicit stack (no recursion).
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Callable, Iterator

from linter.errors import NetlistError
from linter.readers.spice_lines import Card, read_cards

__all__ = ["Deck", "load_deck"]

_INCLUDE_WORDS = frozenset({".include", ".inc", ".incl"})


@dataclass(frozen=True)
class Deck:
    """Every circuit card of the deck and its included files, in reading order, and the title."""

    title: str
    cards: tuple[Card, ...]


@dataclass
class _Open:
    """A file being read: its cards, its real path and the section it was opened for."""

    cards: Iterator[Card]
    real: Path
    name: str
    section: str | None


def _title(text: str) -> str:
    lines = text.splitlines()
    return lines[0].strip() if lines else ""


def _unquote(text: str) -> str:
    if len(text) >= 2 and text[0] == text[-1] and text[0] in "'\"":
        return text[1:-1]
    return text


def _section_cards(cards: Iterator[Card], section: str) -> Iterator[Card]:
    """The cards between ``.lib SECTION`` and its ``.endl``."""
    inside = False
    for card in cards:
        if not inside:
            inside = card.keyword == ".lib" and len(card.tokens) == 2 and card.tokens[1].folded == section
            continue
        if card.keyword == ".endl":
            return
        yield card


def load_deck(text: str, source: str, *, path: Path, root: Path) -> Deck:
    """Read the top file's text and every file it includes into one :class:`Deck`."""
    root_real = root.resolve()
    title = _title(text)
    top = path.resolve()

    def display(real: Path) -> str:
        return os.path.normpath(os.path.join(os.path.dirname(source), os.path.relpath(real, top.parent)))

    stack = [_Open(read_cards(text, source, skip_title=True), top, source, None)]
    cards: list[Card] = []
    while stack:
        current = stack[-1]
        card = next(current.cards, None)
        if card is None or card.keyword == ".end":
            stack.pop()
            continue
        keyword = card.keyword
        if keyword in _INCLUDE_WORDS or (keyword == ".lib" and len(card.tokens) in (2, 3)):
            stack.append(_open_include(card, stack, root_real, display))
        elif keyword == ".title":
            title = card.rest_text(1)
        elif keyword not in (".lib", ".endl"):
            cards.append(card)
    return Deck(title, tuple(cards))


def _open_include(card: Card, stack: list[_Open], root_real: Path,
                  display: Callable[[Path], str]) -> _Open:
    """Check and open the file a ``.include`` or ``.lib`` card names."""
    word = card.tokens[0].text
    if len(card.tokens) < 2:
        raise NetlistError(card.location.file, card.location.line, card.location.column,
                           f"{word} needs a file name")
    given = _unquote(card.tokens[1].text)
    section = card.tokens[2].folded if card.keyword == ".lib" and len(card.tokens) >= 3 else None
    here = card.tokens[1].location
    real = (stack[-1].real.parent / given).resolve()
    if not real.is_relative_to(root_real):
        raise NetlistError(here.file, here.line, here.column,
                           f"{word} {given!r} is outside the project folder; refused")
    opened = [(item.real, item.section) for item in stack]
    if (real, section) in opened:
        chain = " -> ".join([item.name for item in stack[opened.index((real, section)):]]
                            + [display(real)])
        raise NetlistError(here.file, here.line, here.column, f"{word} loop: {chain}")
    name = display(real)
    from linter.limits import read_input
    from linter.readers import decode_text  # the package imports this module lazily

    data = read_input(real, here.file, NetlistError, here.line, here.column, f"{word} {given!r}")

    cards = read_cards(decode_text(data, name), name, skip_title=False)
    return _Open(_section_cards(cards, section) if section else cards, real, name, section)

