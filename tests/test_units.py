"""Engineering values: every documented spelling, RKM against SI, format-then-parse round trips."""

from __future__ import annotations

import math

import pytest
from hypothesis import assume, given, strategies as st

from linter.units import (ValueParseError, format_si, parse_fraction, parse_number,
                          parse_quantity, parse_temperature, parse_with_tolerance)


@pytest.mark.parametrize("text, unit, expected", [
    # the spellings listed in linter/units.py's docstring; values by SI prefix and IEC 60062
    ("4700", "Ω", 4700.0), ("4.7k", "Ω", 4700.0), ("2.2M", "Ω", 2.2e6), ("100n", "F", 1e-7),
    ("10µ", "F", 1e-5), ("4k7", "Ω", 4700.0), ("2R2", "Ω", 2.2), ("R47", "Ω", 0.47),
    ("1M0", "Ω", 1e6), ("330R", "Ω", 330.0), ("10kOhm", "Ω", 1e4), ("150 Ω", "Ω", 150.0),
    ("0.1 W", "W", 0.1), ("20 mA", "A", 0.02), ("5 V", "V", 5.0), ("1/4W", "W", 0.25),
    ("4K7", "Ω", 4700.0), ("10uF", "F", 1e-5), ("250mW", "W", 0.25),
])
def test_documented_spellings(text, unit, expected):
    assert parse_number(text, unit) == pytest.approx(expected, rel=1e-12)


def test_percent_temperature_and_tolerance_spellings():
    assert parse_fraction("60%") == pytest.approx(0.6)  # docstring: 60% read as 0.6
    assert parse_temperature("-10 degC") == -10.0
    assert parse_quantity("60 °C", "°C") == 60.0
    assert parse_with_tolerance("5 V ±5%", "V") == (5.0, 0.05)
    value, tolerance = parse_with_tolerance("12 V +/-10%", "V")
    assert (value, tolerance) == (12.0, pytest.approx(0.1))
    assert parse_with_tolerance("5 V", "V") == (5.0, None)


@pytest.mark.parametrize("text, unit", [("5 V", "A"), ("abc", "Ω"), ("", None), ("4k7k", "Ω"),
                                        ("1/0W", "W"), ("nan", None), ("1e999", None)])
def test_refused(text, unit):
    with pytest.raises(ValueParseError):
        parse_number(text, unit)


_LETTERS = {"R": "", "k": "k", "K": "k", "M": "M", "m": "m", "u": "u", "n": "n", "p": "p"}


@given(st.integers(min_value=0, max_value=999), st.integers(min_value=0, max_value=999),
       st.sampled_from(sorted(_LETTERS)))
def test_rkm_and_si_spellings_agree(whole, fraction, letter):
    # IEC 60062: the letter stands for the decimal point and carries the multiplier
    assume(whole or fraction)
    rkm = f"{whole or ''}{letter}{fraction or ''}"
    si = f"{whole}.{fraction}{_LETTERS[letter]}"
    assert parse_number(rkm) == pytest.approx(parse_number(si), rel=1e-12)


_UNITS = st.sampled_from(["Ω", "V", "A", "W", "F", "H"])
_MAGNITUDES = st.floats(min_value=1e-13, max_value=1e13, allow_nan=False, allow_infinity=False)


@given(_MAGNITUDES, st.booleans(), _UNITS)
def test_format_then_parse_round_trip(magnitude, negative, unit):
    value = -magnitude if negative else magnitude
    text = format_si(value, unit, digits=6)
    # six significant figures: the reading is within half a unit in the sixth place
    assert parse_number(text, unit) == pytest.approx(value, rel=5e-6), text


@given(_MAGNITUDES, _UNITS)
def test_format_three_digits_stays_within_rounding(magnitude, unit):
    text = format_si(magnitude, unit)
    assert parse_number(text, unit) == pytest.approx(magnitude, rel=5e-3), text


@pytest.mark.parametrize("value, unit, text", [
    # expected spellings by SI prefix rules (written by hand)
    (0.0199, "A", "19.9 mA"), (4700.0, "Ω", "4.7 kΩ"), (0.0, "V", "0 V"), (1e-6, "F", "1 µF"),
    (-15.0, "V", "-15 V"), (999.96, "Ω", "1 kΩ"),
])
def test_format_examples(value, unit, text):
    assert format_si(value, unit) == text


def test_format_keeps_tiny_values():
    # below the smallest prefix the number must still read back (not collapse to 0)
    text = format_si(3e-16, "A")
    assert math.isclose(parse_number(text, "A"), 3e-16, rel_tol=5e-3), text
