"""The solver's shortcuts against the numpy calls they stand for (expected values: the plain
numpy call on the same input, compared bit for bit)."""

from __future__ import annotations

import numpy as np
import pytest

from linter.solve import _lu_solve, _newton_step


@pytest.mark.parametrize("rows, n", [(1, 1), (1, 8), (29, 6), (700, 3), (3, 11)])
def test_lu_solve_is_numpys_solve(rows: int, n: int) -> None:
    rng = np.random.default_rng(rows * 100 + n)
    a = rng.normal(size=(rows, n, n)) + np.eye(n) * rng.uniform(0, 3, (rows, 1, 1))
    b = rng.normal(size=(rows, n, 1))
    assert np.array_equal(_lu_solve(a, b), np.linalg.solve(a, b))


def test_lu_solve_raises_on_a_singular_matrix_as_numpy_does() -> None:
    a = np.stack([np.eye(3), np.zeros((3, 3))])
    b = np.ones((2, 3, 1))
    with pytest.raises(np.linalg.LinAlgError):
        np.linalg.solve(a, b)
    with pytest.raises(np.linalg.LinAlgError):
        _lu_solve(a, b)


def test_newton_step_keeps_the_regular_rows_of_a_batch_with_a_singular_row() -> None:
    # the regular row's step is J⁻¹·(−F) (plain numpy), the singular row's the pseudo-inverse's
    a = np.stack([np.array([[2.0, 1.0], [1.0, 3.0]]), np.zeros((2, 2))])
    f = np.array([[1.0, -2.0], [1.0, 1.0]])
    step = _newton_step(a, f)
    assert np.array_equal(step[0], np.linalg.solve(a[:1], -f[:1, :, None])[0, :, 0])
    assert np.array_equal(step[1], np.zeros(2))


def _plain_step_factor(net, junctions, v, dx):
    """The step factor as first written: pn_limit asked about every junction every time."""
    from linter.devices import pn_limit

    a, k, sign = net.junctions
    if a.size == 0:
        return np.ones(v.shape[0])
    n = net.n_nodes
    old = sign * (v[:, a] - v[:, k])
    padded = np.concatenate([dx, np.zeros((dx.shape[0], 1))], axis=1)
    change = sign * (padded[:, np.minimum(a, n)] - padded[:, np.minimum(k, n)])
    new = old + change
    limited = pn_limit(new, old, junctions.nvt, junctions.i_s, junctions.v_crit)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.where(limited == new, 1.0, (limited - old) / change)
    return np.clip(np.min(ratio, axis=1), 1e-6, 1.0)


@pytest.mark.parametrize("seed", range(20))
@pytest.mark.parametrize("scale", [1e-9, 1e-3, 0.1, 3.0])
def test_step_factor_is_the_plain_step_factor(seed: int, scale: float) -> None:
    from linter.solve import Network, Params, _Junctions, _step_factor

    rng = np.random.default_rng(seed)
    rows = 7
    pick = lambda count: rng.permutation(6)[:count]  # noqa: E731
    net = Network(4, 2, np.array([pick(2) for _ in range(2)]),
                  np.array([pick(2) for _ in range(3)]), np.array([pick(3)]),
                  bjt_polarity=np.array([rng.choice([-1.0, 1.0])]))
    col = lambda lo, hi, width: rng.uniform(lo, hi, (rows, width))  # noqa: E731
    params = Params(fixed=np.tile([0.0, 12.0], (rows, 1)), r_g=col(1e-3, 1e-1, 2),
                    d_is=10 ** col(-20, -12, 3), d_nvt=col(0.03, 0.09, 3),
                    q_is=10 ** col(-15, -13, 1), q_bf=col(50, 300, 1), q_br=col(1, 5, 1),
                    m_vto=np.zeros((rows, 0)), m_kp=np.zeros((rows, 0)),
                    m_lambda=np.zeros((rows, 0)))
    junctions = _Junctions.of(params)
    v = np.concatenate([rng.uniform(-1, 4, (rows, 4)), params.fixed], axis=1)
    dx = rng.normal(0, scale, (rows, 4))
    got = _step_factor(net, junctions, v, dx)
    assert np.array_equal(got, _plain_step_factor(net, junctions, v, dx))


@pytest.mark.parametrize("top", [10.0, 79.9, 80.0, 80.1, 300.0])
def test_limited_exp_is_its_plain_definition(top: float) -> None:
    from linter.devices import EXP_LIMIT, limited_exp

    x = np.linspace(-50.0, top, 41).reshape(1, -1)
    x[0, 3] = np.nan
    value, slope = limited_exp(x)
    plain_e = np.exp(np.minimum(x, EXP_LIMIT))
    plain = np.where(x > EXP_LIMIT, plain_e * (1.0 + x - EXP_LIMIT), plain_e)
    assert np.array_equal(value, plain, equal_nan=True)
    assert np.array_equal(slope, plain_e, equal_nan=True)
    assert value is not slope
