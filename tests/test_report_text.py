"""The text report (linter.report.text) on hand-built results (tests/report_samples.py)."""

from __future__ import annotations

import re
from dataclasses import replace

from report_samples import NETLIST, sample_result

from linter.findings import Finding
from linter.report import ReportFormat, ReportOptions

_ANSI = re.compile(r"\x1b\[[0-9;]*m")
_BOX_DRAWING = re.compile("[\u2500-\u257f]")


def _render(result=None, **options) -> str:
    return ReportFormat.TEXT.reporter(ReportOptions(**options)).render(result or sample_result())


def test_summary_line_counts_parts_groups_and_findings() -> None:
    first = _render().splitlines()[0]
    # Expected counts: the hand-built sample has 7 parts, 5 nets, 5 LEDs, 2 groups and one
    # finding of each severity (tests/report_samples.py).
    assert first == (f"{NETLIST} (SPICE): 7 parts, 5 nets, 5 LEDs in 2 LED groups; "
                     "findings: 1 error, 1 warning, 1 info")


def test_findings_grouped_most_severe_first_under_headings() -> None:
    lines = _render().splitlines()
    headings = [line for line in lines if line in ("1 ERROR", "1 WARNING", "1 INFO")]
    assert headings == ["1 ERROR", "1 WARNING", "1 INFO"]
    assert lines.index("1 ERROR") < _index_of(lines, "shared-ballast") < lines.index("1 WARNING")
    assert lines.index("1 WARNING") < _index_of(lines, "string-headroom") < lines.index("1 INFO")


def _index_of(lines: list[str], text: str) -> int:
    return next(number for number, line in enumerate(lines) if text in line)


def test_finding_line_has_location_rule_folded_parts_message_and_fix_below() -> None:
    lines = _render().splitlines()
    at = _index_of(lines, "shared-ballast")
    # Expected: the finding has no location of its own and names D7 first; D7 is placed on
    # line 4 column 1 of the sample netlist (tests/report_samples.py).
    assert lines[at] == (f"{NETLIST}:4:1: error shared-ballast [D7\u2013D10, R6]: "
                         "D7\u2013D10 share R6: one LED may take 31 mA of the 80 mA")
    assert lines[at + 1] == "    fix: give each LED its own 150 \u03a9 resistor"


def test_finding_without_location_points_at_its_part_instance() -> None:
    line = _render().splitlines()[_index_of(_render().splitlines(), "nonstandard-value")]
    # Expected: R12 is placed on line 8 column 1 in the sample netlist.
    assert line.startswith(f"{NETLIST}:8:1: info nonstandard-value [R12]: ")


def test_finding_with_no_place_at_all_starts_with_its_severity() -> None:
    result = sample_result()
    lonely = Finding("unknown-rail", "warning", "net VX has no known voltage", nets=("VX",))
    text = _render(replace(result, findings=(lonely,)))
    assert "\nwarning unknown-rail: net VX has no known voltage\n" in text


def test_quiet_prints_only_findings_and_fixes() -> None:
    lines = _render(quiet=True).splitlines()
    assert len(lines) == 4  # three findings, one of them with a fix
    for line in lines:
        assert line.startswith((f"{NETLIST}:", "    fix: "))


def test_verbose_adds_group_tables_with_units_and_unknowns() -> None:
    text = _render(verbose=True)
    assert "G-D7: parallel from +5V, current set by R6; parts D7\u2013D10, R6" in text
    row = next(line for line in text.splitlines() if line.startswith("D10 "))
    # Expected: the invented figures of bar_group (0.019/0.012/0.031 A, 2.05/1.9/2.4 V,
    # 0.039/0.074 W) written with SI prefixes.
    assert row.split() == ["D10", "LD0603YE", "19", "mA", "12", "mA", "31", "mA", "2.05", "V",
                           "1.9", "V", "2.4", "V", "39", "mW", "74", "mW"]
    r6 = next(line for line in text.splitlines() if line.startswith("R6 "))
    assert r6.split() == ["R6", "39", "\u03a9", "230", "mW", "410", "mW", "125", "mW"]
    d15 = next(line for line in text.splitlines() if line.startswith("D15 "))
    assert d15.split()[1] == "?" and d15.split()[-1] == "?"  # unknown part number, power


def test_group_tables_only_with_verbose_and_no_groups_when_quiet() -> None:
    assert "G-D7 parallel" in _render()  # one line per group by default
    assert "I nom" not in _render()  # the tables' heading
    assert "I nom" in _render(verbose=True)
    assert "G-D7" not in _render(quiet=True)
    assert "G-D7" not in _render(verbose=True, quiet=True)


def test_plain_output_has_no_escape_codes_and_no_box_drawing() -> None:
    text = _render(verbose=True)
    assert not _ANSI.search(text)
    assert not _BOX_DRAWING.search(text)


def test_colour_only_when_asked() -> None:
    coloured = _render(color=True)
    assert _ANSI.search(coloured)
    assert _ANSI.sub("", coloured) == _render()


def test_same_result_same_text_whatever_the_finding_order() -> None:
    result = sample_result()
    shuffled = replace(result, findings=tuple(reversed(result.findings)),
                       groups=tuple(reversed(result.groups)))
    assert _render(result, verbose=True) == _render(shuffled, verbose=True)


def test_no_findings_no_headings() -> None:
    text = _render(replace(sample_result(), findings=()))
    assert text.splitlines()[0].endswith("findings: 0 errors, 0 warnings, 0 info")
    # the summary line, then one line for each of the sample's two groups, no headings
    assert len(text.splitlines()) == 3
    assert all(line.startswith("  G-") for line in text.splitlines()[1:])


def test_one_line_per_group_without_verbose():
    # The demo board has nine LED groups (fixtures/demo/BOARD.md); without --verbose each is
    # one line naming its topology, rail, setter and LEDs.
    from pathlib import Path

    from linter.engine import CheckRequest, run_check
    from linter.report import ReportFormat

    demo = Path(__file__).resolve().parent.parent / "fixtures" / "demo"
    result = run_check(CheckRequest(demo / "dust_extractor_panel.edif", bom=demo / "bom.csv"))
    text = ReportFormat("text").reporter().render(result)
    lines = [line for line in text.splitlines() if line.startswith("  G-")]
    assert len(lines) == 9
    assert any(line.startswith("  G-D7 parallel from +5V, set by R6: D7–D10") for line in lines)
    assert "LED  " not in text  # no tables without --verbose
