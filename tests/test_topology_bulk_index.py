"""The topology index's kinds and roles made by built-in maps over the whole board, the LED
list of find_groups, and natural_key's string-method path give what their plain definitions
give. Expected values: the plain definitions written out here (our own former code, one part
or one name at a time).
"""

from __future__ import annotations

from hypothesis import example, given, settings
from hypothesis import strategies as st

from linter.model import Circuit, Part, Pin, SourceLocation
from linter.partdata import BjtData, LedData, McuData, MosfetData, ResistorData
from linter.refs import natural_key
from linter.topology_index import CircuitIndex
from plain_definitions import plain_key, plain_kind, plain_role

_HERE = SourceLocation("t", 1, 1)
_KINDS = ["led", "resistor", "link", "capacitor", "transistor", "npn", "pmos", "mcu", "ic",
          "diode", "connector", "other"]


class _OwnBjt(BjtData):
    """A subclass of the transistor data (kept by isinstance, as the plain definition does)."""

    __slots__ = ()


def _data(choice: int):
    return [None, LedData(), ResistorData(ohms=100.0), BjtData(polarity="pnp"),
            MosfetData(polarity="nmos"), McuData(), _OwnBjt(polarity="npn")][choice]


_part = st.tuples(st.sampled_from(_KINDS), st.integers(0, 4), st.integers(0, 6))


@settings(max_examples=300, deadline=None)
@given(st.lists(_part, max_size=14), st.booleans())
def test_kinds_and_roles_are_the_plain_ones(specs, stray_data) -> None:
    parts, data = {}, {}
    for number, (kind, pins, choice) in enumerate(specs):
        ref = f"X{number}"
        parts[ref] = Part(ref, kind, None, tuple(Pin(str(i), f"n{i}") for i in range(pins)),
                          _HERE)
        if _data(choice) is not None:
            data[ref] = _data(choice)
    if stray_data:
        data["NOT-ON-BOARD"] = McuData()
    index = CircuitIndex(Circuit("t", "spice", parts, {}), {}, data)
    for ref, part in parts.items():
        kind = plain_kind(part, data.get(ref))
        assert index.kind(ref) == kind
        assert index.role(ref) == plain_role(kind, len(part.pins))
    assert list(index.roles) == list(parts)  # one entry a part, in netlist order


@settings(deadline=None)
@given(st.lists(st.sampled_from(["led", "resistor", "npn"]), max_size=8))
def test_led_list_is_circuit_leds(kinds) -> None:
    from linter.topology import find_groups
    parts = {f"D{n}": Part(f"D{n}", kind, None, (), _HERE) for n, kind in enumerate(kinds)}
    circuit = Circuit("t", "spice", parts, {})
    # every LED without pins is a group of its own, in natural order of the references
    groups = find_groups(circuit, {}, {})
    assert [g.leds for g in groups] == sorted([(p.ref,) for p in circuit.leds()],
                                              key=lambda refs: natural_key(refs[0]))


@settings(deadline=None)
@given(st.text(alphabet=st.sampled_from("DdRß\u0130\u01c5_ 0123456789\u0661"), max_size=8))
@example("D1")
@example("D007")
@example("\u0130" + "5")  # a letter that casefolds to two characters
@example("D\u0661")  # an Arabic-Indic digit at the end: not an ASCII digit, the match path
@example("\u01c52")  # a title-case letter (isalpha)
@example("D_1")  # not all letters before the digits
@example("12")  # no letters
@example("D")  # no digits
def test_natural_key_string_method_path(name: str) -> None:
    assert natural_key(name) == plain_key(name)


def test_mcu_on_is_the_splits_mcu_pins(tmp_path) -> None:
    # expected: split(net).mcu, the plain path of our own code, on every net of the demo
    # (EDIF and SPICE, with its BOM and settings) and of a generated board
    import sys
    from pathlib import Path

    from linter.engine import CheckRequest, load_inputs

    root = Path(__file__).resolve().parents[1]
    if str(root) not in sys.path:
        sys.path.insert(0, str(root))
    from bench.gen_board import generate, write_all

    demo = root / "fixtures" / "demo"
    files = write_all(generate(400, 5), tmp_path)
    requests = [CheckRequest(demo / name, bom=demo / "bom.csv")
                for name in ("dust_extractor_panel.edif", "dust_extractor_panel.cir")]
    requests.append(CheckRequest(files["edif"], bom=files["bom"]))
    for request in requests:
        context = load_inputs(request)
        index = CircuitIndex(context.circuit, context.rails, context.part_data)
        nets = context.circuit.nets
        found = {net: index.mcu_on(net) for net in nets}
        assert found == {net: index.split(net).mcu for net in nets}
        assert any(found.values())  # each has microcontroller pins
