"""The I–V plot of one LED group, drawn with matplotlib (Agg, no pyplot) as inline SVG.

Curves of the LED string at the nominal, highest-current and lowest-current corners, their
operating points, the load line of each corner where the current is set by resistance, and
the LED's continuous maximum current. Colours are told apart in grey print as well: each
corner also has its own line style and marker. Text stays text in the SVG (escaped by
matplotlib), and matplotlib's maths notation is off so that a ``$`` in a name is only a
character.
"""

from __future__ import annotations

import io
from typing import TYPE_CHECKING

from linter.report.html_svg import inline_svg
from linter.units import format_si

if TYPE_CHECKING:
    from linter.report.html_iv import IvData

__all__ = ["CORNER_STYLE", "iv_plot_svg"]

CORNER_STYLE: dict[str, dict[str, str]] = {
    "nominal": {"color": "#000000", "linestyle": "-", "marker": "o", "name": "nominal"},
    "highest": {"color": "#D55E00", "linestyle": "--", "marker": "^", "name": "highest current"},
    "lowest": {"color": "#0072B2", "linestyle": ":", "marker": "v", "name": "lowest current"},
}
"""Per corner: colour (Okabe–Ito palette, legible for colour-blind readers), line style and
marker, and its name in the legend."""

_RC = {"svg.fonttype": "none", "svg.hashsalt": "ledlint", "text.parse_math": False,
       "font.size": 9.0, "font.family": "sans-serif", "axes.linewidth": 0.6}


def _matplotlib():
    """matplotlib with the Agg backend (imported here only: other formats start faster)."""
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    return matplotlib, Figure


def _corner_caption(point) -> str:
    style = CORNER_STYLE[point.role]
    return f"{style['name']}: {format_si(point.current, 'A')} at {format_si(point.voltage, 'V')}"


def _draw(ax, data: "IvData") -> None:
    top = max(float(p.curve_i[-1]) for p in data.points) * 1e3
    for point in data.points:
        style = CORNER_STYLE[point.role]
        ax.plot(point.curve_v, point.curve_i * 1e3, color=style["color"],
                linestyle=style["linestyle"], linewidth=1.2)
        ax.plot([point.voltage], [point.current * 1e3], color=style["color"], marker=style["marker"],
                markersize=6, linestyle="none", label=_corner_caption(point), zorder=5)
    low_v = min(float(p.curve_v[0]) for p in data.points)
    high_v = max(max(float(p.curve_v[-1]) for p in data.points), *(p.voltage for p in data.points))
    span = high_v - low_v
    left, right = low_v - 0.15 * span, high_v + 0.1 * span
    for line in data.load_lines:
        style = CORNER_STYLE[line.role]
        currents = [(line.drive_v - v) / line.ohms * 1e3 for v in (left, right)]
        label = (f"load line {format_si(line.drive_v, 'V')} − I·{format_si(line.ohms, 'Ω')}"
                 if line.role == "nominal" else None)
        ax.plot([left, right], currents, color=style["color"], linestyle=style["linestyle"],
                linewidth=0.8, alpha=0.6, label=label)
    if data.if_max is not None:
        ax.axhline(data.if_max * 1e3, color="#555555", linestyle="-.", linewidth=0.8,
                   label=f"rated maximum {format_si(data.if_max, 'A')}")
    ax.set_xlim(left, right)
    ax.set_ylim(0.0, top)


def iv_plot_svg(data: "IvData", prefix: str) -> str:
    """The plot as inline SVG (ids prefixed with ``prefix``)."""
    matplotlib, figure_class = _matplotlib()
    with matplotlib.rc_context(_RC):
        figure = figure_class(figsize=(7.0, 3.2))
        figure.subplots_adjust(left=0.09, right=0.58, bottom=0.15, top=0.97)
        ax = figure.add_subplot()
        _draw(ax, data)
        count = len(data.string)
        ax.set_xlabel("voltage across the LED (V)" if count == 1
                      else f"voltage across the string of {count} LEDs (V)")
        ax.set_ylabel("LED current (mA)")
        ax.grid(True, linewidth=0.3, color="#bbbbbb")
        ax.legend(loc="upper left", bbox_to_anchor=(1.03, 1.0), fontsize=8.5, frameon=False,
                  borderaxespad=0.0)  # beside the axes: it never hides a curve
        buffer = io.StringIO()
        figure.savefig(buffer, format="svg", metadata={"Date": None, "Creator": None})
    return inline_svg(buffer.getvalue(), prefix)
