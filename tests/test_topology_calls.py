"""The topology index's direct answers equal its memoised and two-step ones.

Expected values: the plain path of our own code: ``mcu_on`` and ``pins_on`` (worked out
through the memos) for ``mcu_pairs`` and ``pins_of``; ``natural_sorted`` then
``rails_among`` for ``sorted_nets_and_rails`` (itself held to ``sorted(..., key=natural_key)``
in test_topology_fast_paths.py). Compared net by net for every listed net and every net a pin
names. Inputs: the demo (EDIF and SPICE), generated boards, hand-made nets (a capacitor, a
part the Circuit does not have, a microcontroller pin, a net no Net lists, a net larger
than the direct reading takes) and random small circuits (hypothesis).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.engine import CheckRequest, load_inputs
from linter.model import Circuit, Net, Part, Pin, SourceLocation
from linter.partdata import McuData, Rail
from linter.topology_index import CircuitIndex

from test_topology_quick import RAILS, _circuit, _part, board_context

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"
HERE = SourceLocation("t", 1, 1)


def _assert_same_answers(circuit: Circuit, rails, part_data) -> int:
    direct = CircuitIndex(circuit, rails, part_data)
    plain = CircuitIndex(circuit, rails, part_data)
    names = set(circuit.nets)
    names.update(pin.net for part in circuit.parts.values() for pin in part.pins
                 if pin.net is not None)
    for net in sorted(names):
        assert direct.mcu_pairs(net) == plain.mcu_on(net), net
        assert direct.pins_of(net) == plain.pins_on(net), net
    ordered = sorted(names)
    for start in range(0, len(ordered), 5):  # groups of nets, rails among them or not
        chosen = set(ordered[start:start + 7]) | set(list(rails)[:start % 3])
        sorted_nets = plain.natural_sorted(chosen)
        assert direct.sorted_nets_and_rails(chosen) == (tuple(sorted_nets),
                                                        plain.rails_among(sorted_nets))
    return len(names)


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo(netlist: str) -> None:
    context = load_inputs(CheckRequest(DEMO / netlist, bom=DEMO / "bom.csv"))
    assert _assert_same_answers(context.circuit, context.rails, context.part_data) > 10


@pytest.mark.parametrize("parts, seed", [(300, 8), (2000, 9)])
@pytest.mark.parametrize("role", ["edif", "edif_hier", "spice"])
def test_generated_board(tmp_path: Path, parts: int, seed: int, role: str) -> None:
    context = board_context(write_all(generate(parts, seed), tmp_path), role)
    assert _assert_same_answers(context.circuit, context.rails, context.part_data) > 50


def test_odd_nets() -> None:
    def two(ref: str, kind: str, one: str, other: str) -> Part:
        return Part(ref, kind, None, (Pin("1", one), Pin("2", other)), HERE)

    parts = {"R1": two("R1", "resistor", "A", "B"), "C1": two("C1", "capacitor", "B", "G"),
             "D1": two("D1", "led", "B", "P"), "R2": two("R2", "resistor", "Q", "G"),
             "U1": Part("U1", "mcu", None, (Pin("PA0", "P"), Pin("PA1", "W"),
                                            Pin("VDD", "V")), HERE)}
    wide = tuple((f"R{n}", "1") for n in range(10, 20)) + (("U1", "PA1"),)
    parts.update({ref: two(ref, "resistor", "W", "G") for ref, _ in wide[:-1]})
    nets = {"A": Net("A", (("R1", "1"),), HERE),
            "B": Net("B", (("R1", "2"), ("C1", "1"), ("D1", "1")), HERE),  # a capacitor
            "G": Net("G", (("C1", "2"), ("GHOST", "1")), HERE),  # a part not in the Circuit
            "P": Net("P", (("D1", "2"), ("U1", "PA0")), HERE),  # a microcontroller pin
            "W": Net("W", wide, HERE),  # more pins than the direct reading takes
            "V": Net("V", (("U1", "VDD"),), HERE)}  # Q: named by R2's pin, listed by no net
    circuit = Circuit("t", "spice", parts, nets)
    assert _assert_same_answers(circuit, {"V": Rail("V", 5.0, 5.0, 5.0)}, {"U1": McuData()}) == 7
    index = CircuitIndex(circuit, {}, {"U1": McuData()})
    # by the definitions: capacitors and unknown parts left out, the pins found, Q from pins
    assert index.pins_of("B") == (("R1", "2"), ("D1", "1"))
    assert index.pins_of("G") == ()
    assert index.mcu_pairs("P") == (("U1", "PA0"),)
    assert index.mcu_pairs("W") == (("U1", "PA1"),)
    assert index.mcu_pairs("A") == ()
    assert index.pins_of("Q") == (("R2", "1"),)


@settings(max_examples=300, deadline=None)
@given(specs=st.lists(_part, min_size=1, max_size=10))
def test_random_small_circuits(specs: list[tuple]) -> None:
    circuit, data = _circuit(specs)
    _assert_same_answers(circuit, RAILS, data)


def test_control_starts_as_its_field_defaults() -> None:
    """Control's written-out ``__init__`` gives each field its declared default (the
    dataclass's own definition: a new empty list per factory, None for ``drive``)."""
    import dataclasses

    from linter.topology_walk import Control

    made, other = Control(), Control()
    for field in dataclasses.fields(Control):
        expected = field.default_factory() if field.default_factory is not dataclasses.MISSING \
            else field.default
        assert getattr(made, field.name) == expected, field.name
        if isinstance(expected, list):
            assert getattr(made, field.name) is not getattr(other, field.name)  # not shared
