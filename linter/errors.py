"""Error hierarchy: one base, one class per input layer, each located in its file.

Every error that reaches the user is an :class:`InputError` (exit code 2) whose text is one
line ``FILE:LINE:COLUMN: message`` (or ``FILE:LINE: message`` where a column means nothing,
as for a TOML key). Errors carry their fields and build the text in ``__str__``.
"""

from __future__ import annotations

__all__ = [
    "LedlintError",
    "InputError",
    "NetlistError",
    "BomError",
    "ConfigError",
    "PartsError",
    "UsageError",
    "one_line",
    "MAX_MESSAGE_LENGTH",
]

MAX_MESSAGE_LENGTH = 400
"""Longest error line printed; a longer one keeps its start and end (a 50 MB token quoted in a
message must not flood the terminal or a CI log)."""

_LINE_BREAKS = {code: f"\\x{code:02x}" for code in (*range(0x20), 0x7F, 0x85)}
_LINE_BREAKS.update({0x2028: "\\u2028", 0x2029: "\\u2029", ord("\t"): " ",
                     ord("\n"): "\\n", ord("\r"): "\\r"})


def one_line(text: str) -> str:
    """``text`` as one printable line: control characters and line separators escaped
    (a tab becomes a space), the middle of an over-long text replaced by an ellipsis.

    >>> one_line("a.csv:2:4: quantity 'two\\nthree' is not a whole number")
    "a.csv:2:4: quantity 'two\\\\nthree' is not a whole number"
    """
    text = text.translate(_LINE_BREAKS)
    if len(text) > MAX_MESSAGE_LENGTH:
        head = MAX_MESSAGE_LENGTH * 2 // 3
        tail = MAX_MESSAGE_LENGTH - head - 1
        text = f"{text[:head]}…{text[-tail:]}"
    return text


class LedlintError(Exception):
    """Base of every error ledlint raises on purpose."""


class InputError(LedlintError, ValueError):
    """An input file that cannot be used, with the place where reading stopped.

    Parameters
    ----------
    file : str
        The path as the user gave it (never resolved: messages echo what was typed).
    line, column : int or None
        1-based position; ``column`` is None where a column means nothing.
    message : str
        What is wrong, lower case, no trailing full stop.
    """

    def __init__(self, file: str, line: int | None, column: int | None, message: str) -> None:
        super().__init__(file, line, column, message)
        self.file = file
        self.line = line
        self.column = column
        self.message = message

    def __str__(self) -> str:
        where = self.file
        if self.line is not None:
            where += f":{self.line}"
            if self.column is not None:
                where += f":{self.column}"
        return one_line(f"{where}: {self.message}")


class NetlistError(InputError):
    """An EDIF or SPICE netlist that cannot be read."""


class BomError(InputError):
    """A bill of materials that cannot be read."""


class ConfigError(InputError):
    """A settings file (``ledlint.toml`` or ``[tool.ledlint]``) that cannot be used."""


class PartsError(InputError):
    """A parts file (``--parts``) that cannot be used."""


class UsageError(LedlintError):
    """A command line that cannot be used (exit code 2)."""
