"""The text report's plain-line shortcut against rich's own printing (same bytes).

Without colour, the text reporter writes a line's plain text itself instead of asking rich to
print it. Expected values: rich's output for the same line or report (the plain path of our
own code, with the shortcut turned off), never stored text.
"""

from __future__ import annotations

import io

import pytest
from hypothesis import given, settings, strategies as st
from report_samples import fixture_netlists, sample_result
from rich.console import Console
from rich.text import Text

from linter.engine import CheckRequest, run_check
from linter.report import ReportOptions
from linter.report import text as text_report
from linter.report.text import REPORT_WIDTH, TextReporter, _Lines
from linter.report.text_line import CONTROL_CODES, Line


def _plain_console(buffer: io.StringIO) -> Console:
    """The console the reporter makes without colour."""
    return Console(file=buffer, force_terminal=False, no_color=True, color_system=None,
                   legacy_windows=False, width=REPORT_WIDTH, highlight=False, soft_wrap=True,
                   emoji=False, markup=False)


_ODD = list("ab -:\n\r\t\x00\x07\x08\x0b\x0c\x1b\x7f\u0085\u2028\u200b\u0301\u03a9\u4e00\U0001f600")
_pieces = st.one_of(st.text(max_size=150), st.text(alphabet=st.sampled_from(_ODD), max_size=40))


def _same(built: Text, expected: Text) -> bool:
    """Equal as rich prints them: text, base style, styled spans, end (Text's own == leaves
    out the base style)."""
    return (built.plain, built.style, built.spans, built.end) == (
        expected.plain, expected.style, expected.spans, expected.end)


@settings(max_examples=400)
@given(st.lists(st.tuples(_pieces, st.sampled_from([None, "bold", "bold red", "cyan"])),
                max_size=4))
def test_shortcut_writes_what_rich_prints(pieces) -> None:
    """A Line written by the shortcut against the rich Text of the same pieces printed by
    rich; and the Line's own rich Text is that Text."""
    line, text = Line(), Text()
    for piece, style in pieces:
        line.append(piece, style=style)
        text.append(piece, style=style)
    fast, slow = _Lines(color=False), io.StringIO()
    fast.print(line)
    _plain_console(slow).print(text)
    assert fast.take() == slow.getvalue()
    assert line.plain == text.plain
    assert _same(line.rich_text(), text)


@settings(max_examples=200)
@given(_pieces, st.sampled_from(["", "bold", "yellow"]),
       st.lists(st.tuples(_pieces, st.sampled_from([None, "bold", "cyan"])), max_size=3))
def test_line_is_the_rich_text_of_its_pieces(first, style, pieces) -> None:
    """Line(text, style) then appends: the same plain text and Text as rich's own."""
    line, text = Line(first, style=style), Text(first, style=style)
    for piece, piece_style in pieces:
        line.append(piece, style=piece_style)
        text.append(piece, style=piece_style)
    assert line.plain == text.plain
    assert _same(line.rich_text(), text)


def test_control_codes_are_the_ones_rich_strips() -> None:
    """CONTROL_CODES against rich.control.strip_control_codes over the first 0x3000 code
    points (every control and format character of Latin and general punctuation)."""
    from rich.control import strip_control_codes

    every = "".join(map(chr, range(0x3000)))
    assert every.translate(CONTROL_CODES) == strip_control_codes(every)


def test_blank_line_as_rich_prints_it() -> None:
    fast, slow = _Lines(color=False), io.StringIO()
    fast.print()
    _plain_console(slow).print()
    assert fast.take() == slow.getvalue() == "\n"


@pytest.fixture(scope="module")
def checked() -> list:
    """The hand-made sample and every fixture board, checked once."""
    return [sample_result(), sample_result(groups=False)] + [
        run_check(CheckRequest(netlist=path)) for path in fixture_netlists()]


@pytest.mark.parametrize("options", [ReportOptions(), ReportOptions(verbose=True),
                                     ReportOptions(quiet=True)], ids=["plain", "verbose", "quiet"])
def test_reports_same_bytes_with_and_without_the_shortcut(checked, options, monkeypatch) -> None:
    fast = [TextReporter(options).render(result) for result in checked]
    original = _Lines.__init__

    def through_rich(self, color):  # type: ignore[no-untyped-def]
        original(self, color)
        self.plain = False  # every line printed by rich (the console itself stays plain)

    monkeypatch.setattr(text_report._Lines, "__init__", through_rich)
    slow = [TextReporter(options).render(result) for result in checked]
    assert fast == slow
    assert any(len(report.splitlines()) > 10 for report in fast)  # real reports compared


def test_streamed_pieces_join_to_the_whole_report(checked, monkeypatch) -> None:
    demo = max(checked, key=lambda result: len(result.findings))
    for options in (ReportOptions(), ReportOptions(verbose=True), ReportOptions(color=True)):
        whole = TextReporter(options).render(demo)
        monkeypatch.setattr(text_report, "PIECE_CHARS", 100)
        pieces = list(TextReporter(options).chunks(demo))
        monkeypatch.undo()
        assert len(pieces) > 3 and "".join(pieces) == whole


_CELL_CHARS = list("aZ09 .-µΩ–/\t\n中\u0301\x07") + ["mA", "kΩ", "D17"]
_cells = st.lists(st.sampled_from(_CELL_CHARS), max_size=6).map("".join)


def _rich_table(headings, right, rows) -> str:
    from rich.table import Table

    table = Table(box=text_report._plain_box(), show_edge=False, pad_edge=False,
                  header_style="bold")
    for heading, flush_right in zip(headings, right):
        table.add_column(heading, justify="right" if flush_right else "left")
    for row in rows:
        table.add_row(*row)
    buffer = io.StringIO()
    _plain_console(buffer).print(table, soft_wrap=False)
    return buffer.getvalue()


_tidy_cells = st.lists(st.sampled_from(["mA", "D17", "4.7", "kΩ", "µA", "–", "?", "x"]),
                      min_size=1, max_size=3).map(" ".join)


def _tables(cells):
    return st.integers(min_value=1, max_value=12).flatmap(lambda columns: st.tuples(
        st.lists(cells, min_size=columns, max_size=columns),
        st.lists(st.booleans(), min_size=columns, max_size=columns),
        st.lists(st.lists(cells, min_size=columns, max_size=columns), max_size=4)))


@settings(max_examples=600)
@given(st.one_of(_tables(_tidy_cells), _tables(_cells)))
def test_plain_table_is_what_rich_prints(table) -> None:
    from linter.report.text_tables import plain_table

    headings, right, rows = table
    text = plain_table(headings, right, rows, REPORT_WIDTH)
    if text is not None:  # None: rich prints it (odd cells or too wide)
        assert text == _rich_table(headings, right, rows)


def test_plain_table_takes_the_usual_tables() -> None:
    from linter.report.text_tables import plain_table

    # a group table as the reporter makes it (invented figures)
    headings = ("LED", "part", "I nom", "I min", "I max")
    rows = [("D7", "LX-R0603", "18.5 mA", "4.39 µA", "75.1 mA"), ("D10", "?", "2 mA", "?", "?")]
    right = [False, False, True, True, True]
    text = plain_table(headings, right, rows, REPORT_WIDTH)
    assert text is not None and text == _rich_table(headings, right, rows)
    assert plain_table(("a",) * 30, [True] * 30, [("xxxx",) * 30], REPORT_WIDTH) is None  # wide


def _shown_part(entry: dict) -> dict:
    """The fields shown_entry keeps, taken from the whole entry (the plain path)."""
    keep = {key: entry[key] for key in ("id", "topology", "rail", "parts", "setter")}
    keep["leds"] = [{key: led[key] for key in ("ref", "part", "current_a", "vf_v", "power_w")}
                    for led in entry["leds"]]
    keep["resistors"] = [{key: resistor[key] for key in ("ref", "ohms", "power_w", "rating_w")}
                         for resistor in entry["resistors"]]
    return keep


def test_shown_entry_is_part_of_the_whole_entry(checked) -> None:
    from test_report_json_layout import _odd_group

    from linter.report.common import group_entry
    from linter.report.text import shown_entry

    records = [record for result in checked for record in result.groups] + [_odd_group()]
    solved = [record for record in records if hasattr(record, "group")]
    assert len(solved) > 50
    for record in solved:
        assert shown_entry(record) == _shown_part(group_entry(record))
    stand_in = sample_result().groups[0]
    assert shown_entry(stand_in) == group_entry(stand_in)
