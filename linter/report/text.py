"""The terminal report: a summary line, then findings by severity, each with its fix."""

from __future__ import annotations

import io
from typing import TYPE_CHECKING

from linter.findings import SEVERITIES
from linter.report import Reporter

if TYPE_CHECKING:
    from linter.engine import CheckResult

__all__ = ["TextReporter"]


class TextReporter(Reporter):
    """Readable when piped; colour only when asked for (the CLI asks on a terminal)."""

    def __init__(self, *, verbose: bool = False, quiet: bool = False, color: bool = False) -> None:
        self.verbose = verbose
        self.quiet = quiet
        self.color = color

    def render(self, result: "CheckResult") -> str:
        from rich.console import Console

        buffer = io.StringIO()
        console = Console(file=buffer, force_terminal=self.color, no_color=not self.color,
                          width=100, highlight=False, soft_wrap=True)
        circuit = result.circuit
        if not self.quiet:
            leds = circuit.leds()
            console.print(f"[bold]{circuit.source}[/bold] ({circuit.format}): "
                          f"{len(circuit.parts)} parts, {len(circuit.nets)} nets, "
                          f"{len(leds)} LEDs, {len(result.groups)} LED groups")
            if result.rails:
                rails = ", ".join(f"{name} {rail}" for name, rail in sorted(result.rails.items()))
                console.print(f"rails: {rails}")
        for severity in SEVERITIES:
            for finding in (f for f in result.findings if f.severity == severity):
                where = f"{finding.location}: " if finding.location else ""
                console.print(f"{where}{severity} [{finding.rule}] {finding.message}", markup=False)
                if finding.fix:
                    console.print(f"    fix: {finding.fix}", markup=False)
        if not self.quiet:
            counts = {s: sum(f.severity == s for f in result.findings) for s in SEVERITIES}
            console.print(", ".join(f"{n} {s}{'s' if n != 1 else ''}" for s, n in counts.items()))
        return buffer.getvalue()
