"""The exact line search and the tension-only solve, against brute force and closed forms.

References: the exact step along a line minimises a convex piecewise quadratic; compared with a
dense grid search and with scipy.optimize.minimize_scalar (bounded Brent) on the same function.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from bracegrid.mechanics import exact_step
from bracegrid.mechanics.tension import bar_forces


def _potential(a: float, g: np.ndarray, dg: np.ndarray, k: np.ndarray, tie: np.ndarray, fd: float) -> float:
    e = g + a * dg
    e = np.where(tie, np.maximum(e, 0.0), e)
    return float(0.5 * np.sum(k * e * e) - a * fd)


@pytest.mark.parametrize("seed", range(50))
def test_exact_step_is_the_minimiser_along_the_line(seed: int) -> None:
    rng = np.random.default_rng(seed)
    m = int(rng.integers(1, 30))
    g, dg = rng.normal(size=m), rng.normal(size=m)
    k = rng.uniform(0.1, 10.0, size=m)
    tie = rng.random(m) < 0.6
    tie[0] = False  # one bar: the line has curvature everywhere
    # a descent direction: the slope at 0 must be negative
    slope0 = float(np.sum(bar_forces(g, k, tie) * dg))
    fd = slope0 + abs(rng.normal()) + 0.1
    a = exact_step(g, dg, k, tie, fd)
    assert a is not None
    assert a > 0
    ref = minimize_scalar(
        lambda x: _potential(x, g, dg, k, tie, fd),
        bounds=(0.0, 10 * a + 10),
        method="bounded",
        options={"xatol": 1e-12},
    )
    assert _potential(a, g, dg, k, tie, fd) <= ref.fun + 1e-9 * (1 + abs(ref.fun))
    grid = np.linspace(0, 3 * a, 301)
    assert _potential(a, g, dg, k, tie, fd) <= min(_potential(x, g, dg, k, tie, fd) for x in grid) + 1e-12


def test_exact_step_reports_a_line_with_no_minimum() -> None:
    # only ties, all shortening along the line while the load does work: no minimum
    g, dg = np.array([-0.5, 0.2]), np.array([-1.0, -1.0])
    assert exact_step(g, dg, np.ones(2), np.array([True, True]), 1.0) is None


def test_exact_step_is_zero_when_the_line_rises_from_the_start() -> None:
    assert exact_step(np.array([1.0]), np.array([1.0]), np.ones(1), np.array([False]), 0.0) == 0.0
