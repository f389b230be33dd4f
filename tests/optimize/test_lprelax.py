"""The LP stage's plumbing: a silent solver, reduced-cost fixing at its extremes."""

from __future__ import annotations

import time

import numpy as np
import pytest

from bracegrid.model import CostCatalogue, Frame, MemberKind
from bracegrid.optimize.bays import bay_table
from bracegrid.optimize.lprelax import LpRelaxation, fixings


def _frame(rows: int, cols: int) -> Frame:
    rng = np.random.default_rng(rows * 100 + cols)
    widths = tuple(int(w) for w in rng.integers(10, 31, cols) * 100)
    heights = tuple(int(h) for h in rng.integers(10, 31, rows) * 100)
    shut = np.nonzero(rng.random((rows, cols)) < 0.1)
    blocked = frozenset((int(i) + 1, int(j) + 1) for i, j in zip(*shut, strict=True))
    return Frame("f", widths, heights, blocked=blocked)


def test_highs_prints_nothing(capfd: pytest.CaptureFixture[str]) -> None:
    """The CLI writes JSON to stdout: the LP solver must not print a banner or a log."""
    table = bay_table(_frame(6, 6), CostCatalogue(), (), frozenset(MemberKind))
    lp = LpRelaxation(table, k=0)
    run = lp.run(deadline=time.monotonic() + 60)
    assert run.point is not None
    out, err = capfd.readouterr()
    assert out == ""
    assert err == ""


def test_fixing_at_or_below_the_bound_leaves_an_empty_box() -> None:
    """Asking for layouts cheaper than the bound itself: no column can take any value."""
    table = bay_table(_frame(8, 9), CostCatalogue(), (), frozenset(MemberKind))
    lp = LpRelaxation(table, k=0)
    run = lp.run(deadline=time.monotonic() + 60)
    assert run.point is not None
    lower, upper = fixings(run.point, lp.cols, run.point.bound)
    assert (lower > upper).any()
    lower, upper = fixings(run.point, lp.cols, run.point.bound + 10**9)
    assert (lower == 0).all()
    assert (upper == lp.cols.top).all()
