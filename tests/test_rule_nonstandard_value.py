"""Rule ``nonstandard-value`` on a stand-in context, and through the engine when it has one."""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Mapping

import pytest

from linter.model import Circuit, Part, Pin, SourceLocation
from linter.partdata import ResistorData
from linter.rules import all_rules


@dataclass
class StandInContext:
    """The names the rule reads from the engine's context: circuit, part_data, severity()."""

    circuit: Circuit
    part_data: Mapping[str, Any] = field(default_factory=dict)
    overrides: Mapping[str, str] = field(default_factory=dict)

    def severity(self, rule: Any) -> str:
        return self.overrides.get(rule.id, rule.default_severity)


def _resistor(ref: str, value_si: float | None, line: int, kind: str = "resistor") -> Part:
    return Part(ref, kind, None, (Pin("1", "A"), Pin("2", "B")),
                SourceLocation("board.cir", line, 1), value_si=value_si)


def _context(parts: list[Part], data: Mapping[str, Any] = (), **kwargs: Any) -> StandInContext:
    circuit = Circuit("board.cir", "spice", {p.ref: p for p in parts}, {})
    return StandInContext(circuit, dict(data), **kwargs)


def _findings(context: StandInContext):
    return list(all_rules()["nonstandard-value"]().check(context))


def test_rule_is_registered_as_info():
    rule = all_rules()["nonstandard-value"]
    assert rule.default_severity == "info"  # DESIGN: info for nonstandard-value


def test_value_off_e24_at_five_percent():
    context = _context([_resistor("R7", 1050.0, 12)], {"R7": ResistorData(1050.0, 0.05)})
    (finding,) = _findings(context)
    # IEC 60063 E24 has 10 and 11 around 10.5: so 1 kΩ or 1.1 kΩ.
    assert finding.message == ("R7: 1.05 kΩ is not an E24 value (5 % tolerance); "
                               "nearest E24: 1 kΩ or 1.1 kΩ")
    assert finding.parts == ("R7",) and finding.severity == "info"
    assert finding.values["nearest_below_ohms"] == 1000.0
    assert finding.values["nearest_above_ohms"] == 1100.0
    assert finding.location == SourceLocation("board.cir", 12, 1)
    # IEC 60063 E48 holds 105 (100 105 110 ...), so a 2 % part of the same value is the
    # other way out.
    assert "1 kΩ or 1.1 kΩ (E24)" in finding.fix and "1.05 kΩ at 2 % (E48)" in finding.fix


def test_standard_values_pass():
    parts = [_resistor("R1", 4700.0, 1), _resistor("R2", 150.0, 2), _resistor("R3", 0.47, 3),
             _resistor("R4", 1.2e6, 4), _resistor("R5", 1050.0, 5), _resistor("R6", 1200.0, 6)]
    data = {"R1": ResistorData(4700.0, 0.05),    # IEC 60063 E24 (and E12) 47
            "R2": ResistorData(150.0, 0.05),     # E24 15
            "R3": ResistorData(0.47, 0.10),      # E12 47, sub-ohm decade
            "R4": ResistorData(1.2e6, 0.05),     # E24 12, megohm decade
            "R5": ResistorData(1050.0, 0.01),    # E96 105
            "R6": ResistorData(1200.0, 0.01)}    # E24 12 at 1 %: common practice, stocked
    assert _findings(_context(parts, data)) == []


def test_one_percent_value_off_e96_and_e24():
    context = _context([_resistor("R9", 1250.0, 3)], {"R9": ResistorData(1250.0, 0.01)})
    (finding,) = _findings(context)
    # IEC 60063 E96 has 124 and 127 around 125.
    assert finding.message == ("R9: 1.25 kΩ is not an E96 or E24 value (1 % tolerance); "
                               "nearest E96: 1.24 kΩ or 1.27 kΩ")


def test_tolerance_unknown_is_taken_as_five_percent_and_said():
    context = _context([_resistor("R2", 1050.0, 2)])  # no part data: netlist value, 5 %
    (finding,) = _findings(context)
    assert "(5 % tolerance, assumed)" in finding.message
    assumed = ResistorData(1050.0, 0.05, assumed=("tolerance",))
    (finding,) = _findings(_context([_resistor("R2", 1050.0, 2)], {"R2": assumed}))
    assert "assumed" in finding.message


def test_part_data_value_wins_over_netlist():
    # The BOM says 1 kΩ (standard) although the netlist says 1.05 kΩ: bom-mismatch's job.
    context = _context([_resistor("R7", 1050.0, 1)], {"R7": ResistorData(1000.0, 0.05)})
    assert _findings(context) == []


def test_unknown_zero_and_non_resistors_are_skipped():
    parts = [_resistor("R1", None, 1), _resistor("R2", 0.0, 2),
             _resistor("C1", 1.05e-7, 3, kind="capacitor")]
    assert _findings(_context(parts, {"R1": ResistorData(None)})) == []


def test_severity_follows_settings():
    context = _context([_resistor("R7", 1050.0, 1)], overrides={"nonstandard-value": "warning"})
    (finding,) = _findings(context)
    assert finding.severity == "warning"


FIXTURES = Path(__file__).resolve().parent.parent / "fixtures" / "rules" / "nonstandard-value"


def test_fixtures_through_the_spice_reader():
    from linter.readers import read_netlist

    fires = read_netlist(FIXTURES / "fires.cir", source="fires.cir")
    # IEC 60063 E24: 1.05 kΩ is not a value; 4.7 kΩ and 91 Ω are.
    (finding,) = _findings(StandInContext(fires))
    assert finding.parts == ("RLIM",) and finding.location.line == 3
    clean = read_netlist(FIXTURES / "clean.cir", source="clean.cir")
    assert _findings(StandInContext(clean)) == []


def test_fixtures_through_the_engine():
    engine = pytest.importorskip("linter.engine")
    if not hasattr(engine, "AnalysisContext"):
        pytest.skip("engine has no AnalysisContext yet")
    fires = engine.run_check(engine.CheckRequest(netlist=FIXTURES / "fires.cir"))
    found = [f for f in fires.findings if f.rule == "nonstandard-value"]
    assert [f.parts for f in found] == [("RLIM",)]
    assert found[0].severity == "info" and found[0].location.line == 3
    clean = engine.run_check(engine.CheckRequest(netlist=FIXTURES / "clean.cir"))
    assert [f for f in clean.findings if f.rule == "nonstandard-value"] == []
