"""The pipeline from files to findings: read, enrich, find groups, solve, apply rules.

Each stage is a pure function of the previous stage's output; this module only strings them
together:

1. :func:`load_inputs` — settings (``--config`` or found upward from the netlist, over the
   shipped defaults; ``--parts`` files), the netlist (SPICE subcircuits whose part data says
   ``mcu`` kept whole), the BOM (only when ``--bom`` is given: a ``bom.csv`` beside the
   netlist is not picked up silently), rails and part data → :class:`AnalysisContext`;
2. :func:`analyse` — LED groups and their operating points (the seam for topology/solve:
   it returns the context with ``groups`` filled; today it returns it unchanged);
3. :func:`run_rules` — every enabled rule, in id order;
4. waivers (:mod:`linter.waivers`) — accepted findings set aside, stale waivers reported;
5. baseline (:mod:`linter.baseline`, ``--baseline FILE``) — findings whose fingerprints the
   baseline holds set aside and counted.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import field, replace
from pathlib import Path
from typing import Any, Mapping

from linter import limits
from linter.bom_join import BomDiscrepancy, apply_bom
from linter.config import Settings, check_rule_settings, load_settings
from linter.context import AnalysisContext
from linter.findings import Finding
from linter.gc_pause import paused_gc
from linter.model import Circuit
from linter.partdata import PartData, Rail
from linter.parts import resolve_part_data
from linter.rails import resolve_rails
from linter.readers import read_netlist
from linter.readers.bom import Bom, read_bom
from linter.records import record
from linter.waivers import STALE_WAIVER, apply_waivers

__all__ = ["CheckRequest", "CheckResult", "AnalysisContext", "run_check", "load_inputs",
           "analyse", "run_rules"]


@record
class CheckRequest:
    """What to check: the netlist and the optional files beside it, as the user named them.

    ``today`` fixes the date waivers' ``until`` is compared with (default: the current date).
    ``baseline`` names a baseline file whose findings are not shown (only counted).
    """

    netlist: Path
    bom: Path | None = None
    config: Path | None = None
    parts_files: tuple[Path, ...] = ()
    today: dt.date | None = None
    baseline: Path | None = None


@record
class CheckResult:
    """Everything a reporter needs: the circuit, the LED groups and the findings.

    ``findings`` are what the report shows (waived ones removed, waiver notices added);
    ``waived`` keeps the findings that a waiver accepted; ``baselined`` those the baseline
    file holds (not shown; ``len(baselined)`` is the count the summary gives).
    """

    request: CheckRequest
    circuit: Circuit
    findings: tuple[Finding, ...] = ()
    groups: tuple = field(default=())
    rails: Mapping[str, Rail] = field(default_factory=dict, hash=False)
    part_data: Mapping[str, PartData] = field(default_factory=dict, hash=False)
    settings: Settings | None = None
    bom: Bom | None = None
    bom_discrepancies: tuple[BomDiscrepancy, ...] = ()
    waived: tuple[Finding, ...] = ()
    context: AnalysisContext | None = None
    baselined: tuple[Finding, ...] = ()


def _rule_registry() -> dict[str, Any]:
    from linter.rules import all_rules

    return all_rules()


def load_check_modules() -> dict[str, Any]:
    """The rule registry, every module a check runs imported first (the rules, topology,
    analysis), with the cyclic collector paused meanwhile.

    Importing allocates many long-lived objects (functions, classes, tables) and no garbage
    cycles worth collecting; the collector would walk them again and again (about 50 young
    collections on a demo check, a few percent of its start-up). Importing twice is free.
    """
    with paused_gc():
        import linter.analysis  # noqa: F401
        import linter.topology  # noqa: F401

        return _rule_registry()


def load_inputs(request: CheckRequest, registry: Mapping[str, Any] | None = None) -> AnalysisContext:
    """Read and enrich every input of ``request`` into an :class:`AnalysisContext` (no groups)."""
    registry = _rule_registry() if registry is None else registry
    settings = load_settings(request.netlist, request.config, request.parts_files)
    settings = check_rule_settings(settings, registry)
    opaque = frozenset(number for number, spec in settings.parts.items() if spec.kind == "mcu")
    bom: Bom | None = None
    discrepancies: tuple[BomDiscrepancy, ...] = ()
    with paused_gc():  # a large netlist is millions of acyclic records; see linter.gc_pause
        with limits.applied(limits.effective(settings.limits)):
            circuit = read_netlist(request.netlist, source=str(request.netlist), opaque=opaque)
            if request.bom is not None:
                bom = read_bom(request.bom)
        if bom is not None:
            circuit, discrepancies = apply_bom(circuit, bom, fresh=True)  # (just read)
        circuit, part_data = resolve_part_data(circuit, settings, fresh=True)  # (just read)
        rails = resolve_rails(circuit, settings)
    return AnalysisContext(circuit=circuit, settings=settings, rails=rails, part_data=part_data,
                           bom=bom, bom_discrepancies=discrepancies)


def analyse(context: AnalysisContext) -> AnalysisContext:
    """LED groups and their solved operating points: the context with ``groups`` filled.

    Topology finds the groups (:func:`linter.topology.find_groups`); the solver computes every
    group at every corner at once (:func:`linter.analysis.analyse`).
    """
    from linter.analysis import analyse as solve_groups
    from linter.topology import find_groups

    groups = find_groups(context.circuit, context.rails, context.part_data)
    solved = solve_groups(groups, context.circuit, context.part_data, context.rails,
                          context.settings.ambient)
    return replace(context, groups=solved)


def _notes_as_findings(context: AnalysisContext, registry: Mapping[str, Any]) -> list[Finding]:
    """Reader notes whose rule is not registered (a registered rule reports its own notes)."""
    return [Finding(rule=note.rule, severity="warning", message=note.message, parts=note.parts,
                    values=dict(note.values), location=note.location)
            for note in context.circuit.notes if note.rule not in registry]


def run_rules(context: AnalysisContext, registry: Mapping[str, Any] | None = None) -> list[Finding]:
    """The findings of every enabled rule, rules in id order, each rule's findings as it gives them."""
    registry = _rule_registry() if registry is None else registry
    from linter.rulekit import forget_board

    try:
        with paused_gc():  # findings and fix searches are many small acyclic records
            findings = _notes_as_findings(context, registry)
            for rule_id in sorted(registry):
                if context.enabled(rule_id):
                    findings.extend(registry[rule_id]().check(context))
    finally:
        forget_board()
    return findings


def run_check(request: CheckRequest) -> CheckResult:
    """Read, enrich, analyse and check the netlist named in ``request``."""
    registry = load_check_modules()
    context = analyse(load_inputs(request, registry))
    findings = run_rules(context, registry)
    today = request.today or dt.date.today()
    kept, waived, notices = apply_waivers(findings, context.settings.waivers, today,
                                          context.severity(STALE_WAIVER, "info"))
    if not context.enabled(STALE_WAIVER):
        notices = ()
    shown, baselined = kept + notices, ()
    if request.baseline is not None:
        from linter.baseline import read_baseline, split_baselined

        shown, baselined = split_baselined(shown, read_baseline(request.baseline))
    return CheckResult(request=request, circuit=context.circuit, findings=shown,
                       groups=context.groups, rails=context.rails, part_data=context.part_data,
                       settings=context.settings, bom=context.bom,
                       bom_discrepancies=context.bom_discrepancies, waived=waived,
                       context=context, baselined=baselined)

