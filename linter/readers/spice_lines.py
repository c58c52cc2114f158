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
from typing import Iterator, NamedTuple

from linter.errors import NetlistError
from linter.model import SourceLocation

__all__ = ["Token", "Card", "read_cards"]


@dataclass(slots=True, unsafe_hash=True)
class Token:
    """A word of a card: its text, where it starts, and its offset in the card's text.

    Not frozen, only because a frozen dataclass costs several times as much to make (as
    :class:`linter.readers.spice_flatten.FlatElement`); nothing changes one once made.
    """

    text: str
    location: SourceLocation
    offset: int = 0

    @property
    def folded(self) -> str:
        """The text in lower case (SPICE is case-insensitive)."""
        return self.text.casefold()


class Card:
    """One logical line: its tokens and its text (continuations joined by a blank).

    A *plain* card (one physical line of printable ASCII and tabs with no ``, ( ) { } ' " =``)
    keeps only its text and position: its tokens are its blank-separated words, made into
    :class:`Token` objects only when asked for (:attr:`tokens`). :attr:`words` gives the
    words of a plain card without building tokens (None for any other card).
    """

    __slots__ = ("text", "keyword", "_file", "_line", "_column", "_tokens")

    def __init__(self, tokens: tuple[Token, ...] | None, text: str, *, file: str = "",
                 line: int = 0, column: int = 0, keyword: str | None = None) -> None:
        self.text = text
        self._tokens = tokens
        self._file, self._line, self._column = file, line, column
        if keyword is None:
            keyword = tokens[0].folded if tokens else ""
        self.keyword = keyword
        """The first word in lower case: an element name or a dot card."""

    @property
    def tokens(self) -> tuple[Token, ...]:
        """Every token with its position (built on first use for a plain card)."""
        tokens = self._tokens
        if tokens is None:
            tokens = self._tokens = tuple(self._plain_tokens())
        return tokens

    @property
    def words(self) -> list[str] | None:
        """The words of a plain card (its tokens' texts); None for any other card."""
        return self.text.split() if self._tokens is None else None

    def _plain_tokens(self) -> list[Token]:
        file, line, column, text = self._file, self._line, self._column, self.text
        found: list[Token] = []
        offset = 0
        for word in text.split():
            offset = text.index(word, offset)
            found.append(Token(word, SourceLocation(file, line, column + offset), offset))
            offset += len(word)
        return found

    def word_offset(self, index: int, words: list[str] | None = None) -> int:
        """Where token ``index`` starts in :attr:`text`; ``words`` may pass :attr:`words`."""
        if self._tokens is not None:
            return self._tokens[index].offset
        text = self.text
        offset = 0
        for word in (words if words is not None else text.split())[:index + 1]:
            offset = text.index(word, offset) + len(word)
        return offset - len(word)

    def location_at(self, offset: int) -> SourceLocation:
        """Where the character at ``offset`` of a plain card's :attr:`text` is."""
        return SourceLocation(self._file, self._line, self._column + offset)

    def word_location(self, index: int, words: list[str] | None = None) -> SourceLocation:
        """Where token ``index`` starts (without building the tokens of a plain card)."""
        if self._tokens is not None:
            return self._tokens[index].location
        return SourceLocation(self._file, self._line,
                              self._column + (self.word_offset(index, words) if index else 0))

    @property
    def location(self) -> SourceLocation:
        """Where the card starts (its first token)."""
        return self.word_location(0)

    def rest_text(self, index: int) -> str:
        """The card's text from token ``index`` to the end ('' when there is no such token)."""
        if index >= len(self.tokens):
            return ""
        return self.text[self.tokens[index].offset:].strip()


class _Segment(NamedTuple):
    line: int
    start: int  # 0-based column of the segment's first character
    text: str


_NOT_PLAIN = re.compile(r"[^\t -~]|[,(){}'\"=]")
"""A character that keeps a line from being a plain card: one outside printable ASCII and
tabs, or one that makes or joins tokens (``, ( ) { } ' " =``). In a plain line the tokens are
exactly the words that :meth:`str.split` finds."""

_DOLLAR_COMMENT = re.compile(r"(?:^|(?<=[ \t]))\$")
"""A ``$`` at the start of a line or after a blank opens a comment."""


def _strip_comment(line: str) -> str:
    if ";" not in line and "$" not in line:
        return line
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
        if not stripped or stripped[0] == "*":
            continue
        indent = len(line) - len(stripped)
        if stripped[0] == "+":
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
    plain = _NOT_PLAIN.search
    for segments in _logical_lines(text, file, 2 if skip_title else 1):
        first = segments[0]
        first_word = first.text.split(None, 1)[0].casefold()
        if in_control:
            in_control = first_word != ".endc"
            continue
        if first_word == ".control":
            in_control = True
            continue
        if len(segments) == 1 and plain(first.text) is None:
            yield Card(None, first.text, file=file, line=first.line, column=first.start + 1,
                       keyword=first_word)
            continue
        card = _card(segments, file)
        if card.tokens:
            yield card
