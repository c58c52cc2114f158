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
