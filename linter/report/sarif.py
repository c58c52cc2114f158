"""The SARIF 2.1.0 report (``--format sarif``), for code-scanning services and CI annotations.

One run whose driver lists every rule (id, name, descriptions and help from the rule's
documentation page, default level) and one result per finding: rule id and index, level,
the message with its fix, the place of the part's instance or element in the netlist
(an artifact URI relative to ``SRCROOT`` when the file lies below the base folder), the
parts as logical locations, and a partial fingerprint that survives unrelated edits.
Severity ``info`` is SARIF level ``note``. Computed fixes are text (SARIF ``fixes`` require
file edits, which ledlint does not make); they are in the message and in ``properties.fix``.
"""

from __future__ import annotations

import re
from pathlib import Path
from typing import TYPE_CHECKING, Any, Iterable, Iterator
from urllib.parse import quote

from linter import __version__
from linter.findings import Finding
from linter.gc_pause import paused_gc
from linter.report.common import finding_location, ordered_findings, plain_data
from linter.report.json_findings import _values_text
from linter.report.json_layout import Lines, compact_json, layered_chunks
from linter.report.lean_order import lean_ordered_findings
from linter.report.stream import StreamingReporter

if TYPE_CHECKING:
    from linter.engine import CheckResult
    from linter.model import Circuit, SourceLocation

__all__ = ["SarifReporter", "SARIF_SCHEMA_URI", "SARIF_VERSION", "FINGERPRINT_KEY",
           "SOURCE_ROOT", "LEVELS", "sarif_log", "sarif_chunks"]

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA_URI = ("https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/"
                    "sarif-schema-2.1.0.json")
"""The ``$schema`` of the log: the OASIS standard's schema (Approved Errata 01)."""
FINGERPRINT_KEY = "ledlint/v1"
"""Key of :attr:`linter.findings.Finding.fingerprint` in ``partialFingerprints``."""
SOURCE_ROOT = "SRCROOT"
"""The ``uriBaseId`` that relative artifact URIs start from."""
LEVELS: dict[str, str] = {"error": "error", "warning": "warning", "info": "note"}
"""Our severity → SARIF ``level``."""

_MARKUP = re.compile(r"\*\*|``?")


def _plain(markdown: str) -> str:
    """A rule page without its emphasis and code marks, for SARIF's plain-text fields."""
    return _MARKUP.sub("", markdown)


def _rule_descriptor(rule_id: str, rule: Any | None) -> dict[str, Any]:
    """``reportingDescriptor`` of one rule; a rule id with no registered class gets its id only."""
    if rule is None:
        return {"id": rule_id, "shortDescription": {"text": rule_id}}
    page = rule.documentation()
    summary = rule.summary() or rule_id
    body = page.split("\n", 1)[1].strip() if "\n" in page else page
    descriptor: dict[str, Any] = {
        "id": rule_id,
        "name": rule.__name__,
        "shortDescription": {"text": summary},
        "fullDescription": {"text": _plain(body or summary)},
        "help": {"text": _plain(page), "markdown": page},
        "defaultConfiguration": {"level": LEVELS[rule.default_severity]},
    }
    if getattr(rule, "aliases", ()):
        descriptor["deprecatedIds"] = list(rule.aliases)
    return descriptor


def _rules(findings: Iterable[Finding]) -> list[dict[str, Any]]:
    """Every registered rule, plus any rule id a finding names that is not registered."""
    from linter.rules import all_rules

    registry = all_rules()
    ids = sorted(set(registry) | {finding.rule for finding in findings})
    return [_rule_descriptor(rule_id, registry.get(rule_id)) for rule_id in ids]


def _artifact(file: str, base: Path) -> dict[str, str]:
    """``artifactLocation``: relative to ``SRCROOT`` below the base folder, else an absolute URI."""
    path = Path(file)
    absolute = (path if path.is_absolute() else Path.cwd() / path).resolve()
    try:
        relative = absolute.relative_to(base)
    except ValueError:
        return {"uri": absolute.as_uri()}
    return {"uri": quote(relative.as_posix(), safe="/"), "uriBaseId": SOURCE_ROOT}


class _Places:
    """``physicalLocation`` records of one log: each file's artifact resolved once (a board's
    findings all point into one or two files; resolving asks the file system)."""

    def __init__(self, base: Path) -> None:
        self.base = base
        self._artifacts: dict[str, dict[str, str]] = {}
        self.values_texts: dict[int, tuple[Any, str]] = {}
        """:func:`_result_line`'s values texts by mapping object (kept with it, so no id
        is reused): findings share their read-only ``values``."""

    def physical(self, location: "SourceLocation") -> dict[str, Any]:
        artifact = self._artifacts.get(location.file)
        if artifact is None:
            artifact = self._artifacts[location.file] = _artifact(location.file, self.base)
        return {"artifactLocation": dict(artifact),
                "region": {"startLine": location.line, "startColumn": location.column}}


def _logical(finding: Finding, circuit: "Circuit") -> list[dict[str, str]]:
    """The parts as ``object`` logical locations (full path where it differs), then the nets."""
    logical: list[dict[str, str]] = []
    for ref in finding.parts:
        part = circuit.parts.get(ref)
        entry = {"name": ref, "kind": "object"}
        if part is not None and part.path and part.path != ref:
            entry["fullyQualifiedName"] = part.path
        logical.append(entry)
    logical.extend({"name": net, "kind": "element"} for net in finding.nets)
    return logical


def _related(finding: Finding, circuit: "Circuit", places: _Places) -> list[dict[str, Any]]:
    """The instances of the other named parts, so that a viewer can show each of them."""
    related = []
    for ref in finding.parts[1:]:
        part = circuit.parts.get(ref)
        if part is not None:
            related.append({"id": len(related) + 1, "message": {"text": ref},
                            "physicalLocation": places.physical(part.location)})
    return related


def _message(finding: Finding) -> str:
    return finding.message if not finding.fix else f"{finding.message}\nFix: {finding.fix}"


_PLAIN_VALUES: Any = object()
"""``values`` of :func:`_result` made from the finding's own (the plain path)."""


def _result(finding: Finding, rule_index: int, circuit: "Circuit",
            places: _Places, values: Any = _PLAIN_VALUES) -> dict[str, Any]:
    """The finding's SARIF result; ``values`` stands in ``properties.values`` if given."""
    location: dict[str, Any] = {}
    where = finding_location(finding, circuit)
    if where is not None:
        location["physicalLocation"] = places.physical(where)
    logical = _logical(finding, circuit)
    if logical:
        location["logicalLocations"] = logical
    result: dict[str, Any] = {
        "ruleId": finding.rule,
        "ruleIndex": rule_index,
        "level": LEVELS[finding.severity],
        "message": {"text": _message(finding)},
    }
    if location:
        result["locations"] = [location]
    related = _related(finding, circuit, places)
    if related:
        result["relatedLocations"] = related
    result["partialFingerprints"] = {FINGERPRINT_KEY: finding.fingerprint}
    result["properties"] = {"parts": list(finding.parts), "nets": list(finding.nets),
                            "group": finding.group, "fix": finding.fix,
                            "values": plain_data(dict(sorted(finding.values.items())))
                            if values is _PLAIN_VALUES else values}
    return result


_VALUES_END = '"values": 0}}'
"""How a result's line ends with 0 standing for its values (the last key of ``properties``,
itself the last key of the result)."""


def _result_line(finding: Finding, rule_index: int, circuit: "Circuit",
                 places: _Places) -> str:
    """``compact_json(_result(...))``. Values keyed by text and holding floats only are
    written by :func:`~linter.report.json_findings._values_text` (their text remembered as
    the JSON report's: keys in order, each float's ``repr``, null where not finite, which is
    what ``plain_data`` and the encoder make of them) in the place of a 0."""
    values = finding.values
    known = places.values_texts.get(id(values))
    if known is None or known[0] is not values:
        if type(values) is not dict or not set(map(type, values)) <= _TEXT_ONLY \
                or not set(map(type, values.values())) <= _FLOAT_ONLY:
            return compact_json(_result(finding, rule_index, circuit, places))
        known = places.values_texts[id(values)] = (values, _values_text(values))
    line = compact_json(_result(finding, rule_index, circuit, places, values=0))
    if line.endswith(_VALUES_END):
        return line[:-3] + known[1] + "}}"
    return compact_json(_result(finding, rule_index, circuit, places))


_TEXT_ONLY, _FLOAT_ONLY = {str}, {float}


def _results(findings: list[Finding], rules: list[dict[str, Any]], circuit: "Circuit",
             base: Path) -> Iterator[dict[str, Any]]:
    """One SARIF result per finding, in the order given."""
    index = {descriptor["id"]: position for position, descriptor in enumerate(rules)}
    places = _Places(base)
    for finding in findings:
        yield _result(finding, index[finding.rule], circuit, places)


def _result_lines(findings: list[Finding], rules: list[dict[str, Any]], circuit: "Circuit",
                  base: Path) -> Iterator[str]:
    """Each of :func:`_results` as one line of JSON (:func:`_result_line`)."""
    index = {descriptor["id"]: position for position, descriptor in enumerate(rules)}
    places = _Places(base)
    for finding in findings:
        yield _result_line(finding, index[finding.rule], circuit, places)


def _log_around(rules: list[dict[str, Any]], base: Path, results: Any) -> dict[str, Any]:
    driver = {"name": "ledlint", "version": __version__, "semanticVersion": __version__,
              "rules": rules}
    run = {
        "tool": {"driver": driver},
        "originalUriBaseIds": {SOURCE_ROOT: {"uri": base.as_uri().rstrip("/") + "/"}},
        "columnKind": "unicodeCodePoints",
        "results": results,
    }
    return {"$schema": SARIF_SCHEMA_URI, "version": SARIF_VERSION, "runs": [run]}


def sarif_log(result: "CheckResult", base: Path) -> dict[str, Any]:
    """The SARIF log as plain data; relative URIs start from ``base`` (an absolute folder)."""
    findings = ordered_findings(result.findings)
    rules = _rules(findings)
    return _log_around(rules, base, list(_results(findings, rules, result.circuit, base)))


def sarif_chunks(log: dict[str, Any]) -> Iterator[str]:
    """A SARIF log's text in pieces: indented by two spaces as ``json.dumps(indent=2)``
    writes it, except that each result (a :class:`Lines` entry) is one line."""
    with paused_gc():  # acyclic text; see linter.gc_pause
        yield from layered_chunks(log)
        yield "\n"


class SarifReporter(StreamingReporter):
    """SARIF 2.1.0; the same input in the same folder gives the same bytes.

    Layout: the log indented by two spaces, each result on one line (a changed finding is
    one changed line); the results are made as they are written (:meth:`chunks`).
    """

    def chunks(self, result: "CheckResult") -> Iterator[str]:
        base = (self.options.base_dir or Path.cwd()).resolve()
        findings = lean_ordered_findings(result.findings)
        rules = _rules(findings)
        lines = Lines(_result_lines(findings, rules, result.circuit, base))
        yield from sarif_chunks(_log_around(rules, base, lines))
