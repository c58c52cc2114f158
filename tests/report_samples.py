"""Hand-built check results for the reporter tests (invented parts of the demo's kind).

Not a test module: the reporter tests import it. Everything here is written by hand, so
that the reporters can be tested before and apart from the analysis.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from linter.engine import CheckRequest, CheckResult
from linter.findings import Finding
from linter.model import Circuit, Net, Part, Pin, SourceLocation, packed_location

NETLIST = "boards/panel.cir"
REPO = Path(__file__).resolve().parents[1]


def fixture_netlists() -> list[Path]:
    """Every netlist under fixtures/ except the deliberately broken ones in fixtures/bad."""
    found = [path for suffix in ("*.edif", "*.cir") for path in (REPO / "fixtures").rglob(suffix)]
    return sorted(path for path in found if "bad" not in path.relative_to(REPO / "fixtures").parts)


def _loc(line: int, column: int = 1) -> SourceLocation:
    return SourceLocation(NETLIST, line, column)


def _part(ref: str, kind: str, value: str, nets: tuple[str, str], line: int,
          pins: tuple[str, str] = ("1", "2")) -> Part:
    return Part(ref, kind, value, (Pin(pins[0], nets[0]), Pin(pins[1], nets[1])), _loc(line),
                path=ref)


def sample_circuit() -> Circuit:
    """Four LEDs sharing R6 from +5V, and one LED on R12 from +12V."""
    parts = [_part("R6", "resistor", "39", ("+5V", "BAR_A"), 3)]
    parts += [_part(f"D{n}", "led", "YELLOW", ("BAR_A", "GND"), n - 3, ("A", "K"))
              for n in (7, 8, 9, 10)]
    parts += [_part("R12", "resistor", "1k", ("+12V", "PWR_A"), 8),
              _part("D15", "led", "GREEN", ("PWR_A", "GND"), 9, ("A", "K"))]
    net_pins: dict[str, list[tuple[str, str]]] = {}
    for part in parts:
        for pin in part.pins:
            net_pins.setdefault(pin.net or "", []).append((part.ref, pin.name))
    nets = {name: Net(name, tuple(pins), _loc(1)) for name, pins in net_pins.items()}
    return Circuit(NETLIST, "spice", {p.ref: p for p in parts}, nets)


def placed_circuit(first_file: str) -> Circuit:
    """Invented parts placed every way a part can be: packed places in ``first_file`` and
    in a second file, a part without a place, one with a SourceLocation."""
    pins = (Pin("1", "A"), Pin("2", "B"))
    parts = [Part("R1", "resistor", "1k", pins, packed_location(first_file, 3, 9)),
             Part("R2", "resistor", "1k", pins, packed_location("second.edif", 7, 2)),
             Part("R3", "resistor", "1k", pins, None),
             Part("R4", "resistor", "1k", pins, SourceLocation("c.edif", 5, 1)),
             Part("U1", "mcu", None, pins, packed_location("second.edif", 11, 4))]
    return Circuit("a.edif", "edif", {p.ref: p for p in parts}, {})


@dataclass(frozen=True)
class FakeGroup:
    """Stands in for the analysis' group result: only ``as_dict()`` is used by reporters."""

    entry: dict[str, Any] = field(hash=False)

    def as_dict(self) -> dict[str, Any]:
        return self.entry


def _range(nom: float | None, low: float | None, high: float | None) -> dict[str, Any]:
    return {"nom": nom, "min": low, "max": high}


def bar_group() -> FakeGroup:
    """Figures invented for the test (not computed): four yellow LEDs on 39 Ω."""
    leds = [{"ref": f"D{n}", "part": "LD0603YE", "current_a": _range(0.019, 0.012, 0.031),
             "vf_v": _range(2.05, 1.9, 2.4), "power_w": _range(0.039, 0.023, 0.074)}
            for n in (7, 8, 9, 10)]
    resistors = [{"ref": "R6", "ohms": 39.0, "power_w": {"nom": 0.23, "max": 0.41},
                  "rating_w": 0.125}]
    return FakeGroup({"id": "G-D7", "topology": "parallel", "rail": "+5V", "setter": "R6",
                      "parts": ["D7", "D8", "D9", "D10", "R6"], "leds": leds,
                      "resistors": resistors})


def power_group() -> FakeGroup:
    """Figures invented for the test; the LED's Vf is unknown (None) on purpose."""
    leds = [{"ref": "D15", "part": None, "current_a": _range(0.0099, 0.0085, 0.0115),
             "vf_v": _range(None, None, None), "power_w": _range(None, None, None)}]
    resistors = [{"ref": "R12", "ohms": 1000.0, "power_w": {"nom": 0.098, "max": 0.13},
                  "rating_w": None}]
    return FakeGroup({"id": "G-D15", "topology": "resistor", "rail": "+12V", "setter": "R12",
                      "parts": ["D15", "R12"], "leds": leds, "resistors": resistors})


def sample_findings() -> tuple[Finding, ...]:
    """One finding of each severity; messages and fixes written by hand for the test."""
    return (
        Finding("nonstandard-value", "info", "R12 is 1 kΩ: fine, listed for the test",
                parts=("R12",)),
        Finding("shared-ballast", "error",
                "D7–D10 share R6: one LED may take 31 mA of the 80 mA",
                parts=("D7", "D8", "D9", "D10", "R6"), nets=("BAR_A",), group="G-D7",
                values={"current_max_a": 0.031, "resistor_current_a": 0.08},
                fix="give each LED its own 150 Ω resistor"),
        Finding("string-headroom", "warning", "current swings 1.6× over the corners",
                parts=("D15", "R12"), group="G-D15", values={"swing_ratio": 1.6},
                location=SourceLocation(NETLIST, 9, 4)),
    )


def sample_result(groups: bool = True) -> CheckResult:
    request = CheckRequest(netlist=Path(NETLIST))
    return CheckResult(request=request, circuit=sample_circuit(), findings=sample_findings(),
                       groups=(power_group(), bar_group()) if groups else ())
