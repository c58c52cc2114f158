"""DC operating point of small nodal networks, vectorised over a batch axis.

A :class:`Network` is the structure (nodes and elements, stamped once into two small
scatter matrices); :class:`Params` holds each element's parameters as arrays of shape
(B, m): one row per corner (and per group of identical structure). :func:`solve` runs
Newton's method on all B rows at once: it assembles the KCL residual F (B, n) and the
Jacobian J (B, n, n) with two matrix products, solves the stacked systems with
``np.linalg.solve`` and damps each row's step so that no junction voltage jumps further than
SPICE's junction limiting allows. Rows that do not converge are flagged, never left as NaN.

Nodes: unknown nodes are 0 … n−1; fixed-voltage nodes (rails, ground, the inner source of a
microcontroller pin) are n … n+nf−1 with their voltages in ``Params.fixed``. A voltage source
behind a resistance is a fixed node plus a resistor. gmin (1e-12 S) joins every unknown node
to ground, as SPICE does.

Elements and their terminals:

* resistor (a, b), conductance G (S);
* diode (anode, cathode), ideal junction Is (A), n·Vt (V) (series resistance is a resistor
  to an inner node, as SPICE does);
* bjt (collector, base, emitter), polarity +1 NPN / −1 PNP, Is (A), BF, BR;
* mosfet (drain, gate, source), polarity +1 N / −1 P, VTO (V, magnitude for either
  polarity), KP (A/V²), λ (1/V).
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields, replace
from functools import cached_property

import numpy as np

from linter.devices import VT_REF, bjt_currents, diode_current, mosfet_current, pn_limit

__all__ = ["GMIN", "CURRENT_TOL", "VOLTAGE_TOL", "MAX_ITERATIONS", "Network", "Params",
           "Solution", "solve", "element_currents"]

GMIN: float = 1e-12
"""S, conductance from every unknown node to ground (as SPICE)."""
CURRENT_TOL: float = 1e-9
"""A, largest KCL residual of a converged row."""
VOLTAGE_TOL: float = 1e-9
"""V, largest last Newton step of a converged row."""
MAX_ITERATIONS: int = 400
"""Newton iterations before a row is declared not converged."""


def _pairs(nodes: np.ndarray) -> np.ndarray:
    """Every (row, column) terminal pair of each element: (m, t, t, 2)."""
    t = nodes.shape[1]
    rows = np.repeat(nodes[:, :, None], t, axis=2)
    cols = np.repeat(nodes[:, None, :], t, axis=1)
    return np.stack([rows, cols], axis=-1)


@dataclass(frozen=True, eq=False)
class Network:
    """The structure of a network: node counts and element terminals (node indices).

    Parameters
    ----------
    n_nodes, n_fixed : int
        Unknown and fixed-voltage nodes.
    resistors, diodes : int arrays (m, 2)
    bjts, mosfets : int arrays (m, 3)
    bjt_polarity, mosfet_polarity : arrays (m,) of +1 / −1
    """

    n_nodes: int
    n_fixed: int
    resistors: np.ndarray = field(default_factory=lambda: np.zeros((0, 2), int))
    diodes: np.ndarray = field(default_factory=lambda: np.zeros((0, 2), int))
    bjts: np.ndarray = field(default_factory=lambda: np.zeros((0, 3), int))
    mosfets: np.ndarray = field(default_factory=lambda: np.zeros((0, 3), int))
    bjt_polarity: np.ndarray = field(default_factory=lambda: np.zeros(0))
    mosfet_polarity: np.ndarray = field(default_factory=lambda: np.zeros(0))

    def __post_init__(self) -> None:
        terminals = self._terminals()
        if terminals.size and (terminals.min() < 0 or terminals.max() >= self.n_all):
            raise ValueError("element terminal outside the network's nodes")

    def _terminals(self) -> np.ndarray:
        return np.concatenate([np.asarray(a, int).reshape(-1) for a in
                               (self.resistors, self.diodes, self.bjts, self.mosfets)])

    @cached_property
    def scatter_f(self) -> np.ndarray:
        """(T, n): terminal currents → KCL residual at the unknown nodes."""
        terminals = self._terminals()
        scatter = np.zeros((terminals.size, self.n_nodes))
        inner = terminals < self.n_nodes
        scatter[np.nonzero(inner)[0], terminals[inner]] = 1.0
        return scatter

    @cached_property
    def scatter_j(self) -> np.ndarray:
        """(T·t, n·n): terminal conductances → Jacobian entries of the unknown nodes."""
        n = self.n_nodes
        pairs = np.concatenate([_pairs(np.asarray(a, int)).reshape(-1, 2) for a in
                                (self.resistors, self.diodes, self.bjts, self.mosfets)])
        scatter = np.zeros((pairs.shape[0], n * n))
        both = (pairs[:, 0] < n) & (pairs[:, 1] < n)
        scatter[np.nonzero(both)[0], pairs[both, 0] * n + pairs[both, 1]] = 1.0
        return scatter

    @property
    def n_all(self) -> int:
        """Unknown plus fixed nodes."""
        return self.n_nodes + self.n_fixed


@dataclass(frozen=True, eq=False)
class Params:
    """Element parameters over the batch: every array has B rows.

    fixed (B, nf) V; r_g (B, mr) S; d_is (B, md) A; d_nvt (B, md) V; q_is (B, mq) A;
    q_bf, q_br (B, mq); m_vto (B, mm) V; m_kp (B, mm) A/V²; m_lambda (B, mm) 1/V.
    """

    fixed: np.ndarray
    r_g: np.ndarray
    d_is: np.ndarray
    d_nvt: np.ndarray
    q_is: np.ndarray
    q_bf: np.ndarray
    q_br: np.ndarray
    m_vto: np.ndarray
    m_kp: np.ndarray
    m_lambda: np.ndarray

    @property
    def rows(self) -> int:
        """B, the batch size."""
        return self.fixed.shape[0]

    def take(self, index: np.ndarray) -> "Params":
        """The rows ``index`` of every array."""
        return replace(self, **{f.name: getattr(self, f.name)[index] for f in fields(self)})


@dataclass(frozen=True, eq=False)
class Solution:
    """Node voltages (B, n + nf), fixed nodes last; ``converged`` (B,) bool; ``iterations``
    (B,) Newton steps; ``residual`` (B,) the largest KCL error in A at the last step."""

    voltages: np.ndarray
    converged: np.ndarray
    iterations: np.ndarray
    residual: np.ndarray


def _terms(net: Network, v: np.ndarray, nodes: np.ndarray) -> np.ndarray:
    """Voltages at each element terminal: (B, m, t)."""
    return v[:, nodes] if nodes.size else np.zeros((v.shape[0], 0, nodes.shape[1]))


def _resistor_stamps(net: Network, p: Params, v: np.ndarray):
    vt = _terms(net, v, net.resistors)
    i = p.r_g * (vt[..., 0] - vt[..., 1])
    g = p.r_g[..., None, None] * np.array([[1.0, -1.0], [-1.0, 1.0]])
    return np.stack([i, -i], axis=-1), g


def _diode_stamps(net: Network, p: Params, v: np.ndarray):
    vt = _terms(net, v, net.diodes)
    i, g = diode_current(vt[..., 0] - vt[..., 1], p.d_is, p.d_nvt)
    return np.stack([i, -i], axis=-1), g[..., None, None] * np.array([[1.0, -1.0], [-1.0, 1.0]])


def _bjt_stamps(net: Network, p: Params, v: np.ndarray):
    vt = _terms(net, v, net.bjts)
    s = net.bjt_polarity
    c = bjt_currents(s * (vt[..., 1] - vt[..., 2]), s * (vt[..., 1] - vt[..., 0]),
                     p.q_is, p.q_bf, p.q_br, VT_REF)
    ic, ib = s * c["ic"], s * c["ib"]
    currents = np.stack([ic, ib, -ic - ib], axis=-1)
    d_c = np.stack([-c["dic_dvbc"], c["dic_dvbe"] + c["dic_dvbc"], -c["dic_dvbe"]], axis=-1)
    d_b = np.stack([-c["dib_dvbc"], c["dib_dvbe"] + c["dib_dvbc"], -c["dib_dvbe"]], axis=-1)
    return currents, np.stack([d_c, d_b, -d_c - d_b], axis=-2)


def _mosfet_stamps(net: Network, p: Params, v: np.ndarray):
    vt = _terms(net, v, net.mosfets)
    s = net.mosfet_polarity
    i_d, gm, gds = mosfet_current(s * (vt[..., 1] - vt[..., 2]), s * (vt[..., 0] - vt[..., 2]),
                                  p.m_vto, p.m_kp, p.m_lambda)
    currents = np.stack([s * i_d, np.zeros_like(i_d), -s * i_d], axis=-1)
    d_d = np.stack([gds, gm, -gm - gds], axis=-1)
    zero = np.zeros_like(d_d)
    return currents, np.stack([d_d, zero, -d_d], axis=-2)


_STAMPERS = (_resistor_stamps, _diode_stamps, _bjt_stamps, _mosfet_stamps)


def _assemble(net: Network, p: Params, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """KCL residual F (B, n) (current leaving each node, A) and Jacobian J (B, n, n) (S)."""
    v = np.concatenate([x, p.fixed], axis=1)
    rows = x.shape[0]
    currents, conductances = [], []
    for stamper in _STAMPERS:
        i, g = stamper(net, p, v)
        currents.append(i.reshape(rows, -1))
        conductances.append(g.reshape(rows, -1))
    n = net.n_nodes
    f = np.concatenate(currents, axis=1) @ net.scatter_f + GMIN * x
    j = (np.concatenate(conductances, axis=1) @ net.scatter_j).reshape(rows, n, n)
    j[:, np.arange(n), np.arange(n)] += GMIN
    return f, j


def _junctions(net: Network, p: Params):
    """Every junction as (anode node, cathode node, sign, Is, n·Vt) arrays over the batch."""
    s_q = net.bjt_polarity
    a = np.concatenate([net.diodes[:, 0], net.bjts[:, 1], net.bjts[:, 1]]).astype(int)
    k = np.concatenate([net.diodes[:, 1], net.bjts[:, 2], net.bjts[:, 0]]).astype(int)
    sign = np.concatenate([np.ones(len(net.diodes)), s_q, s_q])
    i_s = np.concatenate([p.d_is, p.q_is, p.q_is], axis=1)
    nvt = np.concatenate([p.d_nvt, np.full_like(p.q_is, VT_REF), np.full_like(p.q_is, VT_REF)],
                         axis=1)
    return a, k, sign, i_s, nvt


def _step_factor(net: Network, p: Params, x: np.ndarray, dx: np.ndarray) -> np.ndarray:
    """Per row, the share of the Newton step to take so that junction limiting holds."""
    a, k, sign, i_s, nvt = _junctions(net, p)
    if a.size == 0:
        return np.ones(x.shape[0])
    v_old = np.concatenate([x, p.fixed], axis=1)
    v_new = v_old + np.concatenate([dx, np.zeros_like(p.fixed)], axis=1)
    old = sign * (v_old[:, a] - v_old[:, k])
    new = sign * (v_new[:, a] - v_new[:, k])
    limited = pn_limit(new, old, nvt, i_s)
    change = new - old
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.where(np.abs(change) > 0, (limited - old) / change, 1.0)
    return np.clip(np.min(ratio, axis=1), 1e-6, 1.0)


def _newton_step(jacobian: np.ndarray, residual: np.ndarray) -> np.ndarray:
    """The Newton step ``-J⁻¹·F`` for every row.

    A row whose Jacobian is numerically singular (a cluster of junctions far into forward
    bias joined to the rest only by ordinary conductances: 1e16 S against 0.2 S) makes the
    batched LU solve fail for the whole batch; the pseudo-inverse (SVD) then gives the
    minimum-norm step for every row, and junction limiting takes it from there.
    """
    try:
        return np.linalg.solve(jacobian, -residual[..., None])[..., 0]
    except np.linalg.LinAlgError:
        return (np.linalg.pinv(jacobian) @ -residual[..., None])[..., 0]


def solve(net: Network, params: Params, initial: np.ndarray | None = None,
          max_iterations: int = MAX_ITERATIONS) -> Solution:
    """Newton's method on every row; converged when |F| ≤ 1e-9 A and the step ≤ 1e-9 V.

    Rows that converge leave the active set; the rest keep iterating until
    ``max_iterations``, then are flagged ``converged = False`` (their voltages are the last
    iterate, finite).
    """
    rows, n = params.rows, net.n_nodes
    x = np.zeros((rows, n)) if initial is None else np.array(initial, dtype=float)
    converged = np.zeros(rows, bool)
    iterations = np.zeros(rows, int)
    residual = np.full(rows, np.inf)
    active = np.arange(rows)
    for step in range(1, max_iterations + 1):
        if active.size == 0:
            break
        p = params.take(active) if active.size < rows else params
        xa = x[active]
        f, j = _assemble(net, p, xa)
        dx = _newton_step(j, f) if n else np.zeros_like(xa)
        dx = np.where(np.isfinite(dx), dx, 0.0)
        alpha = _step_factor(net, p, xa, dx)
        x[active] = xa + alpha[:, None] * dx
        iterations[active] = step
        residual[active] = np.max(np.abs(f), axis=1, initial=0.0)
        done = ((residual[active] <= CURRENT_TOL)
                & (np.max(np.abs(dx), axis=1, initial=0.0) <= VOLTAGE_TOL) & (alpha >= 1.0))
        converged[active[done]] = True
        active = active[~done]
    return Solution(np.concatenate([x, params.fixed], axis=1), converged, iterations, residual)


def element_currents(net: Network, params: Params, voltages: np.ndarray) -> dict[str, np.ndarray]:
    """Currents at a solution, each (B, m), in the element's own sense (A).

    ``resistor`` from terminal a to b; ``diode`` anode to cathode; ``bjt_ic`` and
    ``bjt_ib`` into collector and base of an NPN (out of them for a PNP), so positive in
    normal operation; ``mosfet_id`` into the drain of an N-MOSFET (out of a P-MOSFET's).
    """
    v = voltages
    ir = params.r_g * (v[:, net.resistors[:, 0]] - v[:, net.resistors[:, 1]])
    idio, _ = diode_current(v[:, net.diodes[:, 0]] - v[:, net.diodes[:, 1]], params.d_is,
                            params.d_nvt)
    s = net.bjt_polarity
    c, b, e = (v[:, net.bjts[:, i]] for i in range(3))
    q = bjt_currents(s * (b - e), s * (b - c), params.q_is, params.q_bf, params.q_br, VT_REF)
    sm = net.mosfet_polarity
    d, g, src = (v[:, net.mosfets[:, i]] for i in range(3))
    i_d, _, _ = mosfet_current(sm * (g - src), sm * (d - src), params.m_vto, params.m_kp,
                               params.m_lambda)
    return {"resistor": ir, "diode": idio, "bjt_ic": q["ic"], "bjt_ib": q["ib"],
            "mosfet_id": i_d}
