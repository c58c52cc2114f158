"""Computed fixes: the values an engineer would change, as pure functions of plain numbers.

Rules call these to turn a finding into a concrete remedy. Each lives in a small module of
its own; this module gathers them so rules import one name:

* :mod:`linter.fixes_resistor`: the standard series resistor for a target current (analytic,
  or by searching the series with the caller's solver), one resistor per LED instead of a
  shared one, and the rail at which a plain resistor regulates well enough;
* :mod:`linter.fixes_rating`: temperature derating of resistors and transistors, and the
  resistor package to buy for a worst-case dissipation;
* :mod:`linter.fixes_sink`: an NPN current sink (divider, emitter resistor, dissipation,
  minimum rail) to replace a marginal resistor.

All quantities are SI floats (V, A, Ω, W, °C for temperatures); each result record has a
``text`` property: one line a hardware engineer can act on.
"""

from __future__ import annotations

from linter.fixes_rating import (
    CHIP_POWER_RATINGS, DEFAULT_DERATING_SHARE, RatingChoice, derated_resistor_rating,
    derated_transistor_rating, derating_factor, resistor_rating,
)
from linter.fixes_resistor import (
    SERIES_STEP, PerLedFix, ResistorChoice, line_current, per_led_resistors, rail_for_resistor,
    resistor_for_current, resistor_for_current_solved,
)
from linter.fixes_sink import (
    GENERIC_NPN, SinkDesign, SinkSearch, collector_current, current_ratio, rail_for_sink,
    sink_design, sink_search,
)

__all__ = [
    "CHIP_POWER_RATINGS", "DEFAULT_DERATING_SHARE", "RatingChoice", "derated_resistor_rating",
    "derated_transistor_rating", "derating_factor", "resistor_rating",
    "SERIES_STEP", "PerLedFix", "ResistorChoice", "line_current", "per_led_resistors",
    "rail_for_resistor",
    "resistor_for_current", "resistor_for_current_solved",
    "GENERIC_NPN", "SinkDesign", "collector_current", "rail_for_sink", "sink_design",
    "SinkSearch", "current_ratio", "sink_search",
]
