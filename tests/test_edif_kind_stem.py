"""The EDIF reader works a part's kind out once per reference stem (the reference without its
final digits) and property reading. That rests on :func:`linter.kinds.infer_kind` giving the
same kind for two references with the same stem and the same texts; checked here against
``infer_kind`` itself (the plain path of our own code), and on read boards part by part.
"""

from __future__ import annotations

from pathlib import Path

from hypothesis import given, strategies as st

from linter.kinds import infer_kind
from linter.readers import read_netlist

ROOT = Path(__file__).resolve().parents[1]

_STEMS = st.text(alphabet="RDLEQCUSJ/1x_-ÄΩ", max_size=6)
_DIGITS = st.text(alphabet="0123456789", max_size=4)
_TEXTS = st.none() | st.sampled_from(["RED", "1N4148", "0", "10k", "NPN", "led", "green", "x"])


@given(_STEMS, _DIGITS, _DIGITS, _TEXTS, _TEXTS, _TEXTS)
def test_same_stem_same_kind(stem, first, second, value, part_number, cell):
    stem = stem.rstrip("0123456789")
    assert infer_kind(stem + first, value, part_number, None, None, cell) == \
        infer_kind(stem + second, value, part_number, None, None, cell)


def test_read_kinds_as_inferred_one_by_one():
    for path in [ROOT / "fixtures/demo/dust_extractor_panel.edif",
                 *sorted((ROOT / "fixtures").rglob("*.edif"))][:12]:
        if "bad" in path.parts:
            continue
        circuit = read_netlist(path)
        for ref, part in circuit.parts.items():
            found = infer_kind(ref, part.value, part.part_number,
                               part.properties.get("description"),
                               part.properties.get("package") or part.properties.get("footprint"),
                               part.cell)
            assert part.kind == found, (path, ref)
