"""SPICE text to cards: comments, continuation lines and tokens, each with its position.

A *card* is one logical line: a physical line plus the ``+`` continuation lines after it
(comment and blank lines between them are allowed, as in ngspice). Comments, as ngspice
reads them: a line whose first non-blank character is ``*``; inline, from ``;`` anywhere or
from ``$`` at the start or after a blank. Tokens are separated by blanks and commas;
``(`` and ``)`` are tokens of their own; ``{...}``, ``'...'`` and ``"..."`` stay whole;
``name = value`` is joined into one token ``name=value``. ``.control`` … ``.endc`` blocks
(simulator commands, not circuit) are skipped whole.
"""

from __future__ import annotations

import re

from dataclasses import dataclass
from functools import cached_property
from typing import Iterator

from linter.errors import NetlistError
from linter.model import SourceLocation

__all__ = ["Token", "Card", "read_cards"]


@dataclass(frozen=True, slots=True)
class Token:
    """A word of a card: its text, where it starts, and its offset in the card's text."""

    text: str
    location: SourceLocation
    offset: int = 0

    @property
    def folded(self) -> str:
        """The text in lower case (SPICE is case-insensitive)."""
        return self.text.casefold()


@dataclass(frozen=True)
class Card:
    """One logical line: its tokens and its text (continuations joined by a blank)."""

    tokens: tuple[Token, ...]
    text: str

    @property
    def location(self) -> SourceLocation:
        """Where the card starts (its first token)."""
        return self.tokens[0].location

    @cached_property
    def keyword(self) -> str:
        """The first word in lower case: an element name or a dot card (worked out once)."""
        return self.tokens[0].folded

    def rest_text(self, index: int) -> str:
        """The card's text from token ``index`` to the end ('' when there is no such token)."""
        if index >= len(self.tokens):
            return ""
        return self.text[self.tokens[index].offset:].strip()


@dataclass
class _Segment:
    line: int
    start: int  # 0-based column of the segment's first character
    text: str


_DOLLAR_COMMENT = re.compile(r"(?:^|(?<=[ \t]))\$")
"""A ``$`` at the start of a line or after a blank opens a comment."""


def _strip_comment(line: str) -> str:
    cut = len(line)
    semicolon = line.find(";")
    if semicolon >= 0:
        cut = semicolon
    dollar = _DOLLAR_COMMENT.search(line, 0, cut)
    if dollar is not None:
        cut = dollar.start()
    return line[:cut]


def _logical_lines(text: str, file: str, first_line: int) -> Iterator[list[_Segment]]:
    """Physical lines from ``first_line`` (1-based) grouped into logical lines."""
    pending: list[_Segment] = []
    for number, raw in enumerate(text.splitlines()[first_line - 1:], start=first_line):
        line = _strip_comment(raw)
        stripped = line.lstrip()
        if not stripped or stripped.startswith("*"):
            continue
        indent = len(line) - len(stripped)
        if stripped.startswith("+"):
            if not pending:
                raise NetlistError(file, number, indent + 1, "continuation line '+' with no line to continue")
            pending.append(_Segment(number, indent + 1, stripped[1:]))
            continue
        if pending:
            yield pending
        pending = [_Segment(number, indent, stripped)]
    if pending:
        yield pending


_CLOSERS = {"{": "}", "'": "'", '"': '"'}
_PLAIN_RUN = re.compile(r"[^ \t\r\f\v,(){'\"]+")
"""A run of characters that neither end a token nor open a quote or brace (taken whole, so a
long token costs linear time)."""


_SIMPLE_TOKEN = re.compile(r"[()]|[^ \t\r\f\v,()]+")
"""A token of a segment with no quote and no brace: a parenthesis or a run of other characters."""
_OPENERS = re.compile(r"[{'\"]")


def _split(segment: _Segment, file: str, base: int) -> list[Token]:
    """Tokens of one segment; ``base`` is the segment's offset in the card text."""
    text = segment.text
    if _OPENERS.search(text) is None:  # the common case: one regex finds every token
        line, column = segment.line, segment.start + 1
        return [Token(match.group(), SourceLocation(file, line, column + match.start()),
                      base + match.start()) for match in _SIMPLE_TOKEN.finditer(text)]
    tokens: list[Token] = []
    index = 0
    current, start = "", -1
    while index < len(text):
        char = text[index]
        if char in " \t\r\f\v,()":
            if current:
                tokens.append(_token(current, file, segment, start, base))
                current = ""
            if char in "()":
                tokens.append(_token(char, file, segment, index, base))
            index += 1
            continue
        if not current:
            start = index
        run = _PLAIN_RUN.match(text, index)
        if run is not None:
            current += run.group()
            index = run.end()
            continue
        if char in _CLOSERS:
            end = _closing(text, index, char)
            if end < 0:
                raise NetlistError(file, segment.line, segment.start + index + 1,
                                   f"{char!r} is never closed on this line")
            current += text[index:end + 1]
            index = end + 1
            continue
        current += char
        index += 1
    if current:
        tokens.append(_token(current, file, segment, start, base))
    return tokens


def _closing(text: str, index: int, opener: str) -> int:
    closer = _CLOSERS[opener]
    if opener != "{":
        return text.find(closer, index + 1)
    depth = 0
    for position in range(index, len(text)):
        if text[position] == "{":
            depth += 1
        elif text[position] == "}":
            depth -= 1
            if depth == 0:
                return position
    return -1


def _token(text: str, file: str, segment: _Segment, index: int, base: int) -> Token:
    return Token(text, SourceLocation(file, segment.line, segment.start + index + 1), base + index)


def _join_equals(tokens: list[Token]) -> list[Token]:
    """``a = b``, ``a= b`` and ``a =b`` become one token ``a=b`` placed at ``a``."""
    joined: list[Token] = []
    index = 0
    while index < len(tokens):
        token = tokens[index]
        glue_next = token.text.endswith("=") and not token.text.startswith(("{", "'"))
        if token.text.startswith("=") and joined and token.text != "=":
            previous = joined.pop()
            token = Token(previous.text + token.text, previous.location, previous.offset)
            glue_next = False
        if token.text == "=" and joined:
            previous = joined.pop()
            token = Token(previous.text + "=", previous.location, previous.offset)
            glue_next = True
        if glue_next and index + 1 < len(tokens) and tokens[index + 1].text not in "()":
            following = tokens[index + 1]
            token = Token(token.text + following.text, token.location, token.offset)
            index += 1
        joined.append(token)
        index += 1
    return joined


def _card(segments: list[_Segment], file: str) -> Card:
    tokens: list[Token] = []
    pieces: list[str] = []
    base = 0
    for segment in segments:
        tokens.extend(_split(segment, file, base))
        pieces.append(segment.text)
        base += len(segment.text) + 1
    text = " ".join(pieces)
    return Card(tuple(_join_equals(tokens) if "=" in text else tokens), text)


def read_cards(text: str, file: str, *, skip_title: bool) -> Iterator[Card]:
    """The cards of one file in order; the first line is skipped when it is the deck's title.

    ``.control`` … ``.endc`` is skipped; reading stops at neither ``.end`` nor anything else
    (the caller decides).
    """
    in_control = False
    for segments in _logical_lines(text, file, 2 if skip_title else 1):
        first_word = segments[0].text.split(None, 1)[0].casefold() if segments[0].text.split() else ""
        if in_control:
            in_control = first_word != ".endc"
            continue
        if first_word == ".control":
            in_control = True
            continue
        card = _card(segments, file)
        if card.tokens:
            yield card
