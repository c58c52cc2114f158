"""The report for people: a summary line, then findings by severity, each with its fix.

Each finding is one line a terminal, an editor or grep can use,
``FILE:LINE:COLUMN: severity rule-id [parts]: message``, and its fix on the next line,
indented. Reference lists are folded (``D7–D10``). ``verbose`` adds a table per LED group
(currents, forward voltages and powers at nominal and at the worst-case corners; resistor
powers against their ratings); ``quiet`` prints the finding lines only. Colour only when the
options ask for it (the CLI asks on a terminal without ``NO_COLOR``); otherwise plain text
whose tables use dashes under the header and no frame.
"""

from __future__ import annotations

import io
from typing import TYPE_CHECKING, Any, Callable, Iterator, Mapping

from linter.findings import SEVERITIES, Finding
from linter.gc_pause import paused_gc
from linter.refs import MIN_RUN, fold_refs, natural_key
from linter.results import GroupResult
from linter import model
from linter.model import _PLACE_FILES, Part, stored_location_getter
from linter.report.common import finding_location, group_entry, plain_data, severity_counts
from linter.report.lean_order import lean_ordered_findings, lean_sorted_records
from linter.report.stream import StreamingReporter
from linter.report.text_line import Line, stripped
from linter.report.text_tables import plain_table
from linter.units import format_si

if TYPE_CHECKING:
    from rich import box
    from rich.console import Console
    from rich.table import Table

    from linter.engine import CheckResult
    from linter.model import Circuit

__all__ = ["TextReporter", "REPORT_WIDTH", "UNKNOWN", "PIECE_CHARS", "shown_entry"]

REPORT_WIDTH = 100
"""Columns of the report: fixed, so that the same input gives the same text anywhere."""
UNKNOWN = "?"
"""Shown in a table cell whose figure is unknown."""



def _plain_box() -> "box.Box":
    """No frame and no column rules: dashes under the header only (reads well in a pipe)."""
    from rich import box

    return box.Box("    \n    \n -  \n    \n    \n -  \n    \n    \n", ascii=True)


_STYLE = {"error": "bold red", "warning": "yellow", "info": "cyan"}


def _plural(count: int, word: str) -> str:
    return f"{count} {word}" if count == 1 else f"{count} {word}s"


def _count_of(count: int, severity: str) -> str:
    """``2 errors``, ``1 warning``, ``3 info``."""
    return f"{count} info" if severity == "info" else _plural(count, severity)


def _summary(result: "CheckResult") -> Line:
    circuit = result.circuit
    counts = severity_counts(result.findings)
    found = ", ".join(_count_of(counts[severity], severity) for severity in SEVERITIES)
    text = Line(f"{circuit.source}", style="bold")
    text.append(f" ({circuit.format.upper()}): {_plural(len(circuit.parts), 'part')}, "
                f"{_plural(len(circuit.nets), 'net')}, {_plural(len(circuit.leds()), 'LED')} "
                f"in {_plural(len(result.groups), 'LED group')}; findings: {found}")
    accepted = [(len(result.waived), "waived"), (len(result.baselined), "in the baseline")]
    for count, why in accepted:
        if count:
            text.append(f"; {count} {why}")
    return text


def _folded(parts: tuple[str, ...]) -> str:
    """``fold_refs(parts)``: fewer names than :data:`~linter.refs.MIN_RUN` hold no run to
    fold, so they are only put in natural order (one name is itself)."""
    if len(parts) >= MIN_RUN:
        return fold_refs(parts)
    if len(parts) == 1:
        return parts[0]
    first, second = parts
    if first == second:
        return first
    return f"{first}, {second}" if natural_key(first) < natural_key(second) else \
        f"{second}, {first}"


def _finding_line(finding: Finding, result: "CheckResult") -> Line:
    where = finding_location(finding, result.circuit)
    line = Line(f"{where}: " if where is not None else "")
    line.append(finding.severity, style=_STYLE[finding.severity])
    line.append(" ")
    line.append(finding.rule, style="bold")
    if finding.parts:
        line.append(f" [{_folded(finding.parts)}]")
    line.append(f": {finding.message}")
    return line


def _finding_text(finding: Finding, result: "CheckResult") -> str:
    """The pieces of :func:`_finding_line` joined (its ``plain`` before stripping)."""
    parts = finding.parts
    return "".join((_where_text(finding, result.circuit), finding.severity, " ",
                    finding.rule, f" [{_folded(parts)}]" if parts else "",
                    f": {finding.message}"))


_STORED_LOCATION = stored_location_getter(Part)
_FILE_BITS, _FILE_MASK, _COLUMN_MASK = model._FILE_BITS, model._FILE_MASK, model._COLUMN_MASK
_LINE_SHIFT = model._FILE_BITS + model._COLUMN_BITS


def _where_text(finding: Finding, circuit: "Circuit") -> str:
    """``f"{finding_location(finding, circuit)}: "``, empty where there is none. A finding
    without its own location whose first part has a packed place: written from the place's
    file, line and column (``SourceLocation.__str__``) without making the SourceLocation."""
    parts = finding.parts
    if finding.location is None and parts and type(circuit.parts) is dict:
        part = circuit.parts.get(parts[0])
        if type(part) is Part:
            place = _STORED_LOCATION(part, Part)
            if type(place) is int:
                return (f"{_PLACE_FILES[place & _FILE_MASK]}:{place >> _LINE_SHIFT}:"
                        f"{place >> _FILE_BITS & _COLUMN_MASK}: ")
    where = finding_location(finding, circuit)
    return f"{where}: " if where is not None else ""


def _fix_line(fix: str) -> Line:
    return Line(f"    fix: {fix}")


def _si(value: Any, unit: str) -> str:
    return UNKNOWN if value is None else format_si(float(value), unit)


_LED_HEADINGS = ("LED", "part", "I nom", "I min", "I max", "Vf nom", "Vf min", "Vf max",
                 "P nom", "P max")
_RESISTOR_HEADINGS = ("resistor", "value", "P nom", "P max", "rating")


def _span_entry(span: Any) -> dict[str, Any]:
    return {"nom": plain_data(span.nom), "min": plain_data(span.min), "max": plain_data(span.max)}


def shown_entry(record: Any) -> Mapping[str, Any]:
    """The fields of a group's JSON entry this report shows, as :func:`group_entry` gives
    them (id, topology, rail, setter, parts; each LED's ref, part, current, Vf and power;
    each resistor's ref, ohms, power and rating), without the rest (the corners, chiefly).
    A record other than a solved group gives its whole entry."""
    if not isinstance(record, GroupResult):
        return group_entry(record)
    shape = record.group
    return {
        "id": plain_data(shape.id), "topology": plain_data(shape.topology),
        "rail": plain_data(record.rail), "parts": plain_data(shape.parts),
        "setter": plain_data(shape.setter),
        "leds": [{"ref": plain_data(led.ref), "part": plain_data(led.part_number),
                  "current_a": _span_entry(led.current), "vf_v": _span_entry(led.vf),
                  "power_w": _span_entry(led.power)} for led in record.leds],
        "resistors": [{"ref": plain_data(resistor.ref), "ohms": plain_data(resistor.ohms),
                       "power_w": _span_entry(resistor.power),
                       "rating_w": plain_data(resistor.rating_w)}
                      for resistor in record.resistors],
    }


def _led_rows(group: Mapping[str, Any]) -> list[tuple[str, ...]]:
    rows = []
    for led in group.get("leds", ()):
        current, vf, power = (led.get(k) or {} for k in ("current_a", "vf_v", "power_w"))
        rows.append((led.get("ref", ""), led.get("part") or UNKNOWN,
                     *(_si(current.get(k), "A") for k in ("nom", "min", "max")),
                     *(_si(vf.get(k), "V") for k in ("nom", "min", "max")),
                     _si(power.get("nom"), "W"), _si(power.get("max"), "W")))
    return rows


def _resistor_rows(group: Mapping[str, Any]) -> list[tuple[str, ...]]:
    rows = []
    for resistor in group.get("resistors", ()):
        power = resistor.get("power_w") or {}
        rows.append((resistor.get("ref", ""), _si(resistor.get("ohms"), "Ω"),
                     _si(power.get("nom"), "W"), _si(power.get("max"), "W"),
                     _si(resistor.get("rating_w"), "W")))
    return rows


def _group_tables(group: Mapping[str, Any]) -> list[tuple[tuple[str, ...], list[tuple[str, ...]]]]:
    """The group's tables: (headings, rows) of its LEDs, then of its resistors, if any.
    The first column of each (the reference) is left-justified, the numbers right."""
    tables = []
    if group.get("leds"):
        tables.append((_LED_HEADINGS, _led_rows(group)))
    if group.get("resistors"):
        tables.append((_RESISTOR_HEADINGS, _resistor_rows(group)))
    return tables


def _left_justified(heading: str) -> bool:
    return heading in ("LED", "part", "resistor")


def _table(headings: tuple[str, ...], rows: list[tuple[str, ...]], style: "box.Box") -> "Table":
    from rich.table import Table

    table = Table(box=style, show_edge=False, pad_edge=False, header_style="bold")
    for heading in headings:
        table.add_column(heading, justify="left" if _left_justified(heading) else "right")
    for row in rows:
        table.add_row(*row)
    return table


def _group_heading(group: Mapping[str, Any]) -> Line:
    heading = Line(str(group.get("id", "")), style="bold")
    heading.append(f": {group.get('topology', UNKNOWN)}")
    heading.append(f" from {group['rail']}" if group.get("rail") else ", rail unknown")
    if group.get("setter"):
        heading.append(f", current set by {group['setter']}")
    if group.get("parts"):
        heading.append(f"; parts {fold_refs(group['parts'])}")
    return heading


GROUP_LINES_MAX = 40
"""Groups listed one line each without ``--verbose``; past this the rest are counted."""


def _group_line(group: Mapping[str, Any]) -> Line:
    """``G-D7 parallel from +5V, set by R6: D7–D10 18.5 mA nom (4.39 µA–75.1 mA)``."""
    line = Line(f"  {group.get('id', '')} {group.get('topology', UNKNOWN)}")
    line.append(f" from {group['rail']}" if group.get("rail") else ", rail unknown")
    if group.get("setter"):
        line.append(f", set by {group['setter']}")
    leds = group.get("leds") or []
    currents = [led.get("current_a") or {} for led in leds]
    noms = [c["nom"] for c in currents if c.get("nom") is not None]
    lows = [c["min"] for c in currents if c.get("min") is not None]
    highs = [c["max"] for c in currents if c.get("max") is not None]
    line.append(f": {fold_refs([led.get('ref', '') for led in leds])}")
    if group.get("topology") == "unrecognised":
        line.append(" not checked (drive path not recognised)")
    elif noms:
        low, high = _si(min(noms), "A"), _si(max(noms), "A")
        spread = low if low == high else f"{low}–{high}"
        line.append(f" {spread} nom")
        if lows and highs:
            line.append(f" ({_si(min(lows), 'A')}–{_si(max(highs), 'A')} over the corners)")
    else:
        line.append(" not solved")
    return line


PIECE_CHARS = 1 << 16
"""A streamed text report comes in pieces of about this many characters."""


class _Lines:
    """The report's lines as they are printed, kept until taken (:meth:`take`).

    Without colour, rich prints a Text line as its plain text and a newline (control codes
    are already stripped from ``Text.plain``, and from :attr:`Line.plain` alike); only tabs
    are expanded on the way, so a plain :class:`~linter.report.text_line.Line` is kept as it
    is, while a line with a tab, a table, and everything in colour go through rich (loaded,
    and the console made, only then). The tests hold the shortcut to rich's own output.
    """

    def __init__(self, color: bool) -> None:
        self.buffer = io.StringIO()
        self.color = color
        self._console: "Console | None" = None
        self.plain = not color
        self.pending: list[str] = []
        self.size = 0

    @property
    def console(self) -> "Console":
        """The rich console the lines rich must print go through (made on first use)."""
        if self._console is None:
            from rich.console import Console

            color = self.color
            self._console = Console(file=self.buffer, force_terminal=color, no_color=not color,
                                    color_system="standard" if color else None,
                                    legacy_windows=False, width=REPORT_WIDTH,
                                    highlight=False, soft_wrap=True, emoji=False, markup=False)
        return self._console

    def print(self, renderable: Any = None, **options: Any) -> None:
        """Print one renderable (a blank line when None) as ``Console.print`` would; a
        :class:`Line` prints as the rich Text it stands for."""
        if self.plain and (renderable is None or (type(renderable) is Line and not options)):
            line = "" if renderable is None else renderable.plain
            if "\t" not in line:
                self.keep(line + "\n")
                return
        if renderable is None:
            self.console.print()
        else:
            if type(renderable) is Line:
                renderable = renderable.rich_text()
            self.console.print(renderable, **options)
        self.keep(self.buffer.getvalue())
        self.buffer.seek(0)
        self.buffer.truncate()

    def print_text(self, text: str, make: Callable[..., Line], *args: Any) -> None:
        """``print(make(*args))``, the Line whose pieces join to ``text``: without colour,
        the text itself stripped (:attr:`Line.plain`) when it holds no tab, the Line left
        unmade."""
        if self.plain:
            plain = stripped(text)
            if "\t" not in plain:
                self.keep(plain + "\n")
                return
        self.print(make(*args))

    def keep(self, text: str) -> None:
        """Add text as it is (whole lines, each ending in a newline)."""
        self.pending.append(text)
        self.size += len(text)

    def take(self) -> str:
        """The text printed since the last call."""
        text = "".join(self.pending)
        self.pending.clear()
        self.size = 0
        return text


class TextReporter(StreamingReporter):
    """Readable when piped; colour only when asked for (the CLI asks on a terminal).

    The text comes in pieces of about :data:`PIECE_CHARS` characters (:meth:`chunks`), so
    that the report of a large board is written as it is made.
    """

    def chunks(self, result: "CheckResult") -> Iterator[str]:
        lines = _Lines(self.options.color)
        with paused_gc():  # acyclic text; see linter.gc_pause
            for _ in self._print(lines, result):
                if lines.size >= PIECE_CHARS:
                    yield lines.take()
            yield lines.take()

    def _print(self, lines: _Lines, result: "CheckResult") -> Iterator[None]:
        """Print the report line by line, pausing after each group and finding."""
        if not self.options.quiet:
            lines.print(_summary(result))
            if self.options.verbose:
                yield from self._print_groups(lines, result)
            else:
                self._print_group_lines(lines, result)
        yield from self._print_findings(lines, result)

    def _print_groups(self, lines: _Lines, result: "CheckResult") -> Iterator[None]:
        style: "box.Box | None" = None  # rich's box, only when a table goes through rich
        for record in lean_sorted_records(result.groups):
            group = shown_entry(record)
            lines.print()
            lines.print(_group_heading(group))
            for headings, rows in _group_tables(group):
                right = [not _left_justified(heading) for heading in headings]
                text = plain_table(headings, right, rows, REPORT_WIDTH) if lines.plain else None
                if text is not None:
                    lines.keep(text)  # what rich prints for it (linter.report.text_tables)
                else:
                    style = style or self._box()
                    lines.print(_table(headings, rows, style), soft_wrap=False)
            yield

    def _box(self) -> "box.Box":
        from rich import box

        return box.SIMPLE_HEAD if self.options.color else _plain_box()

    def _print_group_lines(self, lines: _Lines, result: "CheckResult") -> None:
        records = lean_sorted_records(result.groups)
        for record in records[:GROUP_LINES_MAX]:
            lines.print(_group_line(shown_entry(record)))
        if len(records) > GROUP_LINES_MAX:
            lines.print(Line(f"  … and {len(records) - GROUP_LINES_MAX} more groups "
                             "(--verbose lists them all)"))

    def _print_findings(self, lines: _Lines, result: "CheckResult") -> Iterator[None]:
        findings = lean_ordered_findings(result.findings)
        for severity in SEVERITIES:
            these = [finding for finding in findings if finding.severity == severity]
            if not these:
                continue
            if not self.options.quiet:
                lines.print()
                lines.print(Line(_count_of(len(these), severity).upper(),
                                 style=_STYLE[severity]))
            for finding in these:
                lines.print_text(_finding_text(finding, result), _finding_line, finding, result)
                fix = finding.fix
                if fix:
                    lines.print_text(f"    fix: {fix}", _fix_line, fix)
                yield
