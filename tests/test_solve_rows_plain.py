"""``solve._solve_rows`` (counts and residuals written once per row, converged rows dropped
through one index) against ``solve._solve_rows_plain``, the loop as first written.

Expected values: the plain path of our own code on the very same rows. The arithmetic is
the same operation for operation, so every output must be equal bit for bit: voltages,
convergence flags, iteration counts and residuals, also when the iteration limit cuts the
run short (rows left unconverged) or leaves no iteration at all.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_board import generate  # noqa: E402
from bench.write_edif import write_flat_edif  # noqa: E402
from bench.write_tables import write_settings  # noqa: E402
from linter import solve as solver  # noqa: E402
from linter.engine import CheckRequest, analyse, load_inputs, run_rules  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"


def _solves(request: CheckRequest, monkeypatch: pytest.MonkeyPatch) -> list[tuple]:
    """Every (network, rows, start, limit, cold) a check of ``request`` solves, rules' fix
    searches included."""
    seen: list[tuple] = []
    fast = solver._solve_rows

    def recording(net, params, x, max_iterations, cold=False):
        seen.append((net, params, x.copy(), max_iterations, cold))
        return fast(net, params, x, max_iterations, cold)

    with monkeypatch.context() as patch:
        patch.setattr(solver, "_solve_rows", recording)
        context = analyse(load_inputs(request))
        run_rules(context)
    return seen


def _same(first: solver.Solution, second: solver.Solution) -> bool:
    return all(np.array_equal(getattr(first, key), getattr(second, key), equal_nan=True)
               for key in ("voltages", "converged", "iterations", "residual"))


def _check(solves: list[tuple], limits: tuple[int | None, ...] = (None,)) -> int:
    compared = 0
    for net, params, x, max_iterations, cold in solves:
        for limit in limits:
            cap = max_iterations if limit is None else limit
            fast = solver._solve_rows(net, params, x.copy(), cap, cold)
            plain = solver._solve_rows_plain(net, params, x.copy(), cap, cold)
            assert _same(fast, plain), (net.n_nodes, params.rows, cap, cold)
            compared += 1
    return compared


@pytest.mark.parametrize("netlist", ["dust_extractor_panel.edif", "dust_extractor_panel.cir"])
def test_demo_solves_equal_the_plain_loop(netlist: str, monkeypatch: pytest.MonkeyPatch) -> None:
    bom = DEMO / "bom.csv" if netlist.endswith(".edif") else None
    solves = _solves(CheckRequest(netlist=DEMO / netlist, bom=bom), monkeypatch)
    assert len(solves) > 20
    assert any(not s[1].rows == 0 and s[4] for s in solves)   # cold starts among them
    # the iteration limits cut runs short: before the start step, right after, mid-way
    assert _check(solves, (None, 1, 2, 3, 7)) == 5 * len(solves)


def test_generated_board_solves_equal_the_plain_loop(tmp_path: Path,
                                                     monkeypatch: pytest.MonkeyPatch) -> None:
    board = generate(300, seed=11)
    netlist = tmp_path / "board.edif"
    write_flat_edif(board, netlist)
    write_settings(board, tmp_path / "ledlint.toml")
    solves = _solves(CheckRequest(netlist=netlist), monkeypatch)
    assert solves
    assert _check(solves, (None, 4)) == 2 * len(solves)


def test_no_rows_and_no_iterations() -> None:
    net = solver.Network(1, 1, resistors=np.array([[0, 1]]))
    empty = solver.Params(*(np.zeros((0, k)) for k in (1, 1, 0, 0, 0, 0, 0, 0, 0, 0)))
    one = solver.Params(np.ones((1, 1)), np.ones((1, 1)),
                        *(np.zeros((1, 0)) for _ in range(8)))
    for params in (empty, one):
        for limit in (0, 1, 5):
            for cold in (False, True):
                x = np.zeros((params.rows, 1))
                assert _same(solver._solve_rows(net, params, x.copy(), limit, cold),
                             solver._solve_rows_plain(net, params, x.copy(), limit, cold))
