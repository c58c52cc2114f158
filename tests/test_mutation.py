"""Byte mutations of valid inputs: a reader returns a result or raises one located InputError.

Hypothesis flips, inserts, deletes and splices bytes of small valid fixtures and runs each
reader in-process (and the whole CLI on netlists). The only outcomes allowed are a normal
result or an :class:`~linter.errors.InputError` whose text is one line ``FILE[:LINE[:COL]]:
message``; any other exception is a bug (each one found became a corpus fixture with its fix,
see fixtures/bad/MANIFEST.toml). Bounded: about a minute for the whole module.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from linter.cli import main
from linter.config import read_parts_file, settings_from_text
from linter.errors import InputError
from linter.readers import decode_text, read_netlist
from linter.readers.bom import parse_bom

ROOT = Path(__file__).resolve().parents[1]
CORPUS = ROOT / "fixtures" / "bad" / "corpus"
SEEDS = {
    "edif": (CORPUS / "board.edif").read_bytes(),
    "spice": (ROOT / "fixtures" / "spice" / "subckt_params.cir").read_bytes(),
    "bom": (ROOT / "fixtures" / "demo" / "bom.csv").read_bytes(),
    "settings": (CORPUS / "ledlint.toml").read_bytes(),
}
LOCATED = re.compile(r"^[^\n]+?(:\d+(:\d+)?)?: [^\n]+$")
"""``FILE:LINE:COL: message``, ``FILE:LINE: message`` or ``FILE: message``; one line."""
BOUNDED = settings(max_examples=1000, deadline=None, derandomize=True,
                   suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])


@st.composite
def mutated(draw: st.DrawFn, seed: bytes) -> bytes:
    """``seed`` after one to four edits: flip a byte, insert bytes, delete a span, splice."""
    data = bytearray(seed)
    for _ in range(draw(st.integers(1, 4))):
        where = draw(st.integers(0, max(len(data) - 1, 0)))
        edit = draw(st.sampled_from(["flip", "insert", "delete", "splice", "repeat"]))
        if edit == "flip" and data:
            data[where] ^= 1 << draw(st.integers(0, 7))
        elif edit == "insert":
            data[where:where] = draw(st.binary(min_size=1, max_size=8)
                                     | st.sampled_from([b"(", b")", b'"', b"{", b"}", b"\n+", b"\r",
                                                        b"\x00", b"\xff", b",", b"=", b"[", b"]"]))
        elif edit == "delete":
            del data[where:where + draw(st.integers(1, 64))]
        elif edit == "splice":
            start = draw(st.integers(0, len(seed)))
            data[where:where] = seed[start:start + draw(st.integers(1, 200))]
        elif edit == "repeat":
            data[where:where] = bytes(data[where:where + 16]) * draw(st.integers(2, 50))
    return bytes(data)


def _assert_located(error: InputError) -> None:
    text = str(error)
    assert LOCATED.match(text), text
    assert "\n" not in text and "\r" not in text


@BOUNDED
@given(data=st.data())
@pytest.mark.parametrize("fmt", ["edif", "spice"])
def test_mutated_netlist_reads_or_fails_located(fmt: str, data: st.DataObject,
                                                tmp_path: Path) -> None:
    path = tmp_path / ("board.edif" if fmt == "edif" else "deck.cir")
    path.write_bytes(data.draw(mutated(SEEDS[fmt])))
    try:
        read_netlist(path, source=path.name)
    except InputError as error:
        _assert_located(error)


@BOUNDED
@given(data=st.data())
def test_mutated_bom_reads_or_fails_located(data: st.DataObject) -> None:
    raw = data.draw(mutated(SEEDS["bom"]))
    try:
        parse_bom(decode_text(raw, "bom.csv"), "bom.csv")
    except InputError as error:
        _assert_located(error)


@BOUNDED
@given(data=st.data())
def test_mutated_settings_read_or_fail_located(data: st.DataObject, tmp_path: Path) -> None:
    raw = data.draw(mutated(SEEDS["settings"]))
    try:
        settings_from_text(decode_text(raw, "ledlint.toml"))
    except InputError as error:
        _assert_located(error)
    parts = tmp_path / "parts.toml"
    parts.write_bytes(raw.replace(b"[rails]", b"[parts.X]\nkind='led'"))
    try:
        read_parts_file(parts, "parts.toml")
    except InputError as error:
        _assert_located(error)


@settings(max_examples=150, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(data=st.data())
@pytest.mark.parametrize("fmt", ["edif", "spice"])
def test_mutated_netlist_through_the_whole_check(fmt: str, data: st.DataObject, tmp_path: Path,
                                                 capsys: pytest.CaptureFixture[str]) -> None:
    # the CLI in-process: topology, solver, rules and the JSON report on whatever still reads
    seed = SEEDS["edif"] if fmt == "edif" else (CORPUS / "board.cir").read_bytes()
    path = tmp_path / ("board.edif" if fmt == "edif" else "board.cir")
    path.write_bytes(data.draw(mutated(seed)))
    (tmp_path / "ledlint.toml").write_bytes(SEEDS["settings"])
    code = main(["check", str(path), "--format", "json"])
    out, err = capsys.readouterr()
    assert code in (0, 1, 2)
    if code == 2:
        assert out == "" and err.count("\n") == 1 and LOCATED.match(err.rstrip("\n")), err
    else:
        assert err == "" and out.startswith("{")
