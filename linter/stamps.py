"""Where each element's current and conductances land in the nodal equations.

A :class:`StampPlan` is built once per :class:`~linter.solve.Network`. Element currents and
conductances are evaluated as compact columns over the batch (one column per element and
quantity: a resistor's G, a diode's dI/dV, a BJT's four derivatives, a MOSFET's gm and
gds); each column feeds a few signed entries of the KCL residual F (B, n) and the Jacobian
J (B, n·n). The entries are sorted by target once, so that every Newton iteration
assembles F and J with one gather and one ``np.add.reduceat`` each.

Residual columns: ``[i_r (mr), i_d (md), ic (mq), ib (mq), s·id (mm)]`` (A).
Jacobian columns: ``[g_r (mr), g_d (md), ∂ic/∂vbe, ∂ic/∂vbc, ∂ib/∂vbe, ∂ib/∂vbc (mq each),
gm, gds (mm each)]`` (S). A PNP or P-MOSFET flips the sign of both its voltages and its
currents, so its conductance entries are those of the N device.
"""

from __future__ import annotations

import numpy as np

from linter.records import record

__all__ = ["Scatter", "StampPlan", "junction_nodes"]


@record(eq=False)
class Scatter:
    """Signed entries (column → target), sorted by target, every target present.

    A target without entries gets one entry of sign 0, so that ``np.add.reduceat`` over the
    gathered, signed columns yields every target in order: no zeroed array, no scatter, and
    no matrix product (whose threading costs more than it saves on so few columns).
    """

    columns: np.ndarray
    signs: np.ndarray
    starts: np.ndarray
    size: int

    @classmethod
    def of(cls, entries: list[tuple[int, int, float]], size: int) -> "Scatter":
        """From (column, target, sign) triples (targets already restricted to unknowns)."""
        present = {target for _, target, _ in entries}
        entries = entries + [(0, target, 0.0) for target in range(size) if target not in present]
        table = sorted(entries, key=lambda e: e[1])
        targets = np.array([e[1] for e in table], int)
        starts = np.flatnonzero(np.r_[True, targets[1:] != targets[:-1]]) if table else targets
        return cls(np.array([e[0] for e in table], int), np.array([e[2] for e in table]),
                   starts, size)

    def apply(self, values: np.ndarray) -> np.ndarray:
        """(B, size): the entries of ``values`` (B, columns) summed into their targets."""
        if values.shape[1] == 0 or self.size == 0:
            return np.zeros((values.shape[0], self.size))
        gathered = values.take(self.columns, axis=1)
        gathered *= self.signs
        return np.add.reduceat(gathered, self.starts, axis=1)


def _two_terminal(pairs: np.ndarray, first: int, f: list, j: list) -> None:
    for index, (a, b) in enumerate(pairs.tolist()):
        col = first + index
        f += [(col, a, 1.0), (col, b, -1.0)]
        j += [(col, a, a, 1.0), (col, b, b, 1.0), (col, a, b, -1.0), (col, b, a, -1.0)]


def _bjt_entries(nodes: np.ndarray, first: int, mq: int, f: list, j: list) -> None:
    """Residual columns ic, ib and Jacobian columns ∂ic/∂vbe, ∂ic/∂vbc, ∂ib/∂vbe, ∂ib/∂vbc
    start at ``first`` (mq columns each)."""
    for index, (c, b, e) in enumerate(nodes.tolist()):
        ic, ib = first + index, first + mq + index
        f += [(ic, c, 1.0), (ib, b, 1.0), (ic, e, -1.0), (ib, e, -1.0)]
        a_, bc, cb, d = (first + k * mq + index for k in range(4))
        for col, (row, column), sign in (
                (bc, (c, c), -1), (a_, (c, b), 1), (bc, (c, b), 1), (a_, (c, e), -1),
                (d, (b, c), -1), (cb, (b, b), 1), (d, (b, b), 1), (cb, (b, e), -1),
                (bc, (e, c), 1), (d, (e, c), 1), (a_, (e, b), -1), (bc, (e, b), -1),
                (cb, (e, b), -1), (d, (e, b), -1), (a_, (e, e), 1), (cb, (e, e), 1)):
            j.append((col, row, column, float(sign)))


def _mosfet_entries(nodes: np.ndarray, f_first: int, j_first: int, mm: int, f: list,
                    j: list) -> None:
    for index, (d, g, s) in enumerate(nodes.tolist()):
        col = f_first + index
        f += [(col, d, 1.0), (col, s, -1.0)]
        gm, gds = j_first + index, j_first + mm + index
        for c, (row, column), sign in (
                (gds, (d, d), 1), (gm, (d, g), 1), (gm, (d, s), -1), (gds, (d, s), -1),
                (gds, (s, d), -1), (gm, (s, g), -1), (gm, (s, s), 1), (gds, (s, s), 1)):
            j.append((c, row, column, float(sign)))


@record(eq=False)
class StampPlan:
    """The residual and Jacobian scatters of one network."""

    f: Scatter
    j: Scatter

    @classmethod
    def of(cls, net) -> "StampPlan":
        n = net.n_nodes
        mr, md, mq, mm = (len(a) for a in (net.resistors, net.diodes, net.bjts, net.mosfets))
        f: list = []
        j: list = []
        _two_terminal(np.asarray(net.resistors, int), 0, f, j)
        _two_terminal(np.asarray(net.diodes, int), mr, f, j)
        _bjt_entries(np.asarray(net.bjts, int), mr + md, mq, f, j)
        _mosfet_entries(np.asarray(net.mosfets, int), mr + md + 2 * mq, mr + md + 4 * mq, mm,
                        f, j)
        f_kept = [(c, node, s) for c, node, s in f if node < n]
        j_kept = [(c, row * n + col, s) for c, row, col, s in j if row < n and col < n]
        return cls(Scatter.of(f_kept, n), Scatter.of(j_kept, n * n))


def junction_nodes(net) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Every pn junction as (anode nodes, cathode nodes, polarity): the diodes, then each
    BJT's base–emitter junction, then its base–collector junction."""
    s_q = np.asarray(net.bjt_polarity, float)
    a = np.concatenate([net.diodes[:, 0], net.bjts[:, 1], net.bjts[:, 1]]).astype(int)
    k = np.concatenate([net.diodes[:, 1], net.bjts[:, 2], net.bjts[:, 0]]).astype(int)
    sign = np.concatenate([np.ones(len(net.diodes)), s_q, s_q])
    return a, k, sign
