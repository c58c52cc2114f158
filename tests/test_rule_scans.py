"""Rules that scan the whole board first ask a screen in built-in passes whether anything can
be found at all; a screen may say "maybe" for nothing, never "nothing" for something.

Expected values: the plain loops of the same rules (``screen=False``), our own code; the
crafted circuits' expectations (an open pin, a 1.05 kΩ resistor at 5 %) follow from each
rule's own definition (its docstring), from memory of the E24 and E96 series for 1 kΩ and
1.05 kΩ. Boards: every rule fixture, the demo (EDIF and SPICE) and generated
boards (bench/gen_board.py), whose large channels find nothing in these rules, so that the
short road is the one taken there. led-undercurrent's shorted LEDs on a board without links
compare an LED's two nets, not their roots (``unlinked=False``: the roots always).
"""

from __future__ import annotations

import sys
from dataclasses import dataclass, field, replace
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "fixtures" / "demo"

from linter.engine import CheckRequest, analyse, load_inputs  # noqa: E402
from linter.model import Circuit, Net, Part, Pin, SourceLocation  # noqa: E402
from linter.partdata import ResistorData  # noqa: E402
from linter.rules import all_rules  # noqa: E402
from linter.rules import floating_led, nonstandard_value  # noqa: E402

SCREENED = ("floating-led", "nonstandard-value")
"""Rules whose ``check`` takes ``screen``."""


def _corpus():
    for deck in sorted((ROOT / "fixtures" / "rules").glob("*/*.cir")):
        yield f"{deck.parent.name}/{deck.name}", (deck, None)
    yield "demo.edif", (DEMO / "dust_extractor_panel.edif", DEMO / "bom.csv")
    yield "demo.cir", (DEMO / "dust_extractor_panel.cir", DEMO / "bom.csv")


CORPUS = dict(_corpus())


@pytest.fixture(scope="module")
def generated(tmp_path_factory):
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate, write_all

    out = {}
    for parts, seed in ((800, 2), (1500, 1)):
        folder = tmp_path_factory.mktemp(f"b{parts}_s{seed}")
        write_all(generate(parts, seed), folder)
        out[(parts, seed)] = analyse(load_inputs(CheckRequest(folder / "board.edif",
                                                              bom=folder / "bom.csv")))
    return out


def _both(context, rule_id: str) -> tuple[list, list]:
    rule = all_rules()[rule_id]()
    return list(rule.check(context)), list(rule.check(context, screen=False))


def _assert_same(context) -> dict[str, int]:
    """Both roads give equal findings (text too); returns each rule's finding count."""
    counts = {}
    for rule_id in SCREENED:
        fast, plain = _both(context, rule_id)
        assert [repr(f) for f in fast] == [repr(f) for f in plain], rule_id
        counts[rule_id] = len(plain)
    return counts


@pytest.mark.parametrize("name", sorted(CORPUS))
def test_fixture_findings_same_with_and_without_screens(name):
    netlist, bom = CORPUS[name]
    _assert_same(analyse(load_inputs(CheckRequest(netlist, bom=bom))))


def test_screens_pass_a_generated_board_over(generated):
    for context in generated.values():
        assert _assert_same(context) == {rule: 0 for rule in SCREENED}
        circuit = context.circuit
        assert not floating_led.may_be_open(circuit.leds(), circuit.nets)
        assert not nonstandard_value.may_flag(circuit.parts.values(), context.part_data)


def test_the_fixtures_reach_the_plain_loops():
    """Where a rule finds something, its screen let the loop run (and found the same)."""
    found = {}
    for name, (netlist, bom) in CORPUS.items():
        context = analyse(load_inputs(CheckRequest(netlist, bom=bom)))
        for rule, count in _assert_same(context).items():
            found[rule] = found.get(rule, 0) + count
    assert found["floating-led"] and found["nonstandard-value"]


HERE = SourceLocation("board.cir", 3, 1)


@dataclass
class StandIn:
    circuit: Circuit
    part_data: dict = field(default_factory=dict)
    groups: tuple = ()

    def severity(self, rule, default=None):
        return rule.default_severity


def _circuit(parts: list[Part]) -> Circuit:
    """The circuit of ``parts`` with each net holding the pins on it."""
    on: dict[str, list] = {}
    for part in parts:
        for pin in part.pins:
            if pin.net is not None:
                on.setdefault(pin.net, []).append((part.ref, pin.name))
    nets = {name: Net(name, tuple(pins), HERE) for name, pins in on.items()}
    return Circuit("board.cir", "spice", {p.ref: p for p in parts}, nets)


def _led(ref: str, anode: str | None, cathode: str | None) -> Part:
    return Part(ref, "led", "RED", (Pin("A", anode), Pin("K", cathode)), HERE)


def _two_pin(ref: str, kind: str, a: str, b: str, ohms: float | None = None) -> Part:
    return Part(ref, kind, None, (Pin("1", a), Pin("2", b)), HERE, value_si=ohms)


CLEAN = [_two_pin("R1", "resistor", "v5", "a", 1000.0), _led("D1", "a", "0"),
         _two_pin("V1", "source", "v5", "0")]
"""A 1 kΩ resistor (an E24 value, from memory) feeding a red LED from a source."""


def test_a_clean_stand_in_passes_every_screen():
    context = StandIn(_circuit(CLEAN))
    assert _assert_same(context) == {rule: 0 for rule in SCREENED}
    circuit = context.circuit
    assert not floating_led.may_be_open(circuit.leds(), circuit.nets)
    assert not nonstandard_value.may_flag(circuit.parts.values(), {})


@pytest.mark.parametrize("led", [_led("D2", "a", None), _led("D2", "a", "lone")])
def test_an_open_pin_is_screened_in(led):
    context = StandIn(_circuit([*CLEAN, led]))
    assert floating_led.may_be_open(context.circuit.leds(), context.circuit.nets)
    assert _assert_same(context)["floating-led"] == 1


@pytest.mark.parametrize("ohms, data, found", [
    (1050.0, None, 1),  # 1.05 kΩ: no E24 value (5 % assumed)
    (1000.0, ResistorData(1050.0, 0.05), 1),  # the part data's value is read first
    (1050.0, ResistorData(1050.0, 0.01), 0),  # an E96 value at 1 %
])
def test_a_nonstandard_value_is_screened_in(ohms, data, found):
    parts = [*CLEAN, _two_pin("R2", "resistor", "v5", "a", ohms)]
    context = StandIn(_circuit(parts), {"R2": data} if data is not None else {})
    parts = context.circuit.parts.values()
    assert nonstandard_value.may_flag(parts, context.part_data) == bool(found)
    assert _assert_same(context)["nonstandard-value"] == found


@pytest.mark.parametrize("value", [0.0, -0.0, None])
def test_values_that_give_no_verdict_stay_out(value):
    parts = [*CLEAN, _two_pin("R2", "resistor", "v5", "a", value)]
    context = StandIn(_circuit(parts))
    assert not nonstandard_value.may_flag(context.circuit.parts.values(), {})
    assert _assert_same(context)["nonstandard-value"] == 0


def _shorted_both(context) -> tuple[list, list]:
    rule = all_rules()["led-undercurrent"]()
    return list(rule._shorted(context)), list(rule._shorted(context, unlinked=False))


@pytest.mark.parametrize("name", sorted(CORPUS))
def test_shorted_leds_same_comparing_nets_on_boards_without_links(name):
    netlist, bom = CORPUS[name]
    fast, plain = _shorted_both(analyse(load_inputs(CheckRequest(netlist, bom=bom))))
    assert [repr(f) for f in fast] == [repr(f) for f in plain]


@pytest.mark.parametrize("extra, found", [
    ([_led("D2", "a", "a")], 1),  # both pins on one net (no link on the board)
    ([_led("D2", "b", "c"), _two_pin("L1", "link", "b", "c")], 1),  # a 0 Ω link across
    ([_led("D2", "b", "0"), _two_pin("L1", "link", "b", "x")], 0),  # a link on one side only
    ([_led("D2", "a", "a"), _two_pin("L1", "link", "b", "x")], 1),  # one net, links elsewhere
    ([Part("D2", "led", "RED", (Pin("A", "a"), Pin("K", "a"), Pin("T", None)), HERE)], 1),
])
def test_shorted_leds_same_on_made_circuits(extra, found):
    fast, plain = _shorted_both(StandIn(_circuit([*CLEAN, *extra])))
    assert [repr(f) for f in fast] == [repr(f) for f in plain]
    assert len(plain) == found


def test_shorted_leds_same_on_generated_boards(generated):
    for context in generated.values():
        fast, plain = _shorted_both(context)
        assert fast == plain == []
