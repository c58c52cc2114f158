"""The BOM reader's fast tokenizer (one regex match a cell of a plain shape) against its plain
twin (character by character), and the reference-cell reader against its plain formula.

Expected values: the plain path of our own code (``_tokenize_plain``; the regex-and-split
formula ``expand_references`` used before its "-"-free tokens skipped the range match).
"""

from __future__ import annotations

import re

import pytest
from hypothesis import given, settings, strategies as st

from linter.errors import BomError
from linter.readers.bom import (_expand_token, _tokenize, _tokenize_plain, expand_references,
                                parse_bom)


def _rows(tokenizer, text: str, delimiter: str):
    """Every row as (text, line, column) triples, or the error text where one is raised; the
    rows yielded before the error are kept (the reader consumes rows as they come)."""
    rows = []
    try:
        for row in tokenizer(text, "t.csv", delimiter):
            rows.append([(cell.text, cell.line, cell.column) for cell in row])
    except BomError as error:
        rows.append(str(error))
    return rows


PIECES = st.sampled_from(['"', '""', ",", ";", "\t", " ", "\r", "\n", "\r\n", "R1", "a", "é"])


@settings(max_examples=400)
@given(st.lists(PIECES, max_size=30), st.sampled_from([",", ";", "\t"]))
def test_fast_tokenizer_gives_the_plain_cells(pieces, delimiter):
    text = "".join(pieces)
    assert _rows(_tokenize, text, delimiter) == _rows(_tokenize_plain, text, delimiter)


@pytest.mark.parametrize("text", [
    'Ref,Value\n"R1, R2",1k\n',                  # a quoted list
    'Ref,Value\r\n"R1,\nR2","a ""b"" c"\r\nR3,x',  # a cell across lines, doubled quotes, CRLF
    'Ref,Value\n""\n',                            # an empty quoted cell alone on a line
    'Ref,Value\n""',                              # ... and at the very end
    'Ref,Value\n,',                               # a last row of empty cells
    'Ref,Value\n  "R1",x\n"R2"y,z\n',             # a quote after blanks, text after a quote
    'Ref,Value\nR1,"never closed\nR2,x\n',        # an unclosed quote: located error
    'Ref,Value\nR"1,x\n\n\rR2,y',                 # a quote inside a cell, a lone CR
])
def test_fast_tokenizer_gives_the_plain_cells_by_hand(text):
    assert _rows(_tokenize, text, ",") == _rows(_tokenize_plain, text, ",")


def test_unclosed_quote_after_good_rows_is_located():
    # the plain path says where the quote opened: line 3, column 4
    with pytest.raises(BomError) as caught:
        parse_bom('Ref,Value\nR1,1k\nR2,"1k\nR3,2k\n', "q.csv")
    assert str(caught.value).startswith("q.csv:3:4: quoted cell never closes")


def _plain_expand(cell: str) -> tuple[str, ...]:
    """expand_references as it was written before the fast path (the plain formula)."""
    normal = re.sub(r"\s*[-\u2013\u2014]\s*", "-", cell.strip())
    refs: list[str] = []
    for token in re.split(r"[,;\s]+", normal):
        if token:
            refs.extend(_expand_token(token, "<bom>", 1, 1))
    return tuple(refs)


@given(st.lists(st.sampled_from(["R", "D", "1", "4", "12", "-", " - ", "\u2013", ",", "; ",
                                 " ", "\t", "/", "S2/R"]), max_size=12))
def test_reference_cells_as_the_plain_formula(pieces):
    cell = "".join(pieces)
    try:
        expected: object = _plain_expand(cell)
    except BomError as error:
        expected = str(error)
    try:
        found: object = expand_references(cell)
    except BomError as error:
        found = str(error)
    assert found == expected
