"""Device equations and curve fits (expected values: the Shockley equation, scipy.constants,
the level-1 MOSFET equations, common practice)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants

from linter.devices import (VT_REF, bjt_currents, bjt_is_from_vbe, diode_current, led_curve,
                            led_voltage, limited_exp, mosfet_current, mosfet_kp_from_rds_on,
                            pn_limit, saturation_current, thermal_voltage)
from linter.partdata import LedData


def test_thermal_voltage_is_kt_over_q() -> None:
    # scipy.constants: k = 1.380649e-23 J/K, q = 1.602176634e-19 C; 25 degC = 298.15 K
    assert thermal_voltage(25.0) == pytest.approx(1.380649e-23 * 298.15 / 1.602176634e-19, rel=1e-12)
    assert thermal_voltage(25.0) == pytest.approx(constants.k * 298.15 / constants.e, rel=1e-12)


@settings(max_examples=60, deadline=None)
@given(vf=st.floats(1.6, 3.6), current=st.floats(1e-3, 0.05), n=st.floats(1.0, 4.0),
       rs=st.floats(0.0, 10.0))
def test_fit_passes_through_the_datasheet_point(vf, current, n, rs) -> None:
    # Shockley with series resistance: V(I_test) must equal Vf when Is is fitted to that point
    if vf - current * rs <= 0.1:
        return
    i_s = saturation_current(vf, current, n, rs)
    assert float(led_voltage(current, i_s, n, rs)) == pytest.approx(vf, abs=1e-9)


def test_led_curve_through_typ_min_max() -> None:
    data = LedData(color="red", vf_typ=2.0, vf_min=1.8, vf_max=2.4, vf_test_current=0.02)
    curve = led_curve(data)
    # Shockley equation through each datasheet point at the test current
    for i_s, vf in ((curve.is_typ, 2.0), (curve.is_min_vf, 1.8), (curve.is_max_vf, 2.4)):
        assert float(led_voltage(0.02, i_s, curve.ideality, curve.rs)) == pytest.approx(vf, abs=1e-6)
    assert curve.is_max_vf < curve.is_typ < curve.is_min_vf
    assert "rs" in curve.assumed and "ideality" in curve.assumed


def test_led_curve_uses_spice_figures_directly() -> None:
    data = LedData(spice_is=1e-19, ideality=2.0, rs=4.0, vf_max=2.4, vf_test_current=0.02)
    curve = led_curve(data)
    assert curve.is_typ == 1e-19 and curve.ideality == 2.0 and curve.rs == 4.0
    # Shockley: V = N·Vt·ln(I/IS + 1) + I·RS at 20 mA, Vt from scipy.constants
    vt = constants.k * 298.15 / constants.e
    assert curve.vf_typ == pytest.approx(2 * vt * math.log(0.02 / 1e-19 + 1) + 0.08, rel=1e-12)
    assert float(led_voltage(0.02, curve.is_max_vf, 2.0, 4.0)) == pytest.approx(2.4, abs=1e-9)


def test_missing_vf_min_mirrors_and_says_so() -> None:
    curve = led_curve(LedData(color="blue", vf_typ=3.0, vf_max=3.4, vf_test_current=0.02))
    assert curve.vf_min == pytest.approx(2.6) and "vf_min" in curve.assumed


def test_led_without_any_vf_is_refused() -> None:
    with pytest.raises(ValueError):
        led_curve(LedData(color="red"))


def test_limited_exp_is_continuous_and_finite() -> None:
    x = np.array([0.0, 79.999999, 80.0, 80.000001, 1e6])
    value, slope = limited_exp(x)
    assert np.all(np.isfinite(value)) and np.all(np.isfinite(slope))
    assert value[1] == pytest.approx(value[3], rel=1e-5)


def test_diode_derivative_matches_difference() -> None:
    v = np.array([0.5, 1.9, 2.1])
    i, g = diode_current(v, 1e-19, 2 * VT_REF)
    i2, _ = diode_current(v + 1e-7, 1e-19, 2 * VT_REF)
    assert g == pytest.approx((i2 - i) / 1e-7, rel=1e-4)


def test_pn_limit_cuts_a_runaway_step() -> None:
    nvt = 2 * VT_REF
    limited = pn_limit(np.array([12.0]), np.array([1.9]), nvt, np.array([1e-19]))
    # SPICE's junction limit: a 10 V jump from the on region becomes n·Vt·ln(1 + Δ/(n·Vt))
    assert float(limited[0]) == pytest.approx(1.9 + nvt * math.log(1 + 10.1 / nvt))


def test_bjt_forward_active_gain_and_saturation() -> None:
    i_s = bjt_is_from_vbe(0.65, 0.01)
    active = bjt_currents(np.array(0.65), np.array(-5.0), i_s, 200.0, 1.0)
    # Ebers–Moll transport model: Ic = Is·(exp(Vbe/Vt) − 1) ≈ 10 mA and Ic/Ib = BF in the
    # forward-active region
    assert float(active["ic"]) == pytest.approx(0.01, rel=1e-6)
    assert float(active["ic"] / active["ib"]) == pytest.approx(200.0, rel=1e-6)
    saturated = bjt_currents(np.array(0.65), np.array(0.6), i_s, 200.0, 1.0)
    assert float(saturated["ic"]) < 0.9 * 200.0 * float(saturated["ib"])


def test_mosfet_kp_from_rds_on_gives_that_resistance() -> None:
    # level 1 triode: Rds = 1/(KP·(Vgs − Vth)) at small Vds
    kp = mosfet_kp_from_rds_on(0.5, 4.5, 1.5)
    i_d, _, gds = mosfet_current(np.array(4.5), np.array(1e-6), 1.5, kp)
    assert 1e-6 / float(i_d) == pytest.approx(0.5, rel=1e-5)
    assert 1 / float(gds) == pytest.approx(0.5, rel=1e-5)


def test_mosfet_weak_drive_limits_current() -> None:
    # level 1 saturation: Id = KP/2·(Vgs − Vto)² = 0.4/2·0.4² = 32 mA at Vgs = 2.0 V
    i_d, _, _ = mosfet_current(np.array(2.0), np.array(3.0), 1.6, 0.4)
    assert float(i_d) == pytest.approx(0.032)
    off, _, _ = mosfet_current(np.array(1.0), np.array(3.0), 1.6, 0.4)
    assert float(off) == 0.0


def test_mosfet_reverse_is_mirror() -> None:
    fwd, _, _ = mosfet_current(np.array(3.0), np.array(0.2), 1.6, 0.4)
    rev, _, _ = mosfet_current(np.array(3.0 - 0.2), np.array(-0.2), 1.6, 0.4)
    assert float(rev) == pytest.approx(-float(fwd))


def test_physical_constants_equal_scipy():
    # The solver writes k, q and 0 °C out (exact SI 2019 values) to keep scipy off the
    # start-up path; they must equal scipy.constants.
    from scipy import constants

    from linter import devices

    assert devices.BOLTZMANN == constants.k
    assert devices.ELEMENTARY_CHARGE == constants.e
    assert devices.ZERO_CELSIUS == constants.zero_Celsius
