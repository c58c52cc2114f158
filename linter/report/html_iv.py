"""What the I–V plot of an LED group shows, computed without drawing anything.

For the LED with the highest worst-case current, the plot shows the curve of its series string
(the voltage across the string against the current through it) at three corners — nominal,
the corner of the highest current and the corner of the lowest — with the operating point
of each, and, where the current is set by resistance alone, the load line of each corner.

Curves are the solver's own (:func:`linter.netbuild.build_model`): each LED is
V = n·Vt·ln(I/Is + 1) + I·Rs (Shockley with series resistance, :mod:`linter.devices`) with
the Is of its Vf bin at that corner (``vf_min``/``vf_typ``/``vf_max``), shifted by
``tempco · (T − 25 °C)`` for the corner's ambient. A string's voltage is the sum over its LEDs.

Load line (Ohm): V_string = V_drive − I·R, with V_drive the group's rail at the corner and R
the resistors and pin output resistances in the loop at the corner's tolerance levels; for
LEDs in parallel on one resistor, V = V_drive − N·I·R (N equal shares, nominal only). A load
line is offered only where it reproduces the solver's nominal current (within
:data:`LOAD_LINE_MATCH`); otherwise the plot says why it has none.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Mapping, Sequence

import numpy as np

from linter.devices import T_REF_C, LedCurve, led_voltage, shifted_is

if TYPE_CHECKING:
    from linter.corners import Corner
    from linter.model import Circuit
    from linter.partdata import PartDataMap, Rail
    from linter.results import GroupResult, LedResult

__all__ = ["LOAD_LINE_MATCH", "SIMPLE_LOOPS", "OperatingPoint", "LoadLine", "IvData",
           "string_voltage", "iv_data"]

LOAD_LINE_MATCH: float = 0.01
"""Largest relative difference between the load-line intersection and the solver's nominal
current for the line to be drawn (1 %)."""

SIMPLE_LOOPS: frozenset[str] = frozenset(
    {"resistor", "string", "pin-source", "pin-sink", "pin-bicolour", "parallel"})
"""Topologies whose current is set by resistance alone (no transistor in the loop)."""

_RESISTOR_LEVEL = {"low": -1.0, "nom": 0.0, "high": 1.0}


@dataclass(frozen=True)
class OperatingPoint:
    """One corner's point: ``role`` (``nominal``, ``highest``, ``lowest``), the corner (None
    at nominal), current (A), the voltage across the string there (V) and the string's curve
    at that corner as arrays (V, A)."""

    role: str
    corner: "Corner | None"
    current: float
    voltage: float
    curve_v: np.ndarray
    curve_i: np.ndarray


@dataclass(frozen=True)
class LoadLine:
    """V = ``drive_v`` − I·``ohms`` (V, Ω) for the corner of ``role``."""

    role: str
    drive_v: float
    ohms: float


@dataclass(frozen=True)
class IvData:
    """Everything the plot draws for one group (SI units)."""

    led: str
    string: tuple[str, ...]
    points: tuple[OperatingPoint, ...]
    load_lines: tuple[LoadLine, ...]
    if_max: float | None
    note: str | None


def _led_is(curve: LedCurve, vf_bin: str, ambient_c: float) -> float:
    """Is (A) of ``curve`` in ``vf_bin`` at ``ambient_c`` (the solver's temperature shift)."""
    base = {"vf_min": curve.is_min_vf, "vf_max": curve.is_max_vf}.get(vf_bin, curve.is_typ)
    return float(shifted_is(base, curve.tempco * (ambient_c - T_REF_C), curve.ideality))


def string_voltage(current: np.ndarray | float, curves: Sequence[LedCurve],
                   bins: Sequence[str], ambient_c: float) -> np.ndarray:
    """V across LEDs in series at ``current`` (A): Σ n·Vt·ln(I/Is + 1) + I·Rs."""
    total = np.zeros_like(np.asarray(current, dtype=float))
    for curve, vf_bin in zip(curves, bins):
        i_s = _led_is(curve, vf_bin, ambient_c)
        total = total + led_voltage(current, i_s, curve.ideality, curve.rs)
    return total


def _worst_led(result: "GroupResult") -> "LedResult":
    """The LED with the highest worst-case current (first in group order on ties)."""
    return max(result.leds, key=lambda led: led.current.max)


def _string_of(result: "GroupResult", ref: str) -> tuple[str, ...]:
    for string in result.group.strings:
        if ref in string:
            return tuple(string)
    return (ref,)


def _point(role: str, corner: "Corner | None", current: float, string: tuple[str, ...],
           curves: Mapping[str, LedCurve], i_top: float) -> OperatingPoint:
    bins = [corner.vf.get(ref, "vf_typ") if corner else "vf_typ" for ref in string]
    ambient = corner.ambient_c if corner else T_REF_C
    chain = [curves[ref] for ref in string]
    grid = np.linspace(0.0, i_top, 121)[1:]
    return OperatingPoint(role, corner, current,
                          float(string_voltage(current, chain, bins, ambient)),
                          string_voltage(grid, chain, bins, ambient), grid)


def _loop_ohms(resistors: Sequence, corner: "Corner | None") -> float:
    """Ω of the loop's resistors (parts at the corner's level, pin output resistances)."""
    total = 0.0
    for spec in resistors:
        level = _RESISTOR_LEVEL.get(corner.resistors.get(spec.ref, "nom"), 0.0) if corner else 0.0
        total += spec.ohms * (1.0 + level * spec.tolerance)
    return total


def _drive_v(result: "GroupResult", rails: Mapping[str, "Rail"], corner: "Corner | None") -> float:
    rail = rails[result.rail]  # type: ignore[index]
    if corner is not None and result.rail in corner.rails:
        return float(corner.rails[result.rail][1])
    return rail.nom


def _intersection(line: LoadLine, chain: Sequence[LedCurve]) -> float:
    """Current (A) where the nominal string curve meets ``line`` (bisection: the curve rises
    and the line falls with current, so they cross once)."""
    low, high = 0.0, max(line.drive_v / line.ohms, 1e-9)
    bins = ["vf_typ"] * len(chain)
    for _ in range(80):
        middle = 0.5 * (low + high)
        if float(string_voltage(middle, chain, bins, T_REF_C)) < line.drive_v - middle * line.ohms:
            low = middle
        else:
            high = middle
    return 0.5 * (low + high)


def _load_lines(result: "GroupResult", model, rails: Mapping[str, "Rail"],
                points: Sequence[OperatingPoint], chain: Sequence[LedCurve]
                ) -> tuple[tuple[LoadLine, ...], str | None]:
    """The load line of each corner, or none and the reason (see the module docstring)."""
    topology = result.group.topology
    switches = [spec.ref for spec in (*model.bjts, *model.mosfets)]
    if switches:
        return (), (f"no load line: {', '.join(switches)} in the current path, so the current"
                    " is not set by a resistance alone")
    if topology not in SIMPLE_LOOPS:
        return (), f"no load line: a {topology} group's current is not set by a resistance"
    if result.rail not in rails:
        return (), "no load line: the rail voltage is unknown"
    resistors = [spec for spec in model.resistors if spec.role in ("part", "pin")]
    share = len(result.group.strings) if topology == "parallel" else 1
    lines = [LoadLine(p.role, _drive_v(result, rails, p.corner), _loop_ohms(resistors, p.corner)
                      * share) for p in points if share == 1 or p.role == "nominal"]
    solved = _intersection(lines[0], chain)
    nominal_current = points[0].current
    if abs(solved - nominal_current) > LOAD_LINE_MATCH * nominal_current:
        return (), "no load line: this drive path is not a single resistive loop from the rail"
    note = (f"load line for {share} equal shares of the shared resistor (nominal)"
            if share > 1 else None)
    return tuple(lines), note


def iv_data(result: "GroupResult", circuit: "Circuit", part_data: "PartDataMap",
            rails: Mapping[str, "Rail"]) -> IvData | None:
    """The plot's data for a solved group, or None when it has no lit LED to plot."""
    from linter.netbuild import ModelGap, build_model

    if result.status != "solved" or not result.leds:
        return None
    try:
        model = build_model(result.group, circuit, part_data, dict(rails))
    except ModelGap:
        return None
    curves = {spec.ref: spec.curve for spec in model.diodes if spec.curve is not None}
    led = _worst_led(result)
    string = tuple(ref for ref in _string_of(result, led.ref) if ref in curves)
    if not string or not np.isfinite(led.current.max) or led.current.max <= 0:
        return None
    data = part_data.get(led.ref)
    if_max = getattr(data, "if_max", None)
    i_top = 1.3 * max(led.current.max, if_max or 0.0)
    points = (_point("nominal", None, led.current.nom, string, curves, i_top),
              _point("highest", led.current.at_max, led.current.max, string, curves, i_top),
              _point("lowest", led.current.at_min, led.current.min, string, curves, i_top))
    lines, note = _load_lines(result, model, rails, points, [curves[ref] for ref in string])
    return IvData(led.ref, string, points, lines, if_max, note)
