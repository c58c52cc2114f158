"""ngspice as the reference for what a SPICE deck connects: our reading against its listing.

For every SPICE fixture (``fixtures/**/*.cir`` outside ``fixtures/bad``) ngspice flattens the
deck itself (``listing e`` in a ``.control`` block added to a temporary copy); we parse which
elements it has and which nodes each joins, and require our reading to be the same.

ngspice names a flattened element ``<letter>.<instance path>.<element>`` in lower case
(``r.x2.r3``) and an internal node ``<instance path>.<node>`` (``x2.n1``); ``gnd`` becomes
``0`` (checked by hand on ngspice 39). An instance we keep whole (empty subcircuit, or opaque
by request) has no elements in ngspice; so the copy replaces that subcircuit's body with one
probe resistor per port, ``R__probe<i> <port i> 0 1``, and the probe ``r.<path>.r__probe<i>``
tells which net ngspice joins to port ``i``. The copy is rewritten by plain text handling here,
independent of the reader under test.
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from linter.model import Circuit, Part
from linter.readers.spice import read_spice

pytestmark = pytest.mark.oracle

ROOT = Path(__file__).resolve().parents[2]
FIXTURES = sorted(path for path in (ROOT / "fixtures").glob("**/*.cir")
                  if "bad" not in path.relative_to(ROOT / "fixtures").parts)
OPAQUE_VARIANTS: dict[str, tuple[frozenset[str], ...]] = {
    "dust_extractor_panel.cir": (frozenset(), frozenset({"KM8C28"})),
    "subckt_params.cir": (frozenset(), frozenset({"led_channel"})),
    "with_include.cir": (frozenset(), frozenset({"indicator_red"})),
}
"""Which subcircuits to keep whole, per fixture (always also every empty one)."""

TIMEOUT_S = 60
_LISTING_LINE = re.compile(r"^\s*\d+\s*:\s(.*)$")
_NODE_COUNTS = {"r": 2, "c": 2, "l": 2, "d": 2, "v": 2, "i": 2, "b": 2, "f": 2, "h": 2,
                "e": 4, "g": 4, "m": 4, "j": 3}
"""Nodes per element letter as SPICE defines them (Q: 3, or 4 when a substrate is given)."""


def _joined_lines(text: str) -> list[list[str]]:
    """Physical lines grouped into logical lines (a '+' line continues the previous one)."""
    groups: list[list[str]] = []
    for line in text.splitlines():
        if line.lstrip().startswith("+") and groups:
            groups[-1].append(line)
        else:
            groups.append([line])
    return groups


def _is_element(group: list[str]) -> bool:
    first = group[0].strip()
    return bool(first) and not first.startswith(("*", ".", ";", "$"))


def _ports(group: list[str]) -> list[str]:
    words = " ".join([group[0]] + [line.lstrip()[1:] for line in group[1:]]).split(";")[0].split()
    ports = []
    for word in words[2:]:
        if word.casefold() in ("params:", "param:") or "=" in word:
            break
        ports.append(word)
    return ports


def _probe_bodies(text: str, keep_whole: frozenset[str]) -> str:
    """The text with the bodies of kept-whole (and of empty) subcircuits replaced by probes."""
    out: list[str] = []
    groups = _joined_lines(text)
    index = 0
    while index < len(groups):
        group = groups[index]
        words = group[0].split()
        if words and words[0].casefold() == ".subckt":
            end = next(i for i in range(index + 1, len(groups))
                       if groups[i][0].split()[:1] and groups[i][0].split()[0].casefold() == ".ends")
            body = groups[index + 1:end]
            if words[1].casefold() in keep_whole or not any(_is_element(g) for g in body):
                out.extend(group)
                out.extend(f"R__probe{n} {port} 0 1" for n, port in enumerate(_ports(group), 1))
                out.extend(groups[end])
                index = end + 1
                continue
        out.extend(group)
        index += 1
    return "\n".join(out) + "\n"


def ngspice_listing(deck: Path, keep_whole: frozenset[str], workdir: Path) -> list[list[str]]:
    """ngspice's expanded listing of ``deck`` as token lists (copy of the deck's folder in ``workdir``)."""
    if shutil.which("ngspice") is None:
        pytest.fail("ngspice is not installed: the SPICE oracle needs it (Debian package ngspice)")
    folded = frozenset(name.casefold() for name in keep_whole)
    copy = workdir / "deck"
    shutil.copytree(deck.parent, copy)
    for path in copy.iterdir():
        if path.suffix in (".cir", ".inc", ".lib") and path.is_file():
            path.write_text(_probe_bodies(path.read_text(), folded))
    top = copy / deck.name
    lines = top.read_text().splitlines()
    end = max(i for i, line in enumerate(lines) if line.strip().casefold() == ".end")
    lines[end:end] = [".control", "listing e", ".endc"]
    top.write_text("\n".join(lines) + "\n")
    run = subprocess.run(["ngspice", "-b", top.name], cwd=copy, capture_output=True, text=True,
                         timeout=TIMEOUT_S, check=False)
    listing = [m[1].split() for line in run.stdout.splitlines() if (m := _LISTING_LINE.match(line))]
    assert listing, f"ngspice gave no listing:\n{run.stdout}\n{run.stderr}"
    title = lines[0].casefold().split()
    return [words for words in listing if words != title]  # ngspice lists the title unless it starts with '*'


def ngspice_elements(listing: list[list[str]]) -> dict[str, tuple[str, ...]]:
    """Element name → its nodes, from ngspice's listing."""
    models = {words[1] for words in listing if words[0] == ".model"}
    elements: dict[str, tuple[str, ...]] = {}
    for words in listing:
        name = words[0]
        if name.startswith("."):
            continue
        letter = name[0]
        if letter == "q":
            count = 4 if len(words) > 5 and words[4] not in models else 3
        else:
            count = _NODE_COUNTS[letter]
        elements[name] = tuple(words[1:1 + count])
    return elements


def _spice_net(name: str | None) -> str:
    assert name is not None
    return name.replace("/", ".").casefold()


def _spice_path(part: Part) -> list[str]:
    segments = part.path.split("/")
    leaf = part.properties.get("spice_name", segments[-1])
    return [s.casefold() for s in [*segments[:-1], leaf]]


def our_elements(circuit: Circuit) -> dict[str, tuple[str, ...]]:
    """Our reading in ngspice's naming: flattened elements, and probes for parts kept whole."""
    elements: dict[str, tuple[str, ...]] = {}
    for part in circuit.parts.values():
        path = _spice_path(part)
        if not path[-1].startswith("x"):  # a SPICE element; an X instance here is kept whole
            elements[".".join([part.cell.casefold(), *path]) if len(path) > 1 else path[0]] = \
                tuple(_spice_net(pin.net) for pin in part.pins)
            continue
        for number, pin in enumerate(part.pins, start=1):
            elements[".".join(["r", *path, f"r__probe{number}"])] = (_spice_net(pin.net), "0")
    return elements


def _cases() -> list[tuple[Path, frozenset[str]]]:
    return [(path, opaque) for path in FIXTURES
            for opaque in OPAQUE_VARIANTS.get(path.name, (frozenset(),))]


def test_fixtures_found() -> None:
    # The folder holds the demo deck and the fixtures/spice decks (written alongside this test).
    assert any(path.name == "dust_extractor_panel.cir" for path in FIXTURES)
    assert len(FIXTURES) >= 5


@pytest.mark.parametrize(("deck", "opaque"), _cases(),
                         ids=lambda v: v.name if isinstance(v, Path) else "+".join(sorted(v)) or "flat")
def test_connectivity_matches_ngspice(deck: Path, opaque: frozenset[str], tmp_path: Path) -> None:
    listing = ngspice_listing(deck, opaque, tmp_path)
    circuit = read_spice(deck.read_text(), deck.name, path=deck, root=deck.parent, opaque=opaque)
    theirs = ngspice_elements(listing)
    ours = our_elements(circuit)
    assert sorted(ours) == sorted(theirs)
    for name in theirs:
        assert ours[name] == theirs[name], name


@pytest.mark.parametrize("deck", [p for p in FIXTURES if "{" in p.read_text()], ids=lambda p: p.name)
def test_parameter_values_match_ngspice(deck: Path, tmp_path: Path) -> None:
    # ngspice prints a resistor whose value was an expression with the evaluated number.
    listing = ngspice_listing(deck, frozenset(), tmp_path)
    circuit = read_spice(deck.read_text(), deck.name, path=deck, root=deck.parent)
    by_name = {".".join([p.cell.casefold(), *_spice_path(p)]) if "/" in p.path else _spice_path(p)[0]: p
               for p in circuit.parts.values() if not _spice_path(p)[-1].startswith("x")}
    compared = 0
    for words in listing:
        if words[0][0] == "r" and len(words) > 3 and re.fullmatch(r"[-+0-9.]+e[-+]\d+", words[3]):
            part = by_name[words[0]]
            assert part.value_si is not None
            assert math.isclose(part.value_si, float(words[3]), rel_tol=1e-12), words[0]
            compared += 1
    assert compared > 0
