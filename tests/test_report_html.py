"""The HTML audit report: self-contained, every input name escaped, figures per group,
the I–V plot's physics checked against Ohm's law, the drawing limit, lazy imports."""

from __future__ import annotations

import re
import subprocess
import sys
import xml.etree.ElementTree as ET
from html.parser import HTMLParser
from pathlib import Path

import pytest

from linter.cli import main
from linter.engine import CheckRequest, run_check
from linter.report import ReportFormat
from linter.report.html import HtmlReporter, figure_groups, group_findings
from linter.report.html_iv import iv_data
from linter.report.html_svg import inline_svg, label_markup

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"
HOSTILE = ROOT / "fixtures" / "html"


@pytest.fixture(scope="module")
def demo_result():
    """The demo board checked once (read-only in every test that uses it)."""
    return run_check(CheckRequest(DEMO / "dust_extractor_panel.edif", bom=DEMO / "bom.csv"))


@pytest.fixture(scope="module")
def demo_html(demo_result) -> str:
    return HtmlReporter().render(demo_result)


class _Tags(HTMLParser):
    """Every start tag and every attribute the browser's parser would see."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[str] = []
        self.attrs: list[tuple[str, str | None]] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        self.attrs.extend(attrs)

    def handle_data(self, data):
        self.text.append(data)


def _parse(html: str) -> _Tags:
    parser = _Tags()
    parser.feed(html)
    parser.close()
    return parser


def test_the_format_enum_builds_the_html_reporter():
    assert ReportFormat("html").reporter_class() is HtmlReporter


def test_demo_report_is_one_self_contained_page(demo_html):
    tags = _parse(demo_html)
    assert demo_html.startswith("<!DOCTYPE html>")
    assert not {"script", "link", "img", "iframe", "object", "embed"} & set(tags.tags)
    references = [value for name, value in tags.attrs if name in ("src", "href", "xlink:href")]
    assert all(value and value.startswith("#") for value in references), references
    assert "@import" not in demo_html and not re.search(r"url\((?!#)", demo_html)


def test_demo_report_has_summary_findings_and_every_group(demo_result, demo_html):
    assert 'id="summary"' in demo_html and 'id="findings"' in demo_html
    assert demo_html.count('<section class="group"') == len(demo_result.groups)
    for finding in demo_result.findings:
        assert finding.rule in demo_html
    # 9 LED groups, each drawn (below the limit): a schematic and an I–V plot each
    assert len(demo_result.groups) == 9  # BOARD.md: D1, D2, D3, D4, D5/D6, D7–D10, D11–D14, D15, D16–D18
    assert demo_html.count('<figure class="schematic">') == 9
    assert demo_html.count('<figure class="plot">') == 9


def test_every_inline_svg_is_well_formed_and_ids_are_unique(demo_html):
    svgs = re.findall(r"<svg\b.*?</svg>", demo_html, re.S)
    assert len(svgs) == 18
    for svg in svgs:
        ET.fromstring(svg)
    ids = re.findall(r'\bid="([^"]+)"', demo_html)
    assert len(ids) == len(set(ids))


@pytest.mark.parametrize("netlist", ["hostile.cir", "hostile.edif"])
def test_hostile_names_render_as_text(netlist, tmp_path):
    output = tmp_path / "audit.html"
    code = main(["check", str(HOSTILE / netlist), "--format", "html", "-o", str(output)])
    assert code in (0, 1)
    html = output.read_text(encoding="utf-8")
    assert "<script" not in html.casefold()
    assert "&lt;script&gt;" in html
    tags = _parse(html)
    assert not {"script", "b", "i"} & set(tags.tags)  # the names' markup stays text
    text = "".join(tags.text)
    if netlist.endswith(".edif"):  # names from the fixture, read back as the page's text
        assert "R1<script>alert(&'r')" in text and "D1<b>&amp;'x'" in text
        assert "from +5V<script>&'" in text  # the rail, a net name
        assert 'L&RED<script>"q"' in text  # the part number, %34% decoded to a double quote
    else:
        assert "R<script>alert&1" in text and "D<b>&x" in text
    for svg in re.findall(r"<svg\b.*?</svg>", html, re.S):
        ET.fromstring(svg)


def test_label_markup_escapes_markup_and_maths():
    # schemdraw reads a label as XML and treats $…$ as maths: both must stay plain text
    assert label_markup('<a href="x">&$1$') == "&lt;a href=&quot;x&quot;&gt;&amp;&#36;1&#36;"
    hostile = '<&>"$'
    assert ET.fromstring(f"<t>{label_markup(hostile)}</t>").text == hostile


def test_inline_svg_prefixes_ids_and_references():
    svg = ('<?xml version="1.0"?>\n<!DOCTYPE svg>\n<!-- made by hand -->\n'
           '<svg><defs><path id="m1"/><clipPath id="p2"/></defs>'
           '<use xlink:href="#m1"/><g clip-path="url(#p2)"/></svg>')
    out = inline_svg(svg, "f7-")
    assert out.startswith("<svg>") and "<!--" not in out
    assert 'id="f7-m1"' in out and 'xlink:href="#f7-m1"' in out and "url(#f7-p2)" in out


def test_load_lines_meet_the_curves_at_the_solved_points(demo_result):
    # Ohm's law: at each corner the string voltage equals V_rail − I·R (common practice);
    # G-D15 is R12 1 kΩ ±5 % from +12V 12 V ±10 % (fixtures/demo/ledlint.toml, BOARD.md)
    group = next(g for g in demo_result.groups if g.id == "G-D15")
    data = iv_data(group, demo_result.circuit, demo_result.part_data, demo_result.rails)
    assert [line.role for line in data.load_lines] == ["nominal", "highest", "lowest"]
    assert {(line.drive_v, round(line.ohms, 6)) for line in data.load_lines} == {
        (12.0, 1000.0), (13.2, 950.0), (10.8, 1050.0)}  # demo settings: ±10 % rail, ±5 % R
    for point, line in zip(data.points, data.load_lines):
        assert point.voltage == pytest.approx(line.drive_v - point.current * line.ohms, rel=0.01)
    # a green LED near 2 V at 10 mA (common practice): (12 V − 2 V) / 1 kΩ ≈ 10 mA
    assert data.points[0].current == pytest.approx(0.010, rel=0.05)
    assert data.points[0].voltage == pytest.approx(group.led("D15").vf.nom, abs=1e-3)


def test_string_plot_sums_the_string(demo_result):
    # G-D16: three white LEDs in series on R13 (BOARD.md); the x axis is the string voltage
    group = next(g for g in demo_result.groups if g.id == "G-D16")
    data = iv_data(group, demo_result.circuit, demo_result.part_data, demo_result.rails)
    assert data.string == ("D16", "D17", "D18")
    vf = sum(group.led(ref).vf.nom for ref in data.string)
    assert data.points[0].voltage == pytest.approx(vf, abs=3e-3)


def test_no_load_line_where_a_transistor_sets_the_current(demo_result):
    group = next(g for g in demo_result.groups if g.id == "G-D11")  # NPN sink Q1 (BOARD.md)
    data = iv_data(group, demo_result.circuit, demo_result.part_data, demo_result.rails)
    assert data.load_lines == () and "Q1" in data.note


def test_drawing_limit_puts_groups_with_findings_first(demo_result):
    limit = 2
    drawn = figure_groups(demo_result.groups, demo_result.findings, limit)
    assert len(drawn) == limit
    worst = [g for g in demo_result.groups
             if any(f.severity == "error" for f in group_findings(g, demo_result.findings))]
    assert len(worst) >= limit and drawn <= {g.id for g in worst}

    class Limited(HtmlReporter):
        limit = 2

    html = Limited().render(demo_result)
    assert html.count('<figure class="plot">') == limit
    assert "left out:" in html
    assert html.count("Figures left out (drawing limit)") == len(demo_result.groups) - limit


def test_other_formats_do_not_import_the_drawing_libraries(tmp_path):
    script = ("import sys; from linter.cli import main; "
              f"main(['check', {str(DEMO / 'dust_extractor_panel.edif')!r}, '--format', 'json', "
              f"'-o', {str(tmp_path / 'r.json')!r}]); "
              "print(sorted(m for m in ('matplotlib', 'schemdraw') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                         timeout=300, check=True)
    assert out.stdout.strip() == "[]"
