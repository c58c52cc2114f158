"""Input limits: the sizes beyond which ledlint refuses an input instead of trying to read it.

A CI gate reads whatever a pull request contains, so every reader stops at a sane size with a
located one-line error rather than running out of memory or time. Three limits:

``max_file_size``
    Bytes of any one input file (netlist, included SPICE file, BOM, settings, parts file,
    baseline). Checked from the file's size before it is read; a file that is not a regular
    file (a FIFO, a device such as ``/dev/zero``) is refused outright.
``max_parts``
    Parts after flattening the hierarchy (EDIF leaf instances, SPICE elements and whole
    subcircuit instances), also the number of subcircuit or cell instances expanded on the
    way and the references a BOM may list: a small file with a deep hierarchy can otherwise
    expand to billions of parts.
``max_nesting``
    Levels of nesting: EDIF lists, SPICE subcircuit instances inside instances, and
    ``.include`` files inside included files.

Where the values come from, lowest first: the defaults below (:data:`DEFAULTS`); the
``[limits]`` table of the settings file; the environment variables in :data:`ENVIRONMENT`
(``LEDLINT_MAX_FILE_SIZE``, ``LEDLINT_MAX_PARTS``, ``LEDLINT_MAX_NESTING``). The environment
wins because it belongs to whoever runs the gate, while the settings file travels with the pull
request being checked. The settings file itself is read under the environment's limits (or
the defaults). Sizes may be written as a whole number of bytes or with a unit: ``"64 MB"``,
``"512 kB"``, ``"1 GB"`` (decimal units; ``MiB`` and ``KiB`` are binary).

The engine applies the limits for one check with :func:`applied`; readers ask
:func:`active`. Outside :func:`applied` (a reader called directly) the active limits are the
defaults with the environment laid over them.
"""

from __future__ import annotations

import contextlib
import contextvars
import os
import re
import stat
from dataclasses import fields, replace
from pathlib import Path
from typing import Iterator, Mapping

from linter.errors import InputError
from linter.records import record

__all__ = ["Limits", "DEFAULTS", "ENVIRONMENT", "parse_limit", "from_environment", "effective",
           "active", "applied", "read_input"]


@record
class Limits:
    """The limits in force (see the module docstring for what each one bounds)."""

    max_file_size: int = 256 * 1024 * 1024
    max_parts: int = 250_000
    max_nesting: int = 1000


DEFAULTS = Limits()
"""256 MiB a file (a flat EDIF board of 100,000 parts is about 28 MB); 250,000 parts (2.5 times
the largest benchmarked board; a hierarchy that expands further is refused within seconds
instead of minutes); 1000 levels of nesting (EDIF netlists nest about 10 deep; below the depth
at which a recursive consumer of the tree could hit Python's recursion limit)."""

ENVIRONMENT: Mapping[str, str] = {
    "max_file_size": "LEDLINT_MAX_FILE_SIZE",
    "max_parts": "LEDLINT_MAX_PARTS",
    "max_nesting": "LEDLINT_MAX_NESTING",
}
"""Limit name → the environment variable that sets it (over the settings file)."""

_SIZE = re.compile(r"\s*(\d+)\s*(b|kb|mb|gb|kib|mib|gib)?\s*", re.IGNORECASE)
_UNITS = {"": 1, "b": 1, "kb": 10**3, "mb": 10**6, "gb": 10**9,
          "kib": 2**10, "mib": 2**20, "gib": 2**30}
_NAMES = tuple(f.name for f in fields(Limits))


def parse_limit(name: str, value: object) -> int:
    """A limit's value from settings or the environment: a positive whole number.

    ``max_file_size`` also takes a unit (``"64 MB"``). Raises ValueError with a short reason.

    >>> parse_limit("max_file_size", "64 MB")
    64000000
    >>> parse_limit("max_parts", 5000)
    5000
    """
    if name not in _NAMES:
        raise ValueError(f"unknown limit {name!r}; the limits are {', '.join(_NAMES)}")
    if isinstance(value, bool):
        raise ValueError(f"{name} must be a whole number, not a boolean")
    if isinstance(value, int):
        number = value
    elif isinstance(value, str) and (match := _SIZE.fullmatch(value)) is not None:
        unit = (match.group(2) or "").casefold()
        if unit and name != "max_file_size":
            raise ValueError(f"{name} is a count; write it without a unit")
        if len(match.group(1)) > 18:
            raise ValueError(f"{name} {value!r} is too large")
        number = int(match.group(1)) * _UNITS[unit]
    else:
        example = "'64 MB'" if name == "max_file_size" else "10000"
        raise ValueError(f"{name}: cannot read {value!r} (write it such as {example})")
    if number < 1:
        raise ValueError(f"{name} must be at least 1")
    return number


def from_environment(environ: Mapping[str, str] | None = None) -> dict[str, int]:
    """The limits the environment sets (name → value); a bad value is an :class:`InputError`."""
    environ = os.environ if environ is None else environ
    found: dict[str, int] = {}
    for name, variable in ENVIRONMENT.items():
        text = environ.get(variable)
        if text is None or not text.strip():
            continue
        try:
            found[name] = parse_limit(name, text)
        except ValueError as exc:
            raise InputError(f"${variable}", None, None, str(exc)) from None
    return found


def effective(from_settings: Mapping[str, int] | None = None,
              environ: Mapping[str, str] | None = None) -> Limits:
    """Defaults, then the settings file's ``[limits]``, then the environment."""
    return replace(DEFAULTS, **{**(from_settings or {}), **from_environment(environ)})


_ACTIVE: contextvars.ContextVar[Limits | None] = contextvars.ContextVar("ledlint_limits",
                                                                       default=None)


def active() -> Limits:
    """The limits in force: those :func:`applied` set, else defaults and environment."""
    limits = _ACTIVE.get()
    return limits if limits is not None else effective()


@contextlib.contextmanager
def applied(limits: Limits) -> Iterator[Limits]:
    """Make ``limits`` the active limits inside the ``with`` block."""
    token = _ACTIVE.set(limits)
    try:
        yield limits
    finally:
        _ACTIVE.reset(token)


def read_input(path: Path, source: str, error: type[InputError],
               line: int | None = None, column: int | None = None, what: str = "") -> bytes:
    """The bytes of an input file, refused when it is not a regular file or is too large.

    ``source``, ``line`` and ``column`` locate the error (the file itself, or the card that
    names it, as for a SPICE ``.include``); ``what`` prefixes the message (``".include 'x'"``).
    The file is opened for reading only; its size is checked before a byte is read, and the
    read stops one byte past the limit (a file growing while it is read is refused too).
    """
    limit = active().max_file_size
    prefix = f"{what}: " if what else ""
    try:
        with open(path, "rb") as stream:
            info = os.fstat(stream.fileno())
            if not stat.S_ISREG(info.st_mode):
                raise error(source, line, column, f"{prefix}not a regular file; expected a "
                                                  "text file")
            if info.st_size > limit:
                raise error(source, line, column, _too_large(prefix, info.st_size, limit))
            data = stream.read(limit + 1)
    except OSError as exc:
        raise error(source, line, column, f"{prefix}cannot read: {exc.strerror or exc}") from None
    if len(data) > limit:
        raise error(source, line, column, _too_large(prefix, len(data), limit))
    return data


def _too_large(prefix: str, size: int, limit: int) -> str:
    return (f"{prefix}file of {size} bytes is larger than the {limit}-byte limit "
            f"(max_file_size; raise it in [limits] or ${ENVIRONMENT['max_file_size']})")
