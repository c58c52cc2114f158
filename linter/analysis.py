"""From LED groups to solved :class:`~linter.results.GroupResult` records.

:func:`analyse` builds each group's network (:mod:`linter.netbuild`), puts groups of
identical structure into one batch, chooses the corners (:mod:`linter.corners`), solves every
scenario at every corner of every group of a batch in one vectorised Newton run
(:mod:`linter.batchsolve`) and reduces the rows to spans with the corner of each extreme.
Work is done once per electrically distinct group: a group whose key
(:mod:`linter.group_key`, coded flat by :mod:`linter.key_tables`) repeats an earlier group's
takes that result with its own names (:mod:`linter.result_rename`: a
:class:`~linter.result_rename.FollowerResult`, whose records are built from the template's
on first access; a template's followers are made together), and groups of a batch with
equal solver inputs are solved once (:mod:`linter.solve_memo`).
:func:`operating_point` solves one group at one named corner (for tests and for rules that
need a particular point).
"""

from __future__ import annotations

import gc
import time
from collections import deque
from contextlib import contextmanager
from dataclasses import dataclass
from functools import partial
from itertools import repeat
from operator import is_not
from typing import Iterable, Iterator, Mapping

import numpy as np

from linter.batchsolve import BucketData, RowPlan, run
from linter.corners import (FULL_PRODUCT_AXES, distinct_codes, probe_codes, vertex_codes,
                            worst_case_codes)
from linter.groups import Group
from linter.model import Circuit
from linter.netbuild import GroupModel, ModelGap, build_model
from linter.partdata import Ambient, PartDataMap, Rail
from linter.reduce import group_result
from linter.reduce_bucket import bucket_results
from linter.key_tables import GroupKeys
from linter.result_rename import Template
from linter.results import GroupResult
from linter.solve_memo import representatives

__all__ = ["VF_PROBE", "WARM_PROBE_AXES", "STAGE_TIMES", "analyse", "operating_point"]

VF_PROBE: float = 0.01
"""V, the Vf shift of the sensitivity row (dI/dVf by finite difference)."""


WARM_PROBE_AXES: int = 4
"""From this many axes, vertex-scheme groups are probed one axis at a time first, so that
every vertex starts Newton's method from the sum of the probed moves (fewer iterations)."""

STAGE_TIMES: dict[str, float] = {}
"""Seconds spent in each stage by the last :func:`analyse` call (for bench scripts)."""

_IS_RESULT = partial(is_not, None)
"""Whether a slot of the results list holds a result (is not None)."""

_OUTPUTS = ("led_i", "res_p", "q_p", "m_p", "pin_i")
"""The outputs whose extremes choose the sensitivity scheme's vertices."""


@contextmanager
def _stage(name: str) -> Iterator[None]:
    started = time.perf_counter()
    try:
        yield
    finally:
        STAGE_TIMES[name] = STAGE_TIMES.get(name, 0.0) + time.perf_counter() - started


@contextmanager
def _gc_paused() -> Iterator[None]:
    """Pause the cyclic garbage collector: the analysis allocates many small acyclic
    records, and collections over a large heap cost more than the work itself.

    On resuming, the records made meanwhile go straight to the oldest generation (freeze,
    then unfreeze), where long-lived objects end up anyway; otherwise the first young
    collection would walk every one of them.
    """
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.freeze()
            gc.unfreeze()
            gc.enable()


@dataclass(frozen=True, eq=False)
class _Bucket:
    """Same-signature models, their stacked figures and their nominal solution."""

    models: list[GroupModel]
    data: BucketData
    ambient: Ambient
    nominal: dict[str, np.ndarray]

    @property
    def x_nominal(self) -> np.ndarray:
        """(G, S, n) nominal node voltages."""
        return self.nominal["v"][:, :, 0, :self.models[0].network.n_nodes]


def _nominal(models: list[GroupModel], data: BucketData, ambient: Ambient) -> _Bucket:
    count = len(models[0].axes)
    codes = np.zeros((len(models), 1, count), np.int8)
    out = run(models, RowPlan(codes, np.zeros(1), np.zeros(1, bool)), ambient, data=data)
    return _Bucket(models, data, ambient, out)


def _probe(bucket: _Bucket) -> dict[str, np.ndarray]:
    """Nominal and each axis alone at each extreme (G, S, 1 + 2k, …), started at nominal."""
    probes = probe_codes(bucket.models[0].axes)
    g, rows = len(bucket.models), probes.shape[0]
    codes = np.broadcast_to(probes, (g,) + probes.shape)
    start = np.broadcast_to(bucket.x_nominal[:, :, None], bucket.x_nominal.shape[:2] + (
        rows, bucket.x_nominal.shape[-1])).reshape(-1, bucket.x_nominal.shape[-1])
    return run(bucket.models, RowPlan(codes, np.zeros(rows), np.zeros(rows, bool)),
               bucket.ambient, start, bucket.data)


def _codes(bucket: _Bucket, probed: dict | None) -> tuple[np.ndarray, np.ndarray, str]:
    """(G, C, A) corner codes (row 0 nominal), distinct rows per group, scheme name."""
    axes = bucket.models[0].axes
    g = len(bucket.models)
    if len(axes) <= FULL_PRODUCT_AXES:
        codes = vertex_codes(axes)
        return (np.broadcast_to(codes, (g,) + codes.shape), np.full(g, codes.shape[0]),
                "vertices")
    assert probed is not None
    outputs = np.concatenate([probed[k] for k in _OUTPUTS], axis=-1)   # (G, S, P, K)
    ok = probed["converged"].astype(bool)
    outputs = np.where(ok, outputs, outputs[:, :, :1])   # a failed probe moves nothing
    worst = worst_case_codes(axes, outputs).reshape(g, -1, len(axes))   # (G, S·2K, A)
    nominal = np.zeros((g, 1, len(axes)), np.int8)
    codes, counts = distinct_codes(np.concatenate([nominal, worst], axis=1))
    return codes, counts, "sensitivity"


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


def _start(bucket: _Bucket, plan: RowPlan, probed: dict | None) -> np.ndarray:
    """Initial voltages of every row (G·S·R, n): nominal plus, when the axes were probed,
    the sum of each axis's probed move to the row's level (superposition)."""
    x_nom = bucket.x_nominal                                        # (G, S, n)
    g, s, n = x_nom.shape
    rows = plan.codes.shape[1]
    start = np.broadcast_to(x_nom[:, :, None], (g, s, rows, n))
    if probed is not None:
        axes = bucket.models[0].axes
        ok = probed["converged"][..., :1].astype(bool)              # (G, S, P, 1)
        x_probe = np.where(ok, probed["v"][..., :n], x_nom[:, :, None])
        low = np.array([a.extremes[0] for a in axes])
        high = np.array([a.extremes[1] for a in axes])
        moves = 0.0
        for level, first in ((low, 1), (high, 2)):
            delta = x_probe[:, :, first::2][:, :, :len(axes)] - x_nom[:, :, None]
            weight = (plan.codes == level).astype(float)            # (G, R, k)
            moves = moves + np.einsum("grk,gskn->gsrn", weight, delta)
        start = start + moves
    return start.reshape(g * s * rows, n)


def _solve_bucket(models: list[GroupModel], ambient: Ambient, per_group: bool = False,
                  memoise: bool = True) -> list[GroupResult]:
    """Every group of a bucket solved and reduced; ``per_group`` reduces each group on its
    own with :func:`linter.reduce.group_result` (the plain reference path, for tests).

    With ``memoise``, groups whose every solver input is the same (see
    :mod:`linter.solve_memo`) are solved once, and each group's records are made from its
    representative's rows with its own names; without, every group is solved.
    """
    with _stage("params"):
        data = BucketData.of(models)
        if memoise:
            first, rep = representatives(models, data)
            solved = [models[i] for i in first.tolist()]
            data = data.take(first)
        else:
            rep, solved = np.arange(len(models)), models
    with _stage("nominal"):
        bucket = _nominal(solved, data, ambient)
    axes = len(models[0].axes)
    probed = None
    if axes > FULL_PRODUCT_AXES or axes >= WARM_PROBE_AXES:
        with _stage("probe"):
            probed = _probe(bucket)
    with _stage("plan"):
        codes, counts, scheme = _codes(bucket, probed)
        plan = _plan(solved, codes)
        start = _start(bucket, plan, probed)
    with _stage("corners"):
        out = run(solved, plan, ambient, start, data)
    corners = codes.shape[1]
    with _stage("reduce"):
        if per_group:
            return [group_result(model, {k: a[r] for k, a in out.items()}, plan.codes[r],
                                 corners, scheme, ambient, VF_PROBE, int(counts[r]))
                    for model, r in zip(models, rep.tolist())]
        return bucket_results(models, out, plan.codes, corners, counts, scheme, ambient,
                              VF_PROBE, rep)


def analyse(groups: Iterable[Group], circuit: Circuit, part_data: PartDataMap,
            rails: Mapping[str, Rail], ambient: Ambient = Ambient(), *,
            memoise: bool = True) -> tuple[GroupResult, ...]:
    """Solve every group at its nominal and worst-case corners.

    With ``memoise`` (the default), a group whose key (:mod:`linter.key_tables`) equals
    an earlier group's is neither built nor solved: its result is the earlier one's with its
    own names (:mod:`linter.result_rename`), its records built when first read; and groups of
    one bucket with the same solver inputs are solved once (:mod:`linter.solve_memo`).
    ``memoise=False`` builds and solves every group (the plain reference path).

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
    STAGE_TIMES.clear()
    results: list[GroupResult | None] = [None] * len(groups)
    with _gc_paused():
        with _stage("build"):
            work = _build(groups, circuit, part_data, dict(rails), results, memoise)
        for members in work.buckets.values():
            solved = _solve_bucket([m for _, m in members], ambient, memoise=memoise)
            for (index, _), result in zip(members, solved):
                results[index] = result
        with _stage("rename"):
            for template, (indices, references) in work.followers.items():
                if not indices:
                    continue
                names, note_parts = work.templates[template]
                made = Template(results[template], note_parts)  # type: ignore[arg-type]
                refs_maps = list(map(dict, map(zip, repeat(names), references)))
                deque(map(results.__setitem__, indices, made.followers(
                    list(map(groups.__getitem__, indices)), refs_maps)), 0)
            work.followers.clear()
    return tuple(filter(_IS_RESULT, results))


@dataclass(frozen=True, eq=False)
class _Work:
    """What :func:`_build` leaves to solve: models by structure signature (with their
    group's index); per template index, its followers (their indices and their references
    in key order) and its own references in key order and its model's note parts."""

    buckets: dict[tuple, list[tuple[int, GroupModel]]]
    followers: dict[int, tuple[list[int], list[tuple[str, ...]]]]
    templates: dict[int, tuple[tuple[str, ...], tuple[tuple[str, str], ...]]]


def _build(groups: tuple[Group, ...], circuit: Circuit, part_data: PartDataMap,
           rails: dict[str, Rail], results: list, memoise: bool) -> _Work:
    """Models of the groups to solve; with ``memoise``, a group whose key
    (:class:`~linter.key_tables.GroupKeys`: equal exactly when the plain
    :func:`~linter.group_key.group_key_plain` keys are) equals an earlier modelled group's is
    a follower of it. A group that cannot be modelled gets its ``unsolved`` result in
    ``results`` (its followers are then built each on its own)."""
    work = _Work({}, {}, {})
    # per key, its template's followers (indices, references), or None when unmodelled
    first: dict[tuple, tuple[list[int], list[tuple[str, ...]]] | None] = {}
    keyed = GroupKeys(circuit, part_data, rails).key
    for index, group in enumerate(groups):
        key: tuple | None = None
        if memoise:
            try:
                key, names = keyed(group)
                followers = first.get(key)
            except TypeError:   # a figure that cannot be hashed: built on its own
                key, followers = None, None
            if followers is not None:
                followers[0].append(index)
                followers[1].append(names)
                continue
        try:
            model = build_model(group, circuit, part_data, rails)
        except ModelGap as exc:
            results[index] = GroupResult(group, "unsolved", reason=str(exc))
            if key is not None:
                first.setdefault(key, None)
            continue
        if key is not None:
            work.templates[index] = (names, model.note_parts)
            first[key] = work.followers[index] = ([], [])
        work.buckets.setdefault(model.signature, []).append((index, model))
    return work


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
