"""Settings: discovery, defaults, merging, every table, and located errors."""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import pytest

from linter.cli import main
from linter.config import (check_rule_settings, default_settings, find_settings_file,
                           load_settings, read_parts_file, settings_from_text)
from linter.errors import ConfigError, PartsError
from linter.rules import all_rules

ROOT = Path(__file__).resolve().parent.parent
FIXTURES = ROOT / "fixtures"
CONFIG = FIXTURES / "config"
BAD = FIXTURES / "bad" / "config"


def test_shipped_defaults():
    settings = default_settings()
    # DESIGN.md: ambient 0 to 40 degC, derating 60 % (common practice), resistor tolerance 5 %
    assert (settings.ambient.min, settings.ambient.max) == (0.0, 40.0)
    assert (settings.derating.resistor_power, settings.derating.transistor_power) == (0.6, 0.6)
    assert settings.assume.resistor_tolerance == 0.05
    assert settings.rails == {} and settings.parts == {} and settings.waivers == ()


def test_every_default_key_has_a_comment():
    text = (ROOT / "linter" / "data" / "default_settings.toml").read_text(encoding="utf-8")
    for line in text.splitlines():
        if "=" in line and not line.lstrip().startswith("#"):
            assert "#" in line, line


def test_rails_in_three_forms():
    settings = settings_from_text('[rails]\n"+5V" = "5 V ±5%"\n"GND" = "0 V"\n'
                                  '"VBAT" = { min = "9 V", nom = "12 V", max = "14.4 V" }\n'
                                  '"-15V" = "-15 V +/-10%"\n')
    five, ground, battery, negative = (settings.rails[name] for name in ("+5V", "GND", "VBAT", "-15V"))
    assert (five.min, five.nom, five.max) == pytest.approx((4.75, 5.0, 5.25))  # 5 V ± 5 %
    assert ground.is_ground
    assert (battery.min, battery.nom, battery.max) == (9.0, 12.0, 14.4)
    assert (negative.min, negative.max) == pytest.approx((-16.5, -13.5))  # -15 V ± 10 %
    assert five.origin == "settings ledlint.toml:2"


def test_user_file_overrides_defaults_key_by_key():
    settings = settings_from_text('[ambient]\nmax = "60 degC"\n[derating]\nresistor_power = "50%"\n')
    assert (settings.ambient.min, settings.ambient.max) == (0.0, 60.0)
    assert (settings.derating.resistor_power, settings.derating.transistor_power) == (0.5, 0.6)


def test_parts_waivers_pulsed_and_rules():
    settings = settings_from_text(
        '[parts."LX-R0603"]\nkind = "led"\ncolor = "Red"\nvf_typ = "2.0 V"\n'
        'vf_test_current = "20 mA"\ntempco = "-2 mV/K"\nif_peak_duty = "10%"\n'
        '[parts."QX1"]\nkind = "npn"\nhfe_min = 120\n'
        '[parts."MX1"]\nkind = "mcu"\nsupply_pins = ["VDD", "AVDD"]\n'
        '[[waive]]\nrule = "shared-ballast"\nparts = ["D7", "D8"]\nreason = "matched bin"\n'
        'until = 2030-01-31\n'
        '[pulsed."BAR_EN"]\nduty = "10%"\nperiod = "1 ms"\n'
        '[rules.bom-mismatch]\nseverity = "warning"\nenabled = false\n')
    led = settings.parts["LX-R0603"]
    assert led.figures == {"color": "red", "vf_typ": 2.0, "vf_test_current": 0.02,
                           "tempco": pytest.approx(-0.002), "if_peak_duty": pytest.approx(0.1)}
    assert settings.parts["QX1"].figures == {"hfe_min": 120.0}
    assert settings.parts["MX1"].figures == {"supply_pins": ("VDD", "AVDD")}
    (waiver,) = settings.waivers
    assert (waiver.rule, waiver.parts, waiver.until) == ("shared-ballast", ("D7", "D8"),
                                                         dt.date(2030, 1, 31))
    assert waiver.location.line == 14
    pulse = settings.pulsed["BAR_EN"]
    assert (pulse.duty, pulse.period) == (pytest.approx(0.1), pytest.approx(0.001))
    rule = settings.rules["bom-mismatch"]
    assert (rule.severity, rule.enabled) == ("warning", False)


@pytest.mark.parametrize("name, message", [
    ("unknown_key.toml", "unknown_key.toml:6: unknown key 'vf_tpy' in [parts.\"LX-R0603\"]; "
                         "did you mean 'vf_typ'?"),
    ("malformed.toml", "malformed.toml:2:17: invalid TOML: illegal character '\\n'"),
    ("waiver_without_reason.toml", "waiver_without_reason.toml:6: waiver needs reason = ... "
                                   "(say why the finding is accepted)"),
    ("bad_rail.toml", "bad_rail.toml:2: rail '+5V': cannot read 'five volts' as a value in V "
                      "(write it as '5 V ±5%')"),
    ("unknown_rule.toml", "unknown_rule.toml:1: unknown rule 'bom-mismach' in "
                          "[rules.bom-mismach]; did you mean 'bom-mismatch'?"),
])
def test_bad_settings_exit_2_with_located_message(name, message, capsys):
    netlist = FIXTURES / "demo" / "dust_extractor_panel.cir"
    code = main(["check", str(netlist), "--config", str(BAD / name)])
    captured = capsys.readouterr()
    assert code == 2
    assert captured.err == str(BAD / name).removesuffix(name) + message + "\n"


@pytest.mark.parametrize("text, message", [
    ('[ambient]\nmin = "50 degC"\n', "ledlint.toml:2: [ambient] min 50 degC lies above max 40 degC"),
    ('[derating]\nresistor_power = "160%"\n',
     "ledlint.toml:2: 'resistor_power' in [derating]: must lie between 0% and 100%"),
    ('[rulez]\n', "ledlint.toml:1: unknown key 'rulez' at the top level; did you mean 'rules'?"),
    ('[parts."X"]\ncolor = "red"\n',
     'ledlint.toml:1: [parts."X"] needs kind = one of led, npn, pnp, nmos, pmos, mcu, resistor, '
     'diode, link, capacitor, inductor, ic, connector, switch, other'),
    ('[parts."X"]\nkind = "lde"\n', "ledlint.toml:2: unknown kind 'lde' in [parts.\"X\"]; "
                                    "did you mean 'led'?"),
    ('[parts."X"]\nkind = "led"\ncolor = "teal"\n',
     "ledlint.toml:3: unknown colour 'teal' in [parts.\"X\"]"),
    ('[parts."X"]\nkind = "led"\nif_max = true\n',
     "ledlint.toml:3: 'if_max' in [parts.\"X\"]: expected a value in A (such as '20 mA'), "
     "not the boolean true"),
    ('[rails]\n"V1" = { min = "6 V", nom = "5 V" }\n',
     "ledlint.toml:2: rail 'V1': need min <= nom <= max, got min 6 V, nom 5 V, max 5 V"),
    ('[[waive]]\nrule = "x"\nparts = ["D1"]\nreason = "r"\nuntil = "soon"\n',
     "ledlint.toml:5: until 'soon': expected a date such as 2026-06-30"),
    ('[pulsed."N"]\nperiod = "1 ms"\n', "ledlint.toml:1: [pulsed.\"N\"] needs duty = ... (such as '10%')"),
    ('[rules.bom-mismatch]\nseverity = "fatal"\n',
     "ledlint.toml:2: severity in [rules.bom-mismatch] must be one of error, warning, info, not 'fatal'"),
])
def test_located_errors(text, message):
    with pytest.raises(ConfigError) as caught:
        settings_from_text(text)
    assert str(caught.value) == message


def test_waiver_naming_an_unknown_rule():
    settings = settings_from_text('[[waive]]\nrule = "bom-mismach"\nparts = ["R1"]\nreason = "r"\n')
    with pytest.raises(ConfigError) as caught:
        check_rule_settings(settings, all_rules())
    assert str(caught.value) == ("ledlint.toml:1: waiver names unknown rule 'bom-mismach'; "
                                 "did you mean 'bom-mismatch'?")


class _RuleWithOptions:
    id = "demo-rule"
    from linter.config import RuleOption

    options = (RuleOption("ratio", "", 1.5, "largest current swing"),
               RuleOption("visible_floor", "A", 0.001, "dimmest visible current"))


def test_declared_options_are_read_in_their_unit_and_others_refused():
    registry = {"demo-rule": _RuleWithOptions}
    settings = settings_from_text('[rules.demo-rule]\nratio = 2\nvisible_floor = "0.5 mA"\n')
    checked = check_rule_settings(settings, registry)
    assert checked.rules["demo-rule"].options == {"ratio": 2.0, "visible_floor": 0.0005}
    bad = settings_from_text('[rules.demo-rule]\nratoi = 2\n')
    with pytest.raises(ConfigError) as caught:
        check_rule_settings(bad, registry)
    assert str(caught.value) == "ledlint.toml:2: unknown option 'ratoi' for rule demo-rule; did you mean 'ratio'?"


def test_discovery_walks_up_to_ledlint_toml():
    start = CONFIG / "nested" / "boards" / "panel"
    assert find_settings_file(start) == (CONFIG / "nested" / "ledlint.toml").resolve()


def test_discovery_reads_tool_ledlint_in_pyproject():
    found = find_settings_file(CONFIG / "pyproject_only" / "boards")
    assert found == (CONFIG / "pyproject_only" / "pyproject.toml").resolve()
    settings = load_settings(CONFIG / "pyproject_only" / "boards" / "x.cir")
    assert settings.rails["VLED"].nom == 9.0
    assert settings.parts["LX-B0603"].figures["vf_typ"] == 3.0


def test_discovery_stops_at_the_project_top(tmp_path):
    (tmp_path / ".git").mkdir()
    (tmp_path / "boards").mkdir()
    assert find_settings_file(tmp_path / "boards") is None


def test_config_flag_overrides_discovery():
    settings = load_settings(CONFIG / "nested" / "boards" / "panel" / "x.cir",
                             config=FIXTURES / "demo" / "ledlint.toml")
    assert "VCC" not in settings.rails and "+12V" in settings.rails


def test_parts_files_replace_settings_tables():
    settings = load_settings(CONFIG / "pyproject_only" / "boards" / "x.cir",
                             parts_files=(CONFIG / "extra_parts.toml",))
    assert settings.parts["LX-B0603"].figures["vf_typ"] == 3.2
    assert settings.parts_sources == (str(CONFIG / "extra_parts.toml"),)


def test_parts_file_takes_only_parts(tmp_path):
    extra = tmp_path / "p.toml"
    extra.write_text('[rails]\n"+5V" = "5 V"\n', encoding="utf-8")
    with pytest.raises(PartsError) as caught:
        read_parts_file(extra, "p.toml")
    assert str(caught.value) == "p.toml:1: unknown key 'rails' at the top level; expected one of parts"


def test_demo_settings_load_cleanly():
    settings = load_settings(FIXTURES / "demo" / "dust_extractor_panel.edif")
    assert settings.source is not None and settings.source.endswith("ledlint.toml")
    assert set(settings.parts) == {"LD0603RD", "LD0603GN", "LD0603AM", "LD0603YE", "LD0603BL",
                                   "LD0805WH", "TN45S", "FN30S", "KM8C28"}  # BOARD.md
    assert (settings.ambient.min, settings.ambient.max) == (0.0, 50.0)
