"""E-series access against the IEC 60063 tables, plus properties of nearest/below/above."""

import math

import pytest
from hypothesis import given, strategies as st

from linter import eseries
from linter.eseries import (
    above, accepted_series, base_values, below, is_standard, nearest, neighbours,
    series_for_tolerance, series_tolerance, values_between,
)

# IEC 60063, table of the E6 series (one decade).
IEC_E6 = (10, 15, 22, 33, 47, 68)
# IEC 60063, table of the E12 series (one decade).
IEC_E12 = (10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82)
# IEC 60063, table of the E24 series (one decade), with its irregular 27 30 33 36 39 43 47.
IEC_E24 = (10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62,
           68, 75, 82, 91)
# IEC 60063, E48 series: the first sixteen values of the decade.
IEC_E48_START = (100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205)
# IEC 60063, E96 series: the first thirty values of the decade and its last four.
IEC_E96_START = (100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140,
                 143, 147, 150, 154, 158, 162, 165, 169, 174, 178, 182, 187, 191, 196, 200)
IEC_E96_END = (909, 931, 953, 976)
# IEC 60063, E192 series: spot values, including the irregular 920 (not 919).
IEC_E192_SPOT = (100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 499, 920, 976, 988)


def _scaled(values, divisor):
    return tuple(v / divisor for v in values)


@pytest.mark.parametrize(("series", "expected"), [
    ("E6", _scaled(IEC_E6, 10)),
    ("E12", _scaled(IEC_E12, 10)),
    ("E24", _scaled(IEC_E24, 10)),
])
def test_whole_decade_matches_iec_60063(series, expected):
    assert base_values(series) == pytest.approx(expected, rel=1e-12)


def test_e48_e96_e192_match_iec_60063_values():
    assert base_values("E48")[:16] == pytest.approx(_scaled(IEC_E48_START, 100), rel=1e-12)
    assert base_values("E96")[:30] == pytest.approx(_scaled(IEC_E96_START, 100), rel=1e-12)
    assert base_values("E96")[-4:] == pytest.approx(_scaled(IEC_E96_END, 100), rel=1e-12)
    # IEC 60063: each series has as many values per decade as its name says.
    assert [len(base_values(s)) for s in ("E48", "E96", "E192")] == [48, 96, 192]
    for value in IEC_E192_SPOT:
        assert is_standard(value * 10.0, "E192"), value  # 1.01 kΩ, 9.2 kΩ ... (IEC 60063)
    assert not is_standard(9190.0, "E192")  # IEC 60063 has 920, not the geometric 919


@pytest.mark.parametrize(("tolerance", "series"), [
    # IEC 60063 pairs each series with a tolerance: E6 20 %, E12 10 %, E24 5 %, E48 2 %,
    # E96 1 %, E192 0.5 % (and the tighter precision tolerances).
    (0.20, "E6"), (0.10, "E12"), (0.05, "E24"), (0.02, "E48"), (0.01, "E96"),
    (0.005, "E192"), (0.001, "E192"), (0.0025, "E192"),
    (0.03, "E48"),   # between steps: the tighter series (our choice, documented)
    (0.5, "E6"),
])
def test_series_for_tolerance(tolerance, series):
    assert series_for_tolerance(tolerance) == series


def test_series_tolerance_round_trips():
    for series in ("E6", "E12", "E24", "E48", "E96", "E192"):
        assert series_for_tolerance(series_tolerance(series)) == series


def test_precision_tolerances_also_accept_e24():
    # Common practice: precision ranges stock the E24 values too.
    assert accepted_series(0.01) == ("E96", "E24")
    assert accepted_series(0.05) == ("E24",)
    assert accepted_series(0.10) == ("E12",)


def test_values_across_decades():
    # IEC 60063 E12, decades 1 Ω to 100 Ω.
    expected = [v / 10 for v in IEC_E12] + list(IEC_E12) + [100]
    assert values_between("E12", 1.0, 100.0) == pytest.approx(expected, rel=1e-12)
    # Exact floats, so equality with values typed by hand holds: 4k7 is 4700.0.
    assert 4700.0 in values_between("E12", 1000.0, 10000.0)
    assert 0.47 in values_between("E12", 0.1, 1.0)
    assert values_between("E24", 1.2e6, 1.6e6) == (1.2e6, 1.3e6, 1.5e6, 1.6e6)


def test_nearest_below_above_by_hand():
    # From the IEC 60063 E24 decade: 90 lies between 82 and 91; 1.05 kΩ between 1 k and 1.1 k.
    assert nearest(90.0, "E24") == 91.0
    assert below(90.0, "E24") == 82.0 and above(90.0, "E24") == 91.0
    assert neighbours(1050.0, "E24") == (1000.0, 1100.0)
    assert neighbours(1000.0, "E24") == (1000.0, 1000.0)
    # Across a decade boundary: 9.6 kΩ lies between 9.1 k and 10 k (IEC 60063 E24).
    assert neighbours(9600.0, "E24") == (9100.0, 10000.0)
    # E96 spot: 1.2 kΩ lies between 1.18 k and 1.21 k (IEC 60063 E96).
    assert neighbours(1200.0, "E96") == (1180.0, 1210.0)


def test_is_standard_tolerates_float_noise_only():
    assert is_standard(4.7 * 1000 * (1 + 1e-12), "E12")
    assert not is_standard(4.7e3 * 1.001, "E12")
    assert is_standard(4.7e3 * 1.001, "E12", rel_tol=0.002)


@pytest.mark.parametrize("bad", [0.0, -5.0, math.inf, math.nan])
def test_bad_values_refused(bad):
    with pytest.raises(ValueError):
        nearest(bad, "E24")


def test_unknown_series_refused():
    with pytest.raises(ValueError, match="unknown E-series"):
        nearest(100.0, "E25")
    with pytest.raises(ValueError):
        series_for_tolerance(0.0)


_values = st.floats(min_value=1e-3, max_value=1e9, allow_nan=False, allow_infinity=False)
_series = st.sampled_from(["E6", "E12", "E24", "E48", "E96", "E192"])


@given(_values, _series)
def test_nearest_is_in_series_and_no_value_is_closer(value, series):
    found = nearest(value, series)
    assert is_standard(found, series)
    # Every series value within a factor of 10 either side, listed independently.
    around = values_between(series, value / 10, value * 10)
    assert found in around
    assert all(abs(found - value) <= abs(v - value) for v in around)


@given(_values, _series)
def test_below_and_above_bracket_the_value(value, series):
    low, high = below(value, series), above(value, series)
    assert low <= value * (1 + eseries.DEFAULT_REL_TOL)
    assert high >= value * (1 - eseries.DEFAULT_REL_TOL)
    assert is_standard(low, series) and is_standard(high, series)
    inside = [v for v in values_between(series, value / 10, value * 10) if low < v < high]
    assert inside == []


def test_written_out_tables_equal_the_eseries_package():
    """linter.eseries_tables holds the IEC 60063 tables itself (no package import on a
    check); the eseries package (a published implementation of IEC 60063) must agree."""
    import eseries as package

    from linter.eseries_tables import SERIES, TOLERANCE

    assert tuple(SERIES) == eseries.SERIES_NAMES
    for name in SERIES:
        assert SERIES[name] == tuple(package.series(package.ESeries[name])), name
        assert TOLERANCE[name] == float(package.tolerance(package.ESeries[name])), name


def test_cached_decades_equal_values_made_one_by_one():
    """The decade tables built once give the values the plain per-call loop gave (our own
    plain path as the reference)."""
    for name in eseries.SERIES_NAMES:
        for decade in range(-3, 8):
            plain = tuple(eseries._in_decade(m, decade) for m in base_values(name))
            assert eseries._decade_values(name, decade) == plain
