"""The solver's cold start (:func:`linter.solve._start_step`) against the plain start from
all-zero voltages.

Expected values: the plain path of our own code (``_solve_rows`` without the start step,
as the solver ran before it) on the very same rows. Both are Newton's method to the same
tolerances, so they must agree on which rows converge and, where they do, on the node
voltages within those tolerances; the start step exists to need fewer iterations, which is
checked as a count (not a time).

The cold start also reaches conduction in far fewer iterations on the low-side MOSFET
switches of the 300-part board of seed 11 (12 against 62 and 64 on this machine), because
from all-zero voltages junction limiting lets a string climb only a logarithmic step per
iteration. That count is structural; whether the plain start then runs away altogether
(voltages of 1e24 V, seen on one machine) depends on the BLAS kernel's rounding, so the
test holds only the budget: within :data:`BUDGET` iterations the cold start solves every row
and the plain start leaves some unsolved. A converged row meets the KCL tolerance, so its
answer is an operating point of the circuit, and a string of LEDs over a MOSFET sink has
only one.
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
from linter.engine import CheckRequest, analyse, load_inputs  # noqa: E402
from linter.solve import MAX_ITERATIONS, Network, Params  # noqa: E402

DEMO = ROOT / "fixtures" / "demo"
VOLT_TOL = 1e-9
"""V: converged voltages agree within the solver's own step tolerance (VOLTAGE_TOL)."""
BUDGET = 40
"""Iterations: above the cold start's most on the board (23, a BJT network it does not
start), below the plain start's on the MOSFET switches (62, 64); from our own runs."""


def _cold_solves(request: CheckRequest, monkeypatch: pytest.MonkeyPatch
                 ) -> list[tuple[Network, Params]]:
    """Every (network, rows) the analysis of ``request`` solves from no initial voltages."""
    seen: list[tuple[Network, Params]] = []
    plain = solver._solve_rows

    def recording(net, params, x, max_iterations, cold=False):
        if cold:
            seen.append((net, params))
        return plain(net, params, x, max_iterations, cold)

    with monkeypatch.context() as patch:
        patch.setattr(solver, "_solve_rows", recording)
        analyse(load_inputs(request))
    return seen


def _compare(net: Network, params: Params) -> tuple[int, int]:
    """Both starts on the same rows: every row the plain start solves, the cold start solves
    to the same voltages (it may solve more: see the board test); their iterations."""
    started = solver.solve(net, params)
    zeros = np.zeros((params.rows, net.n_nodes))
    plain = solver._solve_rows(net, params, zeros, MAX_ITERATIONS, cold=False)
    assert not (plain.converged & ~started.converged).any()
    ok = plain.converged
    a, b = started.voltages[ok], plain.voltages[ok]
    assert np.all(np.abs(a - b) <= VOLT_TOL * np.maximum(1.0, np.abs(b))), np.abs(a - b).max()
    return int(started.iterations.sum()), int(plain.iterations.sum())


def _board(tmp_path: Path, parts: int, seed: int) -> CheckRequest:
    board = generate(parts, seed)
    write_flat_edif(board, tmp_path / "board.edif")
    write_settings(board, tmp_path / "ledlint.toml")
    return CheckRequest(tmp_path / "board.edif")


@pytest.mark.parametrize("source", ["demo", "board"])
def test_cold_start_reaches_the_plain_start_answers_in_fewer_iterations(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, source: str) -> None:
    request = (CheckRequest(DEMO / "dust_extractor_panel.edif", bom=DEMO / "bom.csv")
               if source == "demo" else _board(tmp_path, 300, 11))
    solves = _cold_solves(request, monkeypatch)
    assert len(solves) >= 5
    kinds = set()
    started_total = plain_total = 0
    for net, params in solves:
        kinds.add((len(net.diodes) > 1, len(net.bjts) > 0, len(net.mosfets) > 0))
        started, plain = _compare(net, params)
        started_total += started
        plain_total += plain
    assert {(True, False, False), (True, False, True)} <= kinds   # strings, MOSFET sinks
    assert started_total < plain_total


def test_cold_start_solves_within_a_budget_the_plain_start_does_not_meet(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    gained = 0
    for net, params in _cold_solves(_board(tmp_path, 300, 11), monkeypatch):
        started = solver.solve(net, params, max_iterations=BUDGET)
        plain = solver._solve_rows(net, params, np.zeros((params.rows, net.n_nodes)),
                                   BUDGET, cold=False)
        assert started.converged.all()
        assert (started.residual <= solver.CURRENT_TOL).all()
        assert not (plain.converged & ~started.converged).any()
        gained += int((started.converged & ~plain.converged).sum())
    assert gained >= 1


def _random_network(rng: np.random.Generator) -> tuple[Network, Params]:
    """A resistor-fed LED string (1-4 LEDs) to ground, optionally through an NPN or an
    N-MOSFET sink whose control node is fed from a second rail, at random values."""
    leds = int(rng.integers(1, 5))
    sink = rng.choice(["none", "npn", "nmos"])
    # nodes: 0 feed, 1..leds string nodes (last is the string end), then a control node
    top, ctrl = leds, leds + 1
    n = leds + (2 if sink != "none" else 1)
    rail, ground, drive = n, n + 1, n + 2
    resistors = [[rail, 0]]
    diodes = [[k, k + 1] for k in range(leds)]
    bjts, mosfets = np.zeros((0, 3), int), np.zeros((0, 3), int)
    if sink == "none":
        resistors.append([top, ground])
    else:
        resistors += [[drive, ctrl], [ctrl, ground]]
        if sink == "npn":
            bjts = np.array([[top, ctrl, ground]])
        else:
            mosfets = np.array([[top, ctrl, ground]])
    net = Network(n, 3, np.array(resistors), np.array(diodes), bjts, mosfets,
                  np.ones(len(bjts)), np.ones(len(mosfets)))
    rows = 6

    def col(lo: float, hi: float, width: int) -> np.ndarray:
        return rng.uniform(lo, hi, (rows, width))

    params = Params(fixed=np.column_stack([col(3, 48, 1), np.zeros(rows), col(0, 12, 1)]),
                    r_g=1 / col(10, 20000, len(resistors)), d_is=10 ** col(-30, -12, leds),
                    d_nvt=col(0.03, 0.09, leds), q_is=10 ** col(-16, -13, len(bjts)),
                    q_bf=col(30, 400, len(bjts)), q_br=col(1, 5, len(bjts)),
                    m_vto=col(0.7, 3, len(mosfets)), m_kp=col(0.05, 2, len(mosfets)),
                    m_lambda=col(0.0, 0.05, len(mosfets)))
    return net, params


@pytest.mark.parametrize("seed", range(40))
def test_cold_start_matches_plain_start_on_random_drives(seed: int) -> None:
    net, params = _random_network(np.random.default_rng(seed))
    _compare(net, params)
