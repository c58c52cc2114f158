"""One line of the text report, built without rich (rich is loaded only to print it in colour).

A :class:`Line` records the pieces and styles a :class:`rich.text.Text` would be built from,
and keeps the plain text rich would give for them: rich drops a few control characters from
every piece (:data:`CONTROL_CODES`). Without colour the reporter writes :attr:`Line.plain`
itself; in colour, or for a line rich must lay out (a tab), :meth:`Line.rich_text` builds the
very Text the pieces stand for. Importing rich costs about 30 ms, a good part of a one-board
check's start-up; a plain report never needs it. The tests hold both to rich's own results.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from rich.text import Text

__all__ = ["CONTROL_CODES", "Line", "stripped"]

CONTROL_CODES: dict[int, None] = {7: None, 8: None, 11: None, 12: None, 13: None}
"""Characters rich removes from a Text's pieces (bell, backspace, vertical tab, form feed,
carriage return), as a ``str.translate`` table; rich's ``rich.control.strip_control_codes``."""


def stripped(text: str) -> str:
    """``text.translate(CONTROL_CODES)``: the text itself when it holds none of them (five
    ``in`` scans, each a C search; ``translate`` looks every character up in the table, and
    a regular expression's character class costs ten times the scans)."""
    if "\x07" in text or "\x08" in text or "\x0b" in text or "\x0c" in text or "\r" in text:
        return text.translate(CONTROL_CODES)
    return text


class Line:
    """``Line("G-D7", style="bold").append(": parallel")``: a Text's pieces, and its plain text."""

    __slots__ = ("_texts", "_styles")

    def __init__(self, text: str = "", style: str = "") -> None:
        self._texts = [text]
        self._styles: list[str | None] = [style]

    def append(self, text: str, style: str | None = None) -> "Line":
        """Add a piece, styled or not (as ``Text.append``); returns the line."""
        self._texts.append(text)
        self._styles.append(style)
        return self

    @property
    def plain(self) -> str:
        """The line's text as rich's ``Text.plain`` gives it (the pieces joined, then
        stripped: :data:`CONTROL_CODES` are dropped character by character, so once for the
        whole line is the same as once per piece)."""
        return stripped("".join(self._texts))

    def rich_text(self) -> "Text":
        """The rich Text built from the same pieces in the same way."""
        from rich.text import Text

        text = Text(self._texts[0], style=self._styles[0])
        for piece, style in zip(self._texts[1:], self._styles[1:]):
            text.append(piece, style=style)
        return text
