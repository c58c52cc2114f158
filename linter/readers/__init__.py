"""Netlist readers: each turns one file format into a :class:`linter.model.Circuit`.

:func:`read_netlist` sniffs the format from the content (an EDIF file starts with
``(edif``), not only from the suffix, and refuses what is neither.
"""

from __future__ import annotations

from pathlib import Path
from typing import Collection

from linter.errors import NetlistError
from linter.model import Circuit

__all__ = ["read_netlist", "sniff_format", "decode_text", "EDIF_SUFFIXES", "SPICE_SUFFIXES"]

EDIF_SUFFIXES = frozenset({".edif", ".edf", ".edn", ".edo"})
SPICE_SUFFIXES = frozenset({".cir", ".sp", ".spice", ".net", ".ckt", ".spi"})


def decode_text(data: bytes, source: str, error: type = NetlistError) -> str:
    """Bytes of a text input to str: UTF-8 (a byte-order mark is dropped), else a located error.

    NUL bytes mean binary data. A UTF-16 file (its byte-order mark) is refused by name.
    """
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        raise error(source, 1, 1, "UTF-16 text is not supported; save the file as UTF-8")
    nul = data.find(b"\x00")
    if nul >= 0:
        line = data.count(b"\n", 0, nul) + 1
        column = nul - (data.rfind(b"\n", 0, nul) + 1) + 1
        raise error(source, line, column, "binary data (NUL byte); expected a text file")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data.count(b"\n", 0, exc.start) + 1
        column = exc.start - (data.rfind(b"\n", 0, exc.start) + 1) + 1
        raise error(source, line, column,
                    f"not UTF-8 text (byte 0x{data[exc.start]:02x}); save the file as UTF-8") from None
    return text.removeprefix("\ufeff")


def sniff_format(text: str, suffix: str) -> str | None:
    """'edif', 'spice' or None, from the content first and the suffix second."""
    head = text.lstrip()[:64].casefold()
    if head.startswith("(edif"):
        return "edif"
    if suffix.casefold() in EDIF_SUFFIXES and head.startswith("("):
        return "edif"
    if suffix.casefold() in SPICE_SUFFIXES:
        return "spice"
    if head and not head.startswith("("):
        first = text.lstrip().splitlines()[0].strip().casefold() if text.strip() else ""
        if first.startswith(("*", ".title")) or ".end" in text[-2048:].casefold():
            return "spice"
    return None


def read_netlist(path: Path, source: str | None = None, root: Path | None = None,
                 opaque: Collection[str] = ()) -> Circuit:
    """Read an EDIF or SPICE netlist file into a Circuit.

    ``source`` is the name used in messages and locations (default: the path as given);
    ``root`` is the project folder that SPICE ``.include`` may not leave (default: the
    netlist's folder); ``opaque`` names SPICE subcircuits (part numbers whose part data says
    ``mcu``) whose instances stay whole parts.
    """
    name = source if source is not None else str(path)
    from linter.limits import read_input

    data = read_input(path, name, NetlistError)
    if not data or data.isspace():  # (no stripped copy of a large file)
        raise NetlistError(name, 1, 1, "empty file; expected an EDIF or SPICE netlist")
    text = decode_text(data, name)
    del data  # the bytes are not needed once decoded
    fmt = sniff_format(text, path.suffix)
    if fmt == "edif":
        from linter.readers.edif import read_edif

        return read_edif(text, name)
    if fmt == "spice":
        from linter.readers.spice import read_spice

        return read_spice(text, name, path=path, root=root or path.resolve().parent,
                          opaque=opaque)
    raise NetlistError(name, 1, 1, "not an EDIF or SPICE netlist (an EDIF file starts with '(edif')")
