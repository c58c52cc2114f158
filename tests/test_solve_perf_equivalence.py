"""The fast solver paths agree with plain references.

* Batched analysis (every group of a structure solved together, parameters stacked per
  bucket, spans reduced with array operations over the bucket) against a per-group path
  (each group solved alone and reduced by the plain per-group reducer): the same spans
  within 1e-9 relative, on the LED groups of random synthetic boards of every kind.
  Expected values: the reference path itself (the same equations, solved one group at a
  time), not stored figures.
* The Jacobian assembled from the stamp plan against central finite differences of the
  residual (the definition of the derivative), on random networks of every element kind.
"""

from __future__ import annotations

import math
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
from linter import analysis  # noqa: E402
from linter.engine import CheckRequest, load_inputs  # noqa: E402
from linter.netbuild import build_model  # noqa: E402
from linter.solve import Network, Params, _assemble  # noqa: E402
from linter.topology import find_groups  # noqa: E402

REL = 1e-9
ABS = 1e-15   # A, V or W: figures that are rounding noise around zero (reverse leakage)


def _close(a: float | None, b: float | None) -> bool:
    if a is None or b is None:
        return a is b
    if math.isnan(a) or math.isnan(b):
        return math.isnan(a) and math.isnan(b)
    return abs(a - b) <= REL * max(abs(a), abs(b)) + ABS


def _span_figures(span) -> list[float | None]:
    return [None, None, None] if span is None else [span.nom, span.min, span.max]


def _figures(result) -> dict[str, list]:
    """Every number a rule can read from a GroupResult, by element."""
    out: dict[str, list] = {"group": [result.status, result.scheme, result.corners,
                                      len(result.not_converged), result.rail]}
    for led in result.leds:
        out[led.ref] = (_span_figures(led.current) + _span_figures(led.vf)
                        + _span_figures(led.power) + [led.reverse_v, led.di_dvf,
                                                      led.lit_scenarios])
    for r in result.resistors:
        out[r.ref] = _span_figures(r.current) + _span_figures(r.power)
    for t in result.transistors:
        out[t.ref] = (_span_figures(t.vce) + _span_figures(t.current) + _span_figures(t.power)
                      + _span_figures(t.vgs) + [t.saturated, t.current_when_saturated,
                                                t.rail_min, t.headroom_rail])
    for p in result.pins:
        out[p.id] = _span_figures(p.current) + [p.sourcing]
    return out


def _board(tmp_path: Path, parts: int, seed: int):
    board = generate(parts, seed)
    write_flat_edif(board, tmp_path / "board.edif")
    write_settings(board, tmp_path / "ledlint.toml")
    context = load_inputs(CheckRequest(tmp_path / "board.edif"))
    groups = find_groups(context.circuit, context.rails, context.part_data)
    return context, groups


@pytest.mark.parametrize("seed", [11, 29])
def test_batched_analysis_matches_per_group_reference(tmp_path: Path, seed: int) -> None:
    context, groups = _board(tmp_path, 300, seed)
    assert len(groups) >= 30
    ambient = context.settings.ambient
    batched = analysis.analyse(groups, context.circuit, context.part_data, context.rails,
                               ambient)
    kinds = set()
    for group, fast in zip(groups, batched):
        model = build_model(group, context.circuit, context.part_data, dict(context.rails))
        (slow,) = analysis._solve_bucket([model], ambient, per_group=True)
        kinds.add(group.topology)
        expected, got = _figures(slow), _figures(fast)
        assert expected.keys() == got.keys(), group.id
        for key, values in expected.items():
            for a, b in zip(values, got[key]):
                if isinstance(a, float) or isinstance(b, float):
                    assert _close(a, b), (group.id, key, values, got[key])
                else:
                    assert a == b, (group.id, key, values, got[key])
    # the board has every kind the generator makes (bench/README.md lists them)
    assert {"resistor", "string", "parallel", "npn-sink", "low-side-switch", "pin-source",
            "pin-sink"} <= kinds


def _random_network(rng: np.random.Generator) -> tuple[Network, Params]:
    """Unknown nodes 0-4, fixed nodes 5 (0 V) and 6 (5 V); one element of each kind."""
    pick = lambda count: rng.permutation(7)[:count]  # noqa: E731
    net = Network(5, 2, np.array([pick(2) for _ in range(4)]), np.array([pick(2)]),
                  np.array([pick(3)]), np.array([pick(3)]), np.array([rng.choice([-1.0, 1.0])]),
                  np.array([rng.choice([-1.0, 1.0])]))
    rows = 4

    def col(lo: float, hi: float, width: int = 1) -> np.ndarray:
        return rng.uniform(lo, hi, (rows, width))

    params = Params(fixed=np.tile([0.0, 5.0], (rows, 1)), r_g=col(1e-4, 1e-2, 4),
                    d_is=10 ** col(-18, -12), d_nvt=col(0.03, 0.08), q_is=10 ** col(-15, -13),
                    q_bf=col(50, 300), q_br=col(1, 5), m_vto=col(0.5, 2), m_kp=col(0.05, 0.5),
                    m_lambda=col(0.0, 0.05))
    return net, params


@pytest.mark.parametrize("seed", range(12))
def test_stamped_jacobian_is_the_derivative_of_the_residual(seed: int) -> None:
    rng = np.random.default_rng(seed)
    net, params = _random_network(rng)
    x = rng.uniform(-1.0, 1.5, (params.rows, net.n_nodes))
    full = lambda x_: np.concatenate([x_, params.fixed], axis=1)  # noqa: E731
    _, jacobian = _assemble(net, params, full(x))
    step = 1e-7
    for node in range(net.n_nodes):
        up, down = x.copy(), x.copy()
        up[:, node] += step
        down[:, node] -= step
        f_up, _ = _assemble(net, params, full(up))
        f_down, _ = _assemble(net, params, full(down))
        numeric = (f_up - f_down) / (2 * step)
        scale = np.abs(jacobian).max() + 1e-12
        assert np.allclose(jacobian[:, :, node], numeric, rtol=1e-4, atol=1e-5 * scale), node
