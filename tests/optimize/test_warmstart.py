"""Constructive layouts (src/bracegrid/optimize/warmstart.py): repair, prune, constructive, pattern starts.

References: stability is decided by the stability check (bracegrid.analysis.is_stable, the
directed-cycle criterion of Baglivo & Graver 1983) and redundancy by bracegrid.analysis.redundancy_of
(Menger / Edmonds), both outside the module under test. Whether a frame can be made stable at all
is decided here by the largest layout the allowed kinds permit (every free diagonal filled: a brace
where braces are allowed, else a tie): adding members only adds arcs, so if that layout is not
stable no layout is.
"""

from __future__ import annotations

import itertools
import random

import numpy as np
import pytest

from bracegrid.analysis import is_stable, redundancy_of
from bracegrid.model import CostCatalogue, Diagonal, Frame, Member, MemberKind, Opening
from bracegrid.optimize.bays import Additions, AdditionsBuilder, BayTable, bay_table
from bracegrid.optimize.warmstart import constructive, constructive_redundant, pattern_starts, prune, repair

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING
BOTH = frozenset(MemberKind)


def _case(seed: int, *, max_side: int = 4) -> tuple[Frame, tuple[Member, ...], BayTable]:
    rng = random.Random(seed)
    rows, cols = rng.randint(1, max_side), rng.randint(1, max_side)
    widths = tuple(rng.choice([1000, 2000, 2500, 3000]) for _ in range(cols))
    heights = tuple(rng.choice([1000, 2000, 3000]) for _ in range(rows))
    blocked = frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < 0.15)
    frame = Frame("f", widths, heights, blocked=blocked)
    kept = tuple(
        Member(i, j, rng.choice([B, T]), rng.choice([R, F]))
        for i, j in itertools.product(range(1, rows + 1), range(1, cols + 1))
        if (i, j) not in blocked and rng.random() < 0.15
    )
    allow = rng.choice([BOTH, BOTH, frozenset({B}), frozenset({T})])
    return frame, kept, bay_table(frame, CostCatalogue(), kept, allow)


def _everything(table: BayTable, *, braces_per_bay: int = 1) -> Additions:
    """Every free diagonal used: braces where allowed (both arcs), else ties.

    One brace per bay already gives every arc the bay can give (the largest arc set, for
    stability); ``braces_per_bay=2`` fills both diagonals (the largest multiplicities, for redundancy).
    """
    add = AdditionsBuilder.empty(table.rows, table.cols)
    for i, j in itertools.product(range(table.rows), range(table.cols)):
        if table.brace_ok[i, j]:
            add.braces[i, j] = min(braces_per_bay, int(table.free_slots[i, j]))
        else:
            add.rising[i, j] = int(table.rising_tie_ok[i, j])
            add.falling[i, j] = int(table.falling_tie_ok[i, j])
    return add.build()


def _layout(kept: tuple[Member, ...], table: BayTable, add: Additions) -> tuple[Member, ...]:
    return kept + add.members(table)  # members() also proves no bay is over-full


def _removable(frame: Frame, kept: tuple[Member, ...], new: tuple[Member, ...]) -> list[Member]:
    return [m for k, m in enumerate(new) if is_stable(frame, kept + new[:k] + new[k + 1 :])]


@pytest.mark.parametrize("seed", range(40))
def test_constructive_and_repair_give_stable_layouts(seed: int) -> None:
    frame, kept, table = _case(seed)
    possible = is_stable(frame, _layout(kept, table, _everything(table)))
    for got in (constructive(table), repair(table, Additions.empty(table.rows, table.cols))):
        if not possible:
            assert got is None
            continue
        assert got is not None
        assert is_stable(frame, _layout(kept, table, got))


@pytest.mark.parametrize("seed", range(40))
def test_prune_never_raises_cost_and_leaves_nothing_removable(seed: int) -> None:
    frame, kept, table = _case(seed)
    start = _everything(table)
    if not is_stable(frame, _layout(kept, table, start)):
        assert constructive(table) is None  # nothing to prune: no stable layout exists
        return
    pruned = prune(table, start)
    assert pruned.cost(table) <= start.cost(table)
    new = pruned.members(table)
    assert is_stable(frame, kept + new)
    assert _removable(frame, kept, new) == []
    # A pruned layout is a fixed point of pruning.
    again = prune(table, pruned)
    assert again.cost(table) == pruned.cost(table)


@pytest.mark.parametrize("seed", range(20))
def test_constructive_leaves_nothing_removable(seed: int) -> None:
    frame, kept, table = _case(seed)
    got = constructive(table)
    if got is None:
        return
    assert _removable(frame, kept, got.members(table)) == []


def test_prune_turns_a_brace_into_a_cheaper_tie() -> None:
    # 1 x 2 frame, kept brace in bay (1, 1), new braces in both bays. Bay (1, 1)'s new brace is spare;
    # bay (1, 2) needs both arcs... unless one is already there: keep a rising tie there, and then a
    # falling tie (cheaper than a brace at default prices) suffices.
    frame = Frame("f", (3000, 3000), (4000,))
    kept = (Member(1, 1, B, R), Member(1, 2, T, R))
    table = bay_table(frame, CostCatalogue(), kept, BOTH)
    start = Additions(np.array([[1, 1]]), np.zeros((1, 2), dtype=np.int64), np.zeros((1, 2), dtype=np.int64))
    pruned = prune(table, start)
    assert pruned.members(table) == (Member(1, 2, T, F, existing=False),)
    # Hand: a tie on a 5 m diagonal costs 24.00 against 65.00 for a brace (240000 < 650000 units).
    assert pruned.cost(table) == 240_000 < start.cost(table)


def test_prune_tries_every_brace_of_a_bay() -> None:
    # 3 x 3 free frame. Six ties form one directed cycle through every node that avoids bay (1, 1):
    # row1 -> col2 -> row3 -> col1 -> row2 -> col3 -> row1 (hand), so they alone are stable. Two more
    # braces sit in bay (1, 1). Both braces are removable; pruning must not keep either.
    frame = Frame("f", (3000,) * 3, (3000,) * 3)
    table = bay_table(frame, CostCatalogue(), (), BOTH)
    braces = np.zeros((3, 3), dtype=np.int64)
    rising = np.zeros((3, 3), dtype=np.int64)
    falling = np.zeros((3, 3), dtype=np.int64)
    braces[0, 0] = 2
    for i, j in ((0, 1), (2, 0), (1, 2)):
        rising[i, j] = 1
    for i, j in ((2, 1), (1, 0), (0, 2)):
        falling[i, j] = 1
    ties_only = Additions(np.zeros((3, 3), dtype=np.int64), rising, falling)
    assert is_stable(frame, ties_only.members(table))
    pruned = prune(table, Additions(braces, rising, falling))
    assert _removable(frame, (), pruned.members(table)) == []


REDUNDANT_CASES = [
    # (rows, cols, allowed kinds, k)
    (2, 2, BOTH, 1),
    (2, 3, BOTH, 1),
    (3, 3, BOTH, 1),
    (3, 3, BOTH, 2),
    (2, 3, frozenset({B}), 1),
    (3, 3, frozenset({B}), 2),
    (2, 2, frozenset({T}), 1),  # ties only, min(R, C) = 2: possible (THEORY.md, 4 max(R, C) ties)
    (3, 2, frozenset({T}), 1),
]


@pytest.mark.parametrize(("rows", "cols", "allow", "k"), REDUNDANT_CASES)
def test_constructive_redundant_meets_k(rows: int, cols: int, allow: frozenset[MemberKind], k: int) -> None:
    frame = Frame("f", (3000, 1500, 2500)[:cols], (2000, 3000, 2000)[:rows])
    table = bay_table(frame, CostCatalogue(), (), allow)
    assert redundancy_of(frame, _layout((), table, _everything(table, braces_per_bay=2))) >= k  # possible
    got = constructive_redundant(table, None, k)
    assert got is not None
    assert redundancy_of(frame, got.members(table)) >= k


@pytest.mark.parametrize("cols", [1, 2, 3])
def test_constructive_redundant_none_when_impossible(cols: int) -> None:
    # THEORY.md: ties only cannot survive the loss of one member when min(R, C) = 1.
    frame = Frame("f", (3000,) * cols, (2000,))
    table = bay_table(frame, CostCatalogue(), (), frozenset({T}))
    assert redundancy_of(frame, _layout((), table, _everything(table))) < 1
    assert constructive_redundant(table, None, 1) is None


@pytest.mark.parametrize(("rows", "cols", "k"), [(1, 3, 1), (3, 1, 1), (2, 2, 2), (3, 2, 2)])
def test_constructive_redundant_finds_braced_layouts(rows: int, cols: int, k: int) -> None:
    # E.g. 1 x 3, k = 1: each column joins the row through one bay only, so it needs two arcs each way
    # there, which only two braces in the bay give (hand). Such layouts exist (checked first):
    frame = Frame("f", (1500, 3000, 3000)[:cols], (2000, 3000, 2000)[:rows])
    table = bay_table(frame, CostCatalogue(), (), BOTH)
    assert redundancy_of(frame, _layout((), table, _everything(table, braces_per_bay=2))) >= k
    assert constructive_redundant(table, None, k) is not None


@pytest.mark.parametrize("seed", range(30))
def test_constructive_redundant_finds_a_layout_whenever_one_exists(seed: int) -> None:
    # Whenever the fullest layout (two braces in every open bay, the most arcs any bay can give) survives
    # k losses, some layout does, and the greedy (with its tie-for-brace swaps) must return one that does.
    rng = random.Random(seed)
    rows, cols, k = rng.randint(1, 3), rng.randint(1, 3), rng.randint(1, 2)
    shut = frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < 0.15)
    frame = Frame("f", tuple(rng.randint(10, 30) * 100 for _ in range(cols)),
                  tuple(rng.randint(10, 30) * 100 for _ in range(rows)), blocked=shut)  # fmt: skip
    table = bay_table(frame, CostCatalogue(), (), BOTH)
    possible = redundancy_of(frame, _layout((), table, _everything(table, braces_per_bay=2))) >= k
    got = constructive_redundant(table, None, k)
    assert (got is not None) == possible
    if got is not None:
        assert redundancy_of(frame, got.members(table)) >= k


def test_constructive_redundant_keeps_its_start() -> None:
    # Starting from a spanning tree (redundancy 0) the greedy only adds, then prunes new members.
    frame = Frame("f", (3000,) * 3, (2000,) * 2)
    table = bay_table(frame, CostCatalogue(), (), BOTH)
    got = constructive_redundant(table, constructive(table), 1)
    assert got is not None
    assert redundancy_of(frame, got.members(table)) >= 1


def _opening_table() -> tuple[Frame, BayTable]:
    # A near-uniform 4 x 5 grid with an opening over bay (2, 3): the case pattern_starts is meant for.
    vent = Opening("vent", ((6200, 2200), (8800, 2200), (8800, 3800), (6200, 3800)))
    frame = Frame("f", (3000,) * 5, (2000,) * 4, openings=(vent,))
    return frame, bay_table(frame, CostCatalogue(), (), BOTH)


def test_pattern_starts_deterministic_for_a_seed() -> None:
    frame, table = _opening_table()
    first = pattern_starts(table, tries=6, seed=3)
    second = pattern_starts(table, tries=6, seed=3)
    assert first is not None
    assert second is not None
    for a, b in ((first.braces, second.braces), (first.rising, second.rising), (first.falling, second.falling)):
        assert np.array_equal(a, b)
    assert is_stable(frame, first.members(table))
    # More orders tried never give a dearer best (the first orders are the same for one seed).
    more = pattern_starts(table, tries=10, seed=3)
    assert more is not None
    assert more.cost(table) <= first.cost(table)


def test_pattern_starts_stable_for_other_seeds() -> None:
    frame, table = _opening_table()
    for seed in range(3):
        got = pattern_starts(table, tries=4, seed=seed)
        assert got is not None
        assert is_stable(frame, got.members(table))
