"""Board-wide "nothing here" guards of the rules, held to their plain definitions.

``floating-led`` and ``led-undercurrent`` (its shorted LEDs) first ask, by built-in maps over
the whole board, whether any LED could give a finding; only then do they look LED by LED.
Expected values: the plain per-LED definitions written out below (the rules' own loops,
the plain path of our own code), on the demo, generated boards and invented circuits that
each break one condition of a guard.
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "fixtures" / "demo"

from linter import rulekit  # noqa: E402
from linter.model import Circuit, Net, Part, Pin, SourceLocation  # noqa: E402
from linter.readers import read_netlist  # noqa: E402
from linter.rules import floating_led, led_undercurrent  # noqa: E402

HERE = SourceLocation("board.cir", 1, 1)


def _plain_all_joined(leds, nets) -> bool:
    return all(floating_led._joined(nets, pin.net) for part in leds for pin in part.pins)


def _plain_none_shorted(leds, joined) -> bool:
    for led in leds:
        nets = [pin.net for pin in led.pins if pin.net is not None]
        if len(nets) == 2 and joined.find(nets[0]) == joined.find(nets[1]):
            return False
    return True


def _circuits():
    yield read_netlist(DEMO / "dust_extractor_panel.edif")
    yield read_netlist(DEMO / "dust_extractor_panel.cir")
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate

    for parts, seed in ((400, 1), (900, 5)):
        board = generate(parts, seed)
        yield from (c for c in _generated(board))


def _generated(board):
    import tempfile

    from bench.gen_board import write_all

    with tempfile.TemporaryDirectory() as folder:
        write_all(board, Path(folder))
        yield read_netlist(Path(folder) / "board.edif")
        yield read_netlist(Path(folder) / "board.cir")


def _net_table(parts: dict) -> dict:
    joined: dict[str, list] = {}
    for ref, part in parts.items():
        for pin in part.pins:
            if pin.net is not None:
                joined.setdefault(pin.net, []).append((ref, pin.name))
    return {name: Net(name, tuple(pins), HERE) for name, pins in joined.items()}


def _led(ref, *nets):
    return Part(ref, "led", "RED", tuple(Pin(n, net) for n, net in zip("AKX", nets)), HERE)


def _link(ref, a, b):
    return Part(ref, "link", "0", (Pin("1", a), Pin("2", b)), HERE)


def _resistor(ref, a, b):
    return Part(ref, "resistor", "330", (Pin("1", a), Pin("2", b)), HERE)


def _invented():
    """Circuits each with one way for an LED to be open or shorted (and one clean)."""
    base = {"R1": _resistor("R1", "v5", "a"), "D1": _led("D1", "a", "0"),
            "R2": _resistor("R2", "v5", "b"), "D2": _led("D2", "b", "0"),
            "R3": _resistor("R3", "0", "v5")}
    variants = {
        "clean": {},
        "pin on no net": {"D1": _led("D1", "a", None)},
        "lone net": {"D1": _led("D1", "a", "lone")},
        "one net": {"D1": _led("D1", "a", "a")},
        "three pins": {"D1": _led("D1", "a", "0", "a")},
        "linked apart": {"L1": _link("L1", "x", "y")},
        "linked across": {"L1": _link("L1", "a", "q"), "L2": _link("L2", "q", "0")},
        "linked one side": {"L1": _link("L1", "a", "q")},
    }
    for name, change in variants.items():
        parts = {**base, **change}
        nets = _net_table(parts)
        if name == "lone net":
            nets["lone"] = Net("lone", (("D1", "K"),), HERE)
        yield name, Circuit("board.cir", "spice", parts, nets)
    # a pin on a net the table does not hold counts as joined (floating-led's definition)
    parts = dict(base)
    yield "net not in table", Circuit("board.cir", "spice", parts,
                                      {k: v for k, v in _net_table(parts).items() if k != "a"})


def _guards_agree(circuit) -> tuple[bool, bool]:
    leds = rulekit.leds_of(circuit)
    assert leds == circuit.leds()
    assert rulekit.pin_nets(leds) == [p.net for part in leds for p in part.pins]
    joined = led_undercurrent._link_clusters(circuit)
    open_free = floating_led._all_joined(leds, circuit.nets)
    short_free = led_undercurrent._none_shorted(leds, joined)
    assert open_free == _plain_all_joined(leds, circuit.nets)
    if short_free:  # the guard may decline (False) only where the plain loop looks closer
        assert _plain_none_shorted(leds, joined)
    return open_free, short_free


def test_guards_on_read_boards():
    for circuit in _circuits():
        open_free, short_free = _guards_agree(circuit)
        assert short_free == _plain_none_shorted(rulekit.leds_of(circuit),
                                                 led_undercurrent._link_clusters(circuit))


@pytest.mark.parametrize("name,circuit", list(_invented()), ids=lambda x: x if isinstance(x, str) else "")
def test_guards_on_invented_circuits(name, circuit):
    open_free, short_free = _guards_agree(circuit)
    # expected: which of the variants has an open pin or a short (by construction above)
    assert open_free == (name not in ("pin on no net", "lone net"))
    shorted = name in ("one net", "linked across")
    assert _plain_none_shorted(rulekit.leds_of(circuit),
                               led_undercurrent._link_clusters(circuit)) == (not shorted)
    assert short_free == (name in ("clean", "linked apart", "linked one side",
                                   "net not in table", "lone net"))


def test_links_found_by_the_kind_map_are_the_links():
    circuit = dict(_invented())["linked across"]
    joined = led_undercurrent._link_clusters(circuit)
    assert [link for link, _, _ in joined.links] == ["L1", "L2"]
    assert joined.members() == {"a", "q", "0"}
    renamed = replace(circuit, parts={**circuit.parts, "L2": replace(circuit.parts["L2"],
                                                                      kind="resistor")})
    assert [link for link, _, _ in led_undercurrent._link_clusters(renamed).links] == ["L1"]
