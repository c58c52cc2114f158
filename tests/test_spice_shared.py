"""The SPICE reader's parts share equal pins, texts and the empty property table, and are
equal to parts made one by one.

Every expected value is the plain path of our own code: :func:`spice_parts._part`, which
makes each part on its own (its own pins, its own empty dict), on the same flattened deck.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.readers import spice_parts
from linter.readers.spice_deck import load_deck
from linter.readers.spice_flatten import flatten
from linter.readers.spice_parts import assemble, leaf_name
from linter.readers.spice_structure import structure_of

ROOT = Path(__file__).resolve().parents[1]


def _decks() -> list[Path]:
    found = [p for p in sorted((ROOT / "fixtures").rglob("*")) if p.suffix in (".cir", ".sp")]
    return [p for p in found if "bad" not in p.parts]


def _flat(path: Path, opaque: tuple[str, ...] = ()):
    deck = load_deck(path.read_text(encoding="utf-8"), path.name, path=path, root=path.parent)
    return flatten(structure_of(deck.title, deck.cards), opaque), deck.title


def _generated(tmp_path: Path) -> Path:
    import sys

    sys.path.insert(0, str(ROOT))
    try:
        from bench.gen_board import generate, write_all
    finally:
        sys.path.remove(str(ROOT))
    files = write_all(generate(400, seed=5), tmp_path)
    return Path(files.get("board.cir", tmp_path / "board.cir"))


def _check(path: Path, opaque: tuple[str, ...] = ()) -> None:
    flat, title = _flat(path, opaque)
    circuit = assemble(flat, path.name, title)
    net_names = {key: info.name for key, info in flat.nets.items()}
    refs = list(circuit.parts)
    assert len(refs) == len(flat.elements)
    for element, ref in zip(flat.elements, refs):
        plain = spice_parts._part(element, ref, leaf_name(element), net_names, {})
        shared = circuit.parts[ref]
        assert shared == plain
        assert shared.properties == plain.properties and shared.model == plain.model
    pins = {}
    for part in circuit.parts.values():
        for pin in part.pins:
            assert pins.setdefault((pin.name, pin.net), pin) is pin  # one object per pin
    empty = [p.properties for p in circuit.parts.values() if not p.properties]
    assert all(table is empty[0] for table in empty)


@pytest.mark.parametrize("path", _decks(), ids=lambda p: str(p.relative_to(ROOT)))
def test_fixture_decks_parts_as_made_one_by_one(path: Path) -> None:
    _check(path)


@pytest.mark.parametrize("opaque", [(), ("BM32",)])
def test_generated_board_parts_as_made_one_by_one(tmp_path: Path, opaque) -> None:
    _check(_generated(tmp_path), opaque)


@pytest.mark.parametrize("path", _decks()[:6], ids=lambda p: str(p.relative_to(ROOT)))
def test_released_elements_give_the_same_circuit(path: Path) -> None:
    # Reference: the same deck assembled without releasing its elements (our plain path).
    flat, title = _flat(path)
    kept = assemble(flat, path.name, title)
    flat, title = _flat(path)
    released = assemble(flat, path.name, title, release=True)
    assert released == kept
    assert list(released.parts.values()) == list(kept.parts.values())
    assert list(released.nets.values()) == list(kept.nets.values())
    assert all(element is None for element in flat.elements)
