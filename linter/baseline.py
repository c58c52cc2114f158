"""Baselines: the fingerprints of accepted findings, so that a check shows only new ones.

A baseline is a small JSON file of our own design (schema ``ledlint-baseline/1``)::

    {
      "schema": "ledlint-baseline/1",
      "tool": {"name": "ledlint", "version": "0.1.0"},
      "findings": [
        {"fingerprint": "3f1c…", "rule": "resistor-overload", "parts": ["R12"], "nets": [],
         "message": "R12: 137 mW … (for people; not compared)"}
      ]
    }

One entry per fingerprint (the first message in text order), sorted by rule then
fingerprint; and the JSON is written with
fixed indentation and key order: the same findings give the same bytes. Only the
fingerprint is compared (:attr:`linter.findings.Finding.fingerprint`: rule, parts and nets,
never line numbers or numbers in the message), so a finding stays baselined while its
figures move. ``ledlint baseline write`` writes the file whole or not at all
(:func:`linter.output.write_atomically`); ``ledlint check --baseline FILE`` reads it with
:func:`read_baseline` and sets matching findings aside (:func:`split_baselined`).
"""

from __future__ import annotations

import json
import re
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Iterable

from linter import __version__
from linter.errors import InputError
from linter.findings import Finding

__all__ = ["BASELINE_SCHEMA", "BaselineError", "Baseline", "baseline_text", "write_baseline",
           "read_baseline", "parse_baseline", "split_baselined"]

BASELINE_SCHEMA = "ledlint-baseline/1"
"""The ``schema`` field: changes only when a reader would have to change."""

_FINGERPRINT = re.compile(r"^[0-9a-f]{16}$")
"""A finding's fingerprint: 16 lower-case hex digits."""


class BaselineError(InputError):
    """A baseline file that cannot be used (exit code 2)."""


@dataclass(frozen=True)
class Baseline:
    """The fingerprints a baseline file accepts, and the file it came from."""

    source: str
    fingerprints: frozenset[str]


def _entry(finding: Finding) -> dict[str, Any]:
    return {"fingerprint": finding.fingerprint, "rule": finding.rule,
            "parts": list(finding.parts), "nets": list(finding.nets),
            "message": finding.message}


def baseline_text(findings: Iterable[Finding]) -> str:
    """The baseline file's text for ``findings``: sorted, one entry per fingerprint.

    >>> text = baseline_text([Finding("led-reverse", "error", "m", ("D1",))])
    >>> json.loads(text)["findings"][0]["parts"]
    ['D1']
    """
    unique: dict[str, dict[str, Any]] = {}
    for entry in sorted((_entry(f) for f in findings), key=lambda e: e["message"]):
        unique.setdefault(entry["fingerprint"], entry)  # the first message in order wins
    entries = sorted(unique.values(), key=lambda e: (e["rule"], e["fingerprint"]))
    document = {"schema": BASELINE_SCHEMA, "tool": {"name": "ledlint", "version": __version__},
                "findings": entries}
    return json.dumps(document, indent=2, ensure_ascii=False) + "\n"


def write_baseline(path: Path, findings: Iterable[Finding]) -> int:
    """Write the baseline of ``findings`` to ``path`` whole or not at all; the entry count."""
    from linter.output import write_atomically

    text = baseline_text(findings)
    write_atomically(path, text)
    return len(json.loads(text)["findings"])


def _entry_lines(text: str) -> list[int]:
    """1-based line where each value directly inside a top-level array starts (the entries)."""
    lines: list[int] = []
    stack: list[str] = []
    line, in_string, escaped, expect = 1, False, False, False
    for char in text:
        if char == "\n":
            line += 1
        if in_string:
            if escaped:
                escaped = False
            elif char == "\\":
                escaped = True
            elif char == '"':
                in_string = False
            continue
        if char.isspace():
            continue
        at_entries = stack == ["{", "["]
        if at_entries and char == ",":
            expect = True
            continue
        if at_entries and expect and char not in "]":
            lines.append(line)
            expect = False
        if char == '"':
            in_string = True
        elif char in "{[":
            stack.append(char)
            expect = stack == ["{", "["]
        elif char in "}]" and stack:
            stack.pop()
    return lines


def _key_line(text: str, key: str) -> int | None:
    """1-based line of the first ``"key":`` in ``text``, None when absent."""
    match = re.search(rf'"{re.escape(key)}"\s*:', text)
    return None if match is None else text.count("\n", 0, match.start()) + 1


def _fingerprints(entries: Any, text: str, source: str) -> frozenset[str]:
    if not isinstance(entries, list):
        raise BaselineError(source, _key_line(text, "findings"), None,
                            "'findings' must be a list of entries")
    lines = _entry_lines(text)
    found: set[str] = set()
    for index, entry in enumerate(entries):
        line = lines[index] if index < len(lines) else None
        if not isinstance(entry, dict):
            raise BaselineError(source, line, None, f"findings[{index}] is not an object")
        fingerprint = entry.get("fingerprint")
        if not isinstance(fingerprint, str) or not _FINGERPRINT.match(fingerprint):
            raise BaselineError(source, line, None, f"findings[{index}] has no fingerprint "
                                "(16 hex digits expected)")
        found.add(fingerprint)
    return frozenset(found)


def parse_baseline(text: str, source: str) -> Baseline:
    """A baseline from the text of a baseline file; BaselineError names file and line."""
    try:
        document = json.loads(text)
    except json.JSONDecodeError as exc:
        raise BaselineError(source, exc.lineno, exc.colno, f"not JSON: {exc.msg}") from None
    if not isinstance(document, dict):
        raise BaselineError(source, 1, 1, f"not a ledlint baseline (an object with "
                                          f"\"schema\": \"{BASELINE_SCHEMA}\" expected)")
    schema = document.get("schema")
    if schema != BASELINE_SCHEMA:
        where = _key_line(text, "schema") or 1
        raise BaselineError(source, where, None, f"schema {schema!r} is not "
                                                 f"{BASELINE_SCHEMA!r}")
    if "findings" not in document:
        raise BaselineError(source, 1, None, "no 'findings' list")
    return Baseline(source, _fingerprints(document["findings"], text, source))


def read_baseline(path: Path) -> Baseline:
    """The baseline in file ``path`` (UTF-8 JSON); BaselineError when it cannot be used."""
    source = str(path)
    from linter.limits import read_input

    data = read_input(path, source, BaselineError)
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data.count(b"\n", 0, exc.start) + 1
        raise BaselineError(source, line, None, "not UTF-8 text") from None
    return parse_baseline(text, source)


def split_baselined(findings: Iterable[Finding], baseline: Baseline
                    ) -> tuple[tuple[Finding, ...], tuple[Finding, ...]]:
    """(new findings, findings in the baseline), each in the order given."""
    new: list[Finding] = []
    known: list[Finding] = []
    for finding in findings:
        (known if finding.fingerprint in baseline.fingerprints else new).append(finding)
    return tuple(new), tuple(known)
