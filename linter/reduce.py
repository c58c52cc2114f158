"""From one group's solved rows to its :class:`~linter.results.GroupResult`.

Input arrays are shaped (S, R, k): scenarios, rows (the C corners first — row 0 nominal —
then the Vf-sensitivity row, then the headroom copies of the corners), element index.
Rows that did not converge are left out of every span and listed.
"""

from __future__ import annotations

import numpy as np

from linter.corners import LEVEL_NAMES, Corner
from linter.netbuild import GroupModel
from linter.partdata import Ambient, Rail
from linter.results import GroupResult, LedResult, PinResult, ResistorResult, Span, TransistorResult

__all__ = ["group_result", "describe_corner"]


def _rails_by_name(model: GroupModel) -> dict[str, Rail]:
    found = {f.rail.name: f.rail for f in model.fixed if f.rail is not None}
    found.update({p.supply.name: p.supply for p in model.pins if p.supply is not None})
    return found


def describe_corner(model: GroupModel, codes: np.ndarray, scenario: int,
                    ambient: Ambient) -> Corner:
    """The corner of code row ``codes`` (A,) in scenario ``scenario``, in words and volts."""
    rails = _rails_by_name(model)
    out: dict[str, dict] = {"rail": {}, "vf": {}, "beta": {}, "resistor": {}}
    temp = ambient.reference
    for axis, code in zip(model.axes, codes.tolist()):
        name = LEVEL_NAMES[axis.kind][code]
        if axis.kind == "ambient":
            temp = {-1: ambient.min, 0: ambient.reference, 1: ambient.max}[code]
        elif axis.kind == "rail":
            rail = rails.get(axis.name)
            volts = {-1: rail.min, 0: rail.nom, 1: rail.max}[code] if rail else float("nan")
            out["rail"][axis.name] = (name, volts)
        else:
            out[axis.kind][axis.name] = name
    return Corner(model.group.scenarios[scenario].name, out["rail"], temp, out["vf"],
                  out["beta"], out["resistor"])


class _Reducer:
    """Spans over masked (S, C) value grids, with corners described lazily."""

    def __init__(self, model: GroupModel, out: dict, codes: np.ndarray, corners: int,
                 ambient: Ambient) -> None:
        self.model, self.out, self.codes, self.c, self.ambient = model, out, codes, corners, ambient
        self.ok = out["converged"][:, :corners, 0].astype(bool)
        self.described: dict[tuple[int, int], Corner] = {}

    def corner(self, s: int, c: int) -> Corner:
        """The Corner of row (s, c), described once per group."""
        found = self.described.get((s, c))
        if found is None:
            found = self.described[(s, c)] = describe_corner(self.model, self.codes[c], s,
                                                             self.ambient)
        return found

    def span(self, values: np.ndarray, scenarios: np.ndarray | None = None,
             nominal_scenario: int | None = None) -> Span:
        """Span of values (S, C) over the converged rows of ``scenarios`` (mask (S,))."""
        mask = self.ok.copy()
        if scenarios is not None and scenarios.any():
            mask &= scenarios[:, None]
        if not mask.any():
            nan = float("nan")
            return Span(nan, nan, nan)
        if nominal_scenario is None:
            nominal = np.where(mask[:, 0], values[:, 0], -np.inf)
            nominal_scenario = int(np.argmax(nominal)) if mask[:, 0].any() else 0
        low = np.where(mask, values, np.inf)
        high = np.where(mask, values, -np.inf)
        s_lo, c_lo = np.unravel_index(int(np.argmin(low)), low.shape)
        s_hi, c_hi = np.unravel_index(int(np.argmax(high)), high.shape)
        return Span(float(values[nominal_scenario, 0]), float(low[s_lo, c_lo]),
                    float(high[s_hi, c_hi]), self.corner(int(s_lo), int(c_lo)),
                    self.corner(int(s_hi), int(c_hi)))

    def grid(self, key: str, index: int) -> np.ndarray:
        return self.out[key][:, :self.c, index]


def _led_results(r: _Reducer, probe: float) -> tuple[LedResult, ...]:
    leds = [d for d in r.model.diodes if d.curve is not None]
    results = []
    for i, spec in enumerate(leds):
        lit = r.model.lit[:, i]
        lit_any = lit if lit.any() else np.ones_like(lit)
        first = int(np.argmax(lit_any))
        rev = np.where(r.ok, r.grid("led_rev", i), -np.inf)
        s_rev, c_rev = np.unravel_index(int(np.argmax(rev)), rev.shape)
        nominal = r.out["led_i"][first, 0, i]
        shifted = r.out["led_i"][first, r.c, i]
        results.append(LedResult(
            spec.ref, spec.part_number,
            r.span(r.grid("led_i", i), lit_any, first), r.span(r.grid("led_vf", i), lit_any, first),
            r.span(r.grid("led_p", i), lit_any, first),
            tuple(s.name for s, on in zip(r.model.group.scenarios, lit) if on),
            float(rev[s_rev, c_rev]), r.corner(int(s_rev), int(c_rev)),
            float((shifted - nominal) / probe), spec.curve.assumed))
    return tuple(results)


def _resistor_results(r: _Reducer) -> tuple[ResistorResult, ...]:
    parts = [x for x in r.model.resistors if x.role == "part"]
    return tuple(ResistorResult(x.ref, x.ohms, x.tolerance, r.span(r.grid("res_i", i)),
                                r.span(r.grid("res_p", i)), x.rating_w, x.package)
                 for i, x in enumerate(parts))


def _pin_results(r: _Reducer) -> tuple[PinResult, ...]:
    results = []
    for i, pin in enumerate(r.model.pins):
        signed = r.grid("pin_i", i)
        span = r.span(np.abs(signed))
        at = np.unravel_index(int(np.argmax(np.where(r.ok, np.abs(signed), -1))), signed.shape)
        results.append(PinResult(pin.id, pin.net, span, bool(signed[at] >= 0), pin.current_max))
    return tuple(results)


def _saturation(r: _Reducer, flag: np.ndarray, current: np.ndarray
                ) -> tuple[bool, Corner | None, float | None]:
    """Whether ``flag`` (S, C) holds at a converged row; its lowest-current corner."""
    hit = r.ok & (flag > 0.5)
    if not hit.any():
        return False, None, None
    low = np.where(hit, current, np.inf)
    s, c = np.unravel_index(int(np.argmin(low)), low.shape)
    return True, r.corner(int(s), int(c)), float(low[s, c])


def _top_rail(model: GroupModel) -> tuple[str, int] | None:
    """The highest non-ground rail of the group and its node (None without one)."""
    rails = [(f.rail.nom, f.rail.name, i) for i, f in enumerate(model.fixed)
             if f.kind == "rail" and f.rail is not None and not f.rail.is_ground]
    if not rails:
        return None
    _, name, i = max(rails)
    return name, model.network.n_nodes + i


def _rail_min(r: _Reducer, index: int, vce_sat: float) -> tuple[float | None, Corner | None, str | None]:
    """Lowest rail keeping BJT ``index`` regulating, from the headroom rows.

    In a headroom row the LED string's far end is moved by H volts, so at the same (regulated)
    current Vce is H larger; the margin at the real rail is m = Vce_aux − H − Vce_sat and the
    rail may fall to V_rail − m = ΣVf + Ie·Re + Vce_sat.
    """
    model = r.model
    if model.headroom is None:
        return None, None, None
    from linter.batchsolve import headroom_offset
    node, sign, net = model.headroom
    top = (net, node) if sign > 0 else _top_rail(model)
    if top is None:
        return None, None, None
    name, top_node = top
    aux = slice(r.c + 1, 2 * r.c + 1)
    vce_aux = r.out["q_vce"][:, aux, index]
    rail_v = r.out["v"][:, :r.c, top_node]
    need = rail_v - (vce_aux - headroom_offset(model) - vce_sat)
    aux_ok = r.out["converged"][:, aux, 0].astype(bool) & r.ok
    if not aux_ok.any():
        return None, None, name
    masked = np.where(aux_ok, need, -np.inf)
    s, c = np.unravel_index(int(np.argmax(masked)), masked.shape)
    return float(masked[s, c]), r.corner(int(s), int(c)), name


def _bjt_results(r: _Reducer) -> list[TransistorResult]:
    results = []
    setter = r.model.group.setter
    for i, q in enumerate(r.model.bjts):
        current = r.grid("q_ic", i)
        saturated, at, i_sat = _saturation(r, r.grid("q_sat", i), current)
        regulating = r.model.group.topology in ("npn-sink", "pnp-source") and (
            setter == q.ref or len(r.model.bjts) == 1)
        rail_min, rail_at, rail = _rail_min(r, i, q.vce_sat) if regulating else (None, None, None)
        results.append(TransistorResult(
            q.ref, "npn" if q.polarity > 0 else "pnp", r.span(r.grid("q_vce", i)),
            r.span(current), r.span(r.grid("q_p", i)), saturated, at, i_sat,
            rail_min, rail_at, rail, q.vce_sat))
    return results


def _mosfet_results(r: _Reducer) -> list[TransistorResult]:
    results = []
    for i, m in enumerate(r.model.mosfets):
        current = r.grid("m_id", i)
        limiting = r.grid("m_limit", i) * (current > 1e-6)
        saturated, at, i_sat = _saturation(r, limiting, current)
        results.append(TransistorResult(
            m.ref, "nmos" if m.polarity > 0 else "pmos", r.span(r.grid("m_vds", i)),
            r.span(current), r.span(r.grid("m_p", i)), saturated, at, i_sat,
            vgs=r.span(r.grid("m_vgs", i)), vgs_th=m.vto))
    return results


def group_result(model: GroupModel, out: dict, codes: np.ndarray, corners: int, scheme: str,
                 ambient: Ambient, probe: float, distinct: int | None = None) -> GroupResult:
    """Reduce one group's rows (arrays (S, R, k)) to its result; ``corners`` rows per
    scenario are corners, of which ``distinct`` (default all) differ (the rest repeat the
    nominal corner)."""
    r = _Reducer(model, out, codes, corners, ambient)
    corners = corners if distinct is None else distinct
    if not r.ok.any():
        return GroupResult(model.group, "unsolved", corners=corners, scheme=scheme,
                           notes=model.notes, reason="Newton's method did not converge")
    failed = [r.corner(int(s), int(c)) for s, c in zip(*np.nonzero(~r.ok))][:10]
    top = _top_rail(model)
    rail = top[0] if top else next((p.supply.name for p in model.pins if p.supply), None)
    return GroupResult(
        model.group, "solved", rail, _led_results(r, probe), _resistor_results(r),
        tuple(_bjt_results(r) + _mosfet_results(r)), _pin_results(r), corners, scheme,
        tuple(failed), model.notes)
