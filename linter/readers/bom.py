"""Bill of materials reader: a CSV file with a header row, one line item per row.

Columns are found by name, without case, through aliases (:data:`COLUMN_ALIASES`): a
``Designator`` column is the reference column, ``Footprint`` the package and so on; columns
with other names are ignored. A reference cell may list several references, separated by
commas, semicolons or spaces (``R1, R2, R5``), and ranges (``R1-R4``, ``R1 – R4``).

The file is UTF-8 with or without a byte-order mark, delimited by commas, semicolons or tabs
(sniffed from the header line). Quoting follows RFC 4180: a quoted cell may hold delimiters,
line breaks and doubled quotes. The tokenizer is ours (iterative) so that every cell keeps its
line and column for messages.

Do-not-populate: a ``DNP`` / ``DNF`` column marks a row with ``yes``, ``y``, ``x``, ``1``,
``true``, ``dnp``, ``dnf`` or ``nf``; a ``Populate`` / ``Fitted`` column marks it with ``no``,
``n``, ``0``, ``false``, ``dnp``, ``dnf`` or ``nf`` (the opposite sense); a value of ``DNP``,
``DNF`` or ``NF`` marks it too. Rows with an empty reference cell (the board itself, screws)
are skipped: they name no part of the netlist.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path
from typing import Iterator

from linter.errors import BomError
from linter.model import SourceLocation
from linter.readers import decode_text
from linter.records import record

__all__ = ["BomLine", "Bom", "COLUMN_ALIASES", "read_bom", "parse_bom", "expand_references"]

COLUMN_ALIASES: dict[str, tuple[str, ...]] = {
    "references": ("references", "reference", "ref", "refs", "designator", "designators",
                   "refdes", "ref des", "reference designator", "reference designators"),
    "value": ("value", "val"),
    "quantity": ("qty", "quantity"),
    "package": ("package", "footprint", "case"),
    "power": ("power", "rating", "wattage", "power rating"),
    "tolerance": ("tolerance", "tol"),
    "part_number": ("part", "part number", "part no", "pn", "mpn", "manufacturer part number"),
    "description": ("description", "desc"),
    "dnp": ("dnp", "dnf", "do not populate", "do not fit"),
    "fitted": ("populate", "fitted"),
}
"""Our field name → the header spellings that mean it (compared after :func:`_header_key`)."""

_ALIAS_TO_FIELD = {alias: name for name, aliases in COLUMN_ALIASES.items() for alias in aliases}
_DNP_MARKS = frozenset({"yes", "y", "x", "1", "true", "dnp", "dnf", "nf"})
_NOT_FITTED_MARKS = frozenset({"no", "n", "0", "false", "dnp", "dnf", "nf"})
_DNP_VALUES = frozenset({"dnp", "dnf", "nf"})
MAX_RANGE = 10_000
"""The longest reference range accepted (``R1-R10000``); longer is taken for a typing slip."""
_MAX_REFERENCE_DIGITS = 18
"""Digits a range's numbers may have (read as integers only below Python's conversion limit)."""


@record
class BomLine:
    """One row of the BOM: the references it lists and what it says about them.

    Text fields are as written (stripped), None where the column is absent or the cell empty.
    ``line`` and ``column`` locate the reference cell.
    """

    source: str
    line: int
    column: int
    refs: tuple[str, ...]
    value: str | None = None
    quantity: int | None = None
    package: str | None = None
    power: str | None = None
    tolerance: str | None = None
    part_number: str | None = None
    description: str | None = None
    dnp: bool = False

    @property
    def location(self) -> SourceLocation:
        """Where the row's reference cell is."""
        return SourceLocation(self.source, self.line, self.column)


@record
class Bom:
    """A read BOM: its rows in file order and the fields its header provides."""

    source: str
    lines: tuple[BomLine, ...]
    fields: tuple[str, ...]


@dataclass(frozen=True)
class _Cell:
    text: str
    line: int
    column: int


def read_bom(path: Path, source: str | None = None) -> Bom:
    """Read a BOM file; ``source`` is the name used in messages (default: the path as given)."""
    name = source if source is not None else str(path)
    from linter.limits import read_input

    data = read_input(path, name, BomError)
    if not data.strip(b" \t\r\n\xef\xbb\xbf"):
        raise BomError(name, 1, 1, "empty file; expected a CSV bill of materials with a header row")
    return parse_bom(decode_text(data, name, BomError), name)


def parse_bom(text: str, source: str) -> Bom:
    """Read BOM text (already decoded) into a :class:`Bom`."""
    text = text.removeprefix("\ufeff")
    if not text.strip():
        raise BomError(source, 1, 1, "empty file; expected a CSV bill of materials with a header row")
    rows = (row for row in _tokenize(text, source, _sniff_delimiter(text)) if _has_text(row))
    header = next(rows, None)
    if header is None:
        raise BomError(source, 1, 1, "empty file; expected a CSV bill of materials with a header row")
    columns = _map_header(header, source)
    lines = tuple(line for row in rows if (line := _read_row(row, columns, source)) is not None)
    return Bom(source, lines, tuple(columns))


def _has_text(row: list[_Cell]) -> bool:
    return any(cell.text.strip() for cell in row)


def _sniff_delimiter(text: str) -> str:
    """The delimiter of the first non-blank line: the most frequent of ``,`` ``;`` tab."""
    first = next((line for line in text.splitlines() if line.strip()), "")
    counts = {delimiter: first.count(delimiter) for delimiter in (",", ";", "\t")}
    best = max(counts, key=lambda delimiter: counts[delimiter])
    return best if counts[best] > 0 else ","


def _tokenize(text: str, source: str, delimiter: str) -> Iterator[list[_Cell]]:
    """Rows of located cells (RFC 4180 quoting); an unclosed quote is an error.

    Cells of the two plain shapes, a whole quoted cell (``"..."``, doubled quotes inside) or
    an unquoted cell without quotes, each directly followed by the delimiter, a line end or
    the end of the text, are read one regex match each; from the first row with any other
    cell (a quote after blanks or text, text after a closing quote, an unclosed quote) the
    rest of the text is read by :func:`_tokenize_plain`, which gives the same cells for the
    plain shapes (tests/test_bom_tokenize.py compares the two).
    """
    cell = _cell_pattern(delimiter).match
    length = len(text)
    index, line, line_start = 0, 1, 0
    while index < length:
        row: list[_Cell] = []
        row_index, row_line, at = index, line, index
        while True:
            found = cell(text, at)
            if found is None:
                yield from _tokenize_plain(text, source, delimiter, row_index, row_line)
                return
            quoted, bare, end = found.groups()
            if quoted is None:
                value = bare
            else:
                value = quoted.replace('""', '"') if '"' in quoted else quoted
            place = _Cell(value, line, at - line_start + 1)
            if quoted is not None and "\n" in quoted:  # the quoted cell spans lines
                line += quoted.count("\n")
                line_start = at + 2 + quoted.rfind("\n")  # (just after that line end)
            at = found.end()
            if end == delimiter:
                row.append(place)
                continue
            if end or value or row:  # (at the end of the text, nothing left is no row)
                row.append(place)
                yield row
            line, line_start, index = line + 1, at, at
            break


_CELL_PATTERNS: dict[str, re.Pattern[str]] = {}


def _cell_pattern(delimiter: str) -> re.Pattern[str]:
    """One cell of a plain shape and what ends it (see :func:`_tokenize`): groups quoted
    text (doubled quotes as written), unquoted text, the end (the delimiter, a line end, or
    "" at the end of the text)."""
    found = _CELL_PATTERNS.get(delimiter)
    if found is None:
        mark = re.escape(delimiter)
        found = _CELL_PATTERNS[delimiter] = re.compile(
            rf'(?:"((?:[^"]++|"")*+)"|([^"{mark}\r\n]*+))({mark}|\r\n|\r|\n|\Z)')
    return found


def _tokenize_plain(text: str, source: str, delimiter: str, index: int = 0,
                    line: int = 1) -> Iterator[list[_Cell]]:
    """Rows of located cells (RFC 4180 quoting), character by character, from ``index`` (the
    start of line ``line``); an unclosed quote is an error. The reference for :func:`_tokenize`."""
    row: list[_Cell] = []
    chars: list[str] = []
    column = 1
    start = (line, 1)
    quoted_from: tuple[int, int] | None = None
    in_quotes = False
    has_text = False  # a character other than a blank since the cell began (kept, not rescanned)
    length = len(text)
    while index < length:
        char = text[index]
        if in_quotes:
            if char == '"' and index + 1 < length and text[index + 1] == '"':
                chars.append('"')
                has_text = True
                index, column = index + 2, column + 2
                continue
            if char == '"':
                in_quotes = False
            else:
                chars.append(char)
                has_text = has_text or not char.isspace()
        elif char == '"' and not has_text:
            chars.clear()
            in_quotes, quoted_from = True, (line, column)
        elif char == delimiter:
            row.append(_Cell("".join(chars), *start))
            chars.clear()
            has_text = False
            start = (line, column + 1)
        elif char in "\r\n":
            if char == "\r" and index + 1 < length and text[index + 1] == "\n":
                index += 1
            row.append(_Cell("".join(chars), *start))
            yield row
            row, chars, has_text = [], [], False
            line, column, index = line + 1, 1, index + 1
            start = (line, 1)
            continue
        else:
            chars.append(char)
            has_text = has_text or not char.isspace()
        if char == "\n":
            line, column = line + 1, 1
        else:
            column += 1
        index += 1
    if in_quotes and quoted_from is not None:
        raise BomError(source, quoted_from[0], quoted_from[1],
                       "quoted cell never closes (no matching '\"' before the end of the file)")
    if chars or row:
        row.append(_Cell("".join(chars), *start))
        yield row


def _header_key(text: str) -> str:
    """``"Part #"`` → ``"part"``; ``"Ref_Des"`` → ``"ref des"``: case, punctuation and spacing folded."""
    return " ".join(re.sub(r"[_\-.#:/()]+", " ", text.casefold()).split())


def _map_header(header: list[_Cell], source: str) -> dict[str, int]:
    """Our field name → column index; refuses a header without a reference column."""
    columns: dict[str, int] = {}
    for index, cell in enumerate(header):
        field = _ALIAS_TO_FIELD.get(_header_key(cell.text))
        if field is None:
            continue
        if field in columns:
            first = header[columns[field]].text.strip()
            raise BomError(source, cell.line, cell.column,
                           f"column {cell.text.strip()!r} repeats the {field} column {first!r}")
        columns[field] = index
    first = header[0]
    if not columns:
        raise BomError(source, first.line, first.column,
                       "no header row; the first line must name the columns "
                       "(such as References, Value, Qty)")
    if "references" not in columns:
        raise BomError(source, first.line, first.column,
                       "no reference column; expected a column named References, Ref, "
                       "Designator or RefDes")
    return columns


def _cell(row: list[_Cell], columns: dict[str, int], field: str) -> _Cell | None:
    index = columns.get(field)
    if index is None or index >= len(row):
        return None
    return row[index]


def _text(row: list[_Cell], columns: dict[str, int], field: str) -> str | None:
    cell = _cell(row, columns, field)
    if cell is None:
        return None
    stripped = " ".join(cell.text.split())
    return stripped or None


def _read_row(row: list[_Cell], columns: dict[str, int], source: str) -> BomLine | None:
    ref_cell = _cell(row, columns, "references")
    if ref_cell is None or not ref_cell.text.strip():
        return None
    refs = expand_references(ref_cell.text, source, ref_cell.line, ref_cell.column)
    if not refs:
        return None
    value = _text(row, columns, "value")
    return BomLine(
        source=source, line=ref_cell.line, column=ref_cell.column, refs=refs, value=value,
        quantity=_quantity(row, columns, source),
        package=_text(row, columns, "package"), power=_text(row, columns, "power"),
        tolerance=_text(row, columns, "tolerance"),
        part_number=_text(row, columns, "part_number"),
        description=_text(row, columns, "description"),
        dnp=_is_dnp(row, columns, value),
    )


def _quantity(row: list[_Cell], columns: dict[str, int], source: str) -> int | None:
    cell = _cell(row, columns, "quantity")
    if cell is None or not cell.text.strip():
        return None
    text = cell.text.strip()
    if re.fullmatch(r"\d+(?:\.0*)?", text):
        return int(float(text))
    raise BomError(source, cell.line, cell.column, f"quantity {text!r} is not a whole number")


def _is_dnp(row: list[_Cell], columns: dict[str, int], value: str | None) -> bool:
    dnp = _text(row, columns, "dnp")
    fitted = _text(row, columns, "fitted")
    return bool(
        (dnp is not None and dnp.casefold() in _DNP_MARKS)
        or (fitted is not None and fitted.casefold() in _NOT_FITTED_MARKS)
        or (value is not None and value.casefold() in _DNP_VALUES)
    )


_RANGE = re.compile(r"^(?P<prefix>.*?[^\d])?(?P<first>\d+)-(?P<prefix2>.*?[^\d])?(?P<last>\d+)$")


def expand_references(cell: str, source: str = "<bom>", line: int = 1,
                      column: int = 1) -> tuple[str, ...]:
    """The references a cell lists, ranges written out, in the order given.

    >>> expand_references("R1, R2, R5")
    ('R1', 'R2', 'R5')
    >>> expand_references("D7 – D10")
    ('D7', 'D8', 'D9', 'D10')
    """
    normal = cell.strip()
    if _HAS_DASH(normal):
        normal = _DASH_SPACED("-", normal)
    refs: list[str] = []
    for token in _SEPARATORS(normal):
        if "-" in token:
            refs.extend(_expand_token(token, source, line, column))
        elif token:
            refs.append(token)  # (no range without a "-")
    return tuple(refs)


_HAS_DASH = re.compile("[-\u2013\u2014]").search
_DASH_SPACED = re.compile(r"\s*[-\u2013\u2014]\s*").sub
_SEPARATORS = re.compile(r"[,;\s]+").split


def _expand_token(token: str, source: str, line: int, column: int) -> list[str]:
    match = _RANGE.match(token)
    if match is None:
        return [token]
    prefix, prefix2 = match["prefix"] or "", match["prefix2"]
    if prefix2 is not None and prefix2 != prefix:
        raise BomError(source, line, column,
                       f"reference range {token!r} mixes prefixes {prefix!r} and {prefix2!r}")
    if max(len(match["first"]), len(match["last"])) > _MAX_REFERENCE_DIGITS:
        raise BomError(source, line, column, f"reference range {token!r}: a number longer than "
                                             f"{_MAX_REFERENCE_DIGITS} digits")
    first, last = int(match["first"]), int(match["last"])
    if last < first:
        raise BomError(source, line, column, f"reference range {token!r} runs backwards")
    if last - first + 1 > MAX_RANGE:
        raise BomError(source, line, column,
                       f"reference range {token!r} spans {last - first + 1} references "
                       f"(more than {MAX_RANGE}); write the references out")
    return [f"{prefix}{number}" for number in range(first, last + 1)]
