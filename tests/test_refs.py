"""Folding and natural order of reference designators (linter.refs)."""

from __future__ import annotations

import re

from hypothesis import given
from hypothesis import strategies as st

from linter.refs import MIN_RUN, RANGE_DASH, fold_refs, natural_key, natural_sorted


def test_natural_order_reads_numbers_as_numbers() -> None:
    # Expected order: common practice (designators are read with numbers as numbers).
    assert natural_sorted(["D10", "D2", "D1", "C3", "R100", "R20"]) == \
        ["C3", "D1", "D2", "D10", "R20", "R100"]


def test_natural_order_drops_repeats_and_ignores_case_of_letters() -> None:
    # Expected: the set of inputs, letters compared without case (common practice).
    assert natural_sorted(["r2", "R1", "R1"]) == ["R1", "r2"]


def test_hierarchical_paths_sort_by_sheet_then_part() -> None:
    # Expected: sheet S2 after S1, and within a sheet by part number (common practice).
    assert natural_sorted(["S2/R7", "S10/R1", "S1/R12", "S1/R7"]) == \
        ["S1/R7", "S1/R12", "S2/R7", "S10/R1"]


def test_run_of_three_folds_with_an_en_dash() -> None:
    # Expected: the folding convention of DESIGN.md's example ("D1–D12"), written by hand.
    assert fold_refs(["D1", "D2", "D3"]) == "D1\u2013D3"


def test_long_run_and_separate_parts() -> None:
    # Expected: written by hand from the definition (runs of 3 or more fold).
    refs = [f"D{n}" for n in range(1, 13)] + ["R6", "Q1"]
    assert fold_refs(refs) == "D1\u2013D12, Q1, R6"


def test_run_of_two_stays_a_list() -> None:
    # Expected: written by hand; a range of two hides a part for no gain.
    assert fold_refs(["D8", "D7"]) == "D7, D8"


def test_gap_splits_runs() -> None:
    # Expected: written by hand (D4 missing splits D1–D3 from D5–D7).
    assert fold_refs(["D1", "D2", "D3", "D5", "D6", "D7"]) == "D1\u2013D3, D5\u2013D7"


def test_different_prefixes_never_fold_together() -> None:
    # Expected: written by hand; R3 does not continue the D run.
    assert fold_refs(["D1", "D2", "R3", "D3"]) == "D1\u2013D3, R3"


def test_hierarchical_runs_fold_within_a_sheet() -> None:
    # Expected: written by hand; S1/R1..S1/R3 is one run, S2/R4 is another sheet.
    assert fold_refs(["S1/R1", "S1/R2", "S1/R3", "S2/R4"]) == "S1/R1\u2013S1/R3, S2/R4"


def test_leading_zeros_and_unnumbered_designators_stay_whole() -> None:
    # Expected: written by hand; "D01" is not the number after "D0" as a designator reads.
    assert fold_refs(["D0", "D01", "D2", "LED_A", "TP"]) == "D0, D01, D2, LED_A, TP"


def test_empty() -> None:
    assert fold_refs([]) == ""


_REF = st.builds(lambda letter, number: f"{letter}{number}",
                 st.sampled_from(["D", "R", "Q", "S1/R"]), st.integers(0, 40))
_RANGE = re.compile(rf"^(?P<prefix>.*?)(?P<low>\d+){RANGE_DASH}(?P=prefix)(?P<high>\d+)$")


def _expand(folded: str) -> list[str]:
    """Undo folding: ``D1–D3`` back to D1, D2, D3 (the inverse, written for the test)."""
    refs: list[str] = []
    for piece in filter(None, folded.split(", ")):
        match = _RANGE.match(piece)
        if match:
            low, high = int(match["low"]), int(match["high"])
            assert high - low + 1 >= MIN_RUN
            refs.extend(f"{match['prefix']}{n}" for n in range(low, high + 1))
        else:
            refs.append(piece)
    return refs


@given(st.lists(_REF, max_size=40))
def test_folding_loses_and_invents_nothing(refs: list[str]) -> None:
    # Expected: expanding the folded text gives back exactly the sorted set (a round trip).
    assert _expand(fold_refs(refs)) == natural_sorted(refs)


@given(st.lists(_REF, max_size=20))
def test_natural_key_is_a_total_order(refs: list[str]) -> None:
    # Sorting twice from different starting orders gives one answer.
    assert sorted(refs, key=natural_key) == sorted(reversed(refs), key=natural_key)
