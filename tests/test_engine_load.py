"""The engine's loading stage, rule running, severities and waivers."""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import pytest

from linter.engine import CheckRequest, load_inputs, run_check
from linter.partdata import LedData, McuData

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "fixtures" / "demo"
MISMATCH = ROOT / "fixtures" / "bom" / "mismatch.csv"
TODAY = dt.date(2026, 6, 1)


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo_loads_with_all_part_data_and_rails(netlist):
    context = load_inputs(CheckRequest(DEMO / netlist, bom=DEMO / "bom.csv"))
    assert context.bom_discrepancies == ()
    # BOARD.md: +12V 12 V ±10 %, +5V 5 V ±5 %
    assert (context.rails["+12V"].min, context.rails["+12V"].max) == pytest.approx((10.8, 13.2))
    assert (context.rails["+5V"].min, context.rails["+5V"].max) == pytest.approx((4.75, 5.25))
    assert context.circuit.parts["U1"].kind == "mcu"
    assert isinstance(context.part_data["U1"], McuData)
    leds = [ref for ref, part in context.circuit.parts.items() if part.kind == "led"]
    assert len(leds) == 18  # D1-D18 in BOARD.md; D19 is a plain diode
    assert all(isinstance(context.part_data[ref], LedData) for ref in leds)
    assert all(not data.assumed for data in context.part_data.values())
    assert context.groups == ()


def test_demo_has_no_bom_or_part_findings():
    result = run_check(CheckRequest(DEMO / "dust_extractor_panel.edif", bom=DEMO / "bom.csv",
                                    today=TODAY))
    rules = {finding.rule for finding in result.findings}
    assert not rules & {"bom-mismatch", "unknown-part", "unknown-rail", "stale-waiver"}


def _copy_demo(tmp_path: Path, settings: str) -> Path:
    netlist = tmp_path / "board.edif"
    netlist.write_bytes((DEMO / "dust_extractor_panel.edif").read_bytes())
    demo_settings = (DEMO / "ledlint.toml").read_text(encoding="utf-8")
    (tmp_path / "ledlint.toml").write_text(demo_settings + settings, encoding="utf-8")
    return netlist


def test_waivers_apply_expire_and_go_stale(tmp_path):
    netlist = _copy_demo(tmp_path, (
        '\n[[waive]]\nrule = "bom-mismatch"\nparts = ["R12"]\nreason = "BOM fixed in rev B"\n'
        '\n[[waive]]\nrule = "bom-mismatch"\nparts = ["R99"]\nreason = "old"\nuntil = 2026-01-01\n'
        '\n[[waive]]\nrule = "bom-mismatch"\nparts = ["D1"]\nreason = "nothing to waive"\n'))
    result = run_check(CheckRequest(netlist, bom=MISMATCH, today=TODAY))
    waived = [finding.parts for finding in result.waived]
    assert waived == [("R12",)]
    stale = [f for f in result.findings if f.rule == "stale-waiver"]
    assert [(f.parts, f.severity) for f in stale] == [(("R99",), "info"), (("D1",), "info")]
    assert "expired on 2026-01-01" in stale[0].message
    assert "matches no finding" in stale[1].message
    mismatches = [f.parts for f in result.findings if f.rule == "bom-mismatch"]
    assert ("R99",) in mismatches and ("R12",) not in mismatches


def test_severity_override_and_disabled_rule(tmp_path):
    netlist = _copy_demo(tmp_path, '\n[rules.bom-mismatch]\nseverity = "info"\n')
    result = run_check(CheckRequest(netlist, bom=MISMATCH, today=TODAY))
    severities = {f.severity for f in result.findings if f.rule == "bom-mismatch"}
    assert severities == {"info"}
    (tmp_path / "ledlint.toml").write_text('[rules.bom-mismatch]\nenabled = false\n',
                                           encoding="utf-8")
    result = run_check(CheckRequest(netlist, bom=MISMATCH, today=TODAY))
    assert not [f for f in result.findings if f.rule == "bom-mismatch"]


def test_context_option_falls_back_to_declared_default(tmp_path):
    from linter.config import RuleOption

    class Declares:
        id = "bom-mismatch"
        options = (RuleOption("limit", "", 3.0),)

    netlist = _copy_demo(tmp_path, "")
    context = load_inputs(CheckRequest(netlist))
    assert context.option(Declares, "limit") == 3.0
    assert context.option("bom-mismatch", "other", 7) == 7
    with pytest.raises(LookupError):
        context.option("bom-mismatch", "other")


def test_missing_waiver_reason_is_exit_2(tmp_path, capsys):
    from linter.cli import main

    netlist = _copy_demo(tmp_path, '\n[[waive]]\nrule = "bom-mismatch"\nparts = ["R1"]\n')
    line = (tmp_path / "ledlint.toml").read_text(encoding="utf-8").splitlines().index("[[waive]]") + 1
    assert main(["check", str(netlist)]) == 2
    assert capsys.readouterr().err == (f"{tmp_path / 'ledlint.toml'}:{line}: waiver needs reason = "
                                       "... (say why the finding is accepted)\n")


def test_bom_only_when_given():
    context = load_inputs(CheckRequest(DEMO / "dust_extractor_panel.edif"))
    assert context.bom is None and context.bom_discrepancies == ()
