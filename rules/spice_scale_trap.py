"""Rule ``spice-scale-trap``: a SPICE value that SPICE reads differently from what was meant."""

from __future__ import annotations

from typing import Any, Iterable

from linter.findings import Finding
from linter.rules import Rule, register


@register
class SpiceScaleTrap(Rule):
    """A SPICE value that SPICE reads differently from what an engineer means.

    SPICE reads the scale suffix ``M`` as milli and ignores letters after a number, so
    ``R1 a b 1M`` is 1 mΩ, not 1 MΩ, and ``4k7`` is 4 kΩ, not 4.7 kΩ. ledlint computes with
    the SPICE reading (it is what the simulation used) and reports both readings.

    **Anti-pattern**

    ``RLIM n1 n2 4k7`` or ``RPULL vcc n3 1M`` in a deck meant for simulation.

    **Best practice**

    ``RLIM n1 n2 4.7k`` and ``RPULL vcc n3 1meg``: spellings every SPICE reads the same way.
    """

    id = "spice-scale-trap"
    default_severity = "warning"

    def check(self, context: Any) -> Iterable[Finding]:
        for note in context.circuit.notes:
            if note.rule == self.id:
                yield Finding(rule=self.id, severity=context.severity(self),
                              message=note.message, parts=note.parts,
                              values=dict(note.values), location=note.location)
