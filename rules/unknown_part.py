"""Rule ``unknown-part``: a part analysed with generic figures because its own are missing."""

from __future__ import annotations

from typing import Any, Iterable

from linter.findings import Finding
from linter.partdata import ResistorData
from linter.refs import fold_refs, natural_sorted
from linter.rules import Rule, register


def _what(ref: str, data: Any) -> str | None:
    """The part's note without its reference, or None when nothing was assumed or unknown."""
    note = getattr(data, "note", None)
    if not note:
        return None
    return note.removeprefix(f"{ref}: ")


@register
class UnknownPart(Rule):
    """A part is analysed with generic figures because its own data is missing.

    Where a part number has no ``[parts."PN"]`` table (or the table lacks a figure), ledlint
    falls back to generic values by LED colour, resistor chip size or transistor type, and
    every result that depends on them is only as good as the guess. One finding per part
    number (or per set of parts without a part number that share the same assumptions), naming
    the references and what was assumed. A transistor whose polarity is unknown is reported
    too: it cannot be analysed at all.

    **Anti-pattern**

    ``D4 REMOTE_A REMOTE_K LDBLUE`` with no part data: a generic blue LED (3.1 V at 20 mA) is
    assumed, and the current computed for D4 may be off by tens of percent.

    **Best practice**

    Add the datasheet figures to ``ledlint.toml`` (or a ``--parts`` file)::

        [parts."LD0603BL"]
        kind = "led"
        vf_typ = "3.0 V"
        vf_max = "3.4 V"
        vf_test_current = "20 mA"
        if_max = "20 mA"
    """

    id = "unknown-part"
    default_severity = "warning"

    def check(self, context: Any) -> Iterable[Finding]:
        groups: dict[tuple[str | None, str], list[str]] = {}
        for ref, data in context.part_data.items():
            what = _what(ref, data)
            if what is not None:
                number = data.part_number
                groups.setdefault((number, "" if number else what), []).append(ref)
        for (number, _), refs in groups.items():
            yield self._finding(context, number, refs)
        for part in context.circuit.parts.values():
            if part.kind == "transistor":
                yield Finding(rule=self.id, severity=context.severity(self), parts=(part.ref,),
                              message=f"{part.ref}: transistor of unknown polarity; not analysed",
                              fix=f'give its part number a [parts."PN"] table with kind = '
                                  f'"npn", "pnp", "nmos" or "pmos"', location=part.location)

    def _finding(self, context: Any, number: str | None, refs: list[str]) -> Finding:
        refs = natural_sorted(refs)
        first = context.circuit.parts[refs[0]]
        what = _what(refs[0], context.part_data[refs[0]])
        label = f"{number} ({fold_refs(refs)})" if number else fold_refs(refs)
        data = context.part_data[refs[0]]
        if isinstance(data, ResistorData):
            fix = "give the tolerance and power rating in the BOM (or a [parts] table)"
        elif number:
            fix = f'add [parts."{number}"] with the datasheet figures to the settings'
        else:
            fix = "give the parts a part number and add its datasheet figures to the settings"
        return Finding(rule=self.id, severity=context.severity(self), parts=tuple(refs),
                       message=f"{label}: {what}", fix=fix, location=first.location)
