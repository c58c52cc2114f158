"""Waivers: accepted findings, kept in the settings with a reason and an optional end date.

A waiver applies to a finding of its rule that names at least one of its parts (a part
``U1`` also matches the pin ``U1.PA4``). A waiver whose ``until`` date has passed stops
applying and says so; a waiver that matches no finding says so too (it is stale). Both
notices are ``stale-waiver`` findings, info by default.
"""

from __future__ import annotations

import datetime as dt
from typing import Iterable

from linter.config_tables import Waiver
from linter.findings import Finding

__all__ = ["apply_waivers", "waiver_matches", "STALE_WAIVER"]

STALE_WAIVER = "stale-waiver"


def _names(finding: Finding) -> set[str]:
    names = set(finding.parts)
    names.update(part.split(".", 1)[0] for part in finding.parts)
    return names


def waiver_matches(waiver: Waiver, finding: Finding) -> bool:
    """True when ``waiver`` covers ``finding``: same rule, at least one part in common."""
    return waiver.rule == finding.rule and bool(set(waiver.parts) & _names(finding))


def apply_waivers(findings: Iterable[Finding], waivers: Iterable[Waiver], today: dt.date,
                  notice_severity: str = "info") -> tuple[tuple[Finding, ...], tuple[Finding, ...], tuple[Finding, ...]]:
    """(kept findings, waived findings, notices about expired or unused waivers)."""
    findings = tuple(findings)
    active: list[Waiver] = []
    notices: list[Finding] = []
    for waiver in waivers:
        if waiver.until is not None and waiver.until < today:
            notices.append(_notice(waiver, f"waiver of {waiver.rule} for {', '.join(waiver.parts)} "
                                           f"expired on {waiver.until.isoformat()}; it no longer "
                                           f"applies", notice_severity))
        else:
            active.append(waiver)
    kept: list[Finding] = []
    waived: list[Finding] = []
    used: set[int] = set()
    for finding in findings:
        matching = [index for index, waiver in enumerate(active) if waiver_matches(waiver, finding)]
        used.update(matching)
        (waived if matching else kept).append(finding)
    for index, waiver in enumerate(active):
        if index not in used:
            notices.append(_notice(waiver, f"waiver of {waiver.rule} for {', '.join(waiver.parts)} "
                                           f"matches no finding; remove it", notice_severity))
    return tuple(kept), tuple(waived), tuple(notices)


def _notice(waiver: Waiver, message: str, severity: str) -> Finding:
    return Finding(rule=STALE_WAIVER, severity=severity, message=message, parts=waiver.parts,
                   fix=f"delete the [[waive]] entry (reason was: {waiver.reason})",
                   location=waiver.location)
