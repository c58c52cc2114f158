"""resistor-overload and transistor-overload report a part shared by several groups once,
in the first group that lists it, whether or not that group is the one over its rating.

Groups whose template has no part over its rating only add their parts to the ones seen
(one step for the lot); expected values: the plain loop the rules used before (each rated
part of each group looked at in order, written out below), on invented templates and
followers in which one resistor and one transistor belong to two groups.
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import pytest

from linter.partdata import BjtData
from linter.rulekit import forget_board
from linter.rules import all_rules

FINE, HOT = 0.01, 5.0
"""W: far below and far above any rating below."""


def _part(ref, power, rating=0.25, kind="npn"):
    return SimpleNamespace(ref=ref, rating_w=rating, power=SimpleNamespace(max=power),
                           kind=kind)


def _result(template, refs, resistors=(), transistors=()):
    group = SimpleNamespace(topology="resistor")
    if template is None:
        return SimpleNamespace(status="solved", group=group, origin=None,
                               resistors=tuple(resistors), transistors=tuple(transistors))
    return SimpleNamespace(status="solved", group=group, origin=(template, refs))


def _board(order):
    """Templates T1 (R1 fine, Q1 fine) and T2 (R2 hot, Q2 hot); followers renaming their
    parts; "shared" followers name their part R9 or Q9 (the part two groups share)."""
    t1 = _result(None, None, [_part("R1", FINE)], [_part("Q1", FINE)])
    t2 = _result(None, None, [_part("R2", HOT)], [_part("Q2", HOT)])
    made = {"t1": t1, "t2": t2,
            "f1": _result(t1, {"R1": "R11", "Q1": "Q11"}),
            "f2": _result(t2, {"R2": "R12", "Q2": "Q12"}),
            "s1": _result(t1, {"R1": "R9", "Q1": "Q9"}),
            "s2": _result(t2, {"R2": "R9", "Q2": "Q9"})}
    data = {q: BjtData("npn", pd_max=0.25) for q in ("Q1", "Q2", "Q9", "Q11", "Q12")}
    settings = SimpleNamespace(ambient=SimpleNamespace(max=25.0),
                               derating=SimpleNamespace(resistor_power=1.0,
                                                        transistor_power=1.0))
    return SimpleNamespace(groups=tuple(made[k] for k in order), settings=settings,
                           part_data=data)


def _plain(context, kind):
    """The parts reported, by the plain loop (a part's first group decides)."""
    seen, out = set(), []
    for result in context.groups:
        base, refs = (result, None) if result.origin is None else result.origin
        for part in getattr(base, kind):
            ref = part.ref if refs is None else refs[part.ref]
            if ref in seen:
                continue
            seen.add(ref)
            if math.isfinite(part.power.max) and part.power.max > 0.1:
                out.append(ref)
    return out


@pytest.mark.parametrize("order", [("t1", "t2", "f1", "f2", "s1", "s2"),
                                   ("t2", "s2", "t1", "s1", "f1"),
                                   ("s1", "t1", "s2", "t2", "f2", "f1")])
@pytest.mark.parametrize("rule,kind", [("resistor-overload", "resistors"),
                                       ("transistor-overload", "transistors")])
def test_a_shared_part_is_reported_by_its_first_group(order, rule, kind, monkeypatch):
    context = _board(order)
    check = all_rules()[rule]()
    monkeypatch.setattr(check, "_finding", lambda context, result, part, *rest: rest[-1])
    try:
        assert list(check.check(context)) == _plain(context, kind)
    finally:
        forget_board()
    if order[-2:] == ("s1", "s2"):  # Q9/R9 first seen fine: the hot follower is passed
        assert _plain(context, kind)[-1] != ("R9" if kind == "resistors" else "Q9")
