"""Findings: one rule's verdict on named parts, with the numbers that prove it and a fix."""

from __future__ import annotations

import hashlib
from dataclasses import dataclass, field
from typing import Literal, Mapping

from linter.model import SourceLocation

__all__ = ["Severity", "SEVERITIES", "severity_rank", "Finding"]

Severity = Literal["error", "warning", "info"]
SEVERITIES: tuple[str, ...] = ("error", "warning", "info")
"""Most to least severe."""


def severity_rank(severity: str) -> int:
    """2 for error, 1 for warning, 0 for info: larger is worse.

    >>> severity_rank("error") > severity_rank("info")
    True
    """
    return {"info": 0, "warning": 1, "error": 2}[severity]


@dataclass(frozen=True, slots=True)
class Finding:
    """A rule's verdict.

    ``values`` are SI floats keyed by name (``current_max_a``); ``fix`` is a concrete,
    computed remedy in one sentence, or None where none can be computed. The fingerprint is
    built from rule, parts and nets, never from line numbers, so it survives unrelated edits.

    ``values`` is read-only: findings of identical channels may share one mapping (a
    board's many findings are kept until the report; slots keep each small too).
    """

    rule: str
    severity: str
    message: str
    parts: tuple[str, ...] = ()
    nets: tuple[str, ...] = ()
    group: str | None = None
    values: Mapping[str, float] = field(default_factory=dict, hash=False)
    fix: str | None = None
    location: SourceLocation | None = None

    def __post_init__(self) -> None:
        if self.severity not in SEVERITIES:
            raise ValueError(f"finding of {self.rule!r}: unknown severity {self.severity!r}")

    @property
    def fingerprint(self) -> str:
        """16 hex digits of SHA-256 over rule, sorted parts and sorted nets.

        >>> Finding("led-overcurrent", "error", "m", ("D2",)).fingerprint == \\
        ...     Finding("led-overcurrent", "error", "other text", ("D2",)).fingerprint
        True
        """
        key = "\x1f".join((self.rule, ",".join(sorted(self.parts)), ",".join(sorted(self.nets))))
        return hashlib.sha256(key.encode("utf-8")).hexdigest()[:16]
