"""Vectorised Newton on small nodal networks (expected values: Ohm's law, the Shockley
equation)."""

from __future__ import annotations

import numpy as np
import pytest

from linter.devices import VT_REF, led_voltage, saturation_current
from linter.solve import GMIN, Network, Params, element_currents, solve


def params(rows: int, fixed, r_g, d_is=None, d_nvt=None) -> Params:
    empty = np.zeros((rows, 0))
    return Params(fixed=np.asarray(fixed, float), r_g=np.asarray(r_g, float),
                  d_is=empty if d_is is None else np.asarray(d_is, float),
                  d_nvt=empty if d_nvt is None else np.asarray(d_nvt, float),
                  q_is=empty, q_bf=empty, q_br=empty, m_vto=empty, m_kp=empty, m_lambda=empty)


def test_divider_rows_solve_independently() -> None:
    # Ohm's law: V = Vin·R2/(R1 + R2) for each row (gmin of 1e-12 S moves it by nV)
    net = Network(1, 2, resistors=np.array([[1, 0], [0, 2]]))
    p = params(3, [[5, 0], [12, 0], [3.3, 0]],
               [[1e-3, 1e-3], [1 / 2000, 1 / 1000], [1 / 4700, 1 / 10000]])
    sol = solve(net, p)
    assert sol.converged.all()
    expected = np.array([2.5, 4.0, 3.3 * 10000 / 14700])
    assert sol.voltages[:, 0] == pytest.approx(expected, abs=2e-8)


def test_led_on_resistor_meets_tolerances() -> None:
    # Shockley: at I = 20 mA the fitted LED drops exactly 2.0 V, so 5 V over 150 Ω gives 20 mA
    i_s = saturation_current(2.0, 0.02, 2.0, 0.0)
    net = Network(1, 2, resistors=np.array([[1, 0]]), diodes=np.array([[0, 2]]))
    p = params(1, [[5.0, 0.0]], [[1 / 150]], [[i_s]], [[2 * VT_REF]])
    sol = solve(net, p)
    current = element_currents(net, p, sol.voltages)["diode"][0, 0]
    assert sol.converged.all() and sol.residual[0] <= 1e-9
    assert current == pytest.approx(0.02, rel=1e-7)
    assert float(led_voltage(current, i_s, 2.0, 0.0)) == pytest.approx(sol.voltages[0, 0], abs=1e-8)


def test_not_converged_is_flagged_not_nan() -> None:
    i_s = saturation_current(2.0, 0.02, 2.0, 0.0)
    net = Network(1, 2, resistors=np.array([[1, 0]]), diodes=np.array([[0, 2]]))
    p = params(2, [[5.0, 0.0], [24.0, 0.0]], [[1 / 150]] * 2, [[i_s]] * 2, [[2 * VT_REF]] * 2)
    sol = solve(net, p, max_iterations=2)
    assert not sol.converged.any()
    assert np.isfinite(sol.voltages).all()


def test_floating_node_held_by_gmin() -> None:
    # a node joined only through a reverse-biased diode settles near ground through gmin
    net = Network(1, 1, diodes=np.array([[0, 1]]))
    p = params(1, [[5.0]], np.zeros((1, 0)), [[1e-19]], [[2 * VT_REF]])
    sol = solve(net, p)
    assert sol.converged.all()
    assert abs(sol.voltages[0, 0]) < 1e-3
    assert GMIN == 1e-12


def test_network_rejects_unknown_node() -> None:
    with pytest.raises(ValueError):
        Network(1, 1, resistors=np.array([[0, 5]]))
