"""Forms read whole (linter.readers.edif_compound) against the same forms read token by token.

The expected value of every check here is our own plain path: the circuit read with no
compound forms at all (``sexpr.parse`` without ``compounds``), which the other EDIF tests
check against spydrnet and hand-counted positions. Each case also asserts that compound forms
were really matched, so a pattern that silently stopped matching would fail.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from linter import limits
from linter.errors import NetlistError
from linter.readers import edif
from linter.readers.edif_compound import PATTERN, TOKEN_GROUP, EdifCompounds
from linter.readers.sexpr import parse

ROOT = Path(__file__).resolve().parent.parent
FIXTURES = sorted(p for p in ROOT.glob("fixtures/**/*.edif") if "bad" not in p.parts)


def compound_count(text: str) -> int:
    return sum(1 for match in PATTERN.finditer(text) if match.lastindex != TOKEN_GROUP)


def plain(text: str, source: str = "t.edif"):
    return edif._circuit(parse(text, source))


def whole(text: str, source: str = "t.edif"):
    """The reading with compound forms and no second reading on an error (which would hide
    a compound form that the rest of the reader mishandles)."""
    return edif._circuit(parse(text, source, EdifCompounds()))


def assert_same(text: str, source: str = "t.edif") -> None:
    fast, slow = whole(text, source), plain(text, source)
    assert list(fast.parts) == list(slow.parts) and list(fast.nets) == list(slow.nets)
    assert fast.parts == slow.parts and fast.nets == slow.nets and fast.design == slow.design


@pytest.mark.parametrize("path", FIXTURES, ids=lambda p: p.name)
def test_fixtures_read_the_same_with_and_without_compound_forms(path: Path) -> None:
    text = path.read_text(encoding="utf-8")
    assert compound_count(text) > 0
    assert_same(text, str(path))


def board(instances: str, nets: str) -> str:
    return f"""(edif t (edifVersion 2 0 0) (edifLevel 0) (keywordMap (keywordLevel 0))
 (external P (edifLevel 0) (technology (numberDefinition))
  (cell RES (cellType GENERIC) (view netlist (viewType NETLIST)
   (interface (port (rename &1 "1")) (port (rename &2 "2")))))
  (cell LED (cellType GENERIC) (view netlist (viewType NETLIST)
   (interface (port A) (port K)))))
 (library L (edifLevel 0) (technology (numberDefinition))
  (cell RESL (cellType GENERIC) (view netlist (viewType NETLIST)
   (interface (port (rename &1 "1")) (port (rename &2 "2")))))
  (cell TOP (cellType GENERIC) (view netlist (viewType NETLIST)
   (interface (port VIN))
   (contents
{instances}
{nets}))))
 (design T (cellRef TOP (libraryRef L))))
"""


SPELLINGS = [
    # plain, with every keyword in another case
    ('(instance R1 (viewRef netlist (cellRef RES (libraryRef P))) (property value (string "330")))',
     '(net A (joined (portRef VIN) (portRef &1 (instanceRef R1))))'),
    ('(INSTANCE r1 (VIEWREF NETLIST (CELLREF res (LIBRARYREF p))) (PROPERTY Value (STRING "330")))',
     '(NET a (JOINED (PORTREF vin) (PORTREF &1 (INSTANCEREF R1))))'),
    # renamed names, a renamed property, a designator, %n% escapes, no libraryRef
    ('(instance (rename r_1 "R%49%") (viewRef netlist (cellRef RESL)) (designator "R9")'
     ' (property (rename part_no "Part Number") (string "X%37%Y")) (designator "R8"))',
     '(net (rename &_5V "+5V") (joined (portRef VIN) (portRef &1 (instanceRef r_1))))'),
    # a keyword with a letter that folds to an ASCII one only outside ASCII (long s) is no
    # keyword to the form reader (its value is dropped): not read whole either
    ('(instance R1 (viewRef netlist (cellRef RES (libraryRef P))) (property value (\u017ftring "330")))',
     '(net A (joined (portRef VIN) (portRef &1 (instanceRef R1))))'),
    # a later property of the same name wins; an empty designator; tight spacing
    ('(instance R1(viewRef netlist(cellRef RES(libraryRef P)))(property value(string"1k"))'
     '(property value (string "2k2"))(designator ""))',
     '(net A(joined(portRef VIN)(portRef &1(instanceRef R1))))'),
]


@pytest.mark.parametrize("instance, net", SPELLINGS)
def test_spellings_read_the_same(instance: str, net: str) -> None:
    text = board(instance + "\n(instance D1 (viewRef netlist (cellRef LED (libraryRef P))))",
                 net + "\n(net B (joined (portRef &2 (instanceRef R1)) (portRef A (instanceRef D1))))"
                 "\n(net C (joined (portRef K (instanceRef D1)) (portRef VIN)))")
    text = text.replace("(instanceRef R1)", "(instanceRef r_1)") if "r_1" in instance else text
    assert compound_count(text) >= 4
    assert_same(text)


def test_forms_outside_the_compound_grammar_are_read_token_by_token() -> None:
    # a number-typed property and a member port reference are not compound forms
    text = board('(instance R1 (viewRef netlist (cellRef RES (libraryRef P)))'
                 ' (property power (number (e 25 -2))))\n'
                 '(instance R2 (viewRef netlist (cellRef RES (libraryRef P))))',
                 '(net A (joined (portRef VIN) (portRef &1 (instanceRef R1))))\n'
                 '(net B (joined (portRef &2 (instanceRef R1)) (portRef &1 (instanceRef R2))))\n'
                 '(net C (joined (portRef &2 (instanceRef R2)) (portRef VIN)))')
    assert edif.read_edif(text, "t.edif").parts["R1"].properties["power"] == "0.25"  # 25e-2
    assert_same(text)


def error_of(read, text: str) -> str:
    with pytest.raises(NetlistError) as caught:
        read(text, "t.edif")
    return str(caught.value)


@pytest.mark.parametrize("instances, nets", [
    # duplicate instance names, both read whole
    ('(instance R1 (viewRef netlist (cellRef RES (libraryRef P))))\n'
     '(instance R1 (viewRef netlist (cellRef RES (libraryRef P))))', ''),
    # an unknown instance and an unknown port in compound port references
    ('(instance R1 (viewRef netlist (cellRef RES (libraryRef P))))',
     '(net A (joined (portRef VIN) (portRef &1 (instanceRef R7))))'),
    ('(instance R1 (viewRef netlist (cellRef RES (libraryRef P))))',
     '(net A (joined (portRef VIN) (portRef &3 (instanceRef R1))))'),
    # a compound form where a string is expected: the message shows the form as a list
    ('(instance R1 (viewRef netlist (cellRef RES (libraryRef P)))'
     ' (property value (string (portRef X))))', ''),
])
def test_errors_are_word_for_word_those_of_the_plain_reading(instances: str, nets: str) -> None:
    text = board(instances, nets)
    assert error_of(edif.read_edif, text) == error_of(plain, text)


def test_a_compound_form_as_the_whole_file_is_refused_as_not_edif() -> None:
    assert error_of(edif.read_edif, "(portRef A)") == \
        "t.edif:1:1: not an EDIF netlist: expected '(edif' at the start, found '(portRef'"


@pytest.mark.parametrize("depth", [6, 7, 8, 9, 12, 16])
def test_compound_forms_near_the_nesting_limit_read_as_without_them(depth: int) -> None:
    # instances sit 6 lists deep (edif, library, cell, view, contents); their forms nest 4
    # more: with the limit anywhere around there, both readings refuse or accept alike
    text = board('(instance R1 (viewRef netlist (cellRef RES (libraryRef P))))\n'
                 '(instance R2 (viewRef netlist (cellRef RES (libraryRef P))))',
                 '(net A (joined (portRef VIN) (portRef &1 (instanceRef R1))))\n'
                 '(net B (joined (portRef &2 (instanceRef R1)) (portRef &1 (instanceRef R2))))\n'
                 '(net C (joined (portRef &2 (instanceRef R2)) (portRef VIN)))')
    with limits.applied(limits.Limits(max_nesting=depth)):
        try:
            slow = plain(text)
        except NetlistError as problem:
            assert error_of(edif.read_edif, text) == str(problem)
        else:
            fast = whole(text)
            assert fast.parts == slow.parts and fast.nets == slow.nets


def test_the_same_reading_twice_in_one_process() -> None:
    # shared property readings are keyed by the records' identity while they live; a second
    # reading (new records, possibly at reused addresses) must not see the first one's
    text = (ROOT / "fixtures" / "demo" / "dust_extractor_panel.edif").read_text(encoding="utf-8")
    first = edif.read_edif(text, "a.edif")
    second = edif.read_edif(text.replace('"330"', '"331"'), "a.edif")
    assert first.parts == plain(text, "a.edif").parts
    assert second.parts == plain(text.replace('"330"', '"331"'), "a.edif").parts


def _nets_pairs(text: str) -> list[tuple[list, list]]:
    from linter.readers.edif_compound import _PAIR, _PAIRS

    return [(_PAIRS(match.group(13)), _PAIR.findall(match.group(13)))
            for match in PATTERN.finditer(text) if match.lastindex == 9]


@pytest.mark.parametrize("instance, net", SPELLINGS)
def test_pairs_of_a_net_read_whole_are_the_strict_pattern_s(instance: str, net: str) -> None:
    # expected: _PAIR, the strict port-reference pattern (the plain path of our own code)
    found = _nets_pairs(board(instance, net + "\n(net b (joined (PortRef &2 (InstanceRef R1))"
                                              "\t(portRef\nK  (instanceRef\r\nD1 ) ) ))"))
    assert len(found) == 2
    for fast, strict in found:
        assert fast == strict


def test_pairs_of_the_fixtures_nets_are_the_strict_pattern_s() -> None:
    # expected: _PAIR, as above
    found = [pair for path in FIXTURES for pair in _nets_pairs(path.read_text(encoding="utf-8"))]
    assert len(found) > 30
    for fast, strict in found:
        assert fast == strict
