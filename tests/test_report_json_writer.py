"""The JSON report's indented writer gives the standard library's bytes (json.dumps, indent=2)."""

import json

import pytest
from hypothesis import given, strategies as st

from linter.report.json import indented_json

_scalars = st.one_of(st.none(), st.booleans(), st.integers(),
                     st.floats(allow_nan=False, allow_infinity=False), st.text())
_plain = st.recursive(_scalars, lambda inner: st.one_of(
    st.lists(inner, max_size=4), st.dictionaries(st.text(), inner, max_size=4)), max_leaves=30)


@given(_plain)
def test_same_bytes_as_json_dumps(data):
    # expected: Python's json module (the reference encoder), same options as the reporter
    assert indented_json(data) == json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False)


def test_refuses_what_json_dumps_refuses():
    with pytest.raises(ValueError):
        indented_json({"x": float("nan")})
    with pytest.raises(TypeError):
        indented_json({"x": {1, 2}})
