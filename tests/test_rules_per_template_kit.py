"""rulekit's helpers for reading a follower through its template.

Expected values: a follower's own corner (the template's corner with its part names
renamed, as linter.result_rename makes it) through the plain ``at_corner`` and
``Corner.label`` — the plain path of our own code. Corners and names invented.
"""

from __future__ import annotations

from types import SimpleNamespace

from linter import rulekit
from linter.corners import Corner, Levels

RAILS = {"+12V": ("max", 13.2), "+5V": ("nom", 5.0)}


def _corner(names, bins, ambient=40.0, beta=None, resistors=None):
    return Corner("on", RAILS, ambient, Levels(tuple(names), tuple(bins)),
                  beta or {}, resistors or {})


def test_at_corner_through_refs_names_the_followers_leds_in_the_template_order():
    refs = {"D7": "D19", "D8": "D22", "D9": "D20", "R3": "R40", "Q1": "Q12"}
    result = SimpleNamespace(rail="+12V")
    cases = [(("vf_min", "vf_max", "vf_max"), ("D19",)), (("vf_min", "vf_max", "vf_max"), ()),
             (("vf_min", "vf_max", "vf_typ"), ("D22",)), (("vf_max",) * 3, ("D19",))]
    for bins, focus in cases:
        template = _corner(("D7", "D8", "D9"), bins)
        own = _corner(("D19", "D22", "D20"), bins)  # the follower's corner
        assert rulekit.at_corner(template, result, focus, refs) == \
            rulekit.at_corner(own, result, focus)
        named = len(set(bins)) > 1
        assert (rulekit.nameless_at_corner(template, result) is None) == named
        if not named:
            assert rulekit.nameless_at_corner(template, result) == \
                rulekit.at_corner(own, result, focus)
    template = _corner(("D7", "D8"), ("vf_min", "vf_max"), beta={"Q1": "hfe_min"},
                       resistors={"R3": "low"})
    own = _corner(("D19", "D22"), ("vf_min", "vf_max"), beta={"Q12": "hfe_min"},
                  resistors={"R40": "low"})
    assert rulekit.renamed_corner(template, refs).label() == own.label()
    assert rulekit.renamed_corner(template, None) is template
    assert rulekit.nameless_at_corner(None, result) == rulekit.at_corner(None, result)


def test_figures_of_and_renamer():
    plain = SimpleNamespace(origin=None)
    assert rulekit.figures_of(plain) == (plain, None)
    assert rulekit.renamer(None)("D1") == "D1"
    template = SimpleNamespace(origin=None)
    follower = SimpleNamespace(origin=(template, {"D1": "D9"}))
    assert rulekit.figures_of(follower) == (template, {"D1": "D9"})
    assert rulekit.renamer({"D1": "D9"})("D1") == "D9"


def test_per_template_works_once_per_template():
    calls = []
    memo = rulekit.PerTemplate(lambda base: calls.append(base) or len(calls))
    template = SimpleNamespace(origin=None)
    followers = [SimpleNamespace(origin=(template, {})) for _ in range(3)]
    assert [memo(r) for r in (template, *followers)] == [1, 1, 1, 1]
    other = SimpleNamespace(origin=None)
    assert memo(other) == 2 and calls == [template, other]


def _board_of(results):
    """A context holding ``results`` as its groups (a tuple: the board's templates kept)."""
    group = SimpleNamespace(topology="series")
    for result in results:
        result.status, result.group = "solved", group
    return SimpleNamespace(groups=tuple(results))


def test_flagged_gives_the_plain_filter_in_order():
    # expected: the plain generator of flagged's docstring, on invented templates and followers
    templates = [SimpleNamespace(origin=None, mark=m) for m in (0, 1, 2, 0)]
    results = []
    for index, template in enumerate(templates):
        results.append(template)
        results += [SimpleNamespace(origin=(template, {})) for _ in range(index + 1)]
    results.insert(3, SimpleNamespace(origin=(templates[3], {})))  # out of template order
    context = _board_of(results)
    calls = []

    def verdict(base):
        calls.append(base)
        return base.mark

    try:
        for kept in (True, False):  # the board's templates kept, and worked out per call
            if not kept:
                context.groups = list(context.groups)
            verdicts = rulekit.PerTemplate(verdict)
            plain = [(r, verdict(r.origin[0] if r.origin else r)) for r in results
                     if verdict(r.origin[0] if r.origin else r)]
            calls.clear()
            assert list(rulekit.flagged(context, verdicts)) == plain
            assert sorted(map(id, calls)) == sorted(map(id, templates))  # once each
            assert [v for _, v in plain] == [1] * 3 + [2] * 4  # template 1 and 2 with followers
    finally:
        rulekit.forget_board()


def test_named_corner_forms_give_the_written_out_words():
    # expected: rulekit._renamed_phrase, the plain path of our own code
    rails_of = [RAILS, {"+5V": ("min", 4.75), "V%1": ("max", 3.6)},
                {"A\0B": ("max", 1.0)}, {}]
    cases = 0
    for rails in rails_of:
        for names, bins in [(("D1", "D2"), ("vf_min", "vf_max")),
                            (("D1", "D2", "D3"), ("vf_max", "vf_min", "vf_max")),
                            (("D1",), ("vf_min",)), ((), ())]:
            for ambient in (25.0, -0.0, 70.0):
                for vf in (Levels(tuple(names), tuple(bins)), dict(zip(names, bins))):
                    corner = Corner("on", rails, ambient, vf, {}, {})
                    for renamed in ({n: f"L{i}%s" for i, n in enumerate(names)},
                                    {n: "D9" for n in names},  # not one to one
                                    {n: n.lower() for n in names}):
                        focuses = [(), ("nobody",), *((renamed[n],) for n in names),
                                   tuple(renamed[n] for n in names[:2])]
                        for rail in ("+5V", "+12V", None):
                            result = SimpleNamespace(rail=rail)
                            for focus in focuses:
                                for _ in range(2):  # the form made, then kept
                                    assert rulekit.at_corner(corner, result, focus,
                                                             renamed) == \
                                        rulekit._renamed_phrase(corner, rail, focus, renamed)
                                cases += 1
    rulekit.forget_board()
    # rail sets, ambients, vf kinds, renamings, group rails; focuses of 2, 3, 1, 0 LEDs
    assert cases == 4 * 3 * 2 * 3 * 3 * (5 + 6 + 4 + 3)
