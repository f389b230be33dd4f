"""The LP relaxation of the cut model: value, bound, reduced-cost fixing and dive against outside references.

References:
* the same LP with every directed cut of every node set written out (2^n - 2 rows, built here
  from the arc rules of docs/theory.md, not from the optimizer's code) and solved from scratch by
  scipy's ``linprog``: its value must equal the cutting-plane value, which checks that separation
  by maximum flow (``flow_cuts``) misses no violated cut;
* exhaustive enumeration (``tests/validation/test_exhaustive_optimize.exhaustive_minimum`` and
  ``test_exhaustive_redundancy.exhaustive_n_minus_1``, own bitmask reachability): the LP bound
  never exceeds the true minimum, and reduced-cost fixing for "cheaper than minimum + 1" keeps
  an optimal layout inside the box;
* the CP-SAT cut loop without the LP stage (a different exact method) on frames too large to
  enumerate.
"""

from __future__ import annotations

import itertools
import random
import time

import numpy as np
import pytest
from scipy.optimize import linprog

from bracegrid.model import CostCatalogue, CostRate, Diagonal, Frame, Member, MemberKind
from bracegrid.optimize.bays import BayTable, bay_table
from bracegrid.optimize.cutloop import solve_with_cuts
from bracegrid.optimize.lprelax import Columns, Kind, LpRelaxation, fixings
from bracegrid.optimize.separation import violated_cuts
from bracegrid.optimize.warmstart import constructive, constructive_redundant
from tests.validation.test_exhaustive_optimize import exhaustive_minimum
from tests.validation.test_exhaustive_redundancy import exhaustive_n_minus_1

FAR = 10**9  # a deadline no test reaches


def _frame(seed: int, rows: int, cols: int, *, kept: bool) -> tuple[Frame, CostCatalogue]:
    rng = random.Random(seed)
    widths = tuple(rng.choice([1000, 1500, 2000, 2500, 3000]) for _ in range(cols))
    heights = tuple(rng.choice([1000, 2000, 3000]) for _ in range(rows))
    blocked = frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < 0.15)
    members = tuple(
        Member(i, j, rng.choice(list(MemberKind)), rng.choice(list(Diagonal)))
        for i in range(1, rows + 1)
        for j in range(1, cols + 1)
        if kept and (i, j) not in blocked and rng.random() < 0.15
    )
    costs = CostCatalogue(
        brace=CostRate(rng.uniform(5, 40), rng.uniform(0, 12)), tie=CostRate(rng.uniform(2, 25), rng.uniform(0, 6))
    )
    return Frame("lp", widths, heights, blocked=blocked, members=members), costs


def _table(frame: Frame, costs: CostCatalogue) -> BayTable:
    return bay_table(frame, costs, frame.members, frozenset(MemberKind))


def _every_cut_lp(table: BayTable, cols: Columns, k: int) -> float:
    """min cost over the box, slot rows and all 2^n - 2 directed cuts (and for k = 0 the singleton partition)."""
    r_count, n = table.rows, table.rows + table.cols
    a_rows, b_rows = [], []
    for size in range(1, n):
        for chosen in itertools.combinations(range(n), size):
            s = set(chosen)
            row = np.zeros(cols.count)
            kept = 0
            for i in range(table.rows):
                for j in range(table.cols):
                    row_in, col_in = i in s, r_count + j in s
                    if row_in and not col_in:  # up arcs (row -> col) leave S
                        kept += int(table.exist_up[i, j])
                    if col_in and not row_in:  # down arcs (col -> row) leave S
                        kept += int(table.exist_down[i, j])
            for q in range(cols.count):
                i, j, kind = int(cols.i[q]), int(cols.j[q]), Kind(int(cols.kind[q]))
                row_in, col_in = i in s, r_count + j in s
                gives_up, gives_down = kind is not Kind.FALLING, kind is not Kind.RISING
                row[q] = (row_in and not col_in and gives_up) + (col_in and not row_in and gives_down)
            a_rows.append(-row)
            b_rows.append(-(k + 1 - kept))
    for i in range(table.rows):
        for j in range(table.cols):
            here = [q for q in range(cols.count) if cols.i[q] == i and cols.j[q] == j]
            if len(here) > 1:
                row = np.zeros(cols.count)
                row[here] = 1
                a_rows.append(row)
                b_rows.append(int(table.free_slots[i, j]))
            braces = [q for q in here if cols.kind[q] == Kind.BRACE]
            if k == 0:
                for b, t in itertools.product(braces, [q for q in here if cols.kind[q] != Kind.BRACE]):
                    row = np.zeros(cols.count)
                    row[[b, t]] = 1
                    a_rows.append(row)
                    b_rows.append(1)
    if k == 0:  # the all-singletons partition (nothing kept in these cases)
        row = np.where(cols.kind == Kind.BRACE, n, n - 1).astype(float)
        a_rows.append(-row)
        b_rows.append(-n * (n - 1))
    res = linprog(cols.cost, A_ub=np.array(a_rows), b_ub=np.array(b_rows, dtype=float),
                  bounds=[(0, int(t)) for t in cols.top], method="highs")  # fmt: skip
    assert res.status == 0
    return float(res.fun)


@pytest.mark.parametrize(("seed", "k"), [(s, k) for s in range(6) for k in (0, 1)])
def test_cut_loop_lp_equals_lp_with_every_cut(seed: int, k: int) -> None:
    """Separation by maximum flow finds every violated cut: the two LPs have one value."""
    rows, cols = random.Random(seed).choice([(2, 3), (3, 3), (3, 4), (4, 4)])
    frame, costs = _frame(seed, rows, cols, kept=k > 0)
    table = _table(frame, costs)
    lp = LpRelaxation(table, k=k)
    run = lp.run(deadline=time.monotonic() + FAR)
    assert run.closed
    assert run.point is not None
    reference = _every_cut_lp(table, lp.cols, k)
    assert run.point.value == pytest.approx(reference, rel=1e-7, abs=1e-3)
    # The safe bound from the duals agrees with the solver's value to the unit.
    assert abs(run.point.dual_value - run.point.value) <= 1e-6 * max(1.0, reference) + 1e-3
    assert run.point.bound <= int(np.ceil(reference + 1e-6))


def _column_values(cols: Columns, braces: np.ndarray, rising: np.ndarray, falling: np.ndarray) -> np.ndarray:
    by_kind = {Kind.BRACE: braces, Kind.RISING: rising, Kind.FALLING: falling}
    return np.array([by_kind[Kind(int(cols.kind[q]))][cols.i[q], cols.j[q]] for q in range(cols.count)])


@pytest.mark.parametrize(("seed", "k"), [(s, k) for s in range(12) for k in (0, 1)])
def test_bound_and_fixing_against_exhaustive_minimum(seed: int, k: int) -> None:
    """LP bound <= exhaustive minimum; fixing for 'cheaper than minimum + 1' keeps an optimum in the box."""
    rows, cols = random.Random(100 + seed).choice([(1, 2), (2, 2), (2, 3), (3, 2)])
    frame, costs = _frame(100 + seed, rows, cols, kept=True)
    table = _table(frame, costs)
    allow = frozenset(MemberKind)
    best = exhaustive_minimum(frame, costs, allow, 10**12) if k == 0 else exhaustive_n_minus_1(frame, costs, 10**12)
    if best is None:
        return  # no layout at all
    lp = LpRelaxation(table, k=k)
    run = lp.run(deadline=time.monotonic() + FAR, partitions_until=FAR)
    assert run.point is not None
    assert run.point.bound <= best
    # An optimal layout from the exact cut loop (no LP stage), checked against the enumeration.
    improve = (lambda a: constructive(table, a)) if k == 0 else (lambda a: constructive_redundant(table, a, k))
    start = constructive(table) if k == 0 else constructive_redundant(table, None, k)
    got = solve_with_cuts(
        table, k=k, row_sizes=frame.heights, col_sizes=frame.widths, incumbent=start, improve=improve,
        deadline=time.monotonic() + 30, workers=1, seed=0,
    )  # fmt: skip
    assert got.proven
    assert got.additions is not None
    assert got.additions.cost(table) == best
    x = _column_values(lp.cols, got.additions.braces, got.additions.rising, got.additions.falling)
    lower, upper = fixings(run.point, lp.cols, best + 1)
    assert (lower <= x).all()
    assert (x <= upper).all()


@pytest.mark.parametrize("seed", range(4))
def test_lp_bound_below_cut_loop_optimum_on_larger_frames(seed: int) -> None:
    """6 x 7 frames: bound (with partitions) <= the optimum of the CP-SAT cut loop without LP stage."""
    frame, costs = _frame(200 + seed, 6, 7, kept=False)
    table = _table(frame, costs)
    lp = LpRelaxation(table, k=0)
    run = lp.run(deadline=time.monotonic() + FAR, partitions_until=FAR)
    assert run.point is not None
    got = solve_with_cuts(
        table, k=0, row_sizes=frame.heights, col_sizes=frame.widths, incumbent=constructive(table),
        improve=lambda a: constructive(table, a), deadline=time.monotonic() + 60, workers=1, seed=0,
    )  # fmt: skip
    assert got.proven
    assert got.additions is not None
    assert run.point.bound <= got.additions.cost(table)


@pytest.mark.parametrize("k", [0, 1])
def test_dive_gives_a_layout_meeting_every_cut_and_is_repeatable(k: int) -> None:
    frame, costs = _frame(7, 7, 8, kept=False)
    table = _table(frame, costs)
    results = []
    for _ in range(2):
        lp = LpRelaxation(table, k=k)
        run = lp.run(deadline=time.monotonic() + FAR)
        assert run.point is not None
        found = lp.dive(run.point, deadline=time.monotonic() + FAR)
        assert found is not None
        assert violated_cuts(table, found, k) == []
        assert found.cost(table) >= run.point.bound
        results.append((found.braces.tolist(), found.rising.tolist(), found.falling.tolist()))
    assert results[0] == results[1]
