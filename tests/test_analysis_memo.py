"""Memoised analysis against the plain path, and the keys it memoises by.

Expected values: the plain path of our own code (``analyse(..., memoise=False)`` builds and
solves every group on its own), compared field by field and bit for bit — never stored
figures. The key tests change one input at a time and expect a different key (an input the
key missed would let two different groups share a result).
"""

from __future__ import annotations

import dataclasses
import math
import sys
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from circuit_kit import circuit
from linter import analysis
from linter.batchsolve import BucketData
from linter.engine import CheckRequest, load_inputs
from linter.group_key import DataKeys, group_key, group_key_plain
from linter.groups import Group, PinDrive, Scenario
from linter.model import DeviceModel, Pin
from linter.netbuild import build_model
from linter.partdata import BjtData, LedData, McuData, MosfetData, Rail, ResistorData
from linter.solve_memo import _DATA_FIELDS, electrical_keys, representatives
from linter.results import GroupResult
from linter.topology import find_groups

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate  # noqa: E402
from bench.write_edif import write_flat_edif  # noqa: E402
from bench.write_tables import write_settings  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"
GND = Rail("GND", 0.0, 0.0, 0.0)
RED = LedData(color="red", vf_typ=2.0, vf_min=1.8, vf_max=2.4, vf_test_current=0.020)


def _plain(x):
    """Every field of a result as plain data; floats by repr (so NaN equals NaN)."""
    if x is None or isinstance(x, (bool, int, str)):
        return x
    if isinstance(x, float):
        return repr(x)
    if isinstance(x, (list, tuple)):
        return [_plain(v) for v in x]
    if isinstance(x, Group):
        return x
    if dataclasses.is_dataclass(x):  # compared fields only (``origin`` says how it was made)
        # a follower's lazily built result is a GroupResult subclass (result_rename)
        return ("GroupResult" if isinstance(x, GroupResult) else type(x).__name__,
                {f.name: _plain(getattr(x, f.name)) for f in dataclasses.fields(x) if f.compare})
    if hasattr(x, "items"):
        return ("map", [(k, _plain(v)) for k, v in x.items()])   # key order counts too
    raise TypeError(type(x))


def _both_paths(monkeypatch, groups, circuit_, data, rails, ambient):
    built = []

    def counting(*args, **kwargs):
        built.append(args[0].id)
        return build_model(*args, **kwargs)

    monkeypatch.setattr(analysis, "build_model", counting)
    memo = analysis.analyse(groups, circuit_, data, rails, ambient)
    memo_builds = len(built)
    plain = analysis.analyse(groups, circuit_, data, rails, ambient, memoise=False)
    return memo, plain, memo_builds


def _board(tmp_path: Path, seed: int):
    board = generate(300, seed)
    write_flat_edif(board, tmp_path / "board.edif")
    write_settings(board, tmp_path / "ledlint.toml")
    return load_inputs(CheckRequest(tmp_path / "board.edif"))


@pytest.mark.parametrize("seed", [11, 29])
@pytest.mark.parametrize("with_data", [True, False])
def test_memoised_results_equal_the_plain_path_on_generated_boards(
        tmp_path: Path, monkeypatch, seed: int, with_data: bool) -> None:
    context = _board(tmp_path, seed)
    data = context.part_data
    if not with_data:   # generic figures everywhere but the LEDs: notes naming each part
        data = {ref: d for ref, d in data.items() if isinstance(d, LedData)}
    groups = find_groups(context.circuit, context.rails, data)
    memo, plain, builds = _both_paths(monkeypatch, groups, context.circuit, data,
                                      context.rails, context.settings.ambient)
    assert builds < len(groups)            # the generator repeats channels: the memo is used
    assert [_plain(r) for r in memo] == [_plain(r) for r in plain]
    if not with_data:
        assert any(r.notes for r in memo)


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_memoised_results_equal_the_plain_path_on_the_demo(monkeypatch, netlist: str) -> None:
    context = load_inputs(CheckRequest(DEMO / netlist, bom=DEMO / "bom.csv"))
    groups = find_groups(context.circuit, context.rails, context.part_data)
    memo, plain, _ = _both_paths(monkeypatch, groups, context.circuit, context.part_data,
                                 context.rails, context.settings.ambient)
    assert [_plain(r) for r in memo] == [_plain(r) for r in plain]


def _channels(count: int):
    """``count`` equal pin-driven channels: U1.PAi → Ri → Di → Qi (NPN) collector; Qi base
    from the pin through RBi; emitter to GND through REi. Names differ, figures do not."""
    parts = [("U1", "mcu", {"VDD": "V5", "VSS": "GND",
                            **{f"PA{i}": f"P{i}" for i in range(count)}}, None)]
    groups, data = [], {"U1": McuData(pin_current_max=0.02, supply_pins=("VDD",))}
    for i in range(count):
        parts += [(f"R{i}", "resistor", {"1": "V5", "2": f"A{i}"}, 150.0),
                  (f"D{i}", "led", {"A": f"A{i}", "K": f"C{i}"}, None),
                  (f"Q{i}", "npn", {"C": f"C{i}", "B": f"B{i}", "E": f"E{i}"}, None),
                  (f"RB{i}", "resistor", {"1": f"P{i}", "2": f"B{i}"}, 4700.0),
                  (f"RE{i}", "resistor", {"1": f"E{i}", "2": "GND"}, 10.0)]
        data.update({f"D{i}": RED, f"R{i}": ResistorData(150.0, 0.01, 0.1, "0603"),
                     f"Q{i}": BjtData("npn", hfe_min=100.0, hfe_typ=200.0, vce_sat=0.2)})
        pin = PinDrive("U1", f"PA{i}", f"P{i}", "V5")
        groups.append(Group(f"G-D{i}", "low-side-switch", (f"D{i}",), ((f"D{i}",),),
                            (f"R{i}", f"D{i}", f"Q{i}", f"RB{i}", f"RE{i}", "U1"),
                            ("V5", f"A{i}", f"C{i}", f"B{i}", f"E{i}", f"P{i}", "GND"),
                            ("V5", "GND"), f"R{i}", (pin,),
                            (Scenario("on", {pin.id: "high"}),)))
    rails = {"V5": Rail("V5", 5.0, 4.75, 5.25), "GND": GND}
    return groups, circuit(parts), data, rails


def test_repeated_channels_get_their_own_names(monkeypatch) -> None:
    groups, c, data, rails = _channels(3)
    memo, plain, builds = _both_paths(monkeypatch, groups, c, data, rails, analysis.Ambient())
    assert builds == 1
    assert [_plain(r) for r in memo] == [_plain(r) for r in plain]
    third = memo[2]
    assert third.leds[0].ref == "D2" and third.pins[0].id == "U1.PA2"
    assert set(third.leds[0].current.at_max.vf) == {"D2"}
    assert "Q2" in third.leds[0].current.at_max.beta


# --- the keys ------------------------------------------------------------------------------

def _key(groups, c, data, rails, index: int = 0):
    return group_key(groups[index], c, data, rails)[0]


def _with_part(c, ref: str, **changes):
    parts = dict(c.parts)
    parts[ref] = replace(parts[ref], **changes)
    return replace(c, parts=parts)


def _data(data, ref: str, **changes):
    return {**data, ref: replace(data[ref], **changes)}


def _group(groups, **changes):
    return [replace(groups[0], **changes)] + list(groups[1:])


def _changes():
    """(what, function of (groups, circuit, data, rails) → the same with one input changed)."""
    swap = lambda c: _with_part(c, "D0", pins=(Pin("A", "C0"), Pin("K", "A0")))  # noqa: E731
    model = DeviceModel("LX", "D", {"IS": 1e-18, "N": 2.0, "RS": 5.0})
    return [
        ("resistor value", lambda g, c, d, r: (g, _with_part(c, "R0", value_si=160.0), d, r)),
        ("resistor data ohms", lambda g, c, d, r: (g, c, _data(d, "R0", ohms=160.0), r)),
        ("resistor tolerance", lambda g, c, d, r: (g, c, _data(d, "R0", tolerance=0.05), r)),
        ("resistor rating", lambda g, c, d, r: (g, c, _data(d, "R0", power=0.25), r)),
        ("resistor package", lambda g, c, d, r: (g, c, _data(d, "R0", package="0805"), r)),
        ("LED vf_typ", lambda g, c, d, r: (g, c, _data(d, "D0", vf_typ=2.1), r)),
        ("LED vf_min", lambda g, c, d, r: (g, c, _data(d, "D0", vf_min=1.7), r)),
        ("LED vf_max", lambda g, c, d, r: (g, c, _data(d, "D0", vf_max=2.5), r)),
        ("LED test current", lambda g, c, d, r: (g, c, _data(d, "D0", vf_test_current=0.01), r)),
        ("LED colour", lambda g, c, d, r: (g, c, _data(d, "D0", color="green"), r)),
        ("LED tempco", lambda g, c, d, r: (g, c, _data(d, "D0", tempco=-0.003), r)),
        ("LED if_max", lambda g, c, d, r: (g, c, _data(d, "D0", if_max=0.03), r)),
        ("LED part number", lambda g, c, d, r: (g, _with_part(c, "D0", part_number="LX"), d, r)),
        ("LED SPICE model", lambda g, c, d, r: (g, _with_part(c, "D0", model=model), d, r)),
        ("LED kind", lambda g, c, d, r: (g, _with_part(c, "D0", kind="diode"), d, r)),
        ("LED turned round", lambda g, c, d, r: (g, swap(c), d, r)),
        ("beta min", lambda g, c, d, r: (g, c, _data(d, "Q0", hfe_min=50.0), r)),
        ("beta typ", lambda g, c, d, r: (g, c, _data(d, "Q0", hfe_typ=300.0), r)),
        ("Vce_sat", lambda g, c, d, r: (g, c, _data(d, "Q0", vce_sat=0.3), r)),
        ("Vbe", lambda g, c, d, r: (g, c, _data(d, "Q0", vbe=0.7), r)),
        ("transistor kind", lambda g, c, d, r: (
            g, _with_part(c, "Q0", kind="nmos"), {**d, "Q0": MosfetData("nmos")}, r)),
        ("MCU output resistance", lambda g, c, d, r: (
            g, c, _data(d, "U1", output_resistance=40.0), r)),
        ("MCU pin rating", lambda g, c, d, r: (g, c, _data(d, "U1", pin_current_max=0.025), r)),
        ("MCU supply voltage", lambda g, c, d, r: (g, c, _data(d, "U1", supply_voltage=3.3), r)),
        ("MCU supply pin", lambda g, c, d, r: (g, c, _data(d, "U1", supply_pins=("VSS",)), r)),
        ("rail level", lambda g, c, d, r: (g, c, d, {**r, "V5": Rail("V5", 5.1, 4.75, 5.25)})),
        ("rail tolerance", lambda g, c, d, r: (g, c, d, {**r, "V5": Rail("V5", 5.0, 4.5, 5.5)})),
        ("a plain net becomes a rail", lambda g, c, d, r: (
            g, c, d, {**r, "A0": Rail("A0", 3.0, 3.0, 3.0)})),
        ("scenario level", lambda g, c, d, r: (_group(g, scenarios=(
            Scenario("on", {"U1.PA0": "low"}),)), c, d, r)),
        ("scenario name", lambda g, c, d, r: (_group(g, scenarios=(
            Scenario("lit", {"U1.PA0": "high"}),)), c, d, r)),
        ("scenario LEDs lit", lambda g, c, d, r: (_group(g, scenarios=(
            Scenario("on", {"U1.PA0": "high"}, ()),)), c, d, r)),
        ("topology", lambda g, c, d, r: (_group(g, topology="resistor"), c, d, r)),
        ("setter", lambda g, c, d, r: (_group(g, setter="RE0"), c, d, r)),
        ("group rails", lambda g, c, d, r: (_group(g, rails=("V5",)), c, d, r)),
        ("pin", lambda g, c, d, r: (_group(g, pins=(PinDrive("U1", "PA1", "P0", "V5"),)),
                                    c, d, r)),
        ("a part left out", lambda g, c, d, r: (_group(g, parts=g[0].parts[:-2]), c, d, r)),
        ("a net joined by a link", lambda g, c, d, r: (
            _group(g, parts=g[0].parts + ("L9",)),
            circuit([(p.ref, p.kind, {x.name: x.net for x in p.pins}, p.value_si)
                     for p in c.parts.values()] + [("L9", "link", {"1": "E0", "2": "GND"}, 0.0)]),
            d, r)),
    ]


@pytest.mark.parametrize("what, change", _changes(), ids=[w for w, _ in _changes()])
def test_group_key_changes_with_each_input(what: str, change) -> None:
    groups, c, data, rails = _channels(1)
    base = _key(groups, c, data, rails)
    changed = change(groups, c, data, rails)
    assert _key(*changed) != base, what
    assert group_key_plain(changed[0][0], *changed[1:]) == group_key(changed[0][0], *changed[1:])


def _keys_both_ways(groups, c, data, rails):
    shared, shared_plain = DataKeys(), DataKeys()
    fast = [group_key(g, c, data, rails, shared) for g in groups]
    plain = [group_key_plain(g, c, data, rails, shared_plain) for g in groups]
    alone = [group_key(g, c, data, rails) for g in groups]   # a DataKeys of its own
    return fast, plain, alone


@pytest.mark.parametrize("seed", [11, 29])
@pytest.mark.parametrize("with_data", [True, False])
def test_group_key_equals_the_plain_key_on_generated_boards(tmp_path: Path, seed: int,
                                                            with_data: bool) -> None:
    # the plain reference: group_key_plain, one encoder call per name
    context = _board(tmp_path, seed)
    data = context.part_data
    if not with_data:
        data = {ref: d for ref, d in data.items() if isinstance(d, LedData)}
    groups = find_groups(context.circuit, context.rails, data)
    fast, plain, alone = _keys_both_ways(groups, context.circuit, data, context.rails)
    assert fast == plain == alone
    assert len({k for k, _ in fast}) < len(fast)       # repeated channels share keys
    assert any(g.pins for g in groups)


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_group_key_equals_the_plain_key_on_the_demo(netlist: str) -> None:
    context = load_inputs(CheckRequest(DEMO / netlist, bom=DEMO / "bom.csv"))
    groups = find_groups(context.circuit, context.rails, context.part_data)
    fast, plain, alone = _keys_both_ways(groups, context.circuit, context.part_data,
                                         context.rails)
    assert fast == plain == alone


def test_group_key_equals_the_plain_key_on_odd_groups() -> None:
    # pins of one microcontroller driving several groups (its supply pins found once for
    # all), a pin named twice, a part missing from the circuit, a string end outside
    groups, c, data, rails = _channels(3)
    pin = groups[1].pins[0]
    odd = [replace(groups[0], pins=groups[0].pins + (pin, pin)),
           replace(groups[1], parts=groups[1].parts + ("X9",)),
           replace(groups[2], parts=tuple(p for p in groups[2].parts if p != "D2")),
           replace(groups[2], setter="U1.PA2", scenarios=(Scenario("on", {}, ("D2", "Z1")),))]
    data_without_mcu = {k: v for k, v in data.items() if k != "U1"}
    for table in (data, data_without_mcu):
        fast, plain, alone = _keys_both_ways(groups + odd, c, table, rails)
        assert fast == plain == alone


def test_group_key_ignores_names_only() -> None:
    # channels 0 and 1 differ in every reference and plain net name, and in part data notes
    groups, c, data, rails = _channels(2)
    data = _data(data, "D1", note="D1: from the settings")
    assert _key(groups, c, data, rails, 0) == _key(groups, c, data, rails, 1)
    refs = group_key(groups[1], c, data, rails)[1]
    assert refs[:2] == ("R1", "D1") and "U1" in refs


def test_electrical_keys_see_every_solver_figure() -> None:
    groups, c, data, rails = _channels(2)
    models = [build_model(g, c, data, rails) for g in groups]
    stacked = BucketData.of(models)
    first, rep = representatives(models, stacked)
    assert first.tolist() == [0] and rep.tolist() == [0, 0]
    for name in _DATA_FIELDS:
        table = getattr(stacked, name).copy()
        if table[1].size == 0:
            continue
        table[1] = np.nextafter(table[1], math.inf)   # the smallest change a float can make
        keys = electrical_keys(models, replace(stacked, **{name: table}))
        assert keys[0] != keys[1], name
    other = replace(models[1], bjts=(replace(models[1].bjts[0], vce_sat=0.3),))
    keys = electrical_keys([models[0], other], stacked)
    assert keys[0] != keys[1]


def test_clone_is_dataclasses_replace() -> None:
    # the plain reference: dataclasses.replace on the same records
    from linter.result_rename import _clone
    groups, c, data, rails = _channels(1)
    (result,) = analysis.analyse(groups, c, data, rails)
    records = [result, *result.leds, *result.resistors, *result.transistors, *result.pins,
               result.leds[0].current, result.leds[0].current.at_max]
    for record in records:
        field = dataclasses.fields(record)[0].name
        value = "changed" if isinstance(getattr(record, field), str) else 1.5
        assert _clone(record, {}) == record
        assert _clone(record, {field: value}) == replace(record, **{field: value})
        assert type(_clone(record, {})) is type(record)


def test_levels_behave_as_the_dict_they_stand_for() -> None:
    # the plain reference: a dict of the same items (Python's own mapping behaviour)
    import pickle

    from linter.corners import Levels
    plain = {"D1": "vf_min", "D2": "vf_max"}
    levels = Levels(("D1", "D2"), ("vf_min", "vf_max"))
    assert levels == plain and plain == levels and dict(levels) == plain
    assert list(levels.items()) == list(plain.items()) and list(levels) == list(plain)
    assert list(levels.values()) == list(plain.values()) and len(levels) == 2
    assert repr(levels) == repr(plain) and pickle.loads(pickle.dumps(levels)) == plain
    assert levels["D2"] == "vf_max" and "D3" not in levels and levels.get("D3") is None
    with pytest.raises(KeyError):
        levels["D3"]
    assert Levels((), ()) == {} and not Levels((), ())
    assert levels != {"D1": "vf_min", "D2": "vf_typ"}


def test_unhashable_part_data_is_solved_without_the_memo(monkeypatch) -> None:
    # a record holding a list cannot key a memo: each group is built and solved on its own,
    # with the plain path's results (the reference)
    @dataclasses.dataclass(frozen=True)
    class Listed(ResistorData):
        extra: list = dataclasses.field(default_factory=list, hash=False)

    groups, c, data, rails = _channels(2)
    data = {**data, **{f"R{i}": Listed(150.0, 0.01, 0.1, "0603") for i in range(2)}}
    memo, plain, builds = _both_paths(monkeypatch, groups, c, data, rails, analysis.Ambient())
    assert builds == 2
    assert [_plain(r) for r in memo] == [_plain(r) for r in plain]



def test_followers_name_their_template(tmp_path: Path) -> None:
    """A renamed result names the result it was made from and how the names map (fast paths
    of the reports reuse the template's work); a result solved on its own has no origin."""
    context = _board(tmp_path, 11)
    groups = find_groups(context.circuit, context.rails, context.part_data)
    results = analysis.analyse(groups, context.circuit, context.part_data, context.rails,
                               context.settings.ambient)
    followers = [r for r in results if r.origin is not None]
    assert followers and len(followers) < len(results)
    for result in followers:
        template, refs = result.origin
        assert template.origin is None and template in results
        assert [refs[led.ref] for led in template.leds] == [led.ref for led in result.leds]
        assert set(refs.values()) <= set(result.group.parts)
    plain = analysis.analyse(groups, context.circuit, context.part_data, context.rails,
                             context.settings.ambient, memoise=False)
    assert all(r.origin is None for r in plain)


def test_group_key_with_one_data_keys_across_rails_mappings() -> None:
    # the rail nets' codes are kept per rails mapping (by identity): a DataKeys used with
    # another mapping, and back, gives the plain key of each (reference: group_key_plain)
    groups, c, data, rails = _channels(2)
    other = {**rails, "V5": Rail("V5", 5.1, 4.75, 5.25)}
    shared = DataKeys()
    for table in (rails, other, rails, other):
        for group in groups:
            assert group_key(group, c, data, table, shared) == group_key_plain(group, c, data, table)
    assert (group_key(groups[0], c, data, rails, shared)[0]
            != group_key(groups[0], c, data, other, shared)[0])
