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

__all__ = ["CONTROL_CODES", "Line"]

CONTROL_CODES: dict[int, None] = {7: None, 8: None, 11: None, 12: None, 13: None}
"""Characters rich removes from a Text's pieces (bell, backspace, vertical tab, form feed,
carriage return), as a ``str.translate`` table; rich's ``rich.control.strip_control_codes``."""


class Line:
    """``Line("G-D7", style="bold").append(": parallel")``: a Text's pieces, and its plain text."""

    __slots__ = ("_first", "_style", "_pieces", "plain")

    def __init__(self, text: str = "", style: str = "") -> None:
        self._first = text
        self._style = style
        self._pieces: list[tuple[str, str | None]] = []
        self.plain = text.translate(CONTROL_CODES)
        """The line's text as rich's ``Text.plain`` gives it."""

    def append(self, text: str, style: str | None = None) -> "Line":
        """Add a piece, styled or not (as ``Text.append``); returns the line."""
        self._pieces.append((text, style))
        self.plain += text.translate(CONTROL_CODES)
        return self

    def rich_text(self) -> "Text":
        """The rich Text built from the same pieces in the same way."""
        from rich.text import Text

        text = Text(self._first, style=self._style)
        for piece, style in self._pieces:
            text.append(piece, style=style)
        return text
