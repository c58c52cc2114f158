"""The SPICE reader's shortcut for plain cards gives what its general path gives.

A plain card (one line of printable ASCII with no ``, ( ) { } ' " =``) is tokenized by
:meth:`str.split` and, for the common element shapes, read from its words
(``flatten(..., plain_cards=True)``). Every expected value here is the general path's own
result on the same text (``plain_cards=False``, or the token regex): the shortcut must not
change a single element, net, location or message.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.errors import NetlistError
from linter.readers import spice_lines
from linter.readers.spice_deck import load_deck
from linter.readers.spice_flatten import flatten
from linter.readers.spice_parts import assemble
from linter.readers.spice_structure import structure_of

ROOT = Path(__file__).resolve().parents[1]


def _read(text: str, path: Path, plain: bool, opaque: tuple[str, ...] = ()):
    """(elements, nets, circuit) of a deck, or the error text."""
    try:
        deck = load_deck(text, path.name, path=path, root=path.parent)
        flat = flatten(structure_of(deck.title, deck.cards), opaque, plain_cards=plain)
        circuit = assemble(flat, path.name, deck.title)
    except NetlistError as error:
        return str(error)
    return flat.elements, flat.nets, circuit


def _same_reading(text: str, path: Path, opaque: tuple[str, ...] = ()) -> None:
    fast = _read(text, path, True, opaque)
    plain = _read(text, path, False, opaque)
    assert fast == plain  # the general path's result is the expected one


def _decks() -> list[Path]:
    found = [p for p in sorted((ROOT / "fixtures").rglob("*")) if p.suffix in (".cir", ".sp")]
    return [p for p in found if "bad" not in p.parts]


@pytest.mark.parametrize("path", _decks(), ids=lambda p: str(p.relative_to(ROOT)))
def test_fixture_decks_read_the_same_with_and_without_the_shortcut(path: Path) -> None:
    _same_reading(path.read_text(encoding="utf-8"), path)


def test_generated_board_reads_the_same_with_and_without_the_shortcut(tmp_path: Path) -> None:
    import sys

    sys.path.insert(0, str(ROOT))
    try:
        from bench.gen_board import generate, write_all
    finally:
        sys.path.remove(str(ROOT))
    files = write_all(generate(600, seed=3), tmp_path)
    deck = Path(files.get("board.cir", tmp_path / "board.cir"))
    text = deck.read_text(encoding="utf-8")
    _same_reading(text, deck, ("BM32",))
    _same_reading(text, deck)


_WORDS = st.sampled_from(["R1", "r1", "R2", "C1", "L1", "D1", "Q1", "M1", "V1", "X1", "0", "gnd",
                          "GND", "n1", "N1", "a", "1k", "4k7", "1M", "1meg", "-5", "0", "2u",
                          "1e20", "1x$", "LX", "lx", "NQ", "NF", "abc", ".model", "+5V"])
_BLANKS = st.sampled_from([" ", "  ", "\t", " \t "])


_NAMES = st.sampled_from(["R1", "r1", "R2", "C1", "L1", "D1", "d1", "Q1", "M1", "MQ2", "V1"])
_LAST = st.sampled_from(["1k", "4k7", "1M", "-5", "0", "1e20", "1e-9", "1x$", "abc", "LX", "lx",
                         "NQ", "NF", "n1"])


@st.composite
def _lines(draw: st.DrawFn) -> str:
    if draw(st.booleans()):  # an element-shaped line: name, nodes, value or model
        words = [draw(_NAMES), *draw(st.lists(_WORDS, min_size=1, max_size=4)), draw(_LAST)]
    else:
        words = draw(st.lists(_WORDS, min_size=1, max_size=7))
    blanks = [draw(_BLANKS) for _ in words]
    return draw(_BLANKS).lstrip(" ") + "".join(w + b for w, b in zip(words, blanks)).rstrip()


_MODELS = ".model LX D (IS=1e-20 N=2 RS=5)\n.model NQ NPN (BF=100)\n.model NF NMOS (VTO=2)\n"


@settings(max_examples=300, deadline=None)
@given(lines=st.lists(_lines(), min_size=1, max_size=8))
def test_random_plain_lines_read_the_same_with_and_without_the_shortcut(lines, tmp_path_factory):
    path = tmp_path_factory.mktemp("deck") / "deck.cir"
    _same_reading("title\n" + _MODELS + "\n".join(lines) + "\n.end\n", path)


@settings(max_examples=300, deadline=None)
@given(line=_lines())
def test_plain_card_tokens_are_the_regex_tokens(line: str) -> None:
    line = "X9 " + line  # (a line of its own, not a continuation or a comment)
    (card,) = spice_lines.read_cards(line, "f.cir", skip_title=False)
    segment = spice_lines._Segment(1, len(line) - len(line.lstrip()), line.lstrip())
    expected = spice_lines._card([segment], "f.cir")  # the general tokenizer
    assert card.words is not None
    assert card.tokens == expected.tokens
    assert card.keyword == expected.keyword
    assert card.location == expected.location
    assert [card.rest_text(i) for i in range(5)] == [expected.rest_text(i) for i in range(5)]
    assert [card.word_location(i) for i in range(len(card.tokens))] == \
        [token.location for token in expected.tokens]


@pytest.mark.parametrize("line", ["R1 a b 1k", "R1,a b 1k", "R1 a b {x}", "R1 a b r=1k",
                                  "R1 a b 1k\xa0", "V1 a 0 DC(5)", "R1 a b 'x'"])
def test_only_plain_lines_skip_the_tokenizer(line: str) -> None:
    (card,) = spice_lines.read_cards(line, "f.cir", skip_title=False)
    plain = all(c == "\t" or " " <= c <= "~" for c in line) and not set(line) & set(",(){}'\"=")
    assert (card.words is not None) == plain  # by the definition of a plain card
