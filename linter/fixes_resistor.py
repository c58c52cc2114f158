"""Series resistors for LEDs: the standard value that keeps the worst-case current in bounds.

The model is the straight line of an LED on a resistor: I = (V − ΣVf)/(R + R_s), with V the
rail (V), ΣVf the sum of forward voltages of the string (V), R the resistor (Ω) and R_s any
other series resistance such as a pin's output resistance (Ω). The resistor's own tolerance t
moves R between R·(1 − t) and R·(1 + t). Where the real diode curve matters, the ``_solved``
variant takes the solver as a callable instead.
"""

from __future__ import annotations

import math
from typing import Callable

from linter import eseries
from linter.records import record
from linter.units import format_si

__all__ = [
    "ResistorChoice",
    "PerLedFix",
    "line_current",
    "resistor_for_current",
    "resistor_for_current_solved",
    "per_led_resistors",
    "rail_for_resistor",
    "SERIES_STEP",
]

CurrentFunction = Callable[[float], tuple[float, float, float]]
"""R (Ω) → (i_nom, i_min, i_max) in A, as the solver computes them for that resistor."""

SERIES_STEP = 1.001
"""Ratio (dimensionless) that moves past a series value to reach its neighbour (E192 steps ≈ 1.2 %)."""

_STEP = SERIES_STEP


_RATIO_SLACK = 1e-9
"""Relative margin (dimensionless) below which the swing limit counts as unreachable."""


@record
class ResistorChoice:
    """A standard resistor and the currents it gives (A); nom/min None when not computed."""

    ohms: float
    series: str
    tolerance: float
    current_max_a: float
    current_nom_a: float | None = None
    current_min_a: float | None = None

    @property
    def text(self) -> str:
        """``"160 Ω (E24, 5 %): 18.8 mA nominal, 15.9–19.7 mA worst case"``."""
        head = f"{format_si(self.ohms, 'Ω')} ({self.series}, {_percent(self.tolerance)})"
        if self.current_nom_a is None:
            return f"{head}: at most {format_si(self.current_max_a, 'A')}"
        low = "" if self.current_min_a is None else f"{format_si(self.current_min_a, 'A')}–"
        return (f"{head}: {format_si(self.current_nom_a, 'A')} nominal, "
                f"{low}{format_si(self.current_max_a, 'A')} worst case")


def _percent(fraction: float) -> str:
    return f"{fraction * 100:g} %"


def line_current(v_rail: float, vf_sum: float, ohms: float, r_series: float = 0.0) -> float:
    """I = max(0, (V − ΣVf)/(R + R_s)) in A (V in V, R in Ω).

    >>> round(line_current(5.0, 2.0, 150.0), 6)
    0.02
    """
    total = ohms + r_series
    if total <= 0:
        raise ValueError(f"series resistance must be positive, got {total!r} Ω")
    return max(0.0, (v_rail - vf_sum) / total)


def _series_for(series: str | None, tolerance: float) -> str:
    if series is not None:
        return series
    return eseries.series_for_tolerance(tolerance)


def resistor_for_current(v_rail_max: float, vf_sum_min: float, i_target_max: float,
                         series: str | None = None, tolerance: float = 0.05, *,
                         r_series: float = 0.0, v_nom: float | None = None,
                         v_min: float | None = None, vf_sum_typ: float | None = None,
                         vf_sum_max: float | None = None) -> ResistorChoice | None:
    """The smallest standard resistor whose worst-case maximum current is at most the target.

    Worst case is the highest rail, the lowest forward voltages and the resistor at the low
    end of its tolerance: I_max = (V_max − ΣVf_min)/(R·(1 − t) + R_s) ≤ I_target gives
    R ≥ R_min = (V_max − ΣVf_min − I_target·R_s)/(I_target·(1 − t)); the answer is the
    series value at or above R_min (V in V, I in A, R in Ω, t a fraction). The series is the
    one made at ``tolerance`` unless given.

    The nominal current (v_nom, vf_sum_typ, R) and the minimum (v_min, vf_sum_max,
    R·(1 + t)) are filled in when their inputs are given.

    Returns None when V_max − ΣVf_min ≤ I_target·R_s: the current cannot reach the target
    even without a resistor, so no value limits it.

    >>> resistor_for_current(5.0, 2.0, 0.02, "E24", 0.0).ohms
    150.0
    """
    if not i_target_max > 0:
        raise ValueError(f"target current must be positive, got {i_target_max!r} A")
    if not 0 <= tolerance < 1:
        raise ValueError(f"tolerance must be a fraction in [0, 1), got {tolerance!r}")
    series = _series_for(series, tolerance)
    numerator = v_rail_max - vf_sum_min - i_target_max * r_series
    if numerator <= 0:
        return None
    ohms = eseries.above(numerator / (i_target_max * (1 - tolerance)), series)
    i_max = line_current(v_rail_max, vf_sum_min, ohms * (1 - tolerance), r_series)
    i_nom = (None if v_nom is None or vf_sum_typ is None
             else line_current(v_nom, vf_sum_typ, ohms, r_series))
    i_min = (None if v_min is None or vf_sum_max is None
             else line_current(v_min, vf_sum_max, ohms * (1 + tolerance), r_series))
    return ResistorChoice(ohms, series, tolerance, i_max, i_nom, i_min)


def resistor_for_current_solved(current: CurrentFunction, i_target_max: float, r_start: float,
                                series: str | None = None, tolerance: float = 0.05,
                                max_steps: int = 400) -> ResistorChoice | None:
    """The smallest standard resistor for which the solver's worst-case current is at most the target.

    ``current(R)`` returns (i_nom, i_min, i_max) in A for a resistor of R Ω (the caller's
    solver, including tolerance corners). The search starts at the series value at or
    above ``r_start`` (Ω, e.g. the analytic R_min of :func:`resistor_for_current`), climbs
    the series until i_max ≤ I_target, then steps down while the next lower value still
    meets it. Assumes i_max falls as R rises. None when ``max_steps`` values do not suffice.
    """
    if not i_target_max > 0:
        raise ValueError(f"target current must be positive, got {i_target_max!r} A")
    series = _series_for(series, tolerance)
    ohms = eseries.above(r_start, series)
    result = current(ohms)
    steps = 0
    while result[2] > i_target_max:
        steps += 1
        if steps > max_steps:
            return None
        ohms = eseries.above(ohms * _STEP, series)
        result = current(ohms)
    while steps < max_steps:
        steps += 1
        lower = eseries.below(ohms / _STEP, series)
        lower_result = current(lower)
        if lower_result[2] > i_target_max:
            break
        ohms, result = lower, lower_result
    i_nom, i_min, i_max = result
    return ResistorChoice(ohms, series, tolerance, i_max, i_nom, i_min)


@record
class PerLedFix:
    """Replace a shared resistor by ``count`` resistors, one per LED (or per string)."""

    count: int
    choice: ResistorChoice

    @property
    def text(self) -> str:
        """``"one resistor per LED: 4 × 160 Ω (E24, 5 %), 18.8 mA each"``."""
        each = self.choice.current_nom_a
        current = format_si(each if each is not None else self.choice.current_max_a, "A")
        qualifier = "each" if each is not None else "at most, each"
        return (f"one resistor per LED: {self.count} × {format_si(self.choice.ohms, 'Ω')} "
                f"({self.choice.series}, {_percent(self.choice.tolerance)}), {current} {qualifier}")


def per_led_resistors(count: int, v_rail_max: float, vf_sum_min: float, i_target_max: float,
                      series: str | None = None, tolerance: float = 0.05, *,
                      r_series: float = 0.0, v_nom: float | None = None,
                      v_min: float | None = None, vf_sum_typ: float | None = None,
                      vf_sum_max: float | None = None) -> PerLedFix | None:
    """The resistor each of ``count`` parallel LEDs (or strings) needs instead of a shared one.

    Each branch gets its own resistor chosen by :func:`resistor_for_current` for one
    branch's forward voltage (ΣVf in V, per branch) and its own target current (A), so the
    branches no longer fight over one current. None as in :func:`resistor_for_current`.
    """
    if count < 1:
        raise ValueError(f"need at least one LED, got {count}")
    choice = resistor_for_current(v_rail_max, vf_sum_min, i_target_max, series, tolerance,
                                  r_series=r_series, v_nom=v_nom, v_min=v_min,
                                  vf_sum_typ=vf_sum_typ, vf_sum_max=vf_sum_max)
    return None if choice is None else PerLedFix(count, choice)


def rail_for_resistor(vf_sum_min: float, vf_sum_max: float, swing_ratio: float = 1.5, *,
                      rail_min_ratio: float = 1.0, rail_max_ratio: float = 1.0,
                      resistor_tolerance: float = 0.0) -> float | None:
    """The lowest nominal rail (V) at which a plain resistor keeps I_max/I_min ≤ ``swing_ratio``.

    With the rail between a·V and b·V (``rail_max_ratio`` a, ``rail_min_ratio`` b, of the
    nominal V) and the resistor within ±t:
    I_max/I_min = (a·V − ΣVf_min)·(1 + t) / ((b·V − ΣVf_max)·(1 − t)) ≤ q gives
    V ≥ (q·(1 − t)·ΣVf_max − (1 + t)·ΣVf_min) / (q·(1 − t)·b − (1 + t)·a).
    The ratio does not depend on R. None when the denominator is ≤ 0: the rail's own
    tolerance swings the current more than q at any voltage.

    >>> rail_for_resistor(8.0, 10.0, 1.5)
    14.0
    """
    q, t, a, b = swing_ratio, resistor_tolerance, rail_max_ratio, rail_min_ratio
    if not (q > 1 and 0 <= t < 1 and 0 < b <= 1 <= a):
        raise ValueError("need swing_ratio > 1, 0 ≤ t < 1, rail_min_ratio ≤ 1 ≤ rail_max_ratio")
    if vf_sum_min > vf_sum_max:
        raise ValueError(f"ΣVf min {vf_sum_min} V above ΣVf max {vf_sum_max} V")
    denominator = q * (1 - t) * b - (1 + t) * a
    if denominator <= _RATIO_SLACK * (1 + t) * a:  # at the limit only an infinite rail works
        return None
    volts = (q * (1 - t) * vf_sum_max - (1 + t) * vf_sum_min) / denominator
    return volts if math.isfinite(volts) else None
