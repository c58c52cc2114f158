"""The page around the HTML report: style sheet, summary and findings, all escaped.

One self-contained document: inline CSS, inline SVG, no script, no fonts or images fetched.
Every text that comes from the input (names of parts, nets, files, messages) goes through
:func:`esc` (``html.escape`` with quotes) before it reaches the page.
"""

from __future__ import annotations

import html
from pathlib import Path
from typing import TYPE_CHECKING, Iterable, Sequence

from linter import __version__
from linter.findings import SEVERITIES, Finding
from linter.refs import fold_refs
from linter.report.common import finding_location, ordered_findings, severity_counts

if TYPE_CHECKING:
    from linter.engine import CheckResult
    from linter.model import SourceLocation

__all__ = ["esc", "STYLE", "page", "summary_section", "findings_section", "severity_badge"]


def esc(text: object) -> str:
    """``text`` as HTML text or attribute value (``&``, ``<``, ``>``, both quotes escaped)."""
    return html.escape(str(text), quote=True)


STYLE = """
:root { --ink: #1b1b1b; --muted: #555; --rule: #c8c8c8; --error: #b00020; --warning: #8a5a00;
        --info: #005a8c; --band: #f3f3f3; }
body { font: 14px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif;
       color: var(--ink); margin: 1.5rem auto; max-width: 76rem; padding: 0 1rem; }
h1 { font-size: 1.5rem; margin: 0 0 .3rem; } h2 { font-size: 1.2rem; margin: 2rem 0 .6rem;
     border-bottom: 2px solid var(--ink); padding-bottom: .2rem; }
h3 { font-size: 1.05rem; margin: 0 0 .4rem; }
table { border-collapse: collapse; margin: .4rem 0 .8rem; font-size: 13px; }
th, td { border-bottom: 1px solid var(--rule); padding: .25rem .55rem; text-align: left;
         vertical-align: top; }
th { background: var(--band); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.sev { display: inline-block; min-width: 4.2em; padding: 0 .35em; border: 1.5px solid;
       border-radius: 3px; font-weight: 700; font-size: 12px; text-align: center; }
.sev.error { color: var(--error); } .sev.warning { color: var(--warning); border-style: dashed; }
.sev.info { color: var(--info); border-style: dotted; } .sev.ok { color: #2d6a2d; }
.counts td { font-size: 15px; } .muted, figcaption, .note { color: var(--muted); font-size: 12.5px; }
.group { border: 1px solid var(--rule); border-radius: 4px; padding: .8rem 1rem; margin: 1rem 0;
         break-inside: avoid; page-break-inside: avoid; }
.figures { display: flex; flex-wrap: wrap; gap: 1.2rem; align-items: flex-start; }
figure { margin: 0; } figure svg { display: block; height: auto; max-width: 100%; }
figure.schematic svg { max-width: 100%; }
figure.plot svg { width: 40rem; }
.fix { color: #1d4d1d; } code, .mono { font-family: ui-monospace, "DejaVu Sans Mono", monospace;
       font-size: 12.5px; }
a { color: #0b4f8a; } .nowrap { white-space: nowrap; }
@media print { body { max-width: none; margin: 0; font-size: 11px; } a { color: inherit; }
               h2 { break-after: avoid; } figure.plot svg { width: 34rem; } }
"""
"""Print-friendly: severities differ by border style as well as colour."""


def severity_badge(severity: str) -> str:
    return f'<span class="sev {esc(severity)}">{esc(severity)}</span>'


def page(title: str, body: Iterable[str]) -> str:
    """A whole HTML5 document around ``body`` (pieces already escaped)."""
    head = (f'<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n'
            f'<meta name="viewport" content="width=device-width, initial-scale=1">\n'
            f'<meta name="generator" content="ledlint {esc(__version__)}">\n'
            f"<title>{esc(title)}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n")
    return head + "\n".join(body) + "\n</body>\n</html>\n"


def _input_rows(result: "CheckResult") -> list[tuple[str, str]]:
    request = result.request
    rows = [("netlist", f"{request.netlist} ({result.circuit.format.upper()})"),
            ("bill of materials", str(request.bom) if request.bom else "none given"),
            ("settings", str(request.config) if request.config else "found upward from the netlist, or defaults")]
    rows += [("part data", str(path)) for path in request.parts_files]
    return rows


def summary_section(result: "CheckResult", board: str, figure_note: str | None) -> str:
    counts = severity_counts(result.findings)
    circuit = result.circuit
    facts = [("parts", len(circuit.parts)), ("nets", len(circuit.nets)),
             ("LEDs", len(circuit.leds())), ("LED groups", len(result.groups))]
    cells = "".join(f"<td>{severity_badge(s)} <strong>{counts[s]}</strong></td>" for s in SEVERITIES)
    rows = "".join(f"<tr><th>{esc(k)}</th><td>{esc(v)}</td></tr>" for k, v in _input_rows(result))
    fact_text = ", ".join(f"{n} {esc(k)}" for k, n in facts)
    waived = f", {len(result.waived)} waived" if result.waived else ""
    parts = [f'<section id="summary"><h1>LED drive audit: {esc(board)}</h1>',
             f'<p class="muted">ledlint {esc(__version__)}: {fact_text}{esc(waived)}</p>',
             f'<table class="counts"><tr><th>findings</th>{cells}</tr></table>',
             f'<table class="inputs">{rows}</table>']
    if figure_note:
        parts.append(f'<p class="note">{figure_note}</p>')
    return "\n".join(parts) + "</section>"


def _where(location: "SourceLocation | None") -> str:
    """``file.edif:189:11`` (the file's name only; the whole path in the title)."""
    if location is None:
        return ""
    short = f"{Path(location.file).name}:{location.line}:{location.column}"
    return f'<span title="{esc(location)}">{esc(short)}</span>'


def _finding_row(finding: Finding, result: "CheckResult", anchors: dict[str, str]) -> str:
    where = finding_location(finding, result.circuit)
    group = finding.group
    link = (f'<a href="#{anchors[group]}">{esc(group)}</a>' if group in anchors
            else esc(group or ""))
    fix = f'<div class="fix">fix: {esc(finding.fix)}</div>' if finding.fix else ""
    return (f"<tr><td>{severity_badge(finding.severity)}</td><td class=\"mono nowrap\">{esc(finding.rule)}</td>"
            f"<td class=\"nowrap\">{esc(fold_refs(finding.parts))}</td><td>{esc(finding.message)}{fix}</td>"
            f"<td>{link}</td><td class=\"mono\">{_where(where)}</td></tr>")


def findings_section(result: "CheckResult", anchors: dict[str, str]) -> str:
    """Every finding, most severe first, with its fix; then the waived ones, briefly."""
    findings = ordered_findings(result.findings)
    out = ['<section id="findings"><h2>Findings</h2>']
    if not findings:
        out.append("<p>No findings.</p>")
    else:
        out.append("<table><tr><th>severity</th><th>rule</th><th>parts</th><th>message and fix</th>"
                   "<th>group</th><th>source</th></tr>")
        out += [_finding_row(f, result, anchors) for f in findings]
        out.append("</table>")
    if result.waived:
        waived: Sequence[Finding] = ordered_findings(result.waived)
        items = "".join(f"<li>{esc(f.rule)} [{esc(fold_refs(f.parts))}]: {esc(f.message)}</li>"
                        for f in waived)
        out.append(f'<details><summary>{len(waived)} waived</summary><ul>{items}</ul></details>')
    return "\n".join(out) + "</section>"
