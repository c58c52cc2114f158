"""pin-overcurrent's pins by position: each group's largest pin per part and each pin made
alone equal the plain records of ``_pins`` and ``_largest_pin_per_part``.

Expected values: the plain path of our own code (``_pins``, ``_largest_pin_per_part``) on the
demo and generated boards (bench/gen_board.py), whose pin-driven channels repeat (followers).
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

from linter.engine import CheckRequest, analyse, load_inputs  # noqa: E402
from linter.rulekit import figures_of, forget_board, solved_groups  # noqa: E402
from linter.rules import pin_overcurrent as rule  # noqa: E402


def _boards(tmp_path):
    yield ROOT / "fixtures" / "demo" / "dust_extractor_panel.edif", \
        ROOT / "fixtures" / "demo" / "bom.csv"
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate, write_all

    write_all(generate(1500, 2), tmp_path)
    yield tmp_path / "board.edif", tmp_path / "bom.csv"


def test_positions_give_the_plain_pins(tmp_path):
    followers = 0
    for netlist, bom in _boards(tmp_path):
        context = analyse(load_inputs(CheckRequest(netlist=netlist, bom=bom)))
        for result in solved_groups(context):
            plain = rule._pins(result)
            base = figures_of(result)[0]
            ids = [pin.id for pin in plain]
            assert [rule._pin(result, i) for i in range(len(plain))] == list(plain)
            largest = rule._largest_per_part(ids, base.pins)
            assert {part: plain[i] for part, i in largest.items()} == \
                rule._largest_pin_per_part(result)
            followers += bool(plain) and result.origin is not None
        forget_board()
    assert followers > 20


def test_package_over_says_what_the_package_finding_says(tmp_path):
    """``_package_over`` on the pins' spans alone agrees with ``_package_finding`` on the
    plain records of every microcontroller of the boards and the rule's fixtures, and the
    boards hold parts on both sides of it (a package finding and none)."""
    decks = sorted((ROOT / "fixtures" / "rules" / "pin-overcurrent").glob("*.cir"))
    boards = list(_boards(tmp_path)) + [(deck, None) for deck in decks]
    answers = set()
    checker = rule.PinOvercurrent()
    for netlist, bom in boards:
        context = analyse(load_inputs(CheckRequest(netlist=netlist, bom=bom)))
        contributions: dict[str, list] = {}
        for result in solved_groups(context):
            for part, pin in rule._largest_pin_per_part(result).items():
                contributions.setdefault(part, []).append((pin, result))
        for part, pins in sorted(contributions.items()):
            over = rule._package_over(context, part, [pin.current for pin, _ in pins])
            assert over == (checker._package_finding(context, part, pins) is not None)
            answers.add(over)
        forget_board()
    assert answers == {True, False}
