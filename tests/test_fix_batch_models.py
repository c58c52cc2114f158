"""``fix_batch.resistor_models`` (one model built, the others that one with the resistor's
value changed) against building every model (``netbuild.build_model`` per value).

Expected values: the plain path of our own code, the model built for each value with the
value's own part data record (what ``solve_variants`` does); every field must be equal
(arrays element for element, the network's arrays and counts, the specs as records), on
every solved group and resistor of the demo board (EDIF and SPICE) and of the rule
fixtures that carry a resistor, for values below, at and above today's.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from linter.engine import CheckRequest, analyse, load_inputs
from linter.fix_batch import Overlay, resistor_models, solve_resistor_values, solve_variants
from linter.fix_search import resistor_record
from linter.netbuild import ModelGap, build_model
from linter.rulekit import solved_groups

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "fixtures" / "demo"
BOARDS = [(DEMO / "dust_extractor_panel.edif", DEMO / "bom.csv"),
          (DEMO / "dust_extractor_panel.cir", None),
          (ROOT / "fixtures" / "rules" / "shared-ballast" / "fires.cir", None),
          (ROOT / "fixtures" / "rules" / "led-overcurrent" / "fires.cir", None),
          (ROOT / "fixtures" / "rules" / "string-headroom" / "fires.cir", None)]
FACTORS = (1.0, 0.5, 0.83, 1.21, 2.0, 3.3, 10.0)


def _cases():
    cases = []
    for netlist, bom in BOARDS:
        if not netlist.exists():
            continue
        context = analyse(load_inputs(CheckRequest(netlist=netlist, bom=bom)))
        for result in solved_groups(context):
            for resistor in result.resistors:
                cases.append(pytest.param(context, result, resistor.ref,
                                          id=f"{netlist.parent.name}/{netlist.name}-"
                                             f"{result.id}-{resistor.ref}"))
    return cases


CASES = _cases()


def _same(first, second) -> bool:
    if isinstance(first, np.ndarray) or isinstance(second, np.ndarray):
        return (type(first) is type(second) and first.dtype == second.dtype
                and np.array_equal(first, second))
    if dataclasses.is_dataclass(first) and not isinstance(first, type):
        return type(first) is type(second) and all(
            _same(getattr(first, f.name), getattr(second, f.name))
            for f in dataclasses.fields(first))
    if isinstance(first, (tuple, list)):
        return (type(first) is type(second) and len(first) == len(second)
                and all(_same(a, b) for a, b in zip(first, second)))
    if isinstance(first, dict):
        return first.keys() == second.keys() and all(_same(first[k], second[k]) for k in first)
    return repr(first) == repr(second)   # floats told apart exactly, -0.0 from 0.0 too


def test_there_are_cases() -> None:
    assert len(CASES) >= 10


@pytest.mark.parametrize(("context", "result", "ref"), CASES)
def test_models_equal_models_built_one_by_one(context, result, ref) -> None:
    ohms = result.resistor(ref).ohms
    records = [resistor_record(context, ref, ohms * factor) for factor in FACTORS]
    derived = resistor_models(context, result, ref, records)
    assert derived is not None
    built = [build_model(result.group, context.circuit,
                         Overlay(context.part_data, {ref: record}), dict(context.rails))
             for record in records]
    assert len(derived) == len(built)
    for ours, plain in zip(derived, built):
        assert _same(ours, plain)
        assert ours.signature == plain.signature


@pytest.mark.parametrize(("context", "result", "ref"), CASES[:6])
def test_declined_cases_take_the_plain_path(context, result, ref) -> None:
    ohms = result.resistor(ref).ohms
    good = resistor_record(context, ref, ohms)
    assert resistor_models(context, result, ref, []) is None
    # a value that would not build, and a record differing in more than its value
    assert resistor_models(context, result, ref, [good, dataclasses.replace(good, ohms=0.0)]) is None
    other = dataclasses.replace(good, tolerance=(good.tolerance or 0.05) * 2)
    assert resistor_models(context, result, ref, [good, other]) is None
    # a name that is no resistor of the group
    assert resistor_models(context, result, "NO_SUCH_PART", [good]) is None
    # the solved answers then are the plain path's, value by value
    values = [ohms, 0.0, ohms * 2]
    plain = solve_variants(context, result,
                           [({ref: resistor_record(context, ref, v)}, {}) for v in values])
    assert [repr(a) for a in solve_resistor_values(context, result, ref, values)] == \
        [repr(p) for p in plain]


def test_unbuildable_first_model_declines() -> None:
    context = analyse(load_inputs(CheckRequest(netlist=DEMO / "dust_extractor_panel.edif",
                                               bom=DEMO / "bom.csv")))
    result = next(r for r in solved_groups(context) if r.resistors)
    ref = result.resistors[0].ref
    broken = dataclasses.replace(context, rails={name: rail for name, rail in context.rails.items()
                                                 if name not in result.group.rails})
    with pytest.raises(ModelGap):
        build_model(result.group, broken.circuit, broken.part_data, dict(broken.rails))
    record = resistor_record(broken, ref, result.resistor(ref).ohms)
    assert resistor_models(broken, result, ref, [record]) is None
