"""Part data: settings first, SPICE models, generic fallbacks, all reported (unknown-part)."""

from __future__ import annotations

import math

import pytest
from scipy.constants import Boltzmann, elementary_charge

from linter.config import default_settings, settings_from_text
from linter.context import AnalysisContext
from linter.model import Circuit, DeviceModel, Net, Part, Pin, SourceLocation
from linter.partdata import BjtData, LedData, McuData, MosfetData, ResistorData
from linter.parts import resolve_part_data
from linter.rules.unknown_part import UnknownPart

AT = SourceLocation("t.cir", 1, 1)


def circuit_of(*parts: Part) -> Circuit:
    nets: dict[str, list[tuple[str, str]]] = {}
    for part in parts:
        for pin in part.pins:
            nets.setdefault(pin.net, []).append((part.ref, pin.name))
    return Circuit("t.cir", "spice", {p.ref: p for p in parts},
                   {n: Net(n, tuple(p), AT) for n, p in nets.items()})


def two_pin(ref, kind, value=None, part_number=None, model=None, properties=None, names=("1", "2")):
    return Part(ref, kind, value, (Pin(names[0], "A"), Pin(names[1], "B")), AT,
                part_number=part_number, model=model, properties=properties or {})


SETTINGS = settings_from_text(
    '[parts."LD0603RD"]\nkind = "led"\ncolor = "red"\nvf_typ = "2.0 V"\nvf_min = "1.8 V"\n'
    'vf_max = "2.4 V"\nvf_test_current = "20 mA"\nif_max = "25 mA"\nvr_max = "5 V"\n'
    'tempco = "-2 mV/K"\n'
    '[parts."UC8"]\nkind = "mcu"\npin_current_max = "25 mA"\n')


def test_part_data_changes_a_diode_into_an_led():
    circuit = circuit_of(two_pin("D3", "diode", "LD0603RD", "LD0603RD", names=("A", "K")))
    circuit, data = resolve_part_data(circuit, SETTINGS)
    assert circuit.parts["D3"].kind == "led"
    led = data["D3"]
    assert isinstance(led, LedData)
    assert (led.vf_typ, led.vf_max, led.if_max, led.assumed, led.note) == (2.0, 2.4, 0.025, (), None)


def test_opaque_instance_becomes_an_mcu_with_generic_gaps_reported():
    part = Part("U1", "ic", None, (Pin("VDD", "+5V"), Pin("VSS", "0"), Pin("PA0", "X")), AT,
                part_number="UC8")
    circuit, data = resolve_part_data(circuit_of(part), SETTINGS)
    mcu = data["U1"]
    assert circuit.parts["U1"].kind == "mcu" and isinstance(mcu, McuData)
    assert mcu.pin_current_max == 0.025  # from the settings
    # generic (from memory): 100 mA package, 25 ohm; supply and ground from the pin names
    assert (mcu.package_current_max, mcu.output_resistance) == (0.1, 25.0)
    assert (mcu.supply_pins, mcu.ground_pins) == (("VDD",), ("VSS",))
    assert set(mcu.assumed) == {"package_current_max", "output_resistance", "supply_pins",
                                "ground_pins"}


def test_generic_blue_led_by_colour_word_is_noted():
    circuit = circuit_of(two_pin("D4", "led", "BLUE"))
    _, data = resolve_part_data(circuit, default_settings())
    led = data["D4"]
    # generic blue (from memory): 3.1 V typical at 20 mA, 2.8-3.5 V, -3 mV/K
    assert (led.color, led.vf_typ, led.vf_min, led.vf_max, led.tempco) == \
        ("blue", 3.1, 2.8, 3.5, -0.003)
    assert "vf_typ" in led.assumed and "color" not in led.assumed
    assert led.note.startswith("D4: no part data; generic blue LED assumed (vf 3.1 V typ")


def test_led_of_unknown_colour_gets_the_wide_range_and_says_so():
    _, data = resolve_part_data(circuit_of(two_pin("D9", "led", "LED")), default_settings())
    led = data["D9"]
    assert (led.color, led.vf_min, led.vf_max) == (None, 1.8, 3.4)  # red low end to blue high end
    assert "color" in led.assumed and "unknown colour" in led.note


def test_spice_model_gives_vf_by_shockley():
    model = DeviceModel("DX", "D", {"IS": 2.2e-18, "N": 2.0, "RS": 5.0})
    circuit = circuit_of(two_pin("D1", "led", "DX", "DX", model=model))
    _, data = resolve_part_data(circuit, default_settings())
    led = data["D1"]
    # Shockley with series resistance, Vt = kT/q at 300.15 K (SPICE TNOM 27 degC), scipy.constants
    vt = Boltzmann * 300.15 / elementary_charge
    expected = 2.0 * vt * math.log(0.02 / 2.2e-18 + 1) + 0.02 * 5.0
    assert led.vf_typ == pytest.approx(expected, rel=1e-12)
    assert (led.spice_is, led.ideality, led.rs) == (2.2e-18, 2.0, 5.0)
    assert "vf_typ" not in led.assumed and "vf_max" in led.assumed


@pytest.mark.parametrize("properties, power, source", [
    # chip ratings at 70 degC (common practice, DESIGN.md table)
    ({"package": "0603"}, 0.1, "0603 chip size"),
    ({"footprint": "R_0805_2012Metric"}, 0.125, "0805 chip size"),
    ({"package": "2512"}, 1.0, "2512 chip size"),
    ({"package": "axial"}, 0.25, "axial package"),
    ({"package": "0402", "power": "1/4W"}, 0.25, "BOM"),
    ({}, None, None),
])
def test_resistor_rating(properties, power, source):
    circuit = circuit_of(two_pin("R1", "resistor", "1k", properties=properties))
    _, data = resolve_part_data(circuit, default_settings())
    resistor = data["R1"]
    assert isinstance(resistor, ResistorData)
    assert (resistor.power, resistor.power_source) == (power, source)
    assert resistor.ohms == 1000.0


def test_resistor_tolerance_from_bom_else_assumed():
    with_tol = circuit_of(two_pin("R1", "resistor", "1k", properties={"tolerance": "±1%",
                                                                       "package": "0603"}))
    _, data = resolve_part_data(with_tol, default_settings())
    assert (data["R1"].tolerance, data["R1"].assumed, data["R1"].note) == (0.01, (), None)
    bare = circuit_of(two_pin("R2", "resistor", "1k", properties={"package": "0603"}))
    _, data = resolve_part_data(bare, default_settings())
    assert data["R2"].tolerance == 0.05 and data["R2"].assumed == ("tolerance",)  # common practice


def test_transistor_defaults_and_models():
    npn = Part("Q1", "npn", "QX", (Pin("C", "A"), Pin("B", "B"), Pin("E", "0")), AT,
               model=DeviceModel("QX", "NPN", {"IS": 1e-14, "BF": 300.0}))
    nmos = Part("Q2", "nmos", "MX", (Pin("D", "A"), Pin("G", "B"), Pin("S", "0")), AT,
                model=DeviceModel("MX", "NMOS", {"VTO": 2.0, "KP": 0.5}))
    _, data = resolve_part_data(circuit_of(npn, nmos), default_settings())
    bjt, fet = data["Q1"], data["Q2"]
    assert isinstance(bjt, BjtData) and isinstance(fet, MosfetData)
    # generic small-signal NPN (from memory): hfe_min 100, vce_sat 0.2 V; hfe_typ from BF
    assert (bjt.hfe_min, bjt.hfe_typ, bjt.vce_sat, bjt.spice_bf) == (100.0, 300.0, 0.2, 300.0)
    assert "hfe_typ" not in bjt.assumed and "hfe_min" in bjt.assumed
    assert (fet.vgs_th, fet.rds_on, fet.rds_on_vgs, fet.spice_kp) == (2.0, 1.0, 4.5, 0.5)


def test_unknown_part_groups_by_part_number():
    circuit = circuit_of(two_pin("D1", "led", "RED", "LX9"), two_pin("D2", "led", "RED", "LX9"),
                         two_pin("D3", "led", "LD0603RD", "LD0603RD"),
                         two_pin("R1", "resistor", "1k"), two_pin("R2", "resistor", "2k"),
                         two_pin("Q5", "transistor", "Q"))
    circuit, data = resolve_part_data(circuit, SETTINGS)
    context = AnalysisContext(circuit=circuit, settings=SETTINGS, part_data=data)
    findings = list(UnknownPart().check(context))
    by_parts = {finding.parts: finding for finding in findings}
    assert set(by_parts) == {("D1", "D2"), ("R1", "R2"), ("Q5",)}
    assert by_parts[("D1", "D2")].message.startswith("LX9 (D1, D2): no part data; generic red LED")
    assert by_parts[("R1", "R2")].message == (
        "R1, R2: tolerance 5 % assumed; power rating unknown (no rating, no chip size)")
    assert all(finding.severity == "warning" for finding in findings)
