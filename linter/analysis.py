"""From LED groups to solved :class:`~linter.results.GroupResult` records.

:func:`analyse` builds each group's network (:mod:`linter.netbuild`), puts groups of
identical structure into one batch, chooses the corners (:mod:`linter.corners`), solves every
scenario at every corner of every group of a batch in one vectorised Newton run
(:mod:`linter.batchsolve`) and reduces the rows to spans with the corner of each extreme.
:func:`operating_point` solves one group at one named corner (for tests and for rules that
need a particular point).
"""

from __future__ import annotations

from typing import Iterable, Mapping

import numpy as np

from linter.batchsolve import RowPlan, run
from linter.corners import (FULL_PRODUCT_AXES, probe_codes, vertex_codes, worst_case_codes)
from linter.groups import Group
from linter.model import Circuit
from linter.netbuild import GroupModel, ModelGap, build_model
from linter.partdata import Ambient, PartDataMap, Rail
from linter.reduce import group_result
from linter.results import GroupResult

__all__ = ["VF_PROBE", "analyse", "operating_point"]

VF_PROBE: float = 0.01
"""V, the Vf shift of the sensitivity row (dI/dVf by finite difference)."""


def _codes(models: list[GroupModel], ambient: Ambient) -> tuple[np.ndarray, str]:
    """(G, C, A) corner codes, row 0 nominal, and the scheme's name."""
    axes = models[0].axes
    g = len(models)
    if len(axes) <= FULL_PRODUCT_AXES:
        codes = vertex_codes(axes)
        return np.broadcast_to(codes, (g,) + codes.shape).copy(), "vertices"
    probes = np.broadcast_to(probe_codes(axes), (g,) + probe_codes(axes).shape).copy()
    count = probes.shape[1]
    out = run(models, RowPlan(probes, np.zeros(count), np.zeros(count, bool)), ambient)
    outputs = np.concatenate([out[k] for k in ("led_i", "res_p", "q_p", "m_p", "pin_i")], axis=-1)
    worst = worst_case_codes(axes, outputs)                   # (G, S, 2K, A)
    worst = worst.reshape(g, -1, len(axes))
    nominal = np.zeros((g, 1, len(axes)), np.int8)
    return np.concatenate([nominal, worst], axis=1), "sensitivity"


def _plan(models: list[GroupModel], codes: np.ndarray) -> RowPlan:
    """Corner rows, then the Vf-sensitivity row, then headroom copies of the corners."""
    g, c, _ = codes.shape
    parts = [codes, codes[:, :1]]
    shift = [np.zeros(c), np.full(1, VF_PROBE)]
    aux = [np.zeros(c, bool), np.zeros(1, bool)]
    if models[0].headroom is not None:
        parts.append(codes)
        shift.append(np.zeros(c))
        aux.append(np.ones(c, bool))
    return RowPlan(np.concatenate(parts, axis=1), np.concatenate(shift), np.concatenate(aux))


def _warm_start(models: list[GroupModel], plan: RowPlan, ambient: Ambient) -> np.ndarray:
    """Initial voltages for every row: each group's nominal solution (fewer iterations)."""
    nominal = run(models, RowPlan(plan.codes[:, :1], np.zeros(1), np.zeros(1, bool)), ambient)
    n = models[0].network.n_nodes
    start = nominal["v"][..., :n]                               # (G, S, 1, n)
    g, s = start.shape[:2]
    c = plan.codes.shape[1]
    return np.broadcast_to(start, (g, s, c, n)).reshape(g * s * c, n)


def _solve_bucket(models: list[GroupModel], ambient: Ambient) -> list[GroupResult]:
    codes, scheme = _codes(models, ambient)
    plan = _plan(models, codes)
    out = run(models, plan, ambient, _warm_start(models, plan, ambient))
    corners = codes.shape[1]
    return [group_result(model, {k: a[i] for k, a in out.items()}, plan.codes[i], corners,
                         scheme, ambient, VF_PROBE) for i, model in enumerate(models)]


def analyse(groups: Iterable[Group], circuit: Circuit, part_data: PartDataMap,
            rails: Mapping[str, Rail], ambient: Ambient = Ambient()) -> tuple[GroupResult, ...]:
    """Solve every group at its nominal and worst-case corners.

    Parameters
    ----------
    groups : the LED groups (from :mod:`linter.topology`).
    circuit : the Circuit the groups' parts and nets belong to.
    part_data : part data by part reference (LedData, BjtData, MosfetData, McuData,
        ResistorData).
    rails : Rail by net name; a net of a known voltage is a fixed node.
    ambient : the ambient range (°C).

    Returns
    -------
    tuple of GroupResult, in the order of ``groups``. A group that cannot be modelled is
    returned with ``status == "unsolved"`` and the reason.
    """
    groups = tuple(groups)
    results: list[GroupResult | None] = [None] * len(groups)
    buckets: dict[tuple, list[tuple[int, GroupModel]]] = {}
    for index, group in enumerate(groups):
        try:
            model = build_model(group, circuit, part_data, dict(rails))
        except ModelGap as exc:
            results[index] = GroupResult(group, "unsolved", reason=str(exc))
            continue
        buckets.setdefault(model.signature, []).append((index, model))
    for members in buckets.values():
        solved = _solve_bucket([m for _, m in members], ambient)
        for (index, _), result in zip(members, solved):
            results[index] = result
    return tuple(r for r in results if r is not None)


def operating_point(group: Group, circuit: Circuit, part_data: PartDataMap,
                    rails: Mapping[str, Rail], ambient: Ambient = Ambient(),
                    levels: Mapping[tuple[str, str], int] | None = None
                    ) -> dict[str, dict[str, float]]:
    """LED currents (A) of one group at one corner, by scenario name then LED reference.

    ``levels`` maps (axis kind, name) — e.g. ``("rail", "+12V")``, ``("vf", "D11")``,
    ``("ambient", "ambient")`` — to a level (see :mod:`linter.corners`); unnamed axes stay
    nominal. Raises ModelGap when the group cannot be modelled, RuntimeError when Newton's
    method does not converge.
    """
    model = build_model(group, circuit, part_data, dict(rails))
    codes = np.zeros((1, 1, len(model.axes)), np.int8)
    for (kind, name), level in (levels or {}).items():
        matches = [i for i, a in enumerate(model.axes) if (a.kind, a.name) == (kind, name)]
        if not matches:
            raise KeyError(f"{group.id}: no axis {kind} {name}")
        codes[0, 0, matches[0]] = level
    out = run([model], RowPlan(codes, np.zeros(1), np.zeros(1, bool)), ambient)
    if not out["converged"].all():
        raise RuntimeError(f"{group.id}: not converged")
    refs = [d.ref for d in model.diodes if d.curve is not None]
    return {scenario.name: {ref: float(out["led_i"][0, s, 0, i]) for i, ref in enumerate(refs)}
            for s, scenario in enumerate(group.scenarios)}
