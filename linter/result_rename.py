"""One group's result made from another's: equal keys (:mod:`linter.group_key`), own names.

A result names parts in its records (``ref``), in its corners (the LED, transistor and
resistor axes), in its pins (id and net) and in its notes. Every other figure of two groups
with equal keys is the same (their models differ only in names), so the result of one is
the result of the other with those names replaced: references through ``refs``, pins and
notes rebuilt from the group's own pin drives and the template's note parts. Rail names,
scenario names and part numbers are in the key and stay as they are.
"""

from __future__ import annotations

from typing import Mapping

from linter.corners import Corner, Levels
from linter.groups import Group
from linter.results import GroupResult, LedResult, PinResult, ResistorResult, Span, TransistorResult

__all__ = ["renamed"]


def _clone(record, changes: dict):
    """``dataclasses.replace(record, **changes)`` for a frozen slotted dataclass of ours
    without ``__post_init__`` (every result record and :class:`Corner`): the same class and
    fields, set slot by slot without the keyword handling of ``replace``."""
    cls = type(record)
    made = _NEW(cls)
    for name in cls.__slots__:
        _SET(made, name, changes[name] if name in changes else getattr(record, name))
    return made


_NEW = object.__new__
_SET = object.__setattr__


class _Renamer:
    """Renames one follower's records. The many small records (Corner, Span, LED, resistor
    and pin results) are made by their constructors with every field passed (faster than a
    generic copy); the tests compare every field with the plain path, so a field added to
    one of them and not passed here fails there."""

    def __init__(self, refs: Mapping[str, str]) -> None:
        self.refs = refs
        self.corners: dict[int, Corner] = {}
        self.mappings: dict[int, Mapping[str, str]] = {}
        self.names: dict[int, tuple[str, ...]] = {}

    def corner(self, corner: Corner | None) -> Corner | None:
        if corner is None:
            return None
        found = self.corners.get(id(corner))
        if found is None:
            known = self.mappings.get
            vf, beta, resistors = corner.vf, corner.beta, corner.resistors
            new_vf, new_beta, new_resistors = known(id(vf)), known(id(beta)), known(id(resistors))
            found = self.corners[id(corner)] = Corner(
                corner.scenario, corner.rails, corner.ambient_c,
                self.mapping(vf) if new_vf is None else new_vf,
                self.mapping(beta) if new_beta is None else new_beta,
                self.mapping(resistors) if new_resistors is None else new_resistors)
        return found

    def mapping(self, levels: Mapping[str, str]) -> Mapping[str, str]:
        """``levels`` with its names renamed, remembered by the template mapping's identity
        (the template's own where it names nothing); names tuples renamed once."""
        refs = self.refs
        if type(levels) is Levels:
            found: Mapping[str, str] = levels
            if levels.names:
                names = self.names.get(id(levels.names))
                if names is None:
                    names = self.names[id(levels.names)] = tuple(refs[k] for k in levels.names)
                found = Levels(names, levels.levels)
        else:
            found = {refs[k]: v for k, v in levels.items()} if levels else levels
        self.mappings[id(levels)] = found
        return found

    def span(self, span: Span | None) -> Span | None:
        if span is None:
            return None
        low, high = span.at_min, span.at_max
        if low is None and high is None:
            return span
        corner = self.corner
        return Span(span.nom, span.min, span.max, corner(low), corner(high))

    def led(self, x: LedResult) -> LedResult:
        span = self.span
        return LedResult(self.refs[x.ref], x.part_number, span(x.current), span(x.vf),
                         span(x.power), x.lit_scenarios, x.reverse_v, self.corner(x.reverse_at),
                         x.di_dvf, x.assumed)

    def resistor(self, x: ResistorResult) -> ResistorResult:
        return ResistorResult(self.refs[x.ref], x.ohms, x.tolerance, self.span(x.current),
                              self.span(x.power), x.rating_w, x.package)

    def transistor(self, x: TransistorResult) -> TransistorResult:
        return _clone(x, {"ref": self.refs[x.ref], "vce": self.span(x.vce),
                          "current": self.span(x.current), "power": self.span(x.power),
                          "saturated_at": self.corner(x.saturated_at),
                          "rail_min_at": self.corner(x.rail_min_at), "vgs": self.span(x.vgs)})

    def pin(self, x: PinResult, drive) -> PinResult:
        return PinResult(drive.id, drive.net, self.span(x.current), x.sourcing, x.current_max)


def renamed(result: GroupResult, group: Group, refs: Mapping[str, str],
            note_parts: tuple[tuple[str, str], ...]) -> GroupResult:
    """``result`` (of the template group) for ``group``: ``refs`` maps the template's part
    references to the group's; ``note_parts`` are the template model's (ref, text) notes.
    Pin i of the result is the group's pin drive i (both in the group's pin order)."""
    r = _Renamer(refs)
    notes = tuple(f"{refs[ref]}: {text}" for ref, text in note_parts)
    return _clone(result, {
        "group": group, "leds": tuple(r.led(x) for x in result.leds),
        "resistors": tuple(r.resistor(x) for x in result.resistors),
        "transistors": tuple(r.transistor(x) for x in result.transistors),
        "pins": tuple(r.pin(p, drive) for p, drive in zip(result.pins, group.pins)),
        "not_converged": tuple(r.corner(c) for c in result.not_converged), "notes": notes,
        "origin": (result, refs)})
