"""Exact answers without a solver (src/bracegrid/optimize/shortcuts.py).

References:
* spanning_tree_braces: braces only form a graphic matroid on the bipartite row/column graph
  (Bolker & Crapo 1979; THEORY.md), so the cheapest stable set of braces is a minimum spanning
  tree; its cost is compared with ``networkx.minimum_spanning_tree`` on that graph (independent
  implementation), kept members as free (weight 0) edges; R + C - 1 braces on an empty frame;
* pinned_base_rows: on a pinned base each row needs k + 1 member arcs to and k + 1 from the
  columns (THEORY.md, "Supports" and "Redundancy"); the reference here enumerates every assignment
  of nothing / brace / tie to each free diagonal of each row, by brute force;
* closed_form: the closed-form optimum of THEORY.md (via patterns.closed_form_cost, itself
  checked in test_patterns.py) and the pattern that reaches it;
* every layout returned is re-checked with bracegrid.analysis (is_stable, redundancy_of).
"""

from __future__ import annotations

import itertools
import random

import networkx as nx
import pytest

from bracegrid.analysis import is_stable, redundancy_of
from bracegrid.model import CostCatalogue, CostRate, Diagonal, Frame, Member, MemberKind, Supports
from bracegrid.optimize.bays import SCALE, BayTable, bay_table
from bracegrid.optimize.patterns import PatternKind, closed_form_cost
from bracegrid.optimize.results import SolveMethod
from bracegrid.optimize.shortcuts import (
    closed_form,
    closed_form_applies,
    existing_is_symmetric,
    pinned_base_rows,
    spanning_tree_braces,
)

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING
BOTH = frozenset(MemberKind)


def _random_frame(rng: random.Random, max_rows: int, max_cols: int, supports: Supports) -> Frame:
    rows, cols = rng.randint(1, max_rows), rng.randint(1, max_cols)
    widths = tuple(rng.choice([1000, 1800, 2500, 3000]) for _ in range(cols))
    heights = tuple(rng.choice([1000, 2000, 2700]) for _ in range(rows))
    blocked = frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < 0.15)
    return Frame("f", widths, heights, supports=supports, blocked=blocked)


# --------------------------------------------------------------------------- spanning tree


def _mst_reference(table: BayTable, kept_bays: set[tuple[int, int]]) -> int | None:
    g: nx.Graph = nx.Graph()
    g.add_nodes_from([("r", i) for i in range(table.rows)] + [("c", j) for j in range(table.cols)])
    for i, j in itertools.product(range(table.rows), range(table.cols)):
        if (i, j) in kept_bays:
            g.add_edge(("r", i), ("c", j), weight=0)
        elif table.brace_ok[i, j]:
            g.add_edge(("r", i), ("c", j), weight=int(table.brace_cost[i, j]))
    if not nx.is_connected(g):
        return None
    return int(nx.minimum_spanning_tree(g).size(weight="weight"))


@pytest.mark.parametrize("seed", range(25))
def test_spanning_tree_matches_networkx(seed: int) -> None:
    rng = random.Random(seed)
    frame = _random_frame(rng, 5, 5, Supports.FREE)
    open_bays = [
        (i, j) for i in range(1, frame.rows + 1) for j in range(1, frame.cols + 1) if (i, j) not in frame.blocked
    ]
    kept = tuple(Member(i, j, B, rng.choice([R, F])) for i, j in open_bays if rng.random() < 0.15)
    table = bay_table(frame, CostCatalogue(), kept, frozenset({B}))
    got = spanning_tree_braces(table)
    reference = _mst_reference(table, {(m.row - 1, m.col - 1) for m in kept})
    if reference is None:
        assert got is None
        return
    assert got is not None
    assert got.method is SolveMethod.SPANNING_TREE
    assert got.words == "minimum spanning tree of braces"
    assert got.additions.cost(table) == reference
    assert int(got.additions.rising.sum() + got.additions.falling.sum()) == 0
    new = got.additions.members(table)
    assert is_stable(frame, kept + new)
    if not kept:
        assert len(new) == frame.rows + frame.cols - 1  # a spanning tree of R + C nodes


@pytest.mark.parametrize(("rows", "cols"), [(1, 1), (2, 3), (4, 4), (6, 2)])
def test_spanning_tree_has_r_plus_c_minus_one_braces(rows: int, cols: int) -> None:
    table = bay_table(Frame("f", (3000,) * cols, (2000,) * rows), CostCatalogue(), (), frozenset({B}))
    got = spanning_tree_braces(table)
    assert got is not None
    assert int(got.additions.braces.sum()) == rows + cols - 1  # Bolker & Crapo


def test_spanning_tree_none_when_a_column_is_cut_off() -> None:
    # Column 2 fully blocked: no brace can reach it.
    frame = Frame("f", (3000,) * 3, (2000,) * 2, blocked=frozenset({(1, 2), (2, 2)}))
    assert spanning_tree_braces(bay_table(frame, CostCatalogue(), (), frozenset({B}))) is None


# --------------------------------------------------------------------------- pinned base


def _row_minimum(table: BayTable, i: int, allow: frozenset[MemberKind], k: int) -> int | None:
    """Cheapest new members in row i (0-based) giving k + 1 arcs each way, by brute force."""
    choices = [None, *(kind for kind in (B, T) if kind in allow)]
    slots = []
    for j in range(table.cols):
        slots.append((j, R, choices if table.rising_free[i, j] else [None]))
        slots.append((j, F, choices if table.falling_free[i, j] else [None]))
    need = k + 1
    best: int | None = None
    for pick in itertools.product(*(options for _, _, options in slots)):
        up = int(table.exist_up[i].sum())
        down = int(table.exist_down[i].sum())
        cost = 0
        for (j, diagonal, _), kind in zip(slots, pick, strict=True):
            if kind is None:
                continue
            # THEORY.md: brace both ways; rising tie row -> col (up); falling tie col -> row (down).
            up += kind is B or diagonal is R
            down += kind is B or diagonal is F
            cost += int(table.brace_cost[i, j] if kind is B else table.tie_cost[i, j])
        if up >= need and down >= need and (best is None or cost < best):
            best = cost
    return best


@pytest.mark.parametrize("k", [0, 1])
@pytest.mark.parametrize("seed", range(15))
def test_pinned_base_rows_match_brute_force(seed: int, k: int) -> None:
    rng = random.Random(100 * k + seed)
    frame = _random_frame(rng, 3, 3, Supports.BASE)
    kept = []
    for i, j in itertools.product(range(1, frame.rows + 1), range(1, frame.cols + 1)):
        if (i, j) not in frame.blocked and rng.random() < 0.25:
            kept.append(Member(i, j, rng.choice([B, T]), rng.choice([R, F])))
    allow = rng.choice([BOTH, BOTH, frozenset({B}), frozenset({T})])
    costs = CostCatalogue(tie=CostRate(rng.choice([9.0, 14.0, 30.0]), 3.0))  # ties cheap, close or dear
    table = bay_table(frame, costs, tuple(kept), allow)
    per_row = [_row_minimum(table, i, allow, k) for i in range(frame.rows)]
    got = pinned_base_rows(table, k=k)
    if any(c is None for c in per_row):
        assert got is None
        return
    assert got is not None
    assert got.method is SolveMethod.PINNED_ROWS
    assert got.additions.cost(table) == sum(c for c in per_row if c is not None)
    for i in range(frame.rows):  # each row on its own is at its minimum
        row_cost = int((got.additions.braces[i] * table.brace_cost[i]).sum())
        row_cost += int(((got.additions.rising[i] + got.additions.falling[i]) * table.tie_cost[i]).sum())
        assert row_cost == per_row[i]
    layout = tuple(kept) + got.additions.members(table)
    assert all(m.kind in allow for m in layout if not m.existing)
    assert is_stable(frame, layout)
    assert redundancy_of(frame, layout) >= k


def test_pinned_base_rows_docstring_case() -> None:
    # 4 lifts x 3 bays, default prices: a pair of ties per lift (2 x 24.x) beats a brace (65.x) -> 8 ties.
    table = bay_table(Frame("f", (3000,) * 3, (2000,) * 4, supports=Supports.BASE), CostCatalogue(), (), BOTH)
    got = pinned_base_rows(table)
    assert got is not None
    assert int(got.additions.braces.sum()) == 0
    assert int(got.additions.rising.sum()) == int(got.additions.falling.sum()) == 4


def test_pinned_base_rows_none_when_a_row_is_closed() -> None:
    frame = Frame("f", (3000,) * 2, (2000,) * 2, supports=Supports.BASE, blocked=frozenset({(2, 1), (2, 2)}))
    assert pinned_base_rows(bay_table(frame, CostCatalogue(), (), BOTH)) is None
    # Ties only and one bay per row: both senses fit (an X of ties), but k = 1 needs two arcs each way.
    narrow = Frame("f", (3000,), (2000,), supports=Supports.BASE)
    ties = bay_table(narrow, CostCatalogue(), (), frozenset({T}))
    assert pinned_base_rows(ties, k=0) is not None
    assert pinned_base_rows(ties, k=1) is None


# --------------------------------------------------------------------------- closed form


def _uniform(rows: int, cols: int, brace: float, tie: float, allow: frozenset[MemberKind] = BOTH) -> BayTable:
    # Nothing per metre: every bay costs the same whatever its size.
    costs = CostCatalogue(brace=CostRate(brace, 0.0), tie=CostRate(tie, 0.0))
    return bay_table(Frame("f", (3000,) * cols, (2000,) * rows), costs, (), allow)


@pytest.mark.parametrize(
    ("rows", "cols", "brace", "tie", "allow", "kind"),
    [
        (3, 4, 10.0, 4.0, BOTH, PatternKind.CYCLE),  # 2b <= a: ties only (THEORY.md)
        (3, 4, 10.0, 12.0, BOTH, PatternKind.TREE),  # b >= a: braces only
        (4, 6, 10.0, 7.0, BOTH, PatternKind.MIXED),  # min(90, 56 + 20 = 76, 84) -> mixed
        (6, 4, 10.0, 7.0, BOTH, PatternKind.MIXED),  # transposed
        (4, 6, 10.0, 7.0, frozenset({B}), PatternKind.TREE),
        (4, 6, 10.0, 7.0, frozenset({T}), PatternKind.CYCLE),
        (3, 3, 10.0, 7.0, BOTH, PatternKind.CYCLE),  # r = c: mixed = 2rb = cycle (42 < 50)
    ],
)
def test_closed_form(
    rows: int, cols: int, brace: float, tie: float, allow: frozenset[MemberKind], kind: PatternKind
) -> None:
    table = _uniform(rows, cols, brace, tie, allow)
    assert closed_form_applies(table)
    got = closed_form(table)
    assert got is not None
    assert got.method is SolveMethod.CLOSED_FORM
    assert got.pattern is kind
    assert got.words == f"closed form: {kind.words}"
    a = round(brace * SCALE) if B in allow else None
    b = round(tie * SCALE) if T in allow else None
    assert got.additions.cost(table) == closed_form_cost(rows, cols, a, b)
    frame = Frame("f", (3000,) * cols, (2000,) * rows)
    assert is_stable(frame, got.additions.members(table))


def test_closed_form_depends_on_prices_not_sizes() -> None:
    # Different bay sizes, but nothing per metre: prices are uniform, the closed form applies.
    costs = CostCatalogue(brace=CostRate(10.0, 0.0), tie=CostRate(7.0, 0.0))
    mixed_sizes = bay_table(Frame("f", (3000, 1000, 2500), (2000, 900)), costs, (), BOTH)
    assert closed_form(mixed_sizes) is not None
    # Per-metre prices on unequal bays: not uniform, no closed form.
    by_length = bay_table(Frame("f", (3000, 1000, 2500), (2000, 900)), CostCatalogue(), (), BOTH)
    assert not closed_form_applies(by_length)
    assert closed_form(by_length) is None


def test_closed_form_needs_a_complete_empty_frame() -> None:
    costs = CostCatalogue(brace=CostRate(10.0, 0.0), tie=CostRate(7.0, 0.0))
    blocked = Frame("f", (3000,) * 3, (2000,) * 2, blocked=frozenset({(1, 2)}))
    assert closed_form(bay_table(blocked, costs, (), BOTH)) is None
    kept = (Member(1, 1, B, R),)
    assert closed_form(bay_table(Frame("f", (3000,) * 3, (2000,) * 2), costs, kept, BOTH)) is None


# --------------------------------------------------------------------------- kept members


def _kept_table(members: tuple[Member, ...]) -> BayTable:
    return bay_table(Frame("f", (3000, 3000), (2000, 2000)), CostCatalogue(), members, BOTH)


def test_existing_is_symmetric() -> None:
    assert existing_is_symmetric(_kept_table(()))
    assert existing_is_symmetric(_kept_table((Member(1, 1, B, R),)))
    assert not existing_is_symmetric(_kept_table((Member(1, 1, T, R),)))
    # An X of ties gives both arcs of its bay.
    assert existing_is_symmetric(_kept_table((Member(1, 1, T, R), Member(1, 1, T, F))))
    # THEORY.md's 2 x 2 chain of three ties: one-way arcs, not symmetric.
    chain = (Member(1, 1, T, R), Member(1, 2, T, F), Member(2, 2, T, R))
    assert not existing_is_symmetric(_kept_table(chain))
    # Adding the fourth tie closes a directed 4-cycle (row1 -> col1 -> row2 -> col2 -> row1): every arc
    # lies on a cycle, so the strong parts equal the connected parts, which is what contraction needs.
    cycle = (*chain, Member(2, 1, T, F))
    assert existing_is_symmetric(_kept_table(cycle))
