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
]


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
        return f"{where}: {self.message}"


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
