"""From a whole bucket's solved rows to its groups' :class:`~linter.results.GroupResult`s.

The same reduction as :func:`linter.reduce.group_result` (which stays as the plain
per-group reference), done with array operations over every group of a bucket at once:
each extreme is one ``argmin``/``argmax`` over (scenario × corner) for all groups and
elements together; only the frozen records are then built group by group, and each group's
corners are described once, when a span first names them.

Input arrays are shaped (G, S, R, k): groups, scenarios, rows (the C corners first — row 0
nominal — then the Vf-sensitivity row, then the headroom copies of the corners), elements.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from linter.corners import LEVEL_NAMES, Corner, Levels
from linter.netbuild import GroupModel
from linter.partdata import Ambient
from linter.records import record
from linter.reduce import _rails_by_name, _top_rail
from linter.results import GroupResult, LedResult, PinResult, ResistorResult, Span, TransistorResult

__all__ = ["bucket_results"]

_NAN = float("nan")


@record(eq=False)
class _Spans:
    """Spans of k elements of every group: arrays (G, k); ``empty`` where no row counts."""

    nom: list
    low: list
    high: list
    at_low: list
    at_high: list
    empty: list


def _spans(values: np.ndarray, mask: np.ndarray, nominal: np.ndarray | None = None) -> _Spans:
    """Spans of ``values`` (G, S, C, k) over ``mask`` (broadcast to it).

    ``nominal`` (G, k) the scenario whose nominal row is the span's ``nom``; by default the
    scenario with the largest converged nominal value (0 when none converged).
    """
    g, s, c, k = values.shape
    mask = np.broadcast_to(mask, values.shape)
    if nominal is None:
        first = np.where(mask[:, :, 0], values[:, :, 0], -np.inf)        # (G, S, k)
        nominal = np.where(mask[:, :, 0].any(axis=1), np.argmax(first, axis=1), 0)
    nom = np.take_along_axis(values[:, :, 0], nominal[:, None, :], axis=1)[:, 0]
    flat = np.moveaxis(values, -1, 1).reshape(g, k, s * c)
    ok = np.moveaxis(mask, -1, 1).reshape(g, k, s * c)
    at_low = np.argmin(np.where(ok, flat, np.inf), axis=-1)
    at_high = np.argmax(np.where(ok, flat, -np.inf), axis=-1)
    low = np.take_along_axis(flat, at_low[..., None], axis=-1)[..., 0]
    high = np.take_along_axis(flat, at_high[..., None], axis=-1)[..., 0]
    return _Spans(nom.tolist(), low.tolist(), high.tolist(), at_low.tolist(),
                  at_high.tolist(), (~ok.any(axis=-1)).tolist())


class _Namer:
    """Describes one group's corners, each (scenario, row) once. The corners' level
    mappings are :class:`~linter.corners.Levels` over one names tuple per axis kind, each
    distinct one made once; equal rail mappings are one dict (corners are read-only)."""

    def __init__(self, model: GroupModel, codes: np.ndarray, corners: int,
                 ambient: Ambient) -> None:
        self.codes, self.corners, self.ambient = codes, corners, ambient
        self.scenarios = [s.name for s in model.group.scenarios]
        rails = _rails_by_name(model)
        self.rails = [(i, a.name, rails.get(a.name)) for i, a in enumerate(model.axes)
                      if a.kind == "rail"]
        self.ambient_axis = next((i for i, a in enumerate(model.axes) if a.kind == "ambient"),
                                 None)
        self.kinds = {kind: ([i for i, a in enumerate(model.axes) if a.kind == kind],
                             tuple(a.name for a in model.axes if a.kind == kind),
                             LEVEL_NAMES[kind]) for kind in ("vf", "beta", "resistor")}
        self.known: dict[int, Corner] = {}
        self.shared: dict[tuple, Any] = {}

    def __call__(self, flat_index: int) -> Corner:
        found = self.known.get(flat_index)
        if found is None:
            s, c = divmod(flat_index, self.corners)
            found = self.known[flat_index] = self.describe(s, c)
        return found

    def describe(self, s: int, c: int) -> Corner:
        row = self.codes[c].tolist()
        ambient = self.ambient
        temp = ambient.reference
        if self.ambient_axis is not None:
            temp = (ambient.min, ambient.reference, ambient.max)[row[self.ambient_axis] + 1]
        rails = {name: (LEVEL_NAMES["rail"][row[i]],
                        (rail.min, rail.nom, rail.max)[row[i] + 1] if rail else _NAN)
                 for i, name, rail in self.rails}
        shared = self.shared
        rails = shared.setdefault(("rail",) + tuple(rails.items()), rails)
        levels = []
        for kind, (indices, names, words) in self.kinds.items():
            key = (kind,) + tuple(words[row[i]] for i in indices)
            found = shared.get(key)
            if found is None:
                found = shared[key] = Levels(names, key[1:])
            levels.append(found)
        return Corner(self.scenarios[s], rails, temp, *levels)


def _span(spans: _Spans, g: int, k: int, namer: _Namer) -> Span:
    if spans.empty[g][k]:
        return Span(_NAN, _NAN, _NAN)
    return Span(spans.nom[g][k], spans.low[g][k], spans.high[g][k], namer(spans.at_low[g][k]),
                namer(spans.at_high[g][k]))


def _flat_pick(values: np.ndarray, hit: np.ndarray, largest: bool) -> tuple[list, list, list]:
    """Per (G, k): whether any ``hit`` (G, S, C, k) row, the flat (S·C) index and value of
    the smallest (or largest) ``values`` among them."""
    g, s, c, k = values.shape
    flat = np.moveaxis(values, -1, 1).reshape(g, k, s * c)
    ok = np.moveaxis(np.broadcast_to(hit, values.shape), -1, 1).reshape(g, k, s * c)
    fill = -np.inf if largest else np.inf
    masked = np.where(ok, flat, fill)
    at = np.argmax(masked, axis=-1) if largest else np.argmin(masked, axis=-1)
    value = np.take_along_axis(masked, at[..., None], axis=-1)[..., 0]
    return ok.any(axis=-1).tolist(), at.tolist(), value.tolist()


class _Bucket:
    """A bucket's solved arrays, cut to the corner rows, with the per-element spans."""

    def __init__(self, models: list[GroupModel], out: dict, corners: int) -> None:
        self.models, self.out, self.c = models, out, corners
        self.first = models[0]
        self.ok = out["converged"][:, :, :corners, 0].astype(bool)        # (G, S, C)

    def grid(self, key: str, index: list[int] | None = None) -> np.ndarray:
        values = self.out[key][:, :, :self.c]
        return values if index is None else values[..., index]


def _led_table(b: _Bucket, probe: float) -> dict:
    leds = [i for i, d in enumerate(b.first.diodes) if d.curve is not None]
    count = len(leds)
    if not count:
        return {"count": 0}
    lit = b.first.lit                                                    # (S, L)
    lit_any = np.where(lit.any(axis=0), lit, True)
    first = np.argmax(lit_any, axis=0)                                   # (L,)
    mask = b.ok[..., None] & lit_any[None, :, None, :]
    nominal = np.broadcast_to(first, (len(b.models), count))
    table = {k: _spans(b.grid(key), mask, nominal)
             for k, key in (("i", "led_i"), ("vf", "led_vf"), ("p", "led_p"))}
    _, rev_at, rev = _flat_pick(b.grid("led_rev"), b.ok[..., None], largest=True)
    current = b.out["led_i"]
    columns = np.arange(count)
    shifted = current[:, first, b.c, columns] - current[:, first, 0, columns]
    table.update(count=count, rev=rev, rev_at=rev_at, di_dvf=(shifted / probe).tolist(),
                 lit=[np.flatnonzero(lit[:, i]).tolist() for i in range(count)])
    return table


def _transistor_tables(b: _Bucket) -> dict:
    out: dict = {}
    if b.first.bjts:
        current = b.grid("q_ic")
        out["q"] = {k: _spans(b.grid(key), b.ok[..., None])
                    for k, key in (("vce", "q_vce"), ("i", "q_ic"), ("p", "q_p"))}
        out["q_sat"] = _flat_pick(current, b.ok[..., None] & (b.grid("q_sat") > 0.5), False)
    if b.first.mosfets:
        current = b.grid("m_id")
        out["m"] = {k: _spans(b.grid(key), b.ok[..., None])
                    for k, key in (("vds", "m_vds"), ("i", "m_id"), ("p", "m_p"),
                                   ("vgs", "m_vgs"))}
        limiting = (b.grid("m_limit") * (current > 1e-6)) > 0.5
        out["m_sat"] = _flat_pick(current, b.ok[..., None] & limiting, False)
    return out


def _rail_min_table(b: _Bucket) -> dict | None:
    """Per group and BJT, the lowest headroom-rail voltage that keeps it regulating (see
    :func:`linter.reduce._rail_min`), or None without headroom rows."""
    from linter.batchsolve import headroom_offset
    model = b.first
    if model.headroom is None or not model.bjts:
        return None
    node, sign, _ = model.headroom
    tops = [(None, node) if sign > 0 else _top_rail(m) for m in b.models]
    if any(top is None for top in tops):
        return None
    aux = slice(b.c + 1, 2 * b.c + 1)
    vce_sat = np.array([[q.vce_sat for q in m.bjts] for m in b.models], float)
    vce_aux = b.out["q_vce"][:, :, aux]                                   # (G, S, C, mq)
    nodes = np.array([top[1] for top in tops], int)                      # type: ignore[index]
    rail_v = b.out["v"][np.arange(len(nodes)), :, :b.c, nodes][..., None]
    need = rail_v - (vce_aux - headroom_offset(model) - vce_sat[:, None, None, :])
    aux_ok = b.out["converged"][:, :, aux, 0].astype(bool) & b.ok
    return dict(zip(("any", "at", "value"), _flat_pick(need, aux_ok[..., None], True)))


def _leds(table: dict, g: int, model: GroupModel, namer: _Namer) -> tuple[LedResult, ...]:
    """The LED records of group ``g``; the scenarios lit are named by the group's own
    scenarios (the bucket shares which are lit, not their names)."""
    specs = [d for d in model.diodes if d.curve is not None]
    names = namer.scenarios
    return tuple(LedResult(
        spec.ref, spec.part_number, _span(table["i"], g, i, namer),
        _span(table["vf"], g, i, namer), _span(table["p"], g, i, namer),
        tuple(names[s] for s in table["lit"][i]),
        table["rev"][g][i], namer(table["rev_at"][g][i]), table["di_dvf"][g][i],
        spec.curve.assumed) for i, spec in enumerate(specs))


def _resistors(table: dict, g: int, model: GroupModel, namer: _Namer
               ) -> tuple[ResistorResult, ...]:
    parts = [x for x in model.resistors if x.role == "part"]
    return tuple(ResistorResult(x.ref, x.ohms, x.tolerance, _span(table["i"], g, i, namer),
                                _span(table["p"], g, i, namer), x.rating_w, x.package)
                 for i, x in enumerate(parts))


def _pins(table: dict, g: int, model: GroupModel, namer: _Namer) -> tuple[PinResult, ...]:
    return tuple(PinResult(pin.id, pin.net, _span(table["i"], g, i, namer),
                           table["sourcing"][g][i], pin.current_max)
                 for i, pin in enumerate(model.pins))


def _saturation(pick: tuple, g: int, i: int, namer: _Namer):
    if not pick[0][g][i]:
        return False, None, None
    return True, namer(pick[1][g][i]), pick[2][g][i]


def _transistors(tables: dict, rails: dict | None, g: int, model: GroupModel,
                 namer: _Namer) -> tuple[TransistorResult, ...]:
    results = []
    setter = model.group.setter
    for i, q in enumerate(model.bjts):
        spans = tables["q"]
        saturated, at, i_sat = _saturation(tables["q_sat"], g, i, namer)
        regulating = model.group.topology in ("npn-sink", "pnp-source") and (
            setter == q.ref or len(model.bjts) == 1)
        rail_min, rail_at, rail = None, None, None
        if regulating and rails is not None:
            rail = _headroom_rail(model)
            if rails["any"][g][i]:
                rail_min, rail_at = rails["value"][g][i], namer(rails["at"][g][i])
        results.append(TransistorResult(
            q.ref, "npn" if q.polarity > 0 else "pnp", _span(spans["vce"], g, i, namer),
            _span(spans["i"], g, i, namer), _span(spans["p"], g, i, namer), saturated, at,
            i_sat, rail_min, rail_at, rail, q.vce_sat))
    for i, m in enumerate(model.mosfets):
        spans = tables["m"]
        saturated, at, i_sat = _saturation(tables["m_sat"], g, i, namer)
        results.append(TransistorResult(
            m.ref, "nmos" if m.polarity > 0 else "pmos", _span(spans["vds"], g, i, namer),
            _span(spans["i"], g, i, namer), _span(spans["p"], g, i, namer), saturated, at,
            i_sat, vgs=_span(spans["vgs"], g, i, namer), vgs_th=m.vto))
    return tuple(results)


def _headroom_rail(model: GroupModel) -> str | None:
    _, sign, net = model.headroom  # type: ignore[misc]
    if sign > 0:
        return net
    top = _top_rail(model)
    return top[0] if top else None


def _simple_tables(b: _Bucket) -> tuple[dict, dict]:
    parts = [i for i, r in enumerate(b.first.resistors) if r.role == "part"]
    resistors = {"i": _spans(b.grid("res_i"), b.ok[..., None]),
                 "p": _spans(b.grid("res_p"), b.ok[..., None])} if parts else {}
    pins: dict = {}
    if b.first.pins:
        signed = b.grid("pin_i")
        size = np.abs(signed)
        pins["i"] = _spans(size, b.ok[..., None])
        _, at, _ = _flat_pick(size, b.ok[..., None], True)
        g, s, c, k = signed.shape
        flat = np.moveaxis(signed, -1, 1).reshape(g, k, s * c)
        picked = np.take_along_axis(flat, np.array(at, int).reshape(g, k, 1), axis=-1)[..., 0]
        pins["sourcing"] = (picked >= 0).tolist()
    return resistors, pins


def bucket_results(models: list[GroupModel], out: dict, codes: np.ndarray, corners: int,
                   distinct: np.ndarray, scheme: str, ambient: Ambient, probe: float,
                   rep: np.ndarray | None = None) -> list[GroupResult]:
    """Every group's result from the bucket's rows (arrays (G', S, R, k)); ``codes`` (G', R, A)
    the row codes, ``corners`` the corner rows per scenario of which ``distinct`` (G',)
    differ (the rest repeat the nominal corner).

    ``rep`` (G,) gives, for each of ``models``, the row block (0 … G'−1) solved for it (see
    :mod:`linter.solve_memo`; by default model g has block g); block b was solved for the
    first model that names it. The tables are reduced once per block, and each group's
    records are made with its own names.
    """
    rep = np.arange(len(models)) if rep is None else rep
    first = np.full(out["converged"].shape[0], -1, np.intp)
    for index, block in reversed(list(enumerate(rep.tolist()))):
        first[block] = index
    b = _Bucket([models[i] for i in first.tolist()], out, corners)
    leds = _led_table(b, probe)
    resistors, pins = _simple_tables(b)
    transistors = _transistor_tables(b)
    rails = _rail_min_table(b)
    any_ok = b.ok.any(axis=(1, 2)).tolist()
    results = []
    for model, g in zip(models, rep.tolist()):
        count = int(distinct[g])
        if not any_ok[g]:
            results.append(GroupResult(model.group, "unsolved", corners=count, scheme=scheme,
                                       notes=model.notes,
                                       reason="Newton's method did not converge"))
            continue
        namer = _Namer(model, codes[g], corners, ambient)
        failed = [namer(s * corners + c) for s, c in zip(*np.nonzero(~b.ok[g][:, :count]))][:10]
        top = _top_rail(model)
        rail = top[0] if top else next((p.supply.name for p in model.pins if p.supply), None)
        results.append(GroupResult(
            model.group, "solved", rail, _leds(leds, g, model, namer) if leds["count"] else (),
            _resistors(resistors, g, model, namer) if resistors else (),
            _transistors(transistors, rails, g, model, namer), _pins(pins, g, model, namer)
            if pins else (), count, scheme, tuple(failed), model.notes))
    return results
