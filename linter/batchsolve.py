"""Solve a batch of group models of one signature at many corners, in one Newton run.

Rows are ordered (group, scenario, corner). :func:`element_params` turns corner codes
(see :mod:`linter.corners`) into element parameters; :func:`run` solves and returns every
quantity the results need as arrays shaped (G, S, C, k).
"""

from __future__ import annotations

import numpy as np

from linter.devices import VT_REF
from linter.netbuild import HIGH_Z_SIEMENS, GroupModel
from linter.partdata import Ambient
from linter.records import record
from linter.solve import Params, element_currents, solve

__all__ = ["RowPlan", "BucketData", "element_params", "run", "headroom_offset"]


@record(eq=False)
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


@record(eq=False)
class BucketData:
    """Every figure of a bucket's models stacked once as (G, k) arrays (k elements or
    fixed nodes), so that each run turns codes into parameters with array operations only.

    ``rails`` (G, nf, 3) the min, nom, max of each fixed node's rail (0 where none);
    ``supply`` (G, nf) a pin's fixed supply voltage; ``offset`` (G,) the headroom shift;
    ``ohms``, ``tol`` (G, mr); ``nvt``, ``tempco``, ``d_is`` (G, md, 3) Is at vf_min, typ,
    vf_max (plain diodes: their Is thrice); ``q`` (G, mq, 4) Is, hfe_min, hfe_typ, BR;
    ``m`` (G, mm, 3) VTO, KP, λ.
    """

    rails: np.ndarray
    supply: np.ndarray
    offset: np.ndarray
    ohms: np.ndarray
    tol: np.ndarray
    nvt: np.ndarray
    tempco: np.ndarray
    d_is: np.ndarray
    q: np.ndarray
    m: np.ndarray

    def take(self, index: np.ndarray) -> "BucketData":
        """The rows of the models ``index`` (in that order)."""
        return BucketData(**{name: getattr(self, name)[index]
                             for name in self.__dataclass_fields__})

    @classmethod
    def of(cls, models: list[GroupModel]) -> "BucketData":
        first = models[0]
        g = len(models)
        nf, mr, md = len(first.fixed), len(first.resistors), len(first.diodes)
        mq, mm = len(first.bjts), len(first.mosfets)

        def table(rows: list, k: int, width: int = 0) -> np.ndarray:
            shape = (g, k, width) if width else (g, k)
            return np.array(rows, float).reshape(shape)

        return cls(
            rails=table([[_rail_levels(f.rail) for f in m.fixed] for m in models], nf, 3),
            supply=table([[_pin_supply(m, f) for f in m.fixed] for m in models], nf),
            offset=np.array([m.headroom[1] * headroom_offset(m) if m.headroom else 0.0
                             for m in models], float),
            ohms=table([[r.ohms for r in m.resistors] for m in models], mr),
            tol=table([[r.tolerance for r in m.resistors] for m in models], mr),
            nvt=table([[d.ideality * VT_REF for d in m.diodes] for m in models], md),
            tempco=table([[d.tempco for d in m.diodes] for m in models], md),
            d_is=table([[_diode_is_levels(d) for d in m.diodes] for m in models], md, 3),
            q=table([[(b.i_s, b.hfe_min, b.hfe_typ, b.br) for b in m.bjts] for m in models],
                    mq, 4),
            m=table([[(x.vto, x.kp, x.lam) for x in m.mosfets] for m in models], mm, 3),
        )


def _rail_levels(rail) -> tuple[float, float, float]:
    return (rail.min, rail.nom, rail.max) if rail is not None else (0.0, 0.0, 0.0)


def _pin_supply(model: GroupModel, spec) -> float:
    if spec.kind != "pin" or spec.rail is not None:
        return 0.0
    return float(model.pins[spec.pin].supply_voltage)


def _diode_is_levels(spec) -> tuple[float, float, float]:
    if spec.curve is None:
        return (spec.i_s, spec.i_s, spec.i_s)
    c = spec.curve
    return (c.is_min_vf, c.is_typ, c.is_max_vf)


def _level(code: np.ndarray, low, mid, high) -> np.ndarray:
    """The value at ``code``: low at −1, mid at 0, high at +1, linear in between (codes may
    be fractional, as in the Monte Carlo check)."""
    return np.where(code < 0, mid + code * (mid - low), mid + code * (high - mid))


def _axis_codes(codes: np.ndarray, axes: list[int]) -> np.ndarray:
    """(G, C, k) codes of the axes ``axes`` (an axis of −1: held at 0)."""
    index = np.array(axes, int).reshape(-1)
    picked = codes[:, :, np.maximum(index, 0)] if index.size else codes[:, :, :0]
    return np.where(index >= 0, picked, 0)


def _fixed(models, data: BucketData, plan: RowPlan, s: int) -> np.ndarray:
    """(G, S, C, nf) fixed-node voltages."""
    first = models[0]
    code = _axis_codes(plan.codes, [f.axis for f in first.fixed])      # (G, C, nf)
    lo, nom, hi = (data.rails[:, None, :, k] for k in range(3))
    volts = _level(code, lo, nom, hi)
    kinds = [f.kind for f in first.fixed]
    head = np.array([k == "headroom" for k in kinds])
    volts = volts + (plan.aux[None, :, None] * head) * data.offset[:, None, None]
    fixed_supply = np.array([k == "pin" and f.rail is None for k, f in zip(kinds, first.fixed)])
    volts = np.where(fixed_supply, data.supply[:, None, :], volts)
    out = np.broadcast_to(volts[:, None], (volts.shape[0], s) + volts.shape[1:]).copy()
    for f_index, spec in enumerate(first.fixed):
        if spec.kind == "pin":
            high = first.levels[:, spec.pin] > 0
            out[:, ~high, :, f_index] = 0.0
    return out


def _resistor_g(models, data: BucketData, plan: RowPlan, s: int) -> np.ndarray:
    """(G, S, C, mr) conductances; an undriven pin's resistor is opened."""
    first = models[0]
    code = _axis_codes(plan.codes, [r.axis for r in first.resistors])
    cond = 1.0 / (data.ohms[:, None, :] * (1.0 + code * data.tol[:, None, :]))
    out = np.broadcast_to(cond[:, None], (cond.shape[0], s) + cond.shape[1:]).copy()
    for index, spec in enumerate(first.resistors):
        if spec.role == "pin":
            driven = first.levels[:, spec.pin] != 0
            out[:, ~driven, :, index] = HIGH_Z_SIEMENS
    return out


def _temperature_rise(plan: RowPlan, ambient: Ambient) -> np.ndarray:
    """(G, C) K above the datasheet reference; axis 0 is always the ambient axis."""
    code = plan.codes[:, :, 0]
    temp = _level(code, ambient.min, ambient.reference, ambient.max)
    return temp - ambient.reference


def _diode_is(models, data: BucketData, plan: RowPlan, rise: np.ndarray) -> np.ndarray:
    """(G, C, md) Is after Vf bin, temperature and probe shift (a Vf shift is linear in
    ln Is)."""
    first = models[0]
    led = np.array([d.curve is not None for d in first.diodes], bool)
    code = _axis_codes(plan.codes, [d.axis if d.curve is not None else -1 for d in first.diodes])
    logs = np.log(data.d_is)[:, None]                                    # (G, 1, md, 3)
    base = np.where(led, np.exp(_level(code, logs[..., 0], logs[..., 1], logs[..., 2])),
                    data.d_is[:, None, :, 1])
    shift = data.tempco[:, None, :] * rise[..., None] + led * plan.vf_shift[None, :, None]
    return base * np.exp(-shift / data.nvt[:, None, :])


def element_params(models: list[GroupModel], plan: RowPlan, ambient: Ambient,
                   data: BucketData | None = None) -> Params:
    """Parameters of every row (G·S·C of them) of a bucket of same-signature models."""
    from linter.netbuild import GENERIC
    data = BucketData.of(models) if data is None else data
    g, c = plan.codes.shape[:2]
    s = models[0].levels.shape[0]
    rise = _temperature_rise(plan, ambient)
    q = models[0].bjts
    q_is = data.q[:, None, :, 0] * np.exp(
        -GENERIC["bjt_tempco"] * rise[..., None] / VT_REF)
    beta_code = np.minimum(_axis_codes(plan.codes, [b.axis for b in q]), 0)
    bf = _level(beta_code, data.q[:, None, :, 1], data.q[:, None, :, 2], data.q[:, None, :, 2])

    def rows(a: np.ndarray, per_scenario: bool = False) -> np.ndarray:
        a = a if per_scenario else np.broadcast_to(a[:, None], (g, s) + a.shape[1:])
        return np.ascontiguousarray(a).reshape(g * s * c, -1)

    def flat(a: np.ndarray) -> np.ndarray:   # (G, k) constant over corners
        return rows(np.broadcast_to(a[:, None, :], (g, c, a.shape[1])))

    return Params(
        fixed=rows(_fixed(models, data, plan, s), True),
        r_g=rows(_resistor_g(models, data, plan, s), True),
        d_is=rows(_diode_is(models, data, plan, rise)), d_nvt=flat(data.nvt),
        q_is=rows(q_is), q_bf=rows(bf), q_br=flat(data.q[..., 3]),
        m_vto=flat(data.m[..., 0]), m_kp=flat(data.m[..., 1]), m_lambda=flat(data.m[..., 2]),
    )


def run(models: list[GroupModel], plan: RowPlan, ambient: Ambient,
        initial: np.ndarray | None = None, data: BucketData | None = None
        ) -> dict[str, np.ndarray]:
    """Solve every row; every array in the result is shaped (G, S, C, k).

    Keys: ``v`` node voltages; ``converged`` (k = 1); ``led_i``, ``led_vf``, ``led_p``,
    ``led_rev`` (LEDs only, A, V, W, V); ``res_i``, ``res_p`` (part resistors, magnitudes);
    ``q_ic``, ``q_ib``, ``q_vce``, ``q_p``, ``q_sat`` (BJTs); ``m_id``, ``m_vds``, ``m_vgs``,
    ``m_p``, ``m_limit`` (MOSFETs); ``pin_i`` (out of the pin, A).
    """
    first = models[0]
    g, c = plan.codes.shape[:2]
    s = first.levels.shape[0]
    params = element_params(models, plan, ambient, data)
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
