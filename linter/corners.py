"""The corner set: which combinations of tolerances a group is solved at.

A group has independent parameters, each an :class:`Axis` with integer levels:

=========  ====================================  ===========================
kind       levels                                meaning
=========  ====================================  ===========================
rail       −1, 0, +1                             min, nominal, max voltage
resistor   −1, 0, +1                             R·(1 − tol), R, R·(1 + tol)
vf         −1, 0, +1                             the LED at vf_min, vf_typ, vf_max
ambient    −1, 0, +1                             ambient min, 25 °C (reference), max
beta       −1, 0                                 hfe_min, hfe_typ
=========  ====================================  ===========================

Scheme (documented choice). Row 0 is always the nominal corner (every level 0); it is
reported separately. The extremes come from the vertices of the tolerance box (each axis at
its lowest or highest level), because every current the rules look at is monotonic in each
parameter over the box (Ohm's law, the junction law and the transistor equations all are):

* ``vertices`` — up to :data:`FULL_PRODUCT_AXES` axes: nominal plus every vertex
  (2^k rows);
* ``sensitivity`` — more axes: a first pass solves nominal plus each axis moved alone to each
  extreme (:func:`probe_codes`); the signs of those changes give, for each output (each LED
  current, each resistor and transistor power) and each direction, the vertex that pushes
  it furthest (:func:`worst_case_codes`). Two rows per output, all outputs at once.

The Monte Carlo test (tests/test_monte_carlo.py) draws 10,000 random points inside the box
per fixture and checks that no LED current falls outside the reported min–max.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field
from collections.abc import ItemsView
from typing import Literal, Mapping

import numpy as np

from linter.records import record

__all__ = ["AxisKind", "Axis", "FULL_PRODUCT_AXES", "NO_CHANGE_REL", "NO_CHANGE_ABS",
           "LEVEL_NAMES", "Levels", "Corner", "vertex_codes", "probe_codes", "worst_case_codes",
           "distinct_codes"]

AxisKind = Literal["rail", "resistor", "vf", "ambient", "beta"]

FULL_PRODUCT_AXES: int = 7
"""Up to this many axes a group is solved at every vertex (2^7 = 128 rows); beyond it the
sensitivity scheme needs far fewer rows (about 2k + 2K instead of 2^k)."""

NO_CHANGE_REL: float = 1e-9
"""Relative change of a probed output below which an axis counts as not moving it."""
NO_CHANGE_ABS: float = 1e-15
"""Absolute change (in the output's SI unit) below which an axis counts as not moving it."""

LEVEL_NAMES: dict[str, dict[int, str]] = {
    "rail": {-1: "min", 0: "nom", 1: "max"},
    "resistor": {-1: "low", 0: "nom", 1: "high"},
    "vf": {-1: "vf_min", 0: "vf_typ", 1: "vf_max"},
    "ambient": {-1: "min", 0: "ref", 1: "max"},
    "beta": {-1: "hfe_min", 0: "hfe_typ"},
}
"""How each level is named in corner descriptions."""


@record
class Axis:
    """One independent parameter: ``kind`` and the part or rail it belongs to."""

    kind: AxisKind
    name: str

    @property
    def levels(self) -> tuple[int, ...]:
        """The levels this axis takes (see the module table)."""
        return (-1, 0) if self.kind == "beta" else (-1, 0, 1)

    @property
    def extremes(self) -> tuple[int, int]:
        """(lowest, highest) level."""
        return self.levels[0], self.levels[-1]


def vertex_codes(axes: tuple[Axis, ...]) -> np.ndarray:
    """Nominal, then every vertex of the box: (1 + 2^k, k) int8.

    >>> vertex_codes((Axis("rail", "+5V"), Axis("beta", "Q1"))).tolist()
    [[0, 0], [-1, -1], [-1, 0], [1, -1], [1, 0]]
    """
    rows = [np.zeros(len(axes), np.int8)]
    rows += [np.array(v, np.int8) for v in itertools.product(*(a.extremes for a in axes))]
    return np.array(rows, np.int8).reshape(len(rows), len(axes))


def probe_codes(axes: tuple[Axis, ...]) -> np.ndarray:
    """Nominal, then each axis alone at its low and at its high extreme: (1 + 2k, k).

    >>> probe_codes((Axis("rail", "+5V"), Axis("beta", "Q1"))).tolist()
    [[0, 0], [-1, 0], [1, 0], [0, -1], [0, 0]]
    """
    k = len(axes)
    codes = np.zeros((1 + 2 * k, k), np.int8)
    for index, axis in enumerate(axes):
        low, high = axis.extremes
        codes[1 + 2 * index, index] = low
        codes[2 + 2 * index, index] = high
    return codes


def worst_case_codes(axes: tuple[Axis, ...], probe_outputs: np.ndarray) -> np.ndarray:
    """The vertices that push each output to its extremes, from the probe solutions.

    Parameters
    ----------
    axes : k axes.
    probe_outputs : array (..., 1 + 2k, K)
        Each output at the rows of :func:`probe_codes` (leading axes: groups).

    Returns
    -------
    array (..., 2K, k) int8
        For output j, row 2j is the vertex of its largest value, row 2j + 1 of its smallest.
        An axis whose moves do not change an output (by more than :data:`NO_CHANGE_REL` of
        the output's largest probed magnitude, plus :data:`NO_CHANGE_ABS`: the solver's
        rounding, not a dependence) is put at its high extreme.
    """
    k = len(axes)
    low = np.array([a.extremes[0] for a in axes], np.int8)
    high = np.array([a.extremes[1] for a in axes], np.int8)
    at_low = probe_outputs[..., 1::2, :][..., :k, :]
    at_high = probe_outputs[..., 2::2, :][..., :k, :]
    scale = np.max(np.abs(probe_outputs), axis=-2, keepdims=True)
    unmoved = np.abs(at_high - at_low) <= NO_CHANGE_REL * scale + NO_CHANGE_ABS
    rises = np.swapaxes((at_high >= at_low) | unmoved, -1, -2)  # (..., K, k)
    up = np.where(rises, high, low)
    down = np.where(rises, low, high)
    stacked = np.stack([up, down], axis=-2)                     # (..., K, 2, k)
    return stacked.reshape(*stacked.shape[:-3], -1, k).astype(np.int8)


def distinct_codes(codes: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Each group's distinct corner rows, nominal first, padded with nominal rows.

    Parameters
    ----------
    codes : int array (G, C, k) of levels in {−1, 0, 1}; row 0 of each group is nominal.

    Returns
    -------
    (codes, counts) : int8 (G, C', k), nominal then the group's distinct non-nominal rows
        (in ascending order of their base-3 number), then nominal again up to the longest
        group's count; int (G,) the distinct rows of each group, nominal included.

    >>> rows, counts = distinct_codes(np.array([[[0, 0], [1, -1], [0, 0], [1, -1]]]))
    >>> rows.tolist(), counts.tolist()
    ([[[0, 0], [1, -1]]], [2])
    """
    g, c, k = codes.shape
    weights = 3 ** np.arange(k, dtype=np.int64)
    nominal = int(weights.sum())
    keys = np.sort(((codes[:, 1:].astype(np.int64) + 1) * weights).sum(axis=-1), axis=1)
    repeat = np.zeros(keys.shape, bool)
    repeat[:, 1:] = keys[:, 1:] == keys[:, :-1]
    repeat |= keys == nominal
    counts = (~repeat).sum(axis=1)
    width = int(counts.max(initial=0))
    first = np.argsort(repeat, axis=1, kind="stable")[:, :width]
    picked = np.take_along_axis(keys, first, axis=1)
    picked = np.where(np.arange(width) < counts[:, None], picked, nominal)
    keys = np.concatenate([np.full((g, 1), nominal, np.int64), picked], axis=1)
    out = (keys[..., None] // weights) % 3 - 1
    return out.astype(np.int8), counts + 1


class Levels(Mapping[str, str]):
    """A read-only mapping of names to level names (``{"D1": "vf_min"}``), in order.

    What a solved corner's ``vf``, ``beta`` and ``resistors`` hold: the names (a group's
    axes, the same for all its corners) and the levels are two tuples, shared between the
    corners of a group, so that a large board's corners cost little memory. It compares,
    prints and pickles as the dict it stands for.

    >>> levels = Levels(("D1", "D2"), ("vf_min", "vf_max"))
    >>> levels["D2"], dict(levels) == {"D1": "vf_min", "D2": "vf_max"}, levels
    ('vf_max', True, {'D1': 'vf_min', 'D2': 'vf_max'})
    """

    __slots__ = ("names", "levels")

    def __init__(self, names: tuple[str, ...], levels: tuple[str, ...]) -> None:
        self.names = names
        self.levels = levels

    def __getitem__(self, name: str) -> str:
        for known, level in zip(self.names, self.levels):
            if known == name:
                return level
        raise KeyError(name)

    def __iter__(self):
        return iter(self.names)

    def __len__(self) -> int:
        return len(self.names)

    def items(self):  # type: ignore[override]
        """(name, level) pairs in order (a view, as a dict's)."""
        return _LevelItems(self)

    def __repr__(self) -> str:
        return repr(dict(zip(self.names, self.levels)))

    def __reduce__(self):
        return Levels, (self.names, self.levels)


class _LevelItems(ItemsView):
    """A :class:`Levels` mapping's items, iterated in one pass."""

    def __iter__(self):
        mapping = self._mapping
        return zip(mapping.names, mapping.levels)


@dataclass(frozen=True, slots=True)
class Corner:
    """A solved corner in words and numbers: what rules quote ("at +12V max (13.2 V)").

    ``rails`` maps rail name → (level name, V); ``ambient_c`` is °C; ``vf`` maps LED → bin
    name; ``beta`` maps transistor → ``hfe_min``/``hfe_typ``; ``resistors`` maps resistor →
    ``low``/``nom``/``high``; ``scenario`` names the pin state.
    """

    scenario: str
    rails: Mapping[str, tuple[str, float]] = field(default_factory=dict, hash=False)
    ambient_c: float = 25.0
    vf: Mapping[str, str] = field(default_factory=dict, hash=False)
    beta: Mapping[str, str] = field(default_factory=dict, hash=False)
    resistors: Mapping[str, str] = field(default_factory=dict, hash=False)

    def label(self) -> str:
        """One line: ``+12V max (13.2 V), LEDs vf_max, 60 °C, Q1 hfe_min, R9 low``."""
        parts = [f"{name} {level} ({volts:g} V)" for name, (level, volts) in self.rails.items()]
        bins = set(self.vf.values())
        if len(bins) == 1:
            parts.append(f"LEDs {bins.pop()}")
        else:
            parts += [f"{ref} {b}" for ref, b in self.vf.items()]
        parts.append(f"{self.ambient_c:g} °C")
        parts += [f"{ref} {b}" for ref, b in self.beta.items()]
        parts += [f"{ref} {level}" for ref, level in self.resistors.items() if level != "nom"]
        if self.scenario:
            parts.append(f"scenario {self.scenario}")
        return ", ".join(parts)

    def as_dict(self) -> dict:
        """JSON form, SI floats."""
        return {"scenario": self.scenario,
                "rails": {n: {"level": lv, "v": v} for n, (lv, v) in self.rails.items()},
                "ambient_c": self.ambient_c, "vf": dict(self.vf), "beta": dict(self.beta),
                "resistors": dict(self.resistors)}
