"""fixes_sink._figures remembers a transistor record's filled figures by the record object;
each answer must be the plain one (``_figures_plain``), asked first or again.

Expected values: ``fixes_sink._figures_plain``, the plain path of our own code; the records
are invented (gains and voltages of an everyday small-signal NPN, from memory).
"""

from __future__ import annotations

import pytest

from linter import fixes_sink
from linter.partdata import BjtData

RECORDS = [
    None,
    BjtData("npn"),
    BjtData("npn", hfe_min=120.0, vbe=0.65, assumed=("vce_sat",)),
    BjtData("npn", hfe_min=300.0, hfe_typ=150.0, vbe=0.7, vce_sat=0.1),  # typ below min
    BjtData("npn", hfe_min=100.0, hfe_typ=200.0, vbe=0.7, vce_sat=0.2, part_number="TN1"),
]


def test_remembered_figures_are_the_plain_ones():
    fixes_sink._FIGURES.clear()
    for _ in range(2):  # asked first, then again
        for record in RECORDS:
            assert fixes_sink._figures(record) == fixes_sink._figures_plain(record)
    assert len(fixes_sink._FIGURES) == len(RECORDS)


def test_an_equal_record_of_its_own_is_asked_afresh():
    fixes_sink._FIGURES.clear()
    first, second = BjtData("npn", vbe=0.6), BjtData("npn", vbe=0.6)
    assert fixes_sink._figures(first) == fixes_sink._figures(second)
    assert len(fixes_sink._FIGURES) == 2


def test_a_pnp_is_refused_each_time():
    fixes_sink._FIGURES.clear()
    for _ in range(2):
        with pytest.raises(ValueError):
            fixes_sink._figures(BjtData("pnp"))
    assert not fixes_sink._FIGURES


def test_the_memory_starts_again_past_its_size(monkeypatch):
    monkeypatch.setattr(fixes_sink, "_FIGURES_KEPT", 2)
    fixes_sink._FIGURES.clear()
    for record in RECORDS[1:]:
        assert fixes_sink._figures(record) == fixes_sink._figures_plain(record)
    assert 0 < len(fixes_sink._FIGURES) <= 2
