"""An NPN current sink to replace a marginal resistor below an LED string.

The circuit (common practice): a divider R_top/R_bottom from a reference supply sets the
base; the emitter resistor R_e to ground sets the current; the LED string hangs between the
rail and the collector. With the divider as its Thevenin equivalent (V_th, R_th):

    I_c = β/(β + 1) · (V_th − V_be) / (R_e + R_th/(β + 1))        (A; V in V, R in Ω)

which rises with β towards (V_th − V_be)/R_e, so choosing R_e ≥ (V_th − V_be)/I_target keeps
the nominal current at or below the target for every β. The sink regulates while
V_ce ≥ V_ce(sat), i.e. for rails at or above rail_min = ΣVf(max) + I_e·R_e + V_ce(sat).
"""

from __future__ import annotations

import itertools
import math
from dataclasses import replace
from functools import lru_cache
from typing import Iterable

import numpy as np

from linter import eseries
from linter.partdata import BjtData
from linter.records import record
from linter.units import format_si

__all__ = ["GENERIC_NPN", "SinkDesign", "SinkSearch", "sink_design", "sink_search",
           "rail_for_sink", "collector_current", "current_ratio"]

GENERIC_NPN = BjtData(polarity="npn", hfe_min=100.0, hfe_typ=200.0, vbe=0.7, vce_sat=0.2,
                      assumed=("hfe_min", "hfe_typ", "vbe", "vce_sat"),
                      note="generic small-signal NPN (from memory)")
"""Figures for a transistor the designer has yet to choose (from memory: small-signal NPN)."""

VBE_SPREAD_V = 0.1
"""± V around the typical Vbe over parts and ambient (from memory, about −2 mV/K × 50 K)."""
EMITTER_V_PREFERRED = (1.0, 2.0)
"""Emitter voltage window in V (common practice: well above the Vbe spread, little waste)."""
EMITTER_V_FLOOR = 0.5
"""Lowest emitter voltage in V the design accepts when headroom is short (5× the Vbe spread)."""
DIVIDER_TO_BASE_CURRENT = 10.0
"""Divider current at least this multiple of the worst-case base current (common practice)."""
DIVIDER_RATIO_SLACK = 0.03
"""Relative error of V_th accepted in favour of values from a coarser series (E6, E12)."""


def collector_current(v_th: float, r_th: float, vbe: float, r_e: float, beta: float) -> float:
    """I_c = β/(β + 1)·(V_th − V_be)/(R_e + R_th/(β + 1)) in A; β = inf gives (V_th − V_be)/R_e.

    >>> round(collector_current(2.5, 0.0, 0.7, 90.0, math.inf), 6)
    0.02
    """
    alpha = 1.0 if math.isinf(beta) else beta / (beta + 1)
    r_base = 0.0 if math.isinf(beta) else r_th / (beta + 1)
    return max(0.0, alpha * (v_th - vbe) / (r_e + r_base))


def rail_for_sink(vf_string_max: float, v_emitter: float, vce_sat: float) -> float:
    """Lowest rail (V) that keeps the sink in regulation: ΣVf(max) + V_e + V_ce(sat).

    >>> rail_for_sink(8.0, 1.8, 0.2)
    10.0
    """
    return vf_string_max + v_emitter + vce_sat


@record
class SinkDesign:
    """A designed NPN sink. Resistances in Ω, voltages in V, currents in A, powers in W.

    ``v_emitter`` is nominal; ``v_emitter_max`` and ``rail_min_v`` are at the high-current
    corner. ``transistor_power_w`` is the worst case at ``rail_max_v``; ``regulates`` says
    whether the rail's minimum reaches ``rail_min_v``. ``assumed`` names generic figures.
    """

    reference_name: str
    v_reference: float
    r_top: float
    r_bottom: float
    r_emitter: float
    series: str
    v_base: float
    r_base: float
    v_emitter: float
    v_emitter_max: float
    current_nom_a: float
    current_min_a: float
    current_max_a: float
    divider_current_a: float
    base_current_max_a: float
    rail_max_v: float
    rail_min_v: float
    regulates: bool
    transistor_power_w: float
    emitter_power_w: float
    assumed: tuple[str, ...] = ()

    @property
    def text(self) -> str:
        """One line a hardware engineer can act on."""
        return (f"NPN sink: divider {format_si(self.r_top, 'Ω')}/{format_si(self.r_bottom, 'Ω')} "
                f"from {self.reference_name}, emitter {format_si(self.r_emitter, 'Ω')} "
                f"({self.series}), {format_si(self.current_nom_a, 'A')}, Q dissipates "
                f"{format_si(self.transistor_power_w, 'W')} at {self.rail_max_v:.3g} V; "
                f"needs rail ≥ {self.rail_min_v:.3g} V")


def _emitter_target(v_reference: float, headroom_v: float, vbe: float) -> float:
    """Emitter voltage to aim for (V): half the reference less Vbe, in the preferred window,
    no higher than the headroom allows, never below the floor."""
    low, high = EMITTER_V_PREFERRED
    wanted = min(max(v_reference / 2 - vbe, low), high)
    return max(min(wanted, headroom_v), EMITTER_V_FLOOR)


@lru_cache(maxsize=1024)
def _coarseness(ohms: float) -> int:
    """0 for an E6 value, 1 for E12, 2 for E24: coarser series are easier to stock.
    Remembered by value (a divider grid asks the same E24 values again and again)."""
    for rank, series in enumerate(("E6", "E12")):
        if eseries.is_standard(ohms, series):
            return rank
    return 2


def _divider_pairs(r_total_max: float) -> Iterable[tuple[float, float]]:
    """(R_top, R_bottom) pairs of E24 values, each between R_total_max/100 and R_total_max."""
    values = eseries.values_between("E24", r_total_max / 100, r_total_max)
    return ((top, bottom) for top in values for bottom in values if top + bottom <= r_total_max)


def _choose_divider(v_reference: float, v_th_target: float,
                    r_total_max: float) -> tuple[float, float] | None:
    """The E24 divider closest to ``v_th_target``, preferring coarse series, then larger totals.

    :func:`_choose_divider_plain` worked out on arrays: each pair's error is the same
    IEEE-754 operations in the same order (V·R_b, divided by R_t + R_b, less the target,
    magnitude, divided by the target), so the same double; the pairs are met in the same
    order (R_t, then R_b, ascending) and the first best is kept, as ``min`` keeps it (a
    stable sort on the same key), so the same pair (tests compare the two)."""
    grid = _divider_grid(r_total_max)
    if grid is None:
        return None
    values, bottoms, totals, fits, coarseness = grid
    errors = np.abs(v_reference * bottoms / totals - v_th_target) / v_th_target
    limit = max(float(errors[fits].min()), DIVIDER_RATIO_SLACK)
    rows, columns = np.nonzero(fits & (errors <= limit))  # row-major: R_t outer, R_b inner
    order = np.lexsort((errors[rows, columns], -totals[rows, columns],
                        np.maximum(coarseness[rows], coarseness[columns])))
    best = order[0]
    return values[int(rows[best])], values[int(columns[best])]


@lru_cache(maxsize=64)
def _divider_grid(r_total_max: float) -> tuple | None:
    """(the E24 values between R_total_max/100 and R_total_max, as floats; the same as a
    row of R_b; the R_t + R_b table; which totals fit under R_total_max; each value's
    :func:`_coarseness`), or None when no pair fits. Read only."""
    values = eseries.values_between("E24", r_total_max / 100, r_total_max)
    if not values:
        return None
    series = np.array(values, dtype=float)
    bottoms = series[np.newaxis, :]
    totals = series[:, np.newaxis] + bottoms
    fits = totals <= r_total_max
    if not fits.any():
        return None
    coarseness = np.array([_coarseness(value) for value in values])
    for array in (bottoms, totals, fits, coarseness):
        array.flags.writeable = False
    return values, bottoms, totals, fits, coarseness


def _choose_divider_plain(v_reference: float, v_th_target: float,
                          r_total_max: float) -> tuple[float, float] | None:
    """:func:`_choose_divider`, pair by pair (the plain path)."""
    def error(pair: tuple[float, float]) -> float:
        top, bottom = pair
        return abs(v_reference * bottom / (top + bottom) - v_th_target) / v_th_target

    pairs = list(_divider_pairs(r_total_max))
    if not pairs:
        return None
    errors = [error(pair) for pair in pairs]  # each pair's error worked out once
    limit = max(min(errors), DIVIDER_RATIO_SLACK)
    good = [(pair, e) for pair, e in zip(pairs, errors) if e <= limit]
    chosen = min(good, key=lambda item: (max(_coarseness(item[0][0]), _coarseness(item[0][1])),
                                          -sum(item[0]), item[1]))
    return chosen[0]


def _thevenin(v_reference: float, top: float, bottom: float) -> tuple[float, float]:
    """(V_th, R_th) of a divider: V_th = V·R_b/(R_t + R_b), R_th = R_t·R_b/(R_t + R_b)."""
    return v_reference * bottom / (top + bottom), top * bottom / (top + bottom)


_FIGURES: dict[int, tuple[BjtData | None, tuple[BjtData, tuple[str, ...]]]] = {}
_FIGURES_KEPT = 256
"""Transistor records whose :func:`_figures` are kept (by identity; records are frozen)."""


def _figures(transistor: BjtData | None) -> tuple[BjtData, tuple[str, ...]]:
    """:func:`_figures_plain` of the record, worked out once per record object (a sink
    search designs several sinks with one transistor; the answer is read only)."""
    entry = _FIGURES.get(id(transistor))
    if entry is not None and entry[0] is transistor:
        return entry[1]
    answer = _figures_plain(transistor)
    if len(_FIGURES) >= _FIGURES_KEPT:
        _FIGURES.clear()
    _FIGURES[id(transistor)] = (transistor, answer)
    return answer


def _figures_plain(transistor: BjtData | None) -> tuple[BjtData, tuple[str, ...]]:
    """The transistor's figures, generic ones filling the gaps; and the names filled."""
    given = transistor or GENERIC_NPN
    if given.polarity != "npn":
        raise ValueError(f"a sink below the LEDs needs an NPN, got a {given.polarity}")
    filled = {name: getattr(GENERIC_NPN, name) for name in ("hfe_min", "hfe_typ", "vbe", "vce_sat")
              if getattr(given, name) is None}
    assumed = tuple(sorted(set(given.assumed) | set(filled))) if transistor else GENERIC_NPN.assumed
    given = replace(given, **filled)
    if given.hfe_typ < given.hfe_min:  # type: ignore[operator]
        given = replace(given, hfe_typ=given.hfe_min)
    return given, assumed


def _corner(v_ref: float, top: float, bottom: float, r_e: float, vbe: float,
            beta: float) -> tuple[float, float]:
    """(I_c, V_e) at one corner: V_e = I_e·R_e with I_e = I_c·(β + 1)/β."""
    v_th, r_th = _thevenin(v_ref, top, bottom)
    i_c = collector_current(v_th, r_th, vbe, r_e, beta)
    i_e = i_c if math.isinf(beta) else i_c * (beta + 1) / beta
    return i_c, i_e * r_e


def sink_design(v_rail_min: float, vf_string_max: float, i_target: float, v_ref_source: float,
                *, v_rail_max: float | None = None, vf_string_min: float | None = None,
                reference_name: str = "the reference", reference_tolerance: float = 0.0,
                transistor: BjtData | None = None,
                resistor_tolerance: float = 0.05,
                v_emitter: float | None = None) -> SinkDesign | None:
    """Design an NPN sink that sets ``i_target`` (A) through a string of ΣVf ``vf_string_max`` (V).

    Steps: aim the emitter at V_e ≈ V_ref/2 − V_be, held to 1–2 V and to the headroom
    V_rail,min − ΣVf(max) − V_ce(sat) (never below 0.5 V); pick an E24 divider from
    ``v_ref_source`` (V) for V_th = V_e + V_be whose current is ≥ 10 × I_target/β_min;
    take R_e as the series value at or above (V_th − V_be)/I_target, so the nominal current
    stays at or below the target for any β. Corners: reference ±``reference_tolerance``,
    resistors ±``resistor_tolerance`` (divider and R_e), V_be ± 0.1 V, β from β_min
    (minimum current) to unbounded (maximum). Transistor dissipation is the worst case
    (V_rail,max − ΣVf(min) − V_e)·I_c at the rail maximum. ``transistor`` figures missing
    are taken from :data:`GENERIC_NPN` and named in ``assumed``.

    ``v_emitter`` (V), when given, is the emitter voltage aimed at instead.

    Returns None when the reference at its minimum cannot lift the emitter to its target
    (V_ref·(1 − tol) ≤ V_be + V_e) or no divider fits.
    """
    if not i_target > 0:
        raise ValueError(f"target current must be positive, got {i_target!r} A")
    npn, assumed = _figures(transistor)
    vbe, vce_sat = float(npn.vbe), float(npn.vce_sat)  # type: ignore[arg-type]
    v_rail_max = v_rail_min if v_rail_max is None else v_rail_max
    vf_string_min = vf_string_max if vf_string_min is None else vf_string_min
    v_e = (_emitter_target(v_ref_source, v_rail_min - vf_string_max - vce_sat, vbe)
           if v_emitter is None else v_emitter)
    if v_ref_source * (1 - reference_tolerance) <= vbe + v_e:
        return None
    hfe_min = float(npn.hfe_min)  # type: ignore[arg-type]
    r_total_max = v_ref_source * hfe_min / (DIVIDER_TO_BASE_CURRENT * i_target)
    divider = _choose_divider(v_ref_source, v_e + vbe, r_total_max)
    if divider is None:
        return None
    series = eseries.series_for_tolerance(resistor_tolerance)
    top, bottom = divider
    v_th, r_th = _thevenin(v_ref_source, top, bottom)
    r_e = eseries.above((v_th - vbe) / i_target, series)
    return _evaluate(npn, assumed, v_ref_source, reference_name, reference_tolerance,
                     resistor_tolerance, series, top, bottom, r_e,
                     (v_rail_min, v_rail_max, vf_string_min, vf_string_max))


EMITTER_V_STEP = 0.25
"""Step (V) of the emitter voltages :func:`sink_search` tries above the preferred one."""
SEARCH_TOLERANCE = 0.01
"""The resistor tolerance (fraction; E96) :func:`sink_search` tries after the given one."""


def current_ratio(design: SinkDesign) -> float:
    """The sink's current swing over its corners, I_max/I_min (inf when I_min is 0)."""
    low = design.current_min_a
    return math.inf if not low > 0 else design.current_max_a / low


@record
class SinkSearch:
    """What :func:`sink_search` found: ``design`` the first sink tried whose swing
    (:func:`current_ratio`) is within the limit, or None; ``preferred`` the sink at the
    preferred emitter voltage and the given resistor tolerance (:func:`sink_design`'s); and
    ``best_ratio``, the smallest swing among the sinks tried (inf when none could be
    designed)."""

    design: SinkDesign | None
    preferred: SinkDesign | None
    best_ratio: float


def sink_search(ratio_limit: float, v_rail_min: float, vf_string_max: float,
                i_target: float, v_ref_source: float, *, v_rail_max: float | None = None,
                vf_string_min: float | None = None, reference_name: str = "the reference",
                reference_tolerance: float = 0.0, transistor: BjtData | None = None,
                resistor_tolerance: float = 0.05) -> SinkSearch:
    """A sink (:func:`sink_design`) whose current swings at most ``ratio_limit`` (I_max/I_min)
    over its corners.

    Why the preferred sink may swing more: I_e = (V_b − V_be)/R_e, and at the low corner
    V_b is down by the reference's and the divider's tolerance while V_be is up by
    ±0.1 V, the opposite at the high corner; with 1.8 V on the emitter the V_be spread
    alone moves the current by about ±6 %, and a ±5 % reference and ±5 % resistors add
    about ±10 % on V_b and ±5 % on R_e. A higher emitter voltage shrinks the V_be share,
    and a divider closer to the reference (V_b/V_ref near 1) and tighter resistors shrink
    the rest.

    Tried in order, the first within the limit kept: for the given resistor tolerance, then
    1 % (E96) when the given one is looser, the preferred emitter voltage and then every
    :data:`EMITTER_V_STEP` above it, up to the headroom V_rail,min − ΣVf(max) − V_ce(sat)
    (a higher emitter would leave regulation sooner than the preferred sink) while the
    reference at its minimum still lifts the base above V_be + V_e; a sink above the
    preferred emitter voltage that no longer regulates at the rail minimum (its emitter at
    the high-current corner takes the headroom) ends the climb for that tolerance and is
    not offered.
    """
    npn, _ = _figures(transistor)
    vbe, vce_sat = float(npn.vbe), float(npn.vce_sat)  # type: ignore[arg-type]
    headroom = v_rail_min - vf_string_max - vce_sat
    preferred_v = _emitter_target(v_ref_source, headroom, vbe)
    ceiling = min(headroom, v_ref_source * (1 - reference_tolerance) - vbe)
    tolerances = [resistor_tolerance]
    if resistor_tolerance > SEARCH_TOLERANCE:
        tolerances.append(SEARCH_TOLERANCE)

    def design(tolerance: float, v_e: float | None) -> SinkDesign | None:
        return sink_design(v_rail_min, vf_string_max, i_target, v_ref_source,
                           v_rail_max=v_rail_max, vf_string_min=vf_string_min,
                           reference_name=reference_name,
                           reference_tolerance=reference_tolerance, transistor=transistor,
                           resistor_tolerance=tolerance, v_emitter=v_e)

    preferred = design(resistor_tolerance, None)
    best = math.inf
    for tolerance in tolerances:
        for step in itertools.count():
            v_e = preferred_v + step * EMITTER_V_STEP
            if step and v_e >= ceiling:
                break
            tried = (preferred if step == 0 and tolerance == resistor_tolerance
                     else design(tolerance, None if step == 0 else v_e))
            if tried is None:
                continue
            if step and not tried.regulates:  # higher emitters leave regulation sooner
                break
            ratio = current_ratio(tried)
            best = min(best, ratio)
            if ratio <= ratio_limit:
                return SinkSearch(tried, preferred, best)
    return SinkSearch(None, preferred, best)


def _evaluate(npn: BjtData, assumed: tuple[str, ...], v_ref: float, reference_name: str,
              ref_tol: float, r_tol: float, series: str, top: float, bottom: float, r_e: float,
              string: tuple[float, float, float, float]) -> SinkDesign:
    """Currents, emitter voltages, dissipation and minimum rail of a chosen sink at its corners."""
    v_rail_min, v_rail_max, vf_min, vf_max = string
    vbe, vce_sat = float(npn.vbe), float(npn.vce_sat)  # type: ignore[arg-type]
    hfe_min, hfe_typ = float(npn.hfe_min), float(npn.hfe_typ)  # type: ignore[arg-type]
    i_nom, v_e = _corner(v_ref, top, bottom, r_e, vbe, hfe_typ)
    i_max, v_e_max = _corner(v_ref * (1 + ref_tol), top * (1 - r_tol), bottom * (1 + r_tol),
                             r_e * (1 - r_tol), vbe - VBE_SPREAD_V, math.inf)
    i_min, _ = _corner(v_ref * (1 - ref_tol), top * (1 + r_tol), bottom * (1 - r_tol),
                       r_e * (1 + r_tol), vbe + VBE_SPREAD_V, hfe_min)
    v_th, r_th = _thevenin(v_ref, top, bottom)
    power = max(max(0.0, v_rail_max - vf_min - ve) * i
                for i, ve in ((i_nom, v_e), (i_max, v_e_max)))
    rail_min = rail_for_sink(vf_max, v_e_max, vce_sat)
    return SinkDesign(
        reference_name=reference_name, v_reference=v_ref, r_top=top, r_bottom=bottom,
        r_emitter=r_e, series=series, v_base=v_th, r_base=r_th, v_emitter=v_e,
        v_emitter_max=v_e_max, current_nom_a=i_nom, current_min_a=i_min, current_max_a=i_max,
        divider_current_a=v_ref / (top + bottom), base_current_max_a=i_max / hfe_min,
        rail_max_v=v_rail_max, rail_min_v=rail_min, regulates=v_rail_min >= rail_min,
        transistor_power_w=power, emitter_power_w=v_e_max * i_max, assumed=assumed)
