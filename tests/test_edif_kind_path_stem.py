"""The EDIF reader shares a part's kind and value reading between references whose last
path element has the same stem (``S2/R7`` and ``S5/R12``: stem ``R``), not only between
equal whole stems. That rests on :func:`linter.kinds.infer_kind` reading only the letters
that start the last path element; checked here against ``infer_kind`` itself (the plain path
of our own code), and on a generated hierarchical board, whose repeated sheets name parts by
path, part by part.
"""

from __future__ import annotations

import sys
from pathlib import Path

from hypothesis import given, strategies as st

from linter.kinds import infer_kind
from linter.readers.edif import _stem, read_edif

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate  # noqa: E402
from bench.write_edif import write_hier_edif  # noqa: E402

_PATHS = st.text(alphabet="SRDQ/12x_", max_size=6)
_ELEMENTS = st.text(alphabet="RDLEQCUSJx_-ÄΩ", max_size=5)
_DIGITS = st.text(alphabet="0123456789", max_size=4)
_TEXTS = st.none() | st.sampled_from(["RED", "1N4148", "0", "10k", "NPN", "led", "green", "x"])


@given(_PATHS, _PATHS, _ELEMENTS, _DIGITS, _DIGITS, _TEXTS, _TEXTS, _TEXTS)
def test_same_last_element_stem_same_kind(first_path, second_path, element, first, second,
                                          value, part_number, cell):
    one, other = f"{first_path}/{element}{first}", f"{second_path}/{element}{second}"
    assert _stem(one) == _stem(other) == element  # (the element holds no digits)
    assert infer_kind(one, value, part_number, None, None, cell) == \
        infer_kind(other, value, part_number, None, None, cell)


def test_stem_is_the_last_element_without_final_digits():
    # by hand: the path and the number go, letters and inner digits stay
    assert [_stem(ref) for ref in ("S2/LED10", "R7", "S1/S4/Q2A3", "X/", "D")] == \
        ["LED", "R", "Q2A", "", "D"]


def test_hierarchical_board_kinds_as_inferred_one_by_one(tmp_path: Path):
    write_hier_edif(generate(600, 3), tmp_path / "hier.edif")
    circuit = read_edif((tmp_path / "hier.edif").read_text(encoding="utf-8"), "hier.edif")
    assert any("/" in ref for ref in circuit.parts)  # parts named by path are read
    for ref, part in circuit.parts.items():
        assert part.kind == infer_kind(ref, part.value, part.part_number,
                                       part.properties.get("description"),
                                       part.properties.get("package")
                                       or part.properties.get("footprint"), part.cell), ref
