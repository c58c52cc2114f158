"""A walked design's pins made for all parts at once (``edif._leaf_pins``: every pin node taken
up its union–find tree by built-in passes) against the plain twin, ``_PartMaker.pins_of``
part by part (``edif._parts(..., bulk_pins=False)``); and the (part, pin) pairs of each net
gathered by built-in passes (``edif._joined``) against the loop (``edif._joined_plain``).

The expected value is our own plain path; the other EDIF tests hold it to spydrnet and
hand-made cases. Circuits are compared part by part and net by net (pins, places as stored,
order); equal pins are one object either way. The round limit is also set to 0 and 1, so
that the one-by-one finish of deep trees is read as well.
"""

from __future__ import annotations

import sys
from functools import partial
from pathlib import Path

import pytest

from linter.model import stored_location
from linter.readers import edif
from linter.readers.edif_compound import EdifCompounds
from linter.readers.sexpr import parse

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate  # noqa: E402
from bench.write_edif import write_hier_edif  # noqa: E402

FIXTURES = sorted(p for p in ROOT.glob("fixtures/**/*.edif") if "bad" not in p.parts)


def _walked(text: str, bulk: bool, monkeypatch: pytest.MonkeyPatch):
    with monkeypatch.context() as patch:
        patch.setattr(edif, "_parts", partial(edif._parts, bulk_pins=bulk))
        doc = parse(text, "t.edif", EdifCompounds())
        return edif._circuit(doc, direct=False)


def _rows(circuit) -> tuple:
    parts = [(ref, part, part.pins, stored_location(part)) for ref, part in circuit.parts.items()]
    nets = [(name, net, net.pins, stored_location(net)) for name, net in circuit.nets.items()]
    shared = len({id(pin) for part in circuit.parts.values() for pin in part.pins})
    return parts, nets, shared


def assert_same(text: str, monkeypatch: pytest.MonkeyPatch) -> None:
    bulk, plain = _walked(text, True, monkeypatch), _walked(text, False, monkeypatch)
    assert _rows(bulk) == _rows(plain)


@pytest.mark.parametrize("path", FIXTURES, ids=lambda p: p.name)
def test_fixtures(path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    assert_same(path.read_text(encoding="utf-8"), monkeypatch)


@pytest.mark.parametrize("rounds", [0, 1, edif._ROUNDS])
def test_generated_hierarchical_board(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                      rounds: int) -> None:
    write_hier_edif(generate(900, 4), tmp_path / "hier.edif")
    monkeypatch.setattr(edif, "_ROUNDS", rounds)
    text = (tmp_path / "hier.edif").read_text(encoding="utf-8")
    assert_same(text, monkeypatch)
    assert any("/" in ref for ref in _walked(text, True, monkeypatch).parts)  # sheets placed


def _assert_joined_as_plain(circuit) -> None:
    names = dict(enumerate(circuit.nets))
    bulk, plain = edif._joined(circuit.parts, names), edif._joined_plain(circuit.parts, names)
    assert list(bulk) == list(plain) == list(circuit.nets)
    assert {name: list(pairs) for name, pairs in bulk.items()} == plain
    assert all(type(pairs) is tuple for pairs in bulk.values())


@pytest.mark.parametrize("path", FIXTURES, ids=lambda p: p.name)
def test_joined_pairs_of_the_fixtures(path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    _assert_joined_as_plain(_walked(path.read_text(encoding="utf-8"), True, monkeypatch))


def test_joined_pairs_of_a_generated_hierarchical_board(tmp_path: Path,
                                                        monkeypatch: pytest.MonkeyPatch) -> None:
    write_hier_edif(generate(900, 4), tmp_path / "hier.edif")
    circuit = _walked((tmp_path / "hier.edif").read_text(encoding="utf-8"), True, monkeypatch)
    _assert_joined_as_plain(circuit)


def test_joined_pairs_by_hand() -> None:
    # made up: an unconnected pin, a net without pins, pins listed out of net order
    from linter.model import Part, Pin, SourceLocation

    here = SourceLocation("t.edif", 1, 1)
    parts = {"R1": Part("R1", "resistor", "1k", (Pin("1", "B"), Pin("2", None)), here),
             "D1": Part("D1", "led", None, (Pin("A", "A"), Pin("K", "B")), here)}
    names = {7: "A", 3: "B", 9: "C"}
    expected = {"A": (("D1", "A"),), "B": (("R1", "1"), ("D1", "K")), "C": ()}
    assert edif._joined(parts, names) == expected
    assert {name: tuple(pairs) for name, pairs in edif._joined_plain(parts, names).items()} \
        == expected
