"""DC operating point of small nodal networks, vectorised over a batch axis.

A :class:`Network` is the structure (nodes and elements, with a stamp plan built once);
:class:`Params` holds each element's parameters as arrays of shape (B, m): one row per
corner (and per group of identical structure). :func:`solve` runs Newton's method on all B
rows at once: it assembles the KCL residual F (B, n) and the Jacobian J (B, n, n) with one
gather and one segmented sum each (:mod:`linter.stamps`), solves the stacked systems with
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

from dataclasses import field
from functools import cached_property

import numpy as np

from linter.devices import VT_REF, bjt_currents, diode_current, mosfet_current, pn_limit
from linter.records import record
from linter.stamps import StampPlan, junction_nodes

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


@record(eq=False)
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
    def stamps(self) -> StampPlan:
        """Where each element's currents and conductances land (built once, on first use)."""
        return StampPlan.of(self)

    @cached_property
    def junctions(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Every pn junction: (anode nodes, cathode nodes, polarity)."""
        return junction_nodes(self)

    @cached_property
    def junction_steps(self) -> tuple[np.ndarray, np.ndarray]:
        """Each junction's anode and cathode as columns of a Newton step padded with one
        zero column (a fixed node's column is that zero)."""
        a, k, _ = self.junctions
        return np.minimum(a, self.n_nodes), np.minimum(k, self.n_nodes)

    @property
    def n_all(self) -> int:
        """Unknown plus fixed nodes."""
        return self.n_nodes + self.n_fixed


@record(eq=False)
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
        return Params(self.fixed[index], self.r_g[index], self.d_is[index], self.d_nvt[index],
                      self.q_is[index], self.q_bf[index], self.q_br[index], self.m_vto[index],
                      self.m_kp[index], self.m_lambda[index])


@record(eq=False)
class Solution:
    """Node voltages (B, n + nf), fixed nodes last; ``converged`` (B,) bool; ``iterations``
    (B,) Newton steps; ``residual`` (B,) the largest KCL error in A at the last step."""

    voltages: np.ndarray
    converged: np.ndarray
    iterations: np.ndarray
    residual: np.ndarray


START_CURRENT: float = 1e-3
"""A, the forward current at which a cold start places every diode (see :func:`_start_step`)."""
START_SIEMENS: float = 1.0
"""S, the stiffness with which the cold start's step holds a diode at that voltage (a
voltage source of 1 Ω, stiff beside the kΩ-to-Ω resistances that feed an LED)."""


@record(eq=False)
class _Start:
    """Diode voltages (V) a cold start holds: ``diode`` (B, md)."""

    diode: np.ndarray

    @classmethod
    def of(cls, p: Params) -> "_Start":
        """Each diode at :data:`START_CURRENT`: V = n·Vt·ln(I/Is + 1)."""
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            diode = p.d_nvt * np.log1p(START_CURRENT / p.d_is)
        return cls(np.where(np.isfinite(diode), diode, 0.0))


CHUNK_ROWS: int = 16384
"""Rows iterated together: large enough to amortise numpy's per-call cost, small enough for
the temporaries to stay in the processor's cache."""


def _evaluate(net: Network, p: Params, v: np.ndarray, start: _Start | None = None
              ) -> tuple[np.ndarray, np.ndarray]:
    """Residual columns (B, kf) and Jacobian columns (B, kj) in :mod:`linter.stamps` order.

    With ``start``, each diode is a voltage source at the start's voltage behind
    :data:`START_SIEMENS` instead of its curve at ``v`` (see :func:`_start_step`).
    """
    r, d, q, m = net.resistors, net.diodes, net.bjts, net.mosfets
    mr, md, mq, mm = len(r), len(d), len(q), len(m)
    rows = v.shape[0]
    cur = np.empty((rows, mr + md + 2 * mq + mm))
    cond = np.empty((rows, mr + md + 4 * mq + 2 * mm))
    if mr:
        cur[:, :mr] = p.r_g * (v[:, r[:, 0]] - v[:, r[:, 1]])
        cond[:, :mr] = p.r_g
    if md:
        vd = v[:, d[:, 0]] - v[:, d[:, 1]]
        if start is None:
            i, g = diode_current(vd, p.d_is, p.d_nvt)
        else:
            i, _ = diode_current(start.diode, p.d_is, p.d_nvt)
            g = np.full_like(i, START_SIEMENS)
            i = i + START_SIEMENS * (vd - start.diode)
        cur[:, mr:mr + md], cond[:, mr:mr + md] = i, g
    first = mr + md
    if mq:
        s = net.bjt_polarity
        vb = v[:, q[:, 1]]
        c = bjt_currents(s * (vb - v[:, q[:, 2]]), s * (vb - v[:, q[:, 0]]), p.q_is, p.q_bf,
                         p.q_br, VT_REF)
        cur[:, first:first + mq], cur[:, first + mq:first + 2 * mq] = s * c["ic"], s * c["ib"]
        for k, key in enumerate(("dic_dvbe", "dic_dvbc", "dib_dvbe", "dib_dvbc")):
            cond[:, first + k * mq:first + (k + 1) * mq] = c[key]
    if mm:
        s = net.mosfet_polarity
        vs = v[:, m[:, 2]]
        i_d, gm, gds = mosfet_current(s * (v[:, m[:, 1]] - vs), s * (v[:, m[:, 0]] - vs),
                                      p.m_vto, p.m_kp, p.m_lambda)
        cur[:, first + 2 * mq:] = s * i_d
        cond[:, first + 4 * mq:first + 4 * mq + mm], cond[:, first + 4 * mq + mm:] = gm, gds
    return cur, cond


def _assemble(net: Network, p: Params, v: np.ndarray, start: _Start | None = None
              ) -> tuple[np.ndarray, np.ndarray]:
    """KCL residual F (B, n) (current leaving each node, A) and Jacobian J (B, n, n) (S) at
    the node voltages ``v`` (B, n + nf) (diodes held at ``start`` when given)."""
    n, rows = net.n_nodes, v.shape[0]
    cur, cond = _evaluate(net, p, v, start)
    f = net.stamps.f.apply(cur)
    f += GMIN * v[:, :n]
    j = net.stamps.j.apply(cond)
    j[:, ::n + 1] += GMIN
    return f, j.reshape(rows, n, n)


try:  # numpy's own batched LAPACK gesv, which np.linalg.solve wraps
    from numpy.linalg import _umath_linalg
    _GESV = _umath_linalg.solve
except (ImportError, AttributeError):  # pragma: no cover - another numpy layout
    _GESV = None


def _raise_singular(err: str, flag: int) -> None:
    raise np.linalg.LinAlgError("Singular matrix")


def _lu_solve(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """``np.linalg.solve(a, b)`` for float64 stacks a (B, n, n), b (B, n, 1): the same gufunc
    under the same floating-point settings, without the wrapper's type checks (which cost
    more than the solve itself on a Newton iteration of a few small matrices). Raises
    LinAlgError on a singular matrix, as np.linalg.solve does."""
    if _GESV is None or a.dtype != np.float64 or b.dtype != np.float64:
        return np.linalg.solve(a, b)
    with np.errstate(call=_raise_singular, invalid="call", over="ignore", divide="ignore",
                     under="ignore"):
        return _GESV(a, b, signature="dd->d")


def _newton_step(jacobian: np.ndarray, residual: np.ndarray) -> np.ndarray:
    """The Newton step ``-J⁻¹·F`` for every row.

    A row whose Jacobian is numerically singular (a cluster of junctions far into forward
    bias joined to the rest only by ordinary conductances: 1e16 S against 0.2 S) makes the
    batched LU solve fail for the whole batch; such rows (a zero LU pivot, so a zero
    determinant) then take the pseudo-inverse's minimum-norm step, the rest the LU solution,
    and junction limiting takes it from there.
    """
    try:
        return _lu_solve(jacobian, -residual[..., None])[..., 0]
    except np.linalg.LinAlgError:
        pass
    with np.errstate(all="ignore"):
        det = np.linalg.det(jacobian)
    bad = ~(np.isfinite(det) & (det != 0.0))
    step = np.empty_like(residual)
    try:
        step[~bad] = np.linalg.solve(jacobian[~bad], -residual[~bad][..., None])[..., 0]
    except np.linalg.LinAlgError:
        bad[:] = True
    step[bad] = (np.linalg.pinv(jacobian[bad]) @ -residual[bad][..., None])[..., 0]
    return step


@record(eq=False)
class _Junctions:
    """Every pn junction of the rows being iterated: Is (A), n·Vt (V), Vcrit (V)."""

    i_s: np.ndarray
    nvt: np.ndarray
    v_crit: np.ndarray

    @classmethod
    def of(cls, p: Params) -> "_Junctions":
        i_s = np.concatenate([p.d_is, p.q_is, p.q_is], axis=1)
        vt = np.full_like(p.q_is, VT_REF)
        nvt = np.concatenate([p.d_nvt, vt, vt], axis=1)
        with np.errstate(divide="ignore", invalid="ignore"):
            v_crit = nvt * np.log(nvt / (np.sqrt(2.0) * i_s))
        return cls(i_s, nvt, v_crit)

    def take(self, keep: np.ndarray) -> "_Junctions":
        return _Junctions(self.i_s[keep], self.nvt[keep], self.v_crit[keep])


def _step_factor(net: Network, junctions: _Junctions, v: np.ndarray, dx: np.ndarray
                 ) -> np.ndarray:
    """Per row, the share of the Newton step to take so that junction limiting holds."""
    a, k, sign = net.junctions
    if a.size == 0:
        return np.ones(v.shape[0])
    a_step, k_step = net.junction_steps
    old = sign * (v[:, a] - v[:, k])
    padded = np.concatenate([dx, np.zeros((dx.shape[0], 1))], axis=1)
    change = sign * (padded[:, a_step] - padded[:, k_step])
    new = old + change
    # Shortcut: pn_limit moves only a junction above Vcrit that steps by more than 2·n·Vt
    # (its own test, word for word); with none such (and no NaN), every ratio below is 1.
    if not ((new > junctions.v_crit) & (np.abs(new - old) > 2.0 * junctions.nvt)).any() \
            and not np.isnan(new).any():
        return np.ones(v.shape[0])
    limited = pn_limit(new, old, junctions.nvt, junctions.i_s, junctions.v_crit)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.where(limited == new, 1.0, (limited - old) / change)
    return np.minimum(np.maximum(ratio.min(axis=1), 1e-6), 1.0)   # np.clip, fewer calls


def solve(net: Network, params: Params, initial: np.ndarray | None = None,
          max_iterations: int = MAX_ITERATIONS) -> Solution:
    """Newton's method on every row; converged when |F| ≤ 1e-9 A and the step ≤ 1e-9 V.

    Rows that converge leave the active set; the rest keep iterating until
    ``max_iterations``, then are flagged ``converged = False`` (their voltages are the last
    iterate, finite). Rows are iterated :data:`CHUNK_ROWS` at a time.
    """
    rows, n = params.rows, net.n_nodes
    x = np.zeros((rows, n)) if initial is None else np.array(initial, dtype=float)
    cold = initial is None
    if rows > CHUNK_ROWS:
        parts = [_solve_rows(net, params.take(np.arange(lo, min(rows, lo + CHUNK_ROWS))),
                             x[lo:lo + CHUNK_ROWS], max_iterations, cold)
                 for lo in range(0, rows, CHUNK_ROWS)]
        return Solution(*(np.concatenate([getattr(s, k) for s in parts])
                          for k in ("voltages", "converged", "iterations", "residual")))
    return _solve_rows(net, params, x, max_iterations, cold)


def _start_step(net: Network, p: Params, v: np.ndarray) -> None:
    """A cold start's first step, in place: the node voltages with every diode replaced by
    a stiff source at its voltage at :data:`START_CURRENT` (I = I₀ + G·(V − V₀), G =
    :data:`START_SIEMENS`), the MOSFETs and resistors as they are at ``v``: one linear solve.

    From all-zero voltages, junction limiting lets each forward junction climb only a
    logarithmic step per iteration (and scales the whole row's step with it), so a string of
    LEDs took tens of iterations to reach conduction (52 for the demo's MOSFET sink); from
    here the junctions start just below conduction, where limiting takes them up in a few.
    Newton's method then runs as from any other start, to the same tolerances.

    Networks with a BJT are not started this way: a linear transistor has no saturation, so
    the step would drive a saturated sink's collector far below ground, and the iterations
    back cost more than the step saves (tested on random drives).
    """
    n = net.n_nodes
    f, j = _assemble(net, p, v, _Start.of(p))
    dx = _newton_step(j, f)
    v[:, :n] += np.where(np.isfinite(dx), dx, 0.0)


def _rows_start(net: Network, params: Params, x: np.ndarray, max_iterations: int,
                cold: bool) -> tuple:
    """What both Newton loops start from: per row, converged (False), iteration count (0)
    and residual (inf); the active rows (all); the junctions; the unknowns and fixed
    voltages side by side (V), after :func:`_start_step` when ``cold`` asks for it and the
    network allows it; the number of the first iteration left to run (2 after the start
    step, else 1)."""
    rows, n = params.rows, net.n_nodes
    v = np.concatenate([x, params.fixed], axis=1)
    first = 1
    if cold and n and rows and len(net.diodes) and not len(net.bjts) and max_iterations > 1:
        _start_step(net, params, v)
        first = 2
    return (np.zeros(rows, bool), np.zeros(rows, int), np.full(rows, np.inf), np.arange(rows),
            _Junctions.of(params), v, first)


def _solve_rows(net: Network, params: Params, x: np.ndarray, max_iterations: int,
                cold: bool = False) -> Solution:
    """Newton's method on the rows; ``cold`` (no initial voltages given) starts with
    :func:`_start_step`, counted as the first iteration.

    A row's count and residual are written when it converges (and, for the rows left, once
    at the end), not at every iteration; converged rows leave the arrays through one index.
    The arithmetic is :func:`_solve_rows_plain`'s, operation for operation: the same numbers
    bit for bit (tests/test_solve_rows_plain.py). On the tiny networks of a check each iteration
    costs numpy's per-call overhead more than arithmetic, so fewer calls is faster.
    """
    n = net.n_nodes
    converged, iterations, residual, active, junctions, v, first = _rows_start(
        net, params, x, max_iterations, cold)
    p = params
    last, largest = 0, None
    for step in range(first, max_iterations + 1):
        if active.size == 0:
            break
        f, j = _assemble(net, p, v)
        dx = _newton_step(j, f) if n else np.zeros((active.size, 0))
        finite = np.isfinite(dx)
        if not finite.all():
            dx = np.where(finite, dx, 0.0)
        alpha = _step_factor(net, junctions, v, dx)
        v[:, :n] += alpha[:, None] * dx
        last = step
        largest = np.abs(f).max(axis=1, initial=0.0)
        done = ((largest <= CURRENT_TOL)
                & (np.abs(dx).max(axis=1, initial=0.0) <= VOLTAGE_TOL) & (alpha >= 1.0))
        if done.any():
            finished = active[done]
            x[finished] = v[done, :n]
            converged[finished] = True
            iterations[finished] = step
            residual[finished] = largest[done]
            keep = np.flatnonzero(~done)
            active, v, largest = active[keep], v[keep], largest[keep]
            p, junctions = p.take(keep), junctions.take(keep)
    if largest is not None and active.size:
        iterations[active] = last
        residual[active] = largest
    x[active] = v[:, :n]
    return Solution(np.concatenate([x, params.fixed], axis=1), converged, iterations, residual)


def _solve_rows_plain(net: Network, params: Params, x: np.ndarray, max_iterations: int,
                cold: bool = False) -> Solution:
    """:func:`_solve_rows` as first written (the plain twin its tests compare with, number
    for number): each iteration records every active row's count and residual, and the
    arrays are cut down with boolean masks."""
    n = net.n_nodes
    converged, iterations, residual, active, junctions, v, first = _rows_start(
        net, params, x, max_iterations, cold)
    p = params
    for step in range(first, max_iterations + 1):
        if active.size == 0:
            break
        f, j = _assemble(net, p, v)
        dx = _newton_step(j, f) if n else np.zeros((active.size, 0))
        dx = np.where(np.isfinite(dx), dx, 0.0)
        alpha = _step_factor(net, junctions, v, dx)
        v[:, :n] += alpha[:, None] * dx
        iterations[active] = step
        largest = np.abs(f).max(axis=1, initial=0.0)
        residual[active] = largest
        done = ((largest <= CURRENT_TOL)
                & (np.abs(dx).max(axis=1, initial=0.0) <= VOLTAGE_TOL) & (alpha >= 1.0))
        if done.any():
            x[active[done]] = v[done, :n]
            converged[active[done]] = True
            keep = ~done
            active, v, p, junctions = active[keep], v[keep], p.take(keep), junctions.take(keep)
    x[active] = v[:, :n]
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
