"""Solve a batch of group models of one signature at many corners, in one Newton run.

Rows are ordered (group, scenario, corner). :func:`element_params` turns corner codes
(see :mod:`linter.corners`) into element parameters; :func:`run` solves and returns every
quantity the results need as arrays shaped (G, S, C, k).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from linter.devices import VT_REF
from linter.netbuild import HIGH_Z_SIEMENS, GroupModel
from linter.partdata import Ambient
from linter.solve import Params, element_currents, solve

__all__ = ["RowPlan", "element_params", "run", "headroom_offset"]


@dataclass(frozen=True, eq=False)
class RowPlan:
    """Corner rows for a bucket: ``codes`` (G, C, A) levels (integers at corners, any value
    in [−1, 1] for random draws); ``vf_shift`` (C,) V added to
    every LED's curve (sensitivity probe); ``aux`` (C,) True for headroom rows."""

    codes: np.ndarray
    vf_shift: np.ndarray
    aux: np.ndarray


def headroom_offset(model: GroupModel) -> float:
    """V the string end moves in headroom rows: 10 V plus 5 V per LED (ample)."""
    return 10.0 + 5.0 * len(model.diodes)


def _stack(models: list[GroupModel], getter) -> np.ndarray:
    """(G, k) float array of ``getter(model)`` lists."""
    return np.array([getter(m) for m in models], float).reshape(len(models), -1)


def _level(code: np.ndarray, low, mid, high) -> np.ndarray:
    """The value at ``code``: low at −1, mid at 0, high at +1, linear in between (codes may
    be fractional, as in the Monte Carlo check)."""
    return np.where(code < 0, mid + code * (mid - low), mid + code * (high - mid))


def _rail_volts(models, code, getter) -> np.ndarray:
    """(G, C) voltage of a rail picked by ``getter(model) -> Rail`` at ``code`` (G, C)."""
    lo, nom, hi = (_stack(models, lambda m: [getattr(getter(m), k)]) for k in ("min", "nom", "max"))
    return _level(code, lo, nom, hi)


def _fixed(models, plan: RowPlan, temp_shape) -> np.ndarray:
    """(G, S, C, nf) fixed-node voltages."""
    first = models[0]
    g, s, c = temp_shape
    out = np.zeros((g, s, c, len(first.fixed)))
    for f_index, spec in enumerate(first.fixed):
        code = plan.codes[:, :, spec.axis] if spec.axis >= 0 else np.zeros((g, c), np.int8)
        if spec.kind == "pin":
            pin = first.pins[spec.pin]
            if pin.supply is not None:
                supply = _rail_volts(models, code, lambda m, i=f_index: m.fixed[i].rail)
            else:
                supply = _stack(models, lambda m: [m.pins[spec.pin].supply_voltage]) + 0 * code
            high = first.levels[:, spec.pin] > 0
            out[..., f_index] = np.where(high[None, :, None], supply[:, None, :], 0.0)
            continue
        volts = _rail_volts(models, code, lambda m, i=f_index: m.fixed[i].rail)
        if spec.kind == "headroom":
            offset = _stack(models, lambda m: [m.headroom[1] * headroom_offset(m)])
            volts = volts + plan.aux[None, :] * offset
        out[..., f_index] = volts[:, None, :]
    return out


def _resistor_g(models, plan: RowPlan, shape) -> np.ndarray:
    first = models[0]
    g, s, c = shape
    out = np.zeros((g, s, c, len(first.resistors)))
    ohms = _stack(models, lambda m: [r.ohms for r in m.resistors])
    tol = _stack(models, lambda m: [r.tolerance for r in m.resistors])
    for index, spec in enumerate(first.resistors):
        value = np.broadcast_to(ohms[:, index, None], (g, c))
        if spec.axis >= 0:
            value = value * (1.0 + plan.codes[:, :, spec.axis] * tol[:, index, None])
        cond = np.broadcast_to((1.0 / value)[:, None, :], (g, s, c))
        if spec.role == "pin":
            driven = first.levels[:, spec.pin] != 0
            cond = np.where(driven[None, :, None], cond, HIGH_Z_SIEMENS)
        out[..., index] = cond
    return out


def _temperature_rise(plan: RowPlan, ambient: Ambient) -> np.ndarray:
    """(G, C) K above the datasheet reference; axis 0 is always the ambient axis."""
    code = plan.codes[:, :, 0]
    temp = _level(code, ambient.min, ambient.reference, ambient.max)
    return temp - ambient.reference


def _diode_is(models, plan: RowPlan, rise: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(G, C, md) Is after Vf bin, temperature and probe shift; (G, md) n·Vt."""
    first = models[0]
    nvt = _stack(models, lambda m: [d.ideality * VT_REF for d in m.diodes])
    tempco = _stack(models, lambda m: [d.tempco for d in m.diodes])
    is_out = np.zeros(plan.codes.shape[:2] + (len(first.diodes),))
    for index, spec in enumerate(first.diodes):
        if spec.curve is not None:
            lo, mid, hi = (_stack(models, lambda m, k=k: [getattr(m.diodes[index].curve, k)])
                           for k in ("is_min_vf", "is_typ", "is_max_vf"))
            base = np.exp(_level(plan.codes[:, :, spec.axis], np.log(lo), np.log(mid),
                                 np.log(hi)))   # a Vf shift is linear in ln(Is)
            shift = tempco[:, index, None] * rise + plan.vf_shift[None, :]
        else:
            base = _stack(models, lambda m: [m.diodes[index].i_s]) + 0 * rise
            shift = tempco[:, index, None] * rise
        is_out[..., index] = base * np.exp(-shift / nvt[:, index, None])
    return is_out, nvt


def element_params(models: list[GroupModel], plan: RowPlan, ambient: Ambient) -> Params:
    """Parameters of every row (G·S·C of them) of a bucket of same-signature models."""
    from linter.netbuild import GENERIC
    g, c = plan.codes.shape[:2]
    s = models[0].levels.shape[0]
    rise = _temperature_rise(plan, ambient)
    d_is, nvt = _diode_is(models, plan, rise)
    q = models[0].bjts
    q_is = _stack(models, lambda m: [b.i_s for b in m.bjts])[:, None, :] * np.exp(
        -GENERIC["bjt_tempco"] * rise[..., None] / VT_REF)
    bf = np.zeros((g, c, len(q)))
    for i, bjt in enumerate(q):
        typ = _stack(models, lambda m: [m.bjts[i].hfe_typ])
        bf[..., i] = _level(np.minimum(plan.codes[:, :, bjt.axis], 0),
                            _stack(models, lambda m: [m.bjts[i].hfe_min]), typ, typ)
    br = _stack(models, lambda m: [b.br for b in m.bjts])

    def rows(a: np.ndarray, per_scenario: bool = False) -> np.ndarray:
        a = a if per_scenario else np.broadcast_to(a[:, None], (g, s) + a.shape[1:])
        return np.ascontiguousarray(a).reshape(g * s * c, -1)

    def flat(a: np.ndarray) -> np.ndarray:   # (G, k) constant over corners
        return rows(np.broadcast_to(a[:, None, :], (g, c, a.shape[1])))

    return Params(
        fixed=rows(_fixed(models, plan, (g, s, c)), True),
        r_g=rows(_resistor_g(models, plan, (g, s, c)), True),
        d_is=rows(d_is), d_nvt=flat(nvt), q_is=rows(q_is), q_bf=rows(bf), q_br=flat(br),
        m_vto=flat(_stack(models, lambda m: [x.vto for x in m.mosfets])),
        m_kp=flat(_stack(models, lambda m: [x.kp for x in m.mosfets])),
        m_lambda=flat(_stack(models, lambda m: [x.lam for x in m.mosfets])),
    )


def run(models: list[GroupModel], plan: RowPlan, ambient: Ambient,
        initial: np.ndarray | None = None) -> dict[str, np.ndarray]:
    """Solve every row; every array in the result is shaped (G, S, C, k).

    Keys: ``v`` node voltages; ``converged`` (k = 1); ``led_i``, ``led_vf``, ``led_p``,
    ``led_rev`` (LEDs only, A, V, W, V); ``res_i``, ``res_p`` (part resistors, magnitudes);
    ``q_ic``, ``q_ib``, ``q_vce``, ``q_p``, ``q_sat`` (BJTs); ``m_id``, ``m_vds``, ``m_vgs``,
    ``m_p``, ``m_limit`` (MOSFETs); ``pin_i`` (out of the pin, A).
    """
    first = models[0]
    g, c = plan.codes.shape[:2]
    s = first.levels.shape[0]
    params = element_params(models, plan, ambient)
    solution = solve(first.network, params, initial)
    v = solution.voltages
    cur = element_currents(first.network, params, v)
    shape = (g, s, c)
    out = {"v": v, "converged": solution.converged[:, None]}
    # A row that did not converge may hold voltages far out of range; its products may
    # overflow to inf. Such rows are flagged in ``converged`` and never reported as figures.
    with np.errstate(over="ignore", invalid="ignore"):
        out.update(_led_outputs(first, v, cur))
        out.update(_resistor_outputs(first, params, v, cur))
        out.update(_bjt_outputs(first, params, v, cur))
        out.update(_mosfet_outputs(first, params, v, cur))
    return {k: a.reshape(shape + (a.shape[-1],)) for k, a in out.items()}


def _led_outputs(model: GroupModel, v, cur) -> dict[str, np.ndarray]:
    leds = [i for i, d in enumerate(model.diodes) if d.curve is not None]
    anode = np.array([model.diodes[i].anode for i in leds], int)
    cathode = np.array([model.diodes[i].cathode for i in leds], int)
    current = cur["diode"][:, leds]
    vf = v[:, anode] - v[:, cathode]
    return {"led_i": current, "led_vf": vf, "led_p": current * vf, "led_rev": -vf}


def _resistor_outputs(model: GroupModel, params: Params, v, cur) -> dict[str, np.ndarray]:
    parts = [i for i, r in enumerate(model.resistors) if r.role == "part"]
    pins = [p.resistor for p in model.pins]
    current = cur["resistor"]
    drop = v[:, model.network.resistors[:, 0]] - v[:, model.network.resistors[:, 1]]
    return {"res_i": np.abs(current[:, parts]), "res_p": np.abs(current * drop)[:, parts],
            "pin_i": current[:, pins]}


def _bjt_outputs(model: GroupModel, params: Params, v, cur) -> dict[str, np.ndarray]:
    """Saturated: the collector current is below 90 % of β·Ib (β of that row)."""
    net = model.network
    s = net.bjt_polarity
    c, b, e = (v[:, net.bjts[:, i]] for i in range(3))
    ic, ib = cur["bjt_ic"], cur["bjt_ib"]
    vce, vbe = s * (c - e), s * (b - e)
    saturated = (ib > 1e-9) & (ic < 0.9 * ib * params.q_bf)
    return {"q_ic": ic, "q_ib": ib, "q_vce": vce, "q_p": ic * vce + ib * vbe,
            "q_sat": saturated.astype(float)}


def _mosfet_outputs(model: GroupModel, params: Params, v, cur) -> dict[str, np.ndarray]:
    net = model.network
    s = net.mosfet_polarity
    d, g, src = (v[:, net.mosfets[:, i]] for i in range(3))
    i_d = cur["mosfet_id"]
    vds, vgs = s * (d - src), s * (g - src)
    limiting = (vgs > params.m_vto) & (vds >= vgs - params.m_vto)
    return {"m_id": i_d, "m_vds": vds, "m_vgs": vgs, "m_p": i_d * vds,
            "m_limit": limiting.astype(float)}
