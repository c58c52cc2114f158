"""Followers' JSON lines from their template's line (linter.report.json_followers) against
the plain writer.

Expected values: the plain path of our own code. Every line :class:`GroupLines` gives must be
exactly :func:`linter.report.json_groups.group_line` of the same record (itself held to
``json.dumps(plain_data(group.as_dict()))`` in tests/test_report_json_layout.py); each test
also counts the lines that took the fast path, so that a test cannot pass by falling back.
"""

from __future__ import annotations

import shutil
import sys
from dataclasses import replace
from pathlib import Path

import pytest

from linter.engine import CheckRequest, run_check
from linter.groups import PinDrive
from linter.report.json_followers import MARK, GroupLines, follower_form, note_parts, untouched
from linter.report.json_groups import group_line
from linter.result_rename import renamed
from linter.results import GroupResult
from test_result_rename import _template

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate, write_all  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"


def _lines_equal_plain(groups) -> GroupLines:
    """Asserts every line equals the plain writer's; returns the writer (for its counts)."""
    lines = GroupLines(groups)
    for group in sorted(groups, key=lambda g: g.id):  # any order: forms are made on demand
        assert lines.line(group) == group_line(group), group.id
    assert not lines._forms and not lines._left and not lines._lines  # all dropped at the end
    return lines


@pytest.mark.parametrize("suffix", ["edif", "cir"])
def test_demo_lines_are_the_plain_lines(suffix: str) -> None:
    result = run_check(CheckRequest(netlist=DEMO / f"dust_extractor_panel.{suffix}",
                                    bom=DEMO / "bom.csv"))
    assert len(result.groups) > 5
    _lines_equal_plain(result.groups)


@pytest.mark.parametrize("parts, seed, part_data", [
    (1000, 5, True), (1000, 5, False), (600, 11, True), (2500, 3, False), (2500, 7, True)])
def test_generated_board_lines_are_the_plain_lines(tmp_path: Path, parts: int, seed: int,
                                                   part_data: bool) -> None:
    files = write_all(generate(parts, seed=seed), tmp_path / "board")
    if not part_data:  # no BOM and no settings: no part data, generic figures and notes
        files["settings"].unlink()
    result = run_check(CheckRequest(netlist=files["edif"],
                                    bom=files["bom"] if part_data else None))
    followers = [g for g in result.groups if g.origin is not None]
    assert len(followers) > len(result.groups) / 2  # a generated board repeats its channels
    assert any(g.transistors for g in followers)
    assert any(g.pins for g in followers) == part_data  # the settings name the MCU's pins
    lines = _lines_equal_plain(result.groups)
    assert lines.filled == len(followers)


def test_spice_board_lines_are_the_plain_lines(tmp_path: Path) -> None:
    files = write_all(generate(1000, seed=2), tmp_path / "board")
    result = run_check(CheckRequest(netlist=files["spice"], bom=files["bom"]))
    followers = sum(g.origin is not None for g in result.groups)
    assert followers > 0
    assert _lines_equal_plain(result.groups).filled == followers


ODD_NAMES = [
    'D"1', "D\\1", "Dé1", "D\u00b51\u2013x", "D\U0001F4A11", "D\n1", "D\x001",
    MARK + "0" + MARK, '"' + MARK + "1" + MARK + '"', "%s", "%%", "{0}", "{", "}",
    "R1", "R10", "R100", "+5V", "P0", "GND", "U1.PA0", "D1", "D2", "Q1", "", " ",
]
"""Names a follower may carry (invented): quotes, backslashes, non-ASCII, control
characters, the placeholder mark and whole placeholders, format directives, names that are
prefixes of others, rail and net names, the template's own names."""


def _follower(template: GroupResult, note_parts, names: list[str], group_id: str,
              net: str) -> GroupResult:
    """``template`` renamed to ``names`` (the template's references in order), with its own
    group (id, parts, setter) and pin (id, net)."""
    shape = template.group
    refs = dict(zip(("D1", "D2", "R1", "Q1", "U1"), names))
    group = replace(shape, id=group_id, parts=tuple(refs[p] for p in shape.parts),
                    setter=refs[shape.setter],
                    pins=(PinDrive(refs["U1"], "PA0", net, "+5V"),))
    return renamed(template, group, refs, note_parts)


def test_odd_names_give_the_plain_lines() -> None:
    template, note_parts = _template()
    followers = []
    for index in range(len(ODD_NAMES)):
        names = [ODD_NAMES[(index + k) % len(ODD_NAMES)] for k in range(5)]
        group_id = "G-" + names[0]
        net = ODD_NAMES[(index + 7) % len(ODD_NAMES)]
        followers.append(_follower(template, note_parts, names, group_id, net))
    # a follower that swaps the template's own names; one named like the template
    followers.append(_follower(template, note_parts, ["D2", "D1", "Q1", "R1", "U1"], "G-D2",
                               "P0"))
    followers.append(_follower(template, note_parts, ["D1", "D2", "R1", "Q1", "U1"], "G-D1",
                               "P0"))
    lines = _lines_equal_plain([template, *followers])
    assert lines.filled == len(followers)


def test_a_mark_in_the_template_text_falls_back() -> None:
    template, note_parts = _template()
    led = template.leds[0]
    for marked in (replace(template, rail="+5V" + MARK),
                   replace(template, leds=(replace(led, part_number=MARK + "9" + MARK),
                                           *template.leds[1:])),
                   replace(template, group=replace(template.group, id="G-" + MARK))):
        follower = _follower(marked, note_parts, ["D7", "D8", "R7", "Q7", "U7"], "G-D7", "P7")
        assert follower_form(marked, follower.origin[1]) is None
        assert _lines_equal_plain([marked, follower]).filled == 0


def test_guards_send_the_group_the_plain_way() -> None:
    template, note_parts = _template()
    follower = _follower(template, note_parts, ["D7", "D8", "R7", "Q7", "U7"], "G-D7", "P7")
    # the template is not among the groups written
    assert _lines_equal_plain([follower]).filled == 0
    # a result changed after renaming (its origin kept)
    for changed in (replace(follower, status="unsolved"), replace(follower, corners=3),
                    replace(follower, pins=()), replace(follower, leds=follower.leds[:1])):
        assert _lines_equal_plain([template, changed]).filled == 0
    # a reference map that lacks a name of the template
    refs = dict(follower.origin[1])
    del refs["Q1"]
    short = replace(follower, origin=(template, refs))
    assert _lines_equal_plain([template, short]).filled == 0
    # and the well-formed follower does take the fast path
    assert _lines_equal_plain([template, follower]).filled == 1


def test_a_form_is_made_once_per_template_and_dropped_after_its_last_follower() -> None:
    template, note_parts = _template()
    followers = [_follower(template, note_parts, [f"D{n}", f"D{n + 1}", f"R{n}", f"Q{n}",
                                                  f"U{n}"], f"G-D{n}", f"P{n}")
                 for n in (10, 20, 30)]
    lines = GroupLines([*followers, template])
    assert lines._left == {id(template): 3}
    for count, follower in enumerate(followers, 1):
        assert lines.line(follower) == group_line(follower)
        assert (id(template) in lines._forms) == (count < 3)
    assert lines.line(template) == group_line(template)
    assert lines.filled == 3


# --- followers whose records are made on first access: the report must not read them ----

_LAZY_FIELDS = ("leds", "resistors", "transistors", "pins", "not_converged", "notes")
_SLOTS = {name: GroupResult.__dict__[name] for name in _LAZY_FIELDS}


class _Watched(GroupResult):
    """A follower as a lazy one stands: only its group, scalars and origin stored; a record
    field (or ``notes``) is taken from its eagerly renamed twin on first access, and every
    access is counted in ``READS``."""

    __slots__ = ("_twin",)
    READS: dict[str, int] = {}


def _watched_field(name: str) -> property:
    slot = _SLOTS[name]

    def read(self: _Watched):
        _Watched.READS[name] = _Watched.READS.get(name, 0) + 1
        try:
            return slot.__get__(self)
        except AttributeError:
            slot.__set__(self, getattr(self._twin, name))
            return slot.__get__(self)
    return property(read, slot.__set__)


for _name in _LAZY_FIELDS:
    setattr(_Watched, _name, _watched_field(_name))


def _watched(twin: GroupResult) -> _Watched:
    """A lazy stand-in for the renamed result ``twin`` (nothing but its scalars stored)."""
    made = object.__new__(_Watched)
    for name in ("group", "status", "rail", "corners", "scheme", "reason", "origin"):
        GroupResult.__dict__[name].__set__(made, getattr(twin, name))
    _Watched.__dict__["_twin"].__set__(made, twin)
    return made


def _lazy_lines_equal_plain(groups) -> GroupLines:
    """Writes every line with the followers as lazy stand-ins: no follower field may be
    read; then each line is held to the plain writer's line of the eager record."""
    lazy = [_watched(g) if g.origin is not None else g for g in groups]
    _Watched.READS.clear()
    lines = GroupLines(lazy)
    written = [lines.line(group) for group in lazy]
    assert _Watched.READS == {}
    assert not lines._forms and not lines._left and not lines._lines
    for group, line in zip(groups, written):
        assert line == group_line(group), group.id
    return lines


@pytest.mark.parametrize("parts, seed, part_data", [(1000, 5, True), (2500, 7, True),
                                                    (1000, 5, False)])
def test_lazy_followers_are_written_without_reading_their_records(
        tmp_path: Path, parts: int, seed: int, part_data: bool) -> None:
    files = write_all(generate(parts, seed=seed), tmp_path / "board")
    if not part_data:  # no part data: generic figures everywhere
        files["settings"].unlink()
    result = run_check(CheckRequest(netlist=files["edif"],
                                    bom=files["bom"] if part_data else None))
    groups = [g if g.origin is None else renamed(g.origin[0], g.group, g.origin[1],
                                                 _note_parts(g))
              for g in result.groups]  # eager twins, whatever the analysis made
    followers = sum(g.origin is not None for g in groups)
    assert followers > len(groups) / 2
    assert any(g.notes for g in groups if g.origin is not None)  # notes are filled too
    assert _lazy_lines_equal_plain(groups).filled == followers


def _note_parts(follower: GroupResult) -> tuple[tuple[str, str], ...]:
    """The template's notes as (reference, text): each follower note is its template's
    with the reference renamed (checked here against the follower's own notes)."""
    template, refs = follower.origin
    parts = note_parts(template.notes, refs)
    assert parts is not None
    assert tuple(f"{refs[ref]}: {text}" for ref, text in parts) == tuple(follower.notes)
    return parts


def test_lazy_odd_names_and_either_order_give_the_plain_lines() -> None:
    template, parts = _template()
    followers = [_follower(template, parts, [ODD_NAMES[(index + k) % len(ODD_NAMES)]
                                             for k in range(5)],
                           "G-" + ODD_NAMES[index], ODD_NAMES[(index + 3) % len(ODD_NAMES)])
                 for index in range(len(ODD_NAMES))]
    assert _lazy_lines_equal_plain([template, *followers]).filled == len(followers)
    assert _lazy_lines_equal_plain([*followers, template]).filled == len(followers)
    middle = len(followers) // 2
    assert _lazy_lines_equal_plain([*followers[:middle], template,
                                    *followers[middle:]]).filled == len(followers)


def test_a_lazy_follower_partly_read_is_written_alike() -> None:
    template, parts = _template()
    follower = _follower(template, parts, ["D7", "D8", "R7", "Q7", "U7"], "G-D7", "P7")
    for read in (("leds",), ("notes",), ("pins", "notes"), _LAZY_FIELDS):
        lazy = _watched(follower)
        for name in read:
            getattr(lazy, name)
        lines = GroupLines([template, lazy])
        assert lines.line(lazy) == group_line(follower)
        assert lines.filled == 1


def test_note_references_are_told_only_when_one_name_fits() -> None:
    names = ("D1", "D10", "R1", "R1: a")
    assert note_parts(("D1: generic rs", "D10: generic vf"), names) == (
        ("D1", "generic rs"), ("D10", "generic vf"))
    assert note_parts((), names) == ()
    assert note_parts(("R1: a: b",), names) is None      # R1 and "R1: a" both fit
    assert note_parts(("Q1: generic beta",), names) is None  # no name fits
    assert note_parts(("D1 generic",), names) is None
    assert note_parts((7,), names) is None


def test_a_template_note_no_name_fits_sends_its_followers_the_plain_way() -> None:
    template, parts = _template()
    follower = _follower(template, parts, ["D7", "D8", "R7", "Q7", "U7"], "G-D7", "P7")
    odd = replace(template, notes=("X9: generic rs",))  # names no part of the group
    assert follower_form(odd, follower.origin[1]) is None
    moved = replace(follower, origin=(odd, follower.origin[1]))
    assert _lines_equal_plain([odd, moved]).filled == 0


def test_a_note_reference_inside_the_text_is_filled_escaped() -> None:
    template, parts = _template()
    names = ['D"7', "D\\8", "R\n7", "Q\u00b57", "U%s"]
    follower = _follower(template, parts, names, "G-D7", "P7")
    assert follower.notes == ('D"7: generic rs',)
    assert _lazy_lines_equal_plain([template, follower]).filled == 1
    assert untouched(_watched(follower)) and not untouched(follower)


def test_unsafe_is_what_the_json_encoder_escapes() -> None:
    """Every code point: written as it is, in quotes, exactly when _UNSAFE does not find it
    (expected: the standard library's encoder, the plain path)."""
    from linter.report.json_followers import _UNSAFE
    from linter.report.json_groups import _TEXT

    for code in range(0x110000):
        char = chr(code)
        assert (_TEXT(char) == '"' + char + '"') == (_UNSAFE(char) is None), hex(code)


def _counted_unsafe(monkeypatch: pytest.MonkeyPatch, force: bool) -> dict[str, int]:
    """Counts the followers that took the unescaped road ("raw") and those that were sent
    the escaped way ("escaped"); ``force`` sends every one the escaped way."""
    from linter.report import json_followers

    search = json_followers._UNSAFE
    counts = {"raw": 0, "escaped": 0}

    def counted(text: str):
        found = search(text)
        if force and found is None:
            found = search('"')
        counts["escaped" if found is not None else "raw"] += 1
        return found

    monkeypatch.setattr(json_followers, "_UNSAFE", counted)
    return counts


@pytest.mark.parametrize("force", [False, True])
def test_both_roads_give_the_plain_lines_for_odd_names(monkeypatch: pytest.MonkeyPatch,
                                                       force: bool) -> None:
    counts = _counted_unsafe(monkeypatch, force)
    template, note_parts = _template()
    followers = []
    for index in range(len(ODD_NAMES)):
        names = [ODD_NAMES[(index + k) % len(ODD_NAMES)] for k in range(5)]
        net = ODD_NAMES[(index + 7) % len(ODD_NAMES)]
        followers.append(_follower(template, note_parts, names, "G-" + names[0], net))
    for names in (["D7", "D8", "R7", "Q7", "U7"], ["Dé1", "D\u00b52", "Rö", "Q\U0001F4A1", "U\x7f"],
                  ["D%s", "D{0}", "R%%", "Q ", "U" + MARK]):  # safe: nothing to escape
        followers.append(_follower(template, note_parts, names, "G-" + names[0], "P7"))
    lines = _lines_equal_plain([template, *followers])
    assert lines.filled == len(followers)
    if force:
        assert counts["raw"] == 0 and counts["escaped"] > 0
    else:
        assert counts["raw"] >= 3 and counts["escaped"] > 0


@pytest.mark.parametrize("force", [False, True])
def test_both_roads_give_the_plain_lines_on_a_generated_board(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, force: bool) -> None:
    counts = _counted_unsafe(monkeypatch, force)
    files = write_all(generate(1000, seed=13), tmp_path / "board")
    result = run_check(CheckRequest(netlist=files["edif"], bom=files["bom"]))
    followers = sum(g.origin is not None for g in result.groups)
    assert _lines_equal_plain(result.groups).filled == followers
    assert counts["raw" if not force else "escaped"] == followers
