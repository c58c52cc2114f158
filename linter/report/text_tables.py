"""The verbose text report's tables without colour, written directly (rich's bytes).

``--verbose`` prints two small tables per LED group; through rich each costs about 2 ms, a
minute and a half on a 100k-part board. Without colour, a table of one-line cells that fits
the report's width is plain text: columns as wide as their widest cell, a space of padding
inside each column edge but the outer two, a space between columns, a row of dashes under
the header (the reporter's frameless box). :func:`plain_table` writes that; it returns None
for anything else (a cell with a tab, a line break, a control or wide character, blanks at
its ends; an empty column; a table wider than the report), which rich then prints. The tests
hold it to rich's own output.
"""

from __future__ import annotations

from typing import Sequence

__all__ = ["plain_table"]


def _simple(cell: str) -> bool:
    """A cell rich prints as it is: printable, one cell per character, no blanks at the ends."""
    if not cell or cell != cell.strip() or not cell.isprintable():
        return False
    if cell.isascii():
        return True
    from rich.cells import get_character_cell_size

    return all(get_character_cell_size(char) == 1 for char in cell)


def plain_table(headings: Sequence[str], right: Sequence[bool],
                rows: Sequence[Sequence[str]], width: int) -> str | None:
    """The table's text as rich prints it (see the module docstring), or None.

    ``right[i]`` right-justifies column ``i``; ``width`` is the report's width in columns.
    """
    table = [list(headings), *(list(row) for row in rows)]
    count = len(headings)
    if count == 0 or any(len(row) != count or not all(map(_simple, row)) for row in table):
        return None
    widths = [max(len(row[column]) for row in table) for column in range(count)]
    pads = [(0 if column == 0 else 1, 0 if column == count - 1 else 1)
            for column in range(count)]
    if sum(w + left + rest for w, (left, rest) in zip(widths, pads)) + count - 1 > width:
        return None

    def line(row: list[str]) -> str:
        cells = []
        for cell, w, (left, rest), flush_right in zip(row, widths, pads, right):
            gap = " " * (w - len(cell))
            cells.append(" " * left + (gap + cell if flush_right else cell + gap) + " " * rest)
        return " ".join(cells) + "\n"

    rule = " ".join("-" * (w + left + rest) for w, (left, rest) in zip(widths, pads)) + "\n"
    return line(table[0]) + rule + "".join(line(row) for row in table[1:])
