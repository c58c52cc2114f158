"""A small drawing of an LED group's drive path, annotated with the computed currents.

:func:`drive_path` reads a solved group into a list of :class:`Stage` records, top to bottom
in drive order: the rail (or the pin driven high), the resistor that sets the current, the
LEDs (one column per series string), the transistor with its emitter or source resistor, and
ground (or the rail below, or the pin driven low). :func:`schematic_svg` draws them with
schemdraw's SVG backend. The drawing shows the drive order, not the placement on the board.
Every name is passed through :func:`linter.report.html_svg.label_markup`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from linter.report.html_svg import inline_svg, label_markup
from linter.units import format_si

if TYPE_CHECKING:
    from linter.model import Circuit
    from linter.results import GroupResult, Span

__all__ = ["Stage", "drive_path", "schematic_svg"]

_EMITTER_PINS = {"npn": ("e", "emitter", "3"), "pnp": ("e", "emitter", "3"),
                 "nmos": ("s", "source", "3"), "pmos": ("s", "source", "3")}
_CONTROL = {"npn": "base", "pnp": "base", "nmos": "gate", "pmos": "gate"}
_ABOVE_LEDS = ("pnp-source", "high-side-switch")


@dataclass(frozen=True)
class Stage:
    """One step of the drive path: ``kind`` is ``top`` (a rail), ``pin-top``, ``resistor``,
    ``leds``, ``npn``/``pnp``/``nmos``/``pmos``, ``ground``, ``bottom`` (a rail) or
    ``pin-bottom``; ``lines`` is its annotation; ``strings`` and ``led_lines`` (one tuple of
    lines per LED, in string order) only for ``leds``; ``control`` the base or gate note."""

    kind: str
    lines: tuple[str, ...] = ()
    strings: tuple[tuple[str, ...], ...] = ()
    led_lines: tuple[tuple[str, ...], ...] = ()
    antiparallel: bool = False
    control: str = ""


def _range(span: "Span", unit: str) -> str:
    return f"{format_si(span.nom, unit)} ({format_si(span.min, unit)} to {format_si(span.max, unit)})"


def _emitter_resistors(result: "GroupResult", circuit: "Circuit", ref: str, kind: str) -> list[str]:
    """Resistors of the group on the transistor's emitter (source) net."""
    part = circuit.parts.get(ref)
    net = None
    for name in _EMITTER_PINS.get(kind, ()):
        pin = part.pin(name) if part is not None else None
        if pin is not None and pin.net is not None:
            net = pin.net
            break
    if net is None or net in result.group.rails:
        return []
    on_net = set(circuit.parts_on(net))
    return [r.ref for r in result.resistors if r.ref in on_net]


def _resistor_stage(result: "GroupResult", ref: str) -> Stage:
    r = result.resistor(ref)
    return Stage("resistor", (f"{ref} {format_si(r.ohms, 'Ω')}",
                              f"{format_si(r.current.nom, 'A')}, {format_si(r.power.nom, 'W')}"))


def _transistor_stages(result: "GroupResult", circuit: "Circuit") -> tuple[list[Stage], list[str]]:
    """The transistor and its emitter (source) resistors in drive order, and those resistors."""
    t = result.transistors[0] if result.transistors else None
    if t is None:
        return [], []
    emitter = _emitter_resistors(result, circuit, t.ref, t.kind)
    path = {result.group.setter, *emitter}
    bias = [r.ref for r in result.resistors if r.ref not in path]
    drive = result.group.drive or "unknown drive"
    control = f"{_CONTROL.get(t.kind, 'control')}: {drive}" + (f" ({', '.join(bias)})" if bias else "")
    stage = Stage(t.kind if t.kind in _CONTROL else "npn",
                  (f"{t.ref} ({t.kind})", f"{format_si(t.current.nom, 'A')}"), control=control)
    resistors = [_resistor_stage(result, ref) for ref in emitter]
    ordered = [stage, *resistors] if t.kind in ("npn", "nmos") else [*resistors, stage]
    return ordered, emitter


def _led_stage(result: "GroupResult") -> Stage:
    strings = (tuple(tuple(s) for s in result.group.strings)
               or tuple((led.ref,) for led in result.leds))
    lines = []
    for string in strings:
        for index, ref in enumerate(string):
            led = next((x for x in result.leds if x.ref == ref), None)
            if led is None or index > 0:
                lines.append((ref,))
            else:
                lines.append((ref, f"{format_si(led.current.nom, 'A')} nom",
                              f"{format_si(led.current.max, 'A')} max"))
    return Stage("leds", strings=tuple(strings), led_lines=tuple(lines),
                 antiparallel=result.group.topology == "pin-bicolour")


def _lit_when_high(group, pin: str) -> str:
    """``(high: D5 lit)`` for the pin of an anti-parallel pair."""
    lit = [ref for s in group.scenarios if s.levels.get(pin) == "high" for ref in s.lit]
    return f"(high: {', '.join(lit)} lit)" if lit else "(high: none lit)"


def _ends(result: "GroupResult") -> tuple[Stage, Stage]:
    group = result.group
    topology = group.topology
    if topology == "pin-bicolour" and len(group.pins) == 2:
        first, second = (pin.id for pin in group.pins)
        return (Stage("pin-top", (f"{first} {_lit_when_high(group, first)}",)),
                Stage("pin-bottom", (f"{second} {_lit_when_high(group, second)}",)))
    high = [p for s in group.scenarios for p, level in s.levels.items() if level == "high"]
    low = [p for s in group.scenarios for p, level in s.levels.items() if level == "low"]
    if topology == "pin-source" and high:
        top = Stage("pin-top", (f"{high[0]} driven high",))
    else:
        top = Stage("top", (result.rail or "rail unknown",))
    if topology == "pin-sink" and low:
        return top, Stage("pin-bottom", (f"{low[0]} driven low",))
    others = [r for r in group.rails if r != result.rail]
    if len(others) == 1 and topology in ("across-rails", "reversed"):
        return top, Stage("bottom", (others[0],))
    return top, Stage("ground", ())


def drive_path(result: "GroupResult", circuit: "Circuit") -> tuple[Stage, ...]:
    """The group's drive path, top to bottom (see the module docstring)."""
    top, bottom = _ends(result)
    stages = [top]
    setter = result.group.setter
    transistor, emitter = _transistor_stages(result, circuit)
    setter_stage = ([_resistor_stage(result, setter)]
                    if any(r.ref == setter for r in result.resistors) and setter not in emitter
                    else [])
    if result.group.topology in _ABOVE_LEDS:
        stages += transistor + setter_stage + [_led_stage(result)]
    else:
        stages += setter_stage + [_led_stage(result)] + transistor
    return tuple(stages + [bottom])


def _schemdraw():
    import matplotlib

    matplotlib.use("Agg")
    import schemdraw
    import schemdraw.elements as elm

    return schemdraw, elm


def schematic_svg(stages: tuple[Stage, ...], prefix: str) -> str:
    """The drive path drawn as inline SVG (ids prefixed with ``prefix``)."""
    from linter.report.html_draw import draw_stages

    schemdraw, elm = _schemdraw()
    drawing = schemdraw.Drawing(canvas="svg", show=False)
    drawing.config(unit=1.8, fontsize=10, lw=1.1, font="sans-serif")
    draw_stages(drawing, elm, stages, label_markup)
    return inline_svg(drawing.get_imagedata("svg").decode("utf-8"), prefix)
