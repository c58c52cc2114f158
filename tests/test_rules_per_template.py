"""Every rule gives the same findings on followers (results renamed from a template,
``GroupResult.origin``) as on the same groups solved one by one.

Expected values: the plain path of our own code, ``linter.analysis.analyse(...,
memoise=False)`` (no followers: every group solved and named on its own), run through the
same rules; never pasted output. Findings must be equal field by field, in the same order,
with their values in the same order. Boards: the demo (EDIF and SPICE) and generated boards
(bench/gen_board.py) of several sizes and seeds, whose channels repeat, so that most groups
are followers. The rules read a follower's figures through its template and must not build
its records: a counting test holds them to that.
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "fixtures" / "demo"

from linter import fix_search  # noqa: E402
from linter.analysis import analyse as solve_groups  # noqa: E402
from linter.engine import CheckRequest, load_inputs, run_rules  # noqa: E402
from linter.results import GroupResult  # noqa: E402
from linter.topology import find_groups  # noqa: E402

BOARDS = [(300, 1), (800, 2), (1500, 1), (3000, 3)]
"""(parts, seed) of the generated boards."""


def _solved(context, memoise: bool):
    groups = find_groups(context.circuit, context.rails, context.part_data)
    return replace(context, groups=solve_groups(groups, context.circuit, context.part_data,
                                                context.rails, context.settings.ambient,
                                                memoise=memoise))


def _findings(context) -> list:
    fix_search._ANSWERS.clear()  # each path searches its fixes itself
    return run_rules(context)


def _inputs():
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    yield "demo.edif", (DEMO / "dust_extractor_panel.edif", DEMO / "bom.csv")
    yield "demo.cir", (DEMO / "dust_extractor_panel.cir", DEMO / "bom.csv")


@pytest.fixture(scope="module")
def generated(tmp_path_factory):
    if str(ROOT) not in sys.path:
        sys.path.insert(0, str(ROOT))
    from bench.gen_board import generate, write_all

    out = {}
    for parts, seed in BOARDS:
        folder = tmp_path_factory.mktemp(f"b{parts}_s{seed}")
        write_all(generate(parts, seed), folder)
        out[(parts, seed)] = (folder / "board.edif", folder / "bom.csv")
    return out


def _check_same(netlist: Path, bom: Path) -> tuple[int, set[str]]:
    """Compares the two paths; returns (followers, rules with a finding on a follower)."""
    loaded = load_inputs(CheckRequest(netlist=netlist, bom=bom))
    fast_context = _solved(loaded, memoise=True)
    plain_context = _solved(loaded, memoise=False)
    assert all(r.origin is None for r in plain_context.groups)
    followers = {r.id for r in fast_context.groups if r.origin is not None}
    fast = _findings(fast_context)
    plain = _findings(plain_context)
    assert len(fast) == len(plain)
    for a, b in zip(fast, plain):
        assert a == b
        assert repr(a) == repr(b)  # location and every value's exact float too
        assert list(a.values.items()) == list(b.values.items())
    return len(followers), {f.rule for f in fast if f.group in followers}


@pytest.mark.parametrize("name", ["demo.edif", "demo.cir"])
def test_demo_findings_same_on_both_paths(name):
    netlist, bom = dict(_inputs())[name]
    _check_same(netlist, bom)


@pytest.mark.parametrize("board", BOARDS, ids=[f"{p}parts_seed{s}" for p, s in BOARDS])
def test_generated_board_findings_same_on_both_paths(generated, board):
    followers, rules = _check_same(*generated[board])
    assert followers > 20
    assert rules  # some rule found something on a follower


def test_the_boards_together_have_follower_findings_of_the_busy_rules(generated):
    seen: set[str] = set()
    for board in BOARDS:
        seen |= _check_same(*generated[board])[1]
    assert {"string-headroom", "shared-ballast", "resistor-overload",
            "transistor-overload"} <= seen


_RECORDS = ("leds", "resistors", "transistors", "pins", "not_converged", "notes")


def test_rules_do_not_read_follower_records(generated, monkeypatch):
    """Counts every read of a follower's records by the rules (the lazy followers of the
    analysis stay unbuilt only if nothing reads them)."""
    loaded = load_inputs(CheckRequest(netlist=generated[(3000, 3)][0],
                                      bom=generated[(3000, 3)][1]))
    context = _solved(loaded, memoise=True)
    reads: list[str] = []

    class Counting:
        """The slot of a record field, counting reads on a follower."""

        def __init__(self, slot, name):
            self.slot, self.name = slot, name

        def __get__(self, result, owner=None):
            if result is None:
                return self.slot
            if getattr(result, "origin", None) is not None:
                reads.append(self.name)
            return self.slot.__get__(result, owner)

        def __set__(self, result, value):
            self.slot.__set__(result, value)

    for cls in (GroupResult, *GroupResult.__subclasses__()):  # a lazy follower's class too
        for name in _RECORDS:
            if name in cls.__dict__:
                monkeypatch.setattr(cls, name, Counting(cls.__dict__[name], name))
    follower = next(r for r in context.groups if r.origin is not None)
    assert follower.leds is not None and reads[:1] == ["leds"]  # the count counts
    reads.clear()
    findings = _findings(context)
    assert findings
    assert reads == []


RULE_FIXTURES = ROOT / "fixtures" / "rules"
COPIES = (7, 12, 30)
"""Copies of each fixture's circuit made besides the original (numbers of the copies)."""


def _renamed(name: str, copy: int) -> str:
    """A copy's name for ``name``: a trailing number ``n`` becomes ``copy·100 − n`` (so that
    the copy's names run in the opposite natural order), else ``_<copy>`` is appended."""
    head = name.rstrip("0123456789")
    if head != name:
        return f"{head}{copy * 100 - int(name[len(head):])}"
    return f"{name}_{copy}"


_NODES = {"R": 2, "D": 2, "C": 2, "L": 2, "Q": 3, "M": 4}
"""Nodes of a SPICE element by its first letter (X: every word but the last)."""


def _repeated_deck(text: str) -> str:
    """The deck with its parts (not its sources, models or subcircuits) copied
    :data:`COPIES` times, each copy's references and non-rail nets renamed."""
    lines = text.splitlines()
    rails = {"0"}
    parts: list[list[str]] = []
    inside = False
    for line in lines:
        words = line.split()
        if not words or words[0].startswith(("*", "+")):
            continue
        first = words[0].upper()
        if first.startswith(".SUBCKT"):
            inside = True
        elif first.startswith(".ENDS"):
            inside = False
        elif not inside and first[0] == "V":
            rails.update(words[1:3])
        elif not inside and first[0] in "RDCLQMX":
            parts.append(words)
    out = [line for line in lines if line.strip().lower() != ".end"]
    for copy in COPIES:
        for words in parts:
            count = len(words) - 2 if words[0][0].upper() == "X" else _NODES[words[0][0].upper()]
            nodes = [n if n in rails else f"{n}_{copy}" for n in words[1:1 + count]]
            out.append(" ".join([_renamed(words[0], copy), *nodes, *words[1 + count:]]))
    return "\n".join(out + [".end", ""])


def _fixture_rules():
    return sorted(p.name for p in RULE_FIXTURES.iterdir() if (p / "fires.cir").exists())


@pytest.mark.parametrize("rule", _fixture_rules())
def test_repeated_rule_fixture_findings_same_on_both_paths(rule, tmp_path):
    """Each rule's firing fixture with its circuit copied under other names (the copies
    are followers of the first): every rule's findings equal on both paths, and the rule
    of the fixture finds on the followers."""
    import shutil

    folder = RULE_FIXTURES / rule
    for extra in folder.iterdir():
        if extra.suffix in (".toml", ".csv"):
            shutil.copy(extra, tmp_path / extra.name)
    deck = tmp_path / "fires.cir"
    deck.write_text(_repeated_deck((folder / "fires.cir").read_text(encoding="utf-8")),
                    encoding="utf-8")
    bom = tmp_path / "fires_bom.csv"
    if bom.exists():  # each copy's parts get the rows of the parts they copy
        import csv

        with bom.open(encoding="utf-8", newline="") as stream:
            rows = list(csv.reader(stream))
        assert all("," not in row[0] and " " not in row[0] for row in rows[1:])
        rows += [[_renamed(row[0], copy), *row[1:]] for copy in COPIES for row in rows[1:]]
        with bom.open("w", encoding="utf-8", newline="") as stream:
            csv.writer(stream).writerows(rows)
    followers, rules = _check_same(deck, bom if bom.exists() else None)
    if rule not in ("floating-led", "nonstandard-value"):  # no solved group of their own
        assert followers >= 2  # (a copy whose names order differently may key apart)
        assert rule in rules
