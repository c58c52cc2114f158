"""Fix-search memo: identical channels share an answer; any electrical difference does not."""

from dataclasses import dataclass, replace

from linter.fix_search import remembered, signature
from linter.groups import Group
from linter.model import Circuit, Part, Pin, SourceLocation
from linter.partdata import Ambient, Rail, ResistorData
from linter.results import GroupResult


@dataclass(frozen=True)
class _Settings:
    ambient: Ambient = Ambient()


@dataclass(frozen=True)
class _Context:
    circuit: Circuit
    part_data: dict
    rails: dict
    settings: _Settings = _Settings()


def _channel(r: str, d: str, node: str, line: int, ohms: float = 470.0):
    where = SourceLocation("board.cir", line, 1)
    parts = {r: Part(r, "resistor", str(ohms), (Pin("1", "+5V"), Pin("2", node)), where,
                     value_si=ohms),
             d: Part(d, "led", "RED", (Pin("A", node), Pin("K", "0")), where)}
    group = Group(id=f"G-{d}", topology="resistor", leds=(d,), strings=((d,),), parts=(r, d),
                  nets=("+5V", node, "0"), rails=("+5V", "0"), setter=r)
    return parts, group, {r: ResistorData(ohms, 0.05, note=f"{r}: tolerance 5 % assumed")}


def _context_and_results(second_ohms: float = 470.0):
    p1, g1, d1 = _channel("R1", "D1", "N1", 1)
    p2, g2, d2 = _channel("R2", "D2", "N2", 9, second_ohms)
    circuit = Circuit("board.cir", "spice", {**p1, **p2}, {})
    rails = {"+5V": Rail("+5V", 5.0, 4.75, 5.25), "0": Rail("0", 0.0, 0.0, 0.0)}
    context = _Context(circuit, {**d1, **d2}, rails)
    return context, GroupResult(g1, "solved"), GroupResult(g2, "solved")


def test_identical_channels_share_a_signature():
    context, first, second = _context_and_results()
    assert signature(context, first, ("q", "R1", 0.02)) == signature(context, second,
                                                                    ("q", "R2", 0.02))


def test_any_difference_changes_the_signature():
    context, first, second = _context_and_results(second_ohms=560.0)
    assert signature(context, first, ("q", "R1")) != signature(context, second, ("q", "R2"))
    context, first, second = _context_and_results()
    assert signature(context, first, ("q", "R1", 0.02)) != signature(context, second,
                                                                    ("q", "R2", 0.03))
    # the question names a part of the other channel: not the same question
    assert signature(context, first, ("q", "R1")) != signature(context, second, ("q", "R1"))
    warmer = replace(context, settings=_Settings(Ambient(0.0, 70.0)))
    assert signature(context, first, ("q",)) != signature(warmer, first, ("q",))


def test_remembered_runs_the_search_once_for_identical_channels():
    context, first, second = _context_and_results()
    calls = []

    def search():
        calls.append(1)
        return 42.0

    assert remembered(context, first, ("test-memo", "R1"), search) == 42.0
    assert remembered(context, second, ("test-memo", "R2"), search) == 42.0
    assert len(calls) == 1


def _with_note(context, ref: str, note: str):
    return replace(context, part_data={**context.part_data,
                                       ref: replace(context.part_data[ref], note=note)})


def test_signature_matches_the_plain_signature():
    """The signature put together piece by piece is the plain path's digest (expected: the
    plain path of our own code), including records that name a part of the group, records
    whose text a quote or a backslash leaves uncut, and names repr would escape."""
    from linter.fix_search import forget_board, signature_plain

    context, first, second = _context_and_results()
    contexts = [context,
                _with_note(context, "R1", "N1"),          # a record naming the group's net
                _with_note(context, "R1", "R1: it's D1"),  # a lone quote in the record
                _with_note(context, "R1", "a\\b"),        # a backslash in the record
                replace(context, rails={**context.rails,
                                        "it's": Rail("it's", 3.3, 3.2, 3.4)})]
    questions = [("q", "R1", 0.02), ("q", "R2"), ("q", "it's", "a\\b"), None]
    compared = 0
    for ctx in contexts:
        for result in (first, second):
            for question in questions:
                forget_board()
                for _ in range(2):  # the second time from the kept record texts
                    assert signature(ctx, result, question) == \
                        signature_plain(ctx, result, question)
                    compared += 1
    tabbed = GroupResult(replace(first.group, nets=("+5V", "N\t1", "0")), "solved")
    assert signature(context, tabbed, ("q",)) == signature_plain(context, tabbed, ("q",))
    assert compared == 2 * len(contexts) * 2 * len(questions)


def test_signature_matches_the_plain_signature_on_boards():
    """Every solved group of the demo boards and the rule fixtures, asked two questions
    (expected: the plain path of our own code)."""
    from pathlib import Path

    from linter.engine import CheckRequest, analyse, load_inputs
    from linter.fix_search import forget_board, signature_plain
    from linter.rulekit import solved_groups

    root = Path(__file__).resolve().parent.parent / "fixtures"
    boards = [(root / "demo" / "dust_extractor_panel.edif", root / "demo" / "bom.csv"),
              (root / "demo" / "dust_extractor_panel.cir", root / "demo" / "bom.csv"),
              *((path, None) for path in sorted((root / "rules").glob("*/*.cir")))]
    compared = 0
    for netlist, bom in boards:
        context = analyse(load_inputs(CheckRequest(netlist=netlist, bom=bom)))
        forget_board()
        for result in solved_groups(context):
            for question in (("split", result.group.setter, 100.0, 0.05), ("q", 1e-3)):
                assert signature(context, result, question) == \
                    signature_plain(context, result, question)
                compared += 1
    forget_board()
    assert compared > 50
