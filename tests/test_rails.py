"""Rails from settings, SPICE sources and net names; supply-like nets without a voltage."""

from __future__ import annotations

import pytest

from linter.config import settings_from_text, default_settings
from linter.context import AnalysisContext
from linter.model import Circuit, Net, Part, Pin, SourceLocation
from linter.rails import (is_ground_name, leds_fed_by, rail_from_name, resolve_rails,
                          unknown_supply_nets)
from linter.rules.unknown_rail import UnknownRail

AT = SourceLocation("t.cir", 1, 1)


def build(parts: list[tuple[str, str, tuple[str, ...], float | None]], fmt: str = "spice") -> Circuit:
    """Parts as (ref, kind, nets, value_si); pins are named 1, 2, ..."""
    built = {ref: Part(ref, kind, None, tuple(Pin(str(i + 1), net) for i, net in enumerate(nets)),
                       AT, value_si=value, cell=ref[0])
             for ref, kind, nets, value in parts}
    names: dict[str, list[tuple[str, str]]] = {}
    for part in built.values():
        for pin in part.pins:
            names.setdefault(pin.net, []).append((part.ref, pin.name))
    return Circuit("t.cir", fmt, built, {n: Net(n, tuple(p), AT) for n, p in names.items()})


@pytest.mark.parametrize("name, volts", [
    # the voltage each name spells, read by an engineer (common practice)
    ("+5V", 5.0), ("5V0", 5.0), ("3V3", 3.3), ("+12V", 12.0), ("VCC_3V3", 3.3), ("P24V", 24.0),
    ("-15V", -15.0), ("3.3V", 3.3), ("+3V3", 3.3),
])
def test_voltage_from_name(name, volts):
    rail = rail_from_name(name, 0.05)
    assert rail is not None and rail.inferred
    assert rail.nom == pytest.approx(volts)
    assert (rail.min, rail.max) == pytest.approx(sorted((volts * 0.95, volts * 1.05)))


@pytest.mark.parametrize("name", ["GND", "0", "VSS", "AGND", "DGND", "GNDA", "PGND", "gnd"])
def test_ground_names(name):
    assert is_ground_name(name)
    assert rail_from_name(name, 0.05).is_ground


@pytest.mark.parametrize("name", ["VCC", "VDD", "VBAT", "VIN", "+V", "BAR_EN", "LED5", "PA0"])
def test_names_without_voltage(name):
    assert rail_from_name(name, 0.05) is None


def test_settings_then_spice_source_then_names():
    circuit = build([("V1", "source", ("VA", "0"), 9.0), ("V2", "source", ("0", "NEG"), 5.0),
                     ("R1", "resistor", ("+5V", "X"), 100.0), ("R2", "resistor", ("+12V", "VA"), 1.0)])
    settings = settings_from_text('[rails]\n"+12V" = "12 V ±10%"\n')
    rails = resolve_rails(circuit, settings)
    assert rails["+12V"].origin == "settings ledlint.toml:2" and not rails["+12V"].inferred
    assert rails["VA"].nom == 9.0 and rails["VA"].origin.startswith("SPICE source V1")
    assert rails["NEG"].nom == -5.0  # V2 runs from 0 to NEG: NEG sits 5 V below ground
    assert rails["+5V"].inferred and rails["0"].is_ground
    assert "X" not in rails


def test_unknown_rail_feeding_an_led_through_a_resistor():
    circuit = build([("R1", "resistor", ("VCC", "A"), 330.0), ("D1", "led", ("A", "B"), None),
                     ("D2", "led", ("B", "0"), None), ("R2", "resistor", ("VDD", "C"), 1e3),
                     ("C1", "capacitor", ("C", "0"), 1e-7)])
    rails = resolve_rails(circuit, default_settings())
    assert unknown_supply_nets(circuit, rails) == ("VCC", "VDD")
    assert leds_fed_by(circuit, "VCC", rails) == ("D1", "D2")
    assert leds_fed_by(circuit, "VDD", rails) == ()
    context = AnalysisContext(circuit=circuit, settings=default_settings(), rails=rails)
    (finding,) = UnknownRail().check(context)
    assert (finding.parts, finding.nets, finding.severity) == (("D1", "D2"), ("VCC",), "warning")


def test_walk_stops_at_a_known_rail():
    circuit = build([("R1", "resistor", ("VCC", "+5V"), 1.0), ("R2", "resistor", ("+5V", "A"), 1.0),
                     ("D1", "led", ("A", "0"), None)])
    rails = resolve_rails(circuit, default_settings())
    assert leds_fed_by(circuit, "VCC", rails) == ()
