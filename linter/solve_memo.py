"""Groups of one bucket that are electrically the same, so that each is solved once.

Models in one bucket share their structure (:attr:`~linter.netbuild.GroupModel.signature`:
the network, the corner axes by kind and position, the pin levels and lit masks of every
scenario, the headroom plan). Two of them give the same solved rows when, besides, every
figure the solver and the reduction read is the same. Those figures are exactly:

* the stacked rows of :class:`~linter.batchsolve.BucketData` (rail min, nom and max of every
  fixed node, a pin's fixed supply, the headroom shift, resistor ohms and tolerances, diode
  n·Vt, tempco and Is at the three Vf levels, BJT Is, hfe_min, hfe_typ and BR, MOSFET VTO,
  KP and λ), compared bit for bit;
* per model, what the bucket reduction reads besides the solved arrays: each BJT's
  Vce_sat (the headroom figure) and the node of the group's top rail (where the headroom
  check reads the rail voltage).

The ambient range is one per analysis. Everything else in a result (references, pin ids,
nets, rail names, notes, corner descriptions) is taken from each group's own model when its
records are made, never from the representative.
"""

from __future__ import annotations

import numpy as np

from linter.batchsolve import BucketData
from linter.netbuild import GroupModel
from linter.reduce import _top_rail

__all__ = ["electrical_keys", "representatives"]

_DATA_FIELDS = ("rails", "supply", "offset", "ohms", "tol", "nvt", "tempco", "d_is", "q", "m")


def electrical_keys(models: list[GroupModel], data: BucketData) -> list[tuple]:
    """One hashable key per model: equal keys ⇒ equal solved rows and reductions."""
    g = len(models)
    rows = np.concatenate([np.ascontiguousarray(getattr(data, name), float).reshape(g, -1)
                           for name in _DATA_FIELDS], axis=1)
    raw = rows.tobytes()
    width = rows.shape[1] * rows.itemsize
    headroom = models[0].headroom is not None
    return [(raw[i * width:(i + 1) * width], tuple(q.vce_sat for q in m.bjts),
             _top_rail(m) if headroom else None) for i, m in enumerate(models)]


def representatives(models: list[GroupModel], data: BucketData
                    ) -> tuple[np.ndarray, np.ndarray]:
    """(first, rep): the index of the first model of each distinct key, ascending, and for
    every model the position in ``first`` of its representative."""
    seen: dict[tuple, int] = {}
    first: list[int] = []
    rep = np.empty(len(models), np.intp)
    for index, key in enumerate(electrical_keys(models, data)):
        found = seen.get(key)
        if found is None:
            found = seen[key] = len(first)
            first.append(index)
        rep[index] = found
    return np.array(first, np.intp), rep
