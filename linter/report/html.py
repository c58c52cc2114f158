"""The HTML audit report (``--format html``): one self-contained page for reviewing a board.

The summary (board, counts, findings by severity, inputs), every finding with its fix, and a
section for every LED group — passing ones too — with a drawing of its drive path
(:mod:`linter.report.html_schematic`), the LED's I–V curve with the load line and the
corner operating points (:mod:`linter.report.html_plot`) and the value tables
(:mod:`linter.report.html_tables`). matplotlib and schemdraw are imported only when a figure
is drawn. At most :data:`MAX_FIGURE_GROUPS` groups get figures — groups with findings first,
most severe first — and the page names the groups left without.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Sequence

from linter.findings import Finding, severity_rank
from linter.refs import fold_refs, natural_key
from linter.report import Reporter
from linter.report.html_page import (esc, findings_section, page, severity_badge,
                                     summary_section)
from linter.report.common import sorted_groups
from linter.report.html_tables import group_tables, plain_group_section

if TYPE_CHECKING:
    from linter.engine import CheckResult
    from linter.results import GroupResult

__all__ = ["HtmlReporter", "MAX_FIGURE_GROUPS", "figure_groups", "group_findings"]

MAX_FIGURE_GROUPS: int = 60
"""Groups drawn at most (two figures each); the rest get their tables only."""


def group_findings(result: "GroupResult", findings: Sequence[Finding]) -> list[Finding]:
    """The findings of this group: those that name it, and those that name no group but one
    of its LEDs, its setter or its transistor (a microcontroller serves many groups)."""
    own = {*result.group.leds, result.group.setter, result.group.transistor} - {None}
    return [f for f in findings if f.group == result.id
            or (f.group is None and any(ref in own for ref in f.parts))]


def figure_groups(groups: Sequence["GroupResult"], findings: Sequence[Finding],
                  limit: int = MAX_FIGURE_GROUPS) -> set[str]:
    """Ids of the groups to draw: most severe finding first, then natural order, ``limit`` of them."""
    def priority(group: "GroupResult") -> tuple:
        ranks = [severity_rank(f.severity) for f in group_findings(group, findings)]
        return (-(max(ranks) + 1) if ranks else 0, natural_key(group.id))

    return {group.id for group in sorted(groups, key=priority)[:limit]}


def _figures(result: "GroupResult", check: "CheckResult", index: int) -> str:
    from linter.report.html_iv import iv_data
    from linter.report.html_plot import iv_plot_svg
    from linter.report.html_schematic import drive_path, schematic_svg

    out = ['<div class="figures">']
    if result.status == "solved" and result.leds:
        out.append(f'<figure class="schematic">{schematic_svg(drive_path(result, check.circuit), f"s{index}-")}'
                   "<figcaption>Drive path with nominal currents (drawn in drive order)</figcaption></figure>")
    data = iv_data(result, check.circuit, check.part_data, check.rails)
    if data is not None:
        note = f"; {esc(data.note)}" if data.note else ""
        out.append(f'<figure class="plot">{iv_plot_svg(data, f"p{index}-")}<figcaption>'
                   f"I–V of {esc(_string_name(data.string))} at each corner, with the operating points{note}"
                   "</figcaption></figure>")
    out.append("</div>")
    return "".join(out)


def _string_name(string: Sequence[str]) -> str:
    return string[0] if len(string) == 1 else f"the string {fold_refs(string)}"


def _heading(result: "GroupResult", findings: Sequence[Finding]) -> str:
    group = result.group
    words = f"{group.topology} from {result.rail}" if result.rail else f"{group.topology}, rail unknown"
    if group.setter:
        words += f", current set by {group.setter}"
    if findings:
        worst = max(findings, key=lambda f: severity_rank(f.severity)).severity
        badge = f"{severity_badge(worst)} {len(findings)} finding{'s' if len(findings) > 1 else ''}"
    else:
        badge = '<span class="sev ok">pass</span>'
    return f"<h3>{esc(group.id)}: {esc(words)} {badge}</h3>"


def _group_section(result: "GroupResult", check: "CheckResult", anchor: str, drawn: bool,
                   index: int) -> str:
    findings = group_findings(result, check.findings)
    out = [f'<section class="group" id="{anchor}">', _heading(result, findings),
           f'<p class="muted">parts: {esc(fold_refs(result.group.parts))}</p>']
    if result.group.reason:
        out.append(f'<p class="note">{esc(result.group.reason)}</p>')
    if findings:
        out.append("<ul>" + "".join(f"<li>{severity_badge(f.severity)} <span class=\"mono\">"
                                    f"{esc(f.rule)}</span>: {esc(f.message)}</li>" for f in findings)
                   + "</ul>")
    out.append(_figures(result, check, index) if drawn else
               '<p class="note">Figures left out (drawing limit); values below.</p>')
    out.append(group_tables(result, check.part_data))
    return "\n".join(out) + "</section>"


class HtmlReporter(Reporter):
    """One self-contained HTML page: inline CSS and SVG, no script, nothing fetched."""

    limit: int = MAX_FIGURE_GROUPS

    def render(self, result: "CheckResult") -> str:
        solved = [g for g in result.groups if hasattr(g, "group")]
        plain = [g for g in result.groups if not hasattr(g, "group")]  # records with as_dict() only
        groups = sorted(solved, key=lambda g: natural_key(g.id))
        anchors = {group.id: f"group-{index + 1}" for index, group in enumerate(groups)}
        drawn = figure_groups(groups, result.findings, self.limit)
        left_out = [g.id for g in groups if g.id not in drawn]
        note = None
        if left_out:
            note = (f"Figures drawn for {len(drawn)} of {len(groups)} groups (groups with findings "
                    f"first); left out: {esc(fold_refs(left_out))}.")
        board = result.circuit.design or Path(str(result.circuit.source)).stem
        body = [summary_section(result, board, note), findings_section(result, anchors),
                '<section id="groups"><h2>LED groups</h2>']
        if not result.groups:
            body.append("<p>No LED groups found.</p>")
        body += [_group_section(group, result, anchors[group.id], group.id in drawn, index)
                 for index, group in enumerate(groups)]
        body += [plain_group_section(entry) for entry in sorted_groups(plain)]
        body.append("</section>")
        return page(f"ledlint audit: {board}", body)
