"""The block search (LNS with exact CP-SAT blocks): stable, never dearer, repeatable, exact on one block.

References: the independent stability check (``bracegrid.analysis.is_stable`` on the member
list) and exhaustive enumeration (``tests/validation/test_exhaustive_optimize.exhaustive_minimum``).
"""

from __future__ import annotations

import random

import numpy as np
import pytest

from bracegrid.analysis import is_stable
from bracegrid.model import CostCatalogue, CostRate, Diagonal, Frame, Member, MemberKind
from bracegrid.optimize.bays import Additions, bay_table
from bracegrid.optimize.neighbourhood import BlockStats, block_search, window_table
from bracegrid.optimize.warmstart import constructive
from tests.validation.test_exhaustive_optimize import exhaustive_minimum

BOTH = frozenset(MemberKind)
TIES_055 = CostCatalogue(brace=CostRate(25.0, 8.0), tie=CostRate(13.75, 4.4))
FAR = 10**9  # a deadline no test reaches


def _frame(seed: int, rows: int, cols: int, *, kept: bool = False) -> Frame:
    rng = random.Random(seed)
    widths = tuple(rng.randint(10, 30) * 100 for _ in range(cols))
    heights = tuple(rng.randint(10, 30) * 100 for _ in range(rows))
    blocked = frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < 0.1)
    members = tuple(
        Member(i, j, rng.choice(list(MemberKind)), rng.choice(list(Diagonal)))
        for i in range(1, rows + 1)
        for j in range(1, cols + 1)
        if kept and (i, j) not in blocked and rng.random() < 0.1
    )
    return Frame("blocks", widths, heights, blocked=blocked, members=members)


def _poor_start(frame: Frame, seed: int) -> Additions:
    """A stable but wasteful layout: random extra ties on top of the greedy one."""
    table = bay_table(frame, TIES_055, frame.members, BOTH)
    rng = np.random.default_rng(seed)
    base = constructive(table)
    assert base is not None
    extra = (rng.random((table.rows, table.cols)) < 0.3) & table.rising_tie_ok & (base.rising == 0)
    extra &= (base.braces + base.falling + base.rising) < table.free_slots
    extra &= base.braces == 0
    return Additions(base.braces, base.rising + extra.astype(np.int64), base.falling)


def test_window_table_freezes_the_outside() -> None:
    frame = _frame(1, 4, 5)
    table = bay_table(frame, TIES_055, (), BOTH)
    start = constructive(table)
    assert start is not None
    rows, cols = np.array([0, 2]), np.array([1, 3, 4])
    sub = window_table(table, start, rows, cols)
    inside = np.zeros((4, 5), dtype=bool)
    inside[np.ix_(rows, cols)] = True
    assert not (sub.brace_ok & ~inside).any()
    assert not (sub.rising_free & ~inside).any()
    assert not (sub.falling_free & ~inside).any()
    np.testing.assert_array_equal(sub.exist_up[~inside], (start.braces + start.rising)[~inside])
    np.testing.assert_array_equal(sub.exist_down[~inside], (start.braces + start.falling)[~inside])
    np.testing.assert_array_equal(sub.exist_up[inside], 0)


@pytest.mark.parametrize(("seed", "kept"), [(2, False), (3, True), (4, False)])
def test_block_search_is_stable_never_dearer_and_repeatable(seed: int, kept: bool) -> None:
    frame = _frame(seed, 7, 8, kept=kept)
    table = bay_table(frame, TIES_055, frame.members, BOTH)
    start = _poor_start(frame, seed)
    assert is_stable(frame, (*frame.members, *start.members(table)))
    runs = []
    for _ in range(2):
        stats = BlockStats()
        got = block_search(table, start, deadline=FAR, seed=seed, side_r=4, side_c=4, stats=stats, max_blocks=12)
        runs.append((got, stats))
    (got, stats), (again, _) = runs
    assert is_stable(frame, (*frame.members, *got.members(table)))  # independent check on the member list
    assert got.cost(table) <= start.cost(table)
    assert stats.improved >= 1  # the random extra ties are removable
    assert got.cost(table) < start.cost(table)
    assert stats.history == sorted(stats.history, reverse=True)
    # Deterministic: one worker, work limits in deterministic time, seeded blocks.
    for name in ("braces", "rising", "falling"):
        np.testing.assert_array_equal(getattr(got, name), getattr(again, name))


@pytest.mark.parametrize(("seed", "rows", "cols"), [(5, 2, 3), (6, 3, 2), (7, 3, 3)])
def test_one_block_covering_the_frame_reaches_the_exhaustive_minimum(seed: int, rows: int, cols: int) -> None:
    frame = _frame(seed, rows, cols)
    table = bay_table(frame, TIES_055, (), BOTH)
    start = _poor_start(frame, seed)
    stats = BlockStats()
    got = block_search(table, start, deadline=FAR, seed=0, side_r=rows, side_c=cols, stats=stats, max_blocks=30)
    cost = got.cost(table)
    assert is_stable(frame, got.members(table))
    # The enumeration of everything cheaper than cost + 1 finds the minimum if it is <= cost.
    assert exhaustive_minimum(frame, TIES_055, BOTH, cost + 1) == cost
    assert stats.proven >= 1  # the last block proved nothing cheaper exists


def test_patience_stops_the_search() -> None:
    frame = _frame(8, 6, 6)
    table = bay_table(frame, TIES_055, (), BOTH)
    start = constructive(table)
    assert start is not None
    stats = BlockStats()
    block_search(table, start, deadline=FAR, seed=0, side_r=3, side_c=3, stats=stats, patience=5)
    assert stats.blocks == stats.last_gain + 5  # five blocks in a row without a gain, then it stopped
