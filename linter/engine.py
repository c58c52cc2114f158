"""The pipeline from files to findings: read, enrich, find groups, solve, apply rules.

Each stage is a pure function of the previous stage's output; this module only strings them
together. The CLI is the only caller that touches the file system beyond reading inputs.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from linter.findings import Finding
from linter.model import Circuit
from linter.readers import read_netlist

__all__ = ["CheckRequest", "CheckResult", "run_check"]


@dataclass(frozen=True)
class CheckRequest:
    """What to check: the netlist and the optional files beside it, as the user named them."""

    netlist: Path
    bom: Path | None = None
    config: Path | None = None
    parts_files: tuple[Path, ...] = ()


@dataclass(frozen=True)
class CheckResult:
    """Everything a reporter needs: the circuit, the LED groups and the findings."""

    request: CheckRequest
    circuit: Circuit
    findings: tuple[Finding, ...] = ()
    groups: tuple = field(default=())
    rails: dict = field(default_factory=dict, hash=False)


def _notes_as_findings(circuit: Circuit) -> tuple[Finding, ...]:
    """Turn what the reader noticed (``spice-scale-trap``…) into findings."""
    return tuple(
        Finding(rule=note.rule, severity="warning", message=note.message, parts=note.parts,
                values=dict(note.values), location=note.location)
        for note in circuit.notes
    )


def run_check(request: CheckRequest) -> CheckResult:
    """Read the netlist named in ``request`` and return what is known about it."""
    circuit = read_netlist(request.netlist, source=str(request.netlist))
    return CheckResult(request=request, circuit=circuit, findings=_notes_as_findings(circuit))
