"""Placing the drive-path stages on a schemdraw drawing, top to bottom.

The chain runs down from the top stage; LEDs in parallel (several strings on one setter)
stand side by side between a top and a bottom bus; a transistor is entered at its
collector (drain) or emitter (source) and left at the other end, its base or gate note to
its left. Labels go through ``markup`` (see :func:`linter.report.html_svg.label_markup`).
"""

from __future__ import annotations

from typing import Any, Callable

__all__ = ["COLUMN_GAP", "draw_stages"]

COLUMN_GAP: float = 3.6
"""Drawing units between LED columns (room for a three-line label)."""

Markup = Callable[[str], str]


def _text(lines: tuple[str, ...], markup: Markup) -> str:
    return "\n".join(markup(line) for line in lines)


def _leds(drawing: Any, elm: Any, stage: Any, markup: Markup) -> None:
    start = drawing.here
    lines = list(stage.led_lines)
    bottoms = []
    for index, string in enumerate(stage.strings):
        top = (start[0] + index * COLUMN_GAP, start[1])
        if index:
            drawing.add(elm.Line().at((top[0] - COLUMN_GAP, top[1])).to(top))
        own, lines = lines[:len(string)], lines[len(string):]
        bottom = top
        for ref_lines in own:
            led = elm.LED().at(bottom).down()
            if stage.antiparallel and index % 2:
                led = elm.LED().at(bottom).down().reverse()
            drawing.add(led.label(_text(ref_lines, markup), loc="bottom"))
            bottom = led.end
        bottoms.append(bottom)
    depth = min(point[1] for point in bottoms)
    for index, bottom in enumerate(bottoms):
        if bottom[1] > depth:
            drawing.add(elm.Line().at(bottom).to((bottom[0], depth)))
        if index:
            drawing.add(elm.Line().at((bottom[0] - COLUMN_GAP, depth)).to((bottom[0], depth)))
    drawing.here = (start[0], depth)


_TRANSISTOR = {"npn": ("BjtNpn", "collector", "emitter", "base"),
               "pnp": ("BjtPnp", "emitter", "collector", "base"),
               "nmos": ("NFet", "drain", "source", "gate"),
               "pmos": ("PFet", "source", "drain", "gate")}


def _transistor(drawing: Any, elm: Any, stage: Any, markup: Markup) -> None:
    name, entry, exit_, control = _TRANSISTOR[stage.kind]
    kwargs = {"circle": True} if name.startswith("Bjt") else {}
    part = getattr(elm, name)(**kwargs).theta(0)
    if not name.startswith("Bjt"):
        part = part.reverse()  # gate on the left, like a base
    part = part.anchor(entry)
    drawing.add(part.label(_text(stage.lines, markup), loc="right"))
    gate = getattr(part, control)
    drawing.add(elm.Line().at(gate).left(0.6))
    drawing.add(elm.Dot(open=True).label(markup(stage.control), loc="left"))
    drawing.here = getattr(part, exit_)


def draw_stages(drawing: Any, elm: Any, stages: tuple, markup: Markup) -> None:
    """Add ``stages`` to ``drawing`` from the top down."""
    for stage in stages:
        text = _text(stage.lines, markup)
        if stage.kind == "top":
            drawing.add(elm.Vdd().label(text))
        elif stage.kind == "pin-top":
            drawing.add(elm.Dot(open=True).label(text, loc="top"))
        elif stage.kind == "resistor":
            drawing.add(elm.Resistor().down().label(text, loc="bottom"))
        elif stage.kind == "leds":
            _leds(drawing, elm, stage, markup)
        elif stage.kind in _TRANSISTOR:
            _transistor(drawing, elm, stage, markup)
        elif stage.kind == "ground":
            drawing.add(elm.Line().down(0.4))
            drawing.add(elm.Ground())
        elif stage.kind == "bottom":
            drawing.add(elm.Line().down(0.4))
            drawing.add(elm.Vss().label(text, loc="bottom"))
        elif stage.kind == "pin-bottom":
            drawing.add(elm.Line().down(0.4))
            drawing.add(elm.Dot(open=True).label(text, loc="bottom"))
