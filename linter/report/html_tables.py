"""The value tables of one solved LED group: LEDs, resistors, transistors, pins, extremes.

Figures are SI floats formatted with units (:func:`linter.units.format_si`); an unknown
figure shows as ``unknown``. The corner of each extreme is named in words
(:meth:`linter.corners.Corner.label`).
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any, Iterable, Sequence

from linter.report.html_page import esc
from linter.units import format_si

if TYPE_CHECKING:
    from linter.partdata import PartDataMap
    from linter.results import GroupResult, Span

__all__ = ["UNKNOWN", "group_tables", "plain_group_section"]

UNKNOWN = "unknown"


def _si(value: Any, unit: str) -> str:
    if value is None or not math.isfinite(float(value)):
        return UNKNOWN
    return format_si(float(value), unit)


def _table(headings: Sequence[str], rows: Iterable[Sequence[str]], numeric_from: int) -> str:
    """Cells are escaped here; columns from ``numeric_from`` on are right-aligned."""
    def cell(tag: str, index: int, text: str) -> str:
        kind = ' class="num"' if index >= numeric_from else ""
        return f"<{tag}{kind}>{esc(text)}</{tag}>"

    head = "".join(cell("th", i, h) for i, h in enumerate(headings))
    body = "".join("<tr>" + "".join(cell("td", i, c) for i, c in enumerate(row)) + "</tr>"
                   for row in rows)
    return f"<table><tr>{head}</tr>{body}</table>"


def _spans(span: "Span", unit: str) -> list[str]:
    return [_si(span.nom, unit), _si(span.min, unit), _si(span.max, unit)]


def _led_table(result: "GroupResult", part_data: "PartDataMap") -> str:
    rows = []
    for led in result.leds:
        if_max = getattr(part_data.get(led.ref), "if_max", None)
        rows.append([led.ref, led.part_number or UNKNOWN, *_spans(led.current, "A"),
                     _si(if_max, "A"), *_spans(led.vf, "V"), _si(led.power.nom, "W"),
                     _si(led.power.max, "W"), _si(max(led.reverse_v, 0.0), "V")])
    return _table(["LED", "part", "I nom", "I min", "I max", "I rated max", "Vf nom", "Vf min",
                   "Vf max", "P nom", "P max", "reverse V"], rows, 2)


def _resistor_table(result: "GroupResult") -> str:
    rows = []
    for r in result.resistors:
        share = UNKNOWN
        if r.rating_w and math.isfinite(r.power.max):
            percent = 100 * r.power.max / r.rating_w
            share = f"{percent:.0f} %" if percent >= 1 else "<1 %"
        rows.append([r.ref, r.package or UNKNOWN, _si(r.ohms, "Ω"), f"±{100 * r.tolerance:g} %",
                     _si(r.current.nom, "A"), _si(r.current.max, "A"), _si(r.power.nom, "W"),
                     _si(r.power.max, "W"), _si(r.rating_w, "W"), share])
    return _table(["resistor", "package", "value", "tolerance", "I nom", "I max", "P nom",
                   "P max", "rating", "P max / rating"], rows, 2)


def _transistor_table(result: "GroupResult") -> str:
    rows = []
    for t in result.transistors:
        saturated = "no"
        if t.saturated:
            saturated = f"yes, {_si(t.current_when_saturated, 'A')}" if t.current_when_saturated else "yes"
        vgs = f"{_si(t.vgs.min, 'V')} (threshold {_si(t.vgs_th, 'V')})" if t.vgs else "–"
        rows.append([t.ref, t.kind, *_spans(t.current, "A"), _si(t.vce.nom, "V"), _si(t.vce.min, "V"),
                     _si(t.power.nom, "W"), _si(t.power.max, "W"), saturated,
                     _si(t.rail_min, "V") if t.rail_min is not None else "–", vgs])
    return _table(["transistor", "kind", "I nom", "I min", "I max", "Vce/Vds nom", "Vce/Vds min",
                   "P nom", "P max", "left regulation", "lowest rail", "Vgs min"], rows, 2)


def _pin_table(result: "GroupResult") -> str:
    rows = [[p.id, p.net, "sources" if p.sourcing else "sinks", _si(p.current.nom, "A"),
             _si(p.current.max, "A"), _si(p.current_max, "A")] for p in result.pins]
    return _table(["pin", "net", "direction", "I nom", "I max", "rating"], rows, 3)


def _extremes(result: "GroupResult") -> str:
    items = []
    for led in result.leds:
        for word, value, corner in (("highest", led.current.max, led.current.at_max),
                                    ("lowest", led.current.min, led.current.at_min)):
            if corner is not None:
                items.append(f"<li>{esc(led.ref)} {word} current {esc(_si(value, 'A'))} at "
                             f"{esc(corner.label())}</li>")
    for t in result.transistors:
        if t.saturated_at is not None:
            items.append(f"<li>{esc(t.ref)} leaves regulation at {esc(t.saturated_at.label())}</li>")
    if not items:
        return ""
    return ('<details class="extremes" open><summary>corners of the extremes</summary>'
            f"<ul>{''.join(items)}</ul></details>")


def group_tables(result: "GroupResult", part_data: "PartDataMap") -> str:
    """The tables of one group (solved), or the reason it could not be solved."""
    if result.status != "solved":
        return f'<p class="note">Not solved: {esc(result.reason or "reason unknown")}</p>'
    out = [_led_table(result, part_data)] if result.leds else []
    if result.resistors:
        out.append(_resistor_table(result))
    if result.transistors:
        out.append(_transistor_table(result))
    if result.pins:
        out.append(_pin_table(result))
    out.append(_extremes(result))
    notes = list(result.notes)
    if result.not_converged:
        notes.append(f"{len(result.not_converged)} corner(s) did not converge and are left out")
    notes.append(f"{result.corners} corners per scenario ({result.scheme})")
    out.append("".join(f'<p class="note">{esc(note)}</p>' for note in notes))
    return "\n".join(out)


def plain_group_section(entry: dict[str, Any]) -> str:
    """A group known only by its JSON form (``as_dict()``): heading and tables, no figures."""
    words = f"{entry.get('topology', UNKNOWN)} from {entry.get('rail') or 'an unknown rail'}"
    leds = [[led.get("ref", ""), led.get("part") or UNKNOWN,
             *(_si((led.get("current_a") or {}).get(k), "A") for k in ("nom", "min", "max")),
             *(_si((led.get("vf_v") or {}).get(k), "V") for k in ("nom", "min", "max"))]
            for led in entry.get("leds", ())]
    resistors = [[r.get("ref", ""), _si(r.get("ohms"), "Ω"),
                  *(_si((r.get("power_w") or {}).get(k), "W") for k in ("nom", "max")),
                  _si(r.get("rating_w"), "W")] for r in entry.get("resistors", ())]
    return (f'<section class="group"><h3>{esc(entry.get("id", ""))}: {esc(words)}</h3>'
            + _table(["LED", "part", "I nom", "I min", "I max", "Vf nom", "Vf min", "Vf max"], leds, 2)
            + _table(["resistor", "value", "P nom", "P max", "rating"], resistors, 1)
            + "</section>")
