"""linter.refs.natural_key (two string methods for the common designator, an unrolled split
for names with one or two digit runs, one loop otherwise) gives the
keys of its plain definition, written out here as the reference (our own former code: split on
digit runs, each run keyed by its length without leading zeros and its digits, each text
casefolded). Nothing is pasted from the tool's output.
"""

from __future__ import annotations

from hypothesis import example, given
from hypothesis import strategies as st

from linter.model import Circuit
from linter.refs import natural_key, split_key
from linter.topology_index import CircuitIndex
from plain_definitions import plain_key

_NAMEISH = st.text(alphabet=st.sampled_from("DRQdrS/_-.0123456789\u0661\u00df\u0130 "), max_size=12)


@given(st.text(max_size=16) | _NAMEISH)
@example("")
@example("D10")
@example("007")
@example("S2/R07")
@example("\u0661\u0662")  # Arabic-Indic digits: \d in both regexes
@example("Stra\u00dfe1")  # casefold changes the length
@example("R1a")
@example("G12_NB")  # one digit run inside: the unrolled three-chunk path
@example("12_nb")
@example("G1_N007")  # two digit runs: the unrolled five-chunk path
@example("1a2")
@example("S2/R7/X3")  # three runs: the loop
def test_natural_key_is_theplain_key(name: str) -> None:
    assert natural_key(name) == plain_key(name)


@given(st.text(max_size=16) | _NAMEISH)
@example("")
@example("D10")
@example("G12_N1")  # two runs: the five-chunk case
@example("G12_NB")  # one run inside
@example("+5V")
@example("GND")  # no run: natural_key's loop
@example("\u0661\u0662")
@example("S2/R7/X3")  # three runs
@example("G007_N00")
def test_split_key_is_theplain_key(name: str) -> None:
    assert split_key(name) == plain_key(name)


@given(st.lists(_NAMEISH, max_size=20))
def test_natural_key_sorts_as_theplain_key(names: list[str]) -> None:
    assert sorted(names, key=natural_key) == sorted(names, key=plain_key)


def test_topology_index_sorts_with_the_refs_key() -> None:
    # The index's cached sort key is this very function behind its memo.
    circuit = Circuit("x.cir", "spice", {}, {})
    index = CircuitIndex(circuit, {}, {})
    assert index.sort_key.__self__.compute is natural_key  # type: ignore[attr-defined]
    assert index.sort_key("R010") == plain_key("R010")
