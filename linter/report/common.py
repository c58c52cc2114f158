"""What every report format shows alike: the order of findings, where a finding sits in the
source, and the counts by severity."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any, Iterable, Mapping

from linter.findings import SEVERITIES, Finding, severity_rank
from linter.gc_pause import paused_gc
from linter.refs import natural_key

if TYPE_CHECKING:
    from linter.model import Circuit, SourceLocation

__all__ = ["ordered_findings", "finding_location", "severity_counts", "plain_data",
           "sorted_groups", "sorted_records", "group_entry"]


def _order(finding: Finding) -> tuple:
    """Most severe first, then rule id, then the parts and nets in natural order."""
    return (-severity_rank(finding.severity), finding.rule,
            tuple(natural_key(ref) for ref in finding.parts),
            tuple(natural_key(net) for net in finding.nets), finding.message)


def ordered_findings(findings: Iterable[Finding]) -> list[Finding]:
    """The findings in report order: the same for the same input, whatever the rule order.

    The sort keys are many small tuples: the cyclic collector is paused while they live
    (see :mod:`linter.gc_pause`; on a 100k-part board the collections cost 1.7 s).
    """
    with paused_gc():
        return sorted(findings, key=_order)


def finding_location(finding: Finding, circuit: "Circuit") -> "SourceLocation | None":
    """Where to point for a finding: its own location, else the first named part's instance.

    A pin id (``U1.PA4``) points at its part. None where neither is known.
    """
    if finding.location is not None:
        return finding.location
    for ref in finding.parts:
        part = circuit.parts.get(ref) or circuit.parts.get(ref.split(".", 1)[0])
        if part is not None:
            return part.location
    return None


def severity_counts(findings: Iterable[Finding]) -> dict[str, int]:
    """``{"error": n, "warning": n, "info": n}``, every severity present."""
    counts = {severity: 0 for severity in SEVERITIES}
    for finding in findings:
        counts[finding.severity] += 1
    return counts


def plain_data(value: Any) -> Any:
    """JSON-ready copy: mappings to dicts, sequences to lists, numbers to float or int.

    A number that is not finite (an unknown or unbounded figure) becomes None: JSON has no
    NaN, and a report says "unknown" rather than invent a number. numpy scalars become
    Python numbers.
    """
    kind = type(value)
    if kind is float:
        return value if math.isfinite(value) else None
    if value is None or kind is str or kind is bool or kind is int:
        return value
    if kind is dict:
        return {str(key): plain_data(item) for key, item in value.items()}
    if kind is list or kind is tuple:
        return [plain_data(item) for item in value]
    return _plain_other(value)


def _plain_other(value: Any) -> Any:
    """:func:`plain_data` for anything but the built-in types (subclasses, numpy, records)."""
    if value is None or isinstance(value, (str, bool)):
        return value
    if isinstance(value, Mapping):
        return {str(key): plain_data(item) for key, item in value.items()}
    if isinstance(value, (list, tuple)):
        return [plain_data(item) for item in value]
    if isinstance(value, int) and not hasattr(value, "dtype"):
        return value
    if hasattr(value, "item") and hasattr(value, "dtype"):  # a numpy scalar
        return plain_data(value.item())
    number = float(value)
    return number if math.isfinite(number) else None


def sorted_groups(groups: Iterable[Any]) -> list[dict[str, Any]]:
    """Each group's ``as_dict()`` as plain data, in natural order of the group id."""
    dicts = [plain_data(group.as_dict()) for group in groups]
    return sorted(dicts, key=lambda entry: natural_key(str(entry.get("id", ""))))


def group_entry(group: Any) -> dict[str, Any]:
    """One group's ``as_dict()`` as plain data (an entry of :func:`sorted_groups`)."""
    return plain_data(group.as_dict())


def _record_id(group: Any) -> str:
    """The id :func:`sorted_groups` sorts by, without the whole entry where the record has
    an ``id`` (a solved group); a stand-in record with ``as_dict()`` only is asked for it."""
    record_id = getattr(group, "id", None)
    if isinstance(record_id, str):
        return record_id
    return str(group_entry(group).get("id", ""))


def sorted_records(groups: Iterable[Any]) -> list[Any]:
    """The group records in the order of :func:`sorted_groups`, not turned into entries:
    a reporter that shows a few groups, or one at a time, makes only those entries."""
    with paused_gc():
        return sorted(groups, key=lambda group: natural_key(_record_id(group)))
