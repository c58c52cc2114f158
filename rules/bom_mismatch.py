"""Rule ``bom-mismatch``: the bill of materials and the netlist disagree."""

from __future__ import annotations

from typing import Any, Iterable

from linter.findings import Finding
from linter.rules import Rule, register

_FIXES = {
    "missing-from-bom": "add a BOM line for it (or mark it DNP if it is not fitted)",
    "missing-from-netlist": "remove the reference from the BOM or add the part to the schematic",
    "value": "make the BOM and the schematic agree on one value",
    "quantity": "set the quantity to the number of references on the line",
    "duplicate": "keep the reference on one BOM line only",
    "part-number": "make the BOM and the schematic agree on one part number",
}


@register
class BomMismatch(Rule):
    """The bill of materials and the netlist disagree.

    A part in the netlist but not in the BOM (and not marked do-not-populate), a BOM reference
    that is not in the netlist, a value that differs as a number (``4k7`` and ``4.7k`` are the
    same value and are never flagged), a quantity that does not count the line's references, a
    reference listed twice, or a part number that differs. Where values differ the analysis
    uses the netlist's value, and the finding says so: the board is built from the BOM, so
    every computed number is in doubt until the two agree.

    **Anti-pattern**

    ``R12`` is ``1k`` in the schematic and ``1k2`` in ``bom.csv``; the BOM line
    ``D7-D10,YELLOW,3`` lists four LEDs with quantity 3.

    **Best practice**

    Export the BOM from the same schematic revision as the netlist and check both together:
    ``ledlint check board.edif --bom bom.csv``.
    """

    id = "bom-mismatch"
    default_severity = "error"

    def check(self, context: Any) -> Iterable[Finding]:
        for problem in context.bom_discrepancies:
            yield Finding(rule=self.id, severity=context.severity(self), message=problem.message,
                          parts=problem.refs, values=dict(problem.values),
                          fix=_FIXES.get(problem.kind), location=problem.location)
