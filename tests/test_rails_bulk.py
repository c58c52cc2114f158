"""Rails picked out in bulk (:func:`linter.rails.resolve_rails`: source parts by kind, net
names by one combined pattern) are the rails of the plain pass over every part and name
(:func:`linter.rails.resolve_rails_plain`), in the same order.

Expected values: the plain path of our own code.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from linter.config import default_settings, load_settings, settings_from_text
from linter.model import Circuit, Net, Part, Pin, SourceLocation
from linter.rails import _RAIL_NAME, rail_from_name, resolve_rails, resolve_rails_plain
from linter.readers import read_netlist

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "fixtures" / "demo"
AT = SourceLocation("t.cir", 1, 1)

_PIECES = ["VCC", "vdd", "GND", "A", "D", "P", "N", "S", "+", "-", "_", "3", "5", "12", "V",
           "v", ".", ",", "0", "VSS", "AGND", "x", "\n", "LED", "ß", "K"]
_NAMES = st.lists(st.sampled_from(_PIECES), min_size=1, max_size=5).map("".join)


@given(_NAMES)
def test_combined_pattern_matches_what_gives_a_rail(name: str) -> None:
    assert bool(_RAIL_NAME.match(name)) == (rail_from_name(name, 0.05) is not None)


def _same(circuit: Circuit, settings) -> None:
    fast, plain = resolve_rails(circuit, settings), resolve_rails_plain(circuit, settings)
    assert fast == plain and list(fast) == list(plain)


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo(netlist: str) -> None:
    path = DEMO / netlist
    _same(read_netlist(path), load_settings(path, None, ()))
    _same(read_netlist(path), default_settings())


def test_generated(tmp_path: Path) -> None:
    sys.path.insert(0, str(ROOT))
    try:
        from bench.gen_board import generate, write_all
    finally:
        sys.path.remove(str(ROOT))
    write_all(generate(600, seed=3), tmp_path)
    for name in ("board.edif", "board_hier.edif", "board.cir"):
        path = tmp_path / name
        _same(read_netlist(path), load_settings(path, None, ()))


@given(st.lists(st.tuples(_NAMES, _NAMES, st.sampled_from(["source", "resistor", "led"]),
                          st.sampled_from([None, 5.0, -3.3, 0.0]),
                          st.sampled_from(["V", "I", "", "R"])), max_size=8),
       st.lists(_NAMES, max_size=6))
def test_made_circuits(sources: list, extra: list[str]) -> None:
    parts, nets = {}, {}
    for i, (plus, minus, kind, volts, cell) in enumerate(sources):
        ref = f"{cell or 'X'}{i}"
        parts[ref] = Part(ref, kind, None, (Pin("1", plus), Pin("2", minus)), AT,
                          value_si=volts, cell=cell)
        for net in (plus, minus):
            nets.setdefault(net, Net(net, (), AT))
    for name in extra:
        nets.setdefault(name, Net(name, (), AT))
    circuit = Circuit("t.cir", "spice", parts, nets)
    _same(circuit, default_settings())
    named = settings_from_text('[rails]\n"VCC" = "5 V"\n"3V3" = "3.0 V"\n')
    _same(circuit, named)
