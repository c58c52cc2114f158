"""One group's result made from another's: equal keys (:mod:`linter.group_key`), own names.

A result names parts in its records (``ref``), in its corners (the LED, transistor and
resistor axes), in its pins (id and net) and in its notes. Every other figure of two groups
with equal keys is the same (their models differ only in names), so the result of one is
the result of the other with those names replaced: references through ``refs``, pins and
notes rebuilt from the group's own pin drives and the template's note parts. Rail names,
scenario names and part numbers are in the key and stay as they are.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Mapping

from linter.corners import Corner
from linter.groups import Group
from linter.results import GroupResult, LedResult, PinResult, ResistorResult, Span, TransistorResult

__all__ = ["renamed"]


class _Renamer:
    def __init__(self, refs: Mapping[str, str]) -> None:
        self.refs = refs
        self.corners: dict[int, Corner] = {}

    def corner(self, corner: Corner | None) -> Corner | None:
        if corner is None:
            return None
        found = self.corners.get(id(corner))
        if found is None:
            refs = self.refs
            found = self.corners[id(corner)] = Corner(
                corner.scenario, corner.rails, corner.ambient_c,
                {refs[k]: v for k, v in corner.vf.items()},
                {refs[k]: v for k, v in corner.beta.items()},
                {refs[k]: v for k, v in corner.resistors.items()})
        return found

    def span(self, span: Span | None) -> Span | None:
        if span is None or (span.at_min is None and span.at_max is None):
            return span
        return Span(span.nom, span.min, span.max, self.corner(span.at_min),
                    self.corner(span.at_max))

    def led(self, x: LedResult) -> LedResult:
        return LedResult(self.refs[x.ref], x.part_number, self.span(x.current),
                         self.span(x.vf), self.span(x.power), x.lit_scenarios, x.reverse_v,
                         self.corner(x.reverse_at), x.di_dvf, x.assumed)

    def resistor(self, x: ResistorResult) -> ResistorResult:
        return ResistorResult(self.refs[x.ref], x.ohms, x.tolerance, self.span(x.current),
                              self.span(x.power), x.rating_w, x.package)

    def transistor(self, x: TransistorResult) -> TransistorResult:
        return replace(x, ref=self.refs[x.ref], vce=self.span(x.vce),
                       current=self.span(x.current), power=self.span(x.power),
                       saturated_at=self.corner(x.saturated_at),
                       rail_min_at=self.corner(x.rail_min_at), vgs=self.span(x.vgs))


def renamed(result: GroupResult, group: Group, refs: Mapping[str, str],
            note_parts: tuple[tuple[str, str], ...]) -> GroupResult:
    """``result`` (of the template group) for ``group``: ``refs`` maps the template's part
    references to the group's; ``note_parts`` are the template model's (ref, text) notes.
    Pin i of the result is the group's pin drive i (both in the group's pin order)."""
    r = _Renamer(refs)
    notes = tuple(f"{refs[ref]}: {text}" for ref, text in note_parts)
    pins = tuple(PinResult(drive.id, drive.net, r.span(p.current), p.sourcing, p.current_max)
                 for p, drive in zip(result.pins, group.pins))
    return GroupResult(
        group, result.status, result.rail, tuple(r.led(x) for x in result.leds),
        tuple(r.resistor(x) for x in result.resistors),
        tuple(r.transistor(x) for x in result.transistors), pins, result.corners,
        result.scheme, tuple(r.corner(c) for c in result.not_converged), notes,
        result.reason)
