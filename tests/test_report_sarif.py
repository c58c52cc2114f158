"""The SARIF 2.1.0 report, held to the OASIS schema kept beside the repository (../shared)."""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import jsonschema
import pytest
from report_samples import NETLIST, fixture_netlists, sample_result

from linter import __version__
from linter.cli import main
from linter.findings import Finding
from linter.model import SourceLocation
from linter.report import ReportFormat, ReportOptions
from linter.rules import all_rules

REPO = Path(__file__).resolve().parents[1]
SARIF_SCHEMA = REPO.parent / "shared" / "schemas" / "sarif-schema-2.1.0.json"


@pytest.fixture(scope="module")
def validator() -> jsonschema.Draft4Validator:
    """The official schema (draft-04); a missing file fails the tests, it never skips them."""
    if not SARIF_SCHEMA.is_file():
        pytest.fail(f"the SARIF 2.1.0 schema is missing: {SARIF_SCHEMA}")
    schema = json.loads(SARIF_SCHEMA.read_text("utf-8"))
    jsonschema.Draft4Validator.check_schema(schema)
    return jsonschema.Draft4Validator(schema)


def _log(result=None, base: Path = REPO) -> dict:
    reporter = ReportFormat.SARIF.reporter(ReportOptions(base_dir=base))
    return json.loads(reporter.render(result or sample_result()))


def _errors(validator: jsonschema.Draft4Validator, log: dict) -> list[str]:
    return [f"{list(error.path)}: {error.message}" for error in validator.iter_errors(log)]


def test_sample_validates(validator) -> None:
    assert _errors(validator, _log()) == []


def test_validator_catches_a_broken_log(validator) -> None:
    log = _log()
    log["runs"][0]["results"][0]["level"] = "fatal"  # not a SARIF level (schema enum)
    assert _errors(validator, log)


def test_driver_lists_every_rule_from_its_documentation() -> None:
    driver = _log()["runs"][0]["tool"]["driver"]
    assert driver["name"] == "ledlint" and driver["version"] == __version__
    assert "informationUri" not in driver  # we have no web site to point to
    registry = all_rules()
    by_id = {rule["id"]: rule for rule in driver["rules"]}
    assert set(registry) <= set(by_id)
    # SARIF 2.1.0 level for each of our severities (the spec's "error", "warning", "note").
    level = {"error": "error", "warning": "warning", "info": "note"}
    for rule_id, rule in registry.items():
        entry = by_id[rule_id]
        assert entry["name"] == rule.__name__
        assert entry["shortDescription"]["text"] == rule.summary()
        assert entry["help"]["markdown"] == rule.documentation()
        assert "**" not in entry["help"]["text"] and "Anti-pattern" in entry["help"]["text"]
        assert entry["fullDescription"]["text"]
        assert entry["defaultConfiguration"]["level"] == level[rule.default_severity]


def test_results_point_at_their_rules_and_carry_levels_fingerprints_and_fixes() -> None:
    run = _log()["runs"][0]
    rules = run["tool"]["driver"]["rules"]
    results = run["results"]
    assert [r["ruleId"] for r in results] == ["shared-ballast", "string-headroom",
                                              "nonstandard-value"]
    for result in results:
        assert rules[result["ruleIndex"]]["id"] == result["ruleId"]
    assert [r["level"] for r in results] == ["error", "warning", "note"]
    ballast = results[0]
    finding = sample_result().findings[1]
    assert ballast["partialFingerprints"] == {"ledlint/v1": finding.fingerprint}
    assert ballast["message"]["text"] == f"{finding.message}\nFix: {finding.fix}"
    assert ballast["properties"]["fix"] == finding.fix
    assert ballast["properties"]["values"] == {"current_max_a": 0.031, "resistor_current_a": 0.08}


def test_physical_location_relative_to_srcroot_and_region_of_the_part() -> None:
    run = _log()["runs"][0]
    assert run["originalUriBaseIds"]["SRCROOT"]["uri"] == REPO.as_uri() + "/"
    location = run["results"][0]["locations"][0]
    # D7, the first part named, is placed on line 4 column 1 of boards/panel.cir (sample).
    assert location["physicalLocation"] == {
        "artifactLocation": {"uri": NETLIST, "uriBaseId": "SRCROOT"},
        "region": {"startLine": 4, "startColumn": 1}}
    names = [entry["name"] for entry in location["logicalLocations"]]
    assert names == ["D7", "D8", "D9", "D10", "R6", "BAR_A"]
    assert location["logicalLocations"][0]["kind"] == "object"
    related = run["results"][0]["relatedLocations"]
    assert [entry["message"]["text"] for entry in related] == ["D8", "D9", "D10", "R6"]


def test_file_outside_the_base_folder_gets_an_absolute_uri(tmp_path: Path, validator) -> None:
    elsewhere = tmp_path / "other place" / "board.cir"
    finding = Finding("floating-led", "warning", "D3 has a pin on no net", ("D3",),
                      location=SourceLocation(str(elsewhere), 12, 5))
    log = _log(replace(sample_result(), findings=(finding,)), base=REPO / "fixtures")
    artifact = log["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["artifactLocation"]
    assert artifact == {"uri": elsewhere.as_uri()}
    assert "%20" in artifact["uri"]  # RFC 3986: a space is percent-encoded
    assert _errors(validator, log) == []


def test_relative_uri_is_percent_encoded(tmp_path: Path) -> None:
    finding = Finding("floating-led", "warning", "m", ("D3",),
                      location=SourceLocation(str(tmp_path / "my boards" / "a#1.cir"), 1, 1))
    log = _log(replace(sample_result(), findings=(finding,)), base=tmp_path)
    artifact = log["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["artifactLocation"]
    assert artifact == {"uri": "my%20boards/a%231.cir", "uriBaseId": "SRCROOT"}


def test_a_rule_id_without_a_registered_rule_still_gets_a_descriptor(validator) -> None:
    finding = Finding("made-up-rule", "info", "m", ("R6",))
    log = _log(replace(sample_result(), findings=(finding,)))
    result = log["runs"][0]["results"][0]
    assert log["runs"][0]["tool"]["driver"]["rules"][result["ruleIndex"]]["id"] == "made-up-rule"
    assert _errors(validator, log) == []


def test_same_input_same_bytes() -> None:
    reporter = ReportFormat.SARIF.reporter(ReportOptions(base_dir=REPO))
    assert reporter.render(sample_result()) == reporter.render(sample_result())


@pytest.mark.parametrize("netlist", fixture_netlists(),
                         ids=lambda path: str(path.relative_to(REPO)))
def test_fixture_sarif_validates(netlist: Path, tmp_path: Path, validator) -> None:
    output = tmp_path / "report.sarif"
    assert main(["check", str(netlist), "--format", "sarif", "--output", str(output)]) in (0, 1)
    assert _errors(validator, json.loads(output.read_text("utf-8"))) == []


def test_hierarchical_part_carries_its_full_path(validator) -> None:
    result = sample_result()
    r6 = result.circuit.parts["R6"]
    parts = {**result.circuit.parts, "R6": replace(r6, path="S2/R6")}
    circuit = replace(result.circuit, parts=parts)
    finding = Finding("resistor-overload", "error", "R6 burns 410 mW", ("R6",))
    log = _log(replace(result, circuit=circuit, findings=(finding,)))
    logical = log["runs"][0]["results"][0]["locations"][0]["logicalLocations"]
    assert logical == [{"name": "R6", "kind": "object", "fullyQualifiedName": "S2/R6"}]
    assert _errors(validator, log) == []
