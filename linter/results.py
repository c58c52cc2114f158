"""Solved LED groups: what the analysis hands to rules and reports (SI floats throughout).

Every figure that varies over the corners is a :class:`Span`: the value at the nominal
corner and the extremes, with the :class:`~linter.corners.Corner` at which each extreme
occurs, so that a rule can say "at +12V max (13.2 V)".
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping

from linter.corners import Corner
from linter.groups import Group

__all__ = ["Span", "LedResult", "ResistorResult", "TransistorResult", "PinResult",
           "GroupResult"]


@dataclass(frozen=True, slots=True)
class Span:
    """A quantity over the corners: ``nom`` at the nominal corner, ``min`` and ``max`` over
    all corners solved, and where the extremes occur (``at_min``, ``at_max``)."""

    nom: float
    min: float
    max: float
    at_min: Corner | None = None
    at_max: Corner | None = None

    def as_dict(self) -> dict:
        """``{"nom", "min", "max"}``."""
        return {"nom": self.nom, "min": self.min, "max": self.max}

    def corners_dict(self) -> dict:
        """``{"min": corner, "max": corner}`` in JSON form."""
        return {k: c.as_dict() for k, c in (("min", self.at_min), ("max", self.at_max))
                if c is not None}


@dataclass(frozen=True, slots=True)
class LedResult:
    """One LED: current (A), forward voltage (V) and power (W) over the scenarios in which
    it is lit (``lit_scenarios``); the largest reverse voltage across it over every scenario
    and corner (``reverse_v``, V, positive when reverse-biased) and where; ``di_dvf`` (A/V)
    the change of its nominal current per volt of Vf shift of every LED in the group;
    ``assumed`` the curve figures taken from generic values."""

    ref: str
    part_number: str | None
    current: Span
    vf: Span
    power: Span
    lit_scenarios: tuple[str, ...]
    reverse_v: float
    reverse_at: Corner | None
    di_dvf: float | None
    assumed: tuple[str, ...] = ()

    def as_dict(self) -> dict:
        return {"ref": self.ref, "part": self.part_number, "current_a": self.current.as_dict(),
                "vf_v": self.vf.as_dict(), "power_w": self.power.as_dict(),
                "lit_scenarios": list(self.lit_scenarios), "reverse_v_max": self.reverse_v,
                "di_dvf_a_per_v": self.di_dvf, "assumed": list(self.assumed),
                "corners": {"current_a": self.current.corners_dict()}}


@dataclass(frozen=True, slots=True)
class ResistorResult:
    """One resistor: nominal ohms (Ω), tolerance (fraction), current magnitude (A) and
    power (W) over every scenario and corner, its rating before derating (W) and package."""

    ref: str
    ohms: float
    tolerance: float
    current: Span
    power: Span
    rating_w: float | None
    package: str | None

    def as_dict(self) -> dict:
        return {"ref": self.ref, "ohms": self.ohms, "tolerance": self.tolerance,
                "current_a": self.current.as_dict(), "power_w": self.power.as_dict(),
                "rating_w": self.rating_w, "package": self.package,
                "corners": {"power_w": self.power.corners_dict()}}


@dataclass(frozen=True, slots=True)
class TransistorResult:
    """One transistor (``kind`` npn, pnp, nmos, pmos), magnitudes positive in normal use.

    vce : Span, V — Vce of a BJT, Vds of a MOSFET. current : Span, A — Ic or Id.
    power : Span, W — Ic·Vce + Ib·Vbe, or Id·Vds.
    saturated : bool — a BJT left regulation (Ic < 0.9·β·Ib) at some corner; a MOSFET's
        gate drive limited its current (saturation region: Vds ≥ Vgs − Vth) at some corner.
    saturated_at : Corner or None — that corner with the lowest current;
    current_when_saturated : float or None — the current there (A).
    rail_min : float or None — V, npn-sink / pnp-source: the lowest ``headroom_rail``
        voltage that keeps it regulating at the worst corner, ΣVf + Ie·Re + Vce_sat at the
        current it regulates to; ``rail_min_at`` that corner; ``vce_sat`` the figure used.
    vgs : Span or None — MOSFET gate drive (V); ``vgs_th`` its threshold (V).
    """

    ref: str
    kind: str
    vce: Span
    current: Span
    power: Span
    saturated: bool
    saturated_at: Corner | None = None
    current_when_saturated: float | None = None
    rail_min: float | None = None
    rail_min_at: Corner | None = None
    headroom_rail: str | None = None
    vce_sat: float | None = None
    vgs: Span | None = None
    vgs_th: float | None = None

    def as_dict(self) -> dict:
        out = {"ref": self.ref, "kind": self.kind, "vce_v": self.vce.as_dict(),
               "current_a": self.current.as_dict(), "power_w": self.power.as_dict(),
               "saturated": self.saturated, "current_when_saturated_a":
               self.current_when_saturated, "rail_min_v": self.rail_min,
               "headroom_rail": self.headroom_rail, "vce_sat_v": self.vce_sat,
               "corners": {"power_w": self.power.corners_dict()}}
        if self.saturated_at is not None:
            out["corners"]["saturated"] = self.saturated_at.as_dict()
        if self.rail_min_at is not None:
            out["corners"]["rail_min"] = self.rail_min_at.as_dict()
        if self.vgs is not None:
            out["vgs_v"] = self.vgs.as_dict()
            out["vgs_th_v"] = self.vgs_th
        return out


@dataclass(frozen=True, slots=True)
class PinResult:
    """A microcontroller pin: current magnitude (A) over scenarios and corners,
    ``sourcing`` (True when the largest current flows out of the pin), its rating (A)."""

    id: str
    net: str
    current: Span
    sourcing: bool
    current_max: float | None

    def as_dict(self) -> dict:
        return {"id": self.id, "net": self.net, "current_a": self.current.as_dict(),
                "sourcing": self.sourcing, "rating_a": self.current_max,
                "corners": {"current_a": self.current.corners_dict()}}


@dataclass(frozen=True, slots=True)
class GroupResult:
    """One solved (or unsolvable) group.

    ``status`` is ``"solved"`` or ``"unsolved"`` (then ``reason`` says why and the part
    lists are empty). ``corners`` counts the corners solved per scenario (nominal
    included), ``scheme`` names the corner scheme (``vertices`` or ``sensitivity``);
    ``not_converged`` lists corners where Newton's method failed (their figures are left
    out of the spans); ``notes`` names generic figures used.

    ``origin`` (not compared, not reported): for a result made by renaming another group's
    (:mod:`linter.result_rename`), that template result and the map from its part
    references to this group's; None for a result solved on its own. Fast paths use it to
    reuse work done for the template.
    """

    group: Group
    status: str
    rail: str | None = None
    leds: tuple[LedResult, ...] = ()
    resistors: tuple[ResistorResult, ...] = ()
    transistors: tuple[TransistorResult, ...] = ()
    pins: tuple[PinResult, ...] = ()
    corners: int = 0
    scheme: str = ""
    not_converged: tuple[Corner, ...] = ()
    notes: tuple[str, ...] = ()
    reason: str | None = None
    origin: "tuple[GroupResult, Mapping[str, str]] | None" = field(
        default=None, compare=False, repr=False)

    @property
    def id(self) -> str:
        return self.group.id

    @property
    def converged(self) -> bool:
        """True when every corner converged."""
        return self.status == "solved" and not self.not_converged

    def led(self, ref: str) -> LedResult:
        """The result of LED ``ref``."""
        return next(led for led in self.leds if led.ref == ref)

    def resistor(self, ref: str) -> ResistorResult:
        return next(r for r in self.resistors if r.ref == ref)

    def transistor(self, ref: str) -> TransistorResult:
        return next(t for t in self.transistors if t.ref == ref)

    def as_dict(self) -> dict:
        """The JSON ``groups`` entry (DESIGN.md), SI floats."""
        return {
            "id": self.group.id, "topology": self.group.topology, "rail": self.rail,
            "parts": list(self.group.parts), "setter": self.group.setter,
            "status": self.status, "reason": self.reason,
            "leds": [x.as_dict() for x in self.leds],
            "resistors": [x.as_dict() for x in self.resistors],
            "transistors": [x.as_dict() for x in self.transistors],
            "pins": [x.as_dict() for x in self.pins],
            "corners": self.corners, "scheme": self.scheme, "converged": self.converged,
            "not_converged": [c.as_dict() for c in self.not_converged],
            "notes": list(self.notes),
        }
