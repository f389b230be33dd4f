"""N-1 layouts: brute force over single removals, and exhaustive minimum cost on tiny frames.

References: a layout survives the loss of any one member iff it stays stable
after each single removal -- checked here literally, member by member, with
the stability check (directed-cycle criterion, Baglivo & Graver 1983, ch. 10)
and with the bar-framework reference tests/physics.py (numpy rank + scipy
linprog). The cost is compared with exhaustive enumeration of every
assignment of each diagonal to nothing / brace / tie (an independent
computation, with its own bitmask reachability test).
"""

from __future__ import annotations

import random

import pytest

from bracegrid.analysis import is_stable, redundancy_of
from bracegrid.errors import InfeasibleError
from bracegrid.model import CostCatalogue, CostRate, Diagonal, Frame, Member, MemberKind, Supports, blocked_bays
from bracegrid.optimize import SolveOptions, SolveStatus, optimize_frame
from tests.physics import physically_rigid
from tests.validation.test_exhaustive_optimize import _strong, _units

OPTS = SolveOptions(time_limit=30, workers=1, seed=0, redundancy=1)


def _survives_any_single_loss(frame: Frame, members: tuple[Member, ...]) -> bool:
    return all(is_stable(frame, members[:i] + members[i + 1 :]) for i in range(len(members)))


def _arcs(frame: Frame, layout: list[tuple[int, int, Diagonal, MemberKind]]) -> tuple[list[int], list[int], int]:
    r_count, c_count = frame.rows, frame.cols
    base = frame.supports is Supports.BASE
    n = r_count + c_count + (1 if base else 0)
    out, inn = [0] * n, [0] * n

    def arc(u: int, v: int) -> None:
        out[u] |= 1 << v
        inn[v] |= 1 << u

    if base:
        for j in range(c_count):
            arc(n - 1, r_count + j)
            arc(r_count + j, n - 1)
    for i, j, d, kind in layout:
        row, col = i - 1, r_count + j - 1
        if kind is MemberKind.BRACE or d is Diagonal.RISING:
            arc(row, col)
        if kind is MemberKind.BRACE or d is Diagonal.FALLING:
            arc(col, row)
    return out, inn, n


def _n_minus_1(frame: Frame, layout: list[tuple[int, int, Diagonal, MemberKind]]) -> bool:
    for i in range(len(layout)):
        out, inn, n = _arcs(frame, layout[:i] + layout[i + 1 :])
        if not _strong(n, out, inn):
            return False
    out, inn, n = _arcs(frame, layout)
    return _strong(n, out, inn)


def exhaustive_n_minus_1(frame: Frame, costs: CostCatalogue, bound: int) -> int | None:
    """Cheapest added cost (below bound) of a layout surviving any single loss; None if none is cheaper."""
    kept = [(m.row, m.col, m.diagonal, m.kind) for m in frame.members]
    taken = {(m.row, m.col, m.diagonal) for m in frame.members}
    closed = blocked_bays(frame)
    slots = [
        (i, j, d)
        for i in range(1, frame.rows + 1)
        for j in range(1, frame.cols + 1)
        for d in Diagonal
        if (i, j) not in closed and (i, j, d) not in taken
    ]
    best, found = [bound], [False]

    def go(k: int, cost: int, layout: list[tuple[int, int, Diagonal, MemberKind]]) -> None:
        if cost >= best[0]:
            return
        if _n_minus_1(frame, layout):
            best[0], found[0] = cost, True
            return
        if k == len(slots):
            return
        i, j, d = slots[k]
        go(k + 1, cost, layout)
        for kind in sorted(frame.allow, key=lambda x: x.value):
            go(k + 1, cost + _units(costs, kind, frame, i, j), [*layout, (i, j, d, kind)])

    go(0, 0, kept)
    return best[0] if found[0] else None


def _case(seed: int) -> tuple[Frame, CostCatalogue]:
    rng = random.Random(seed)
    rows, cols = rng.choice([(1, 2), (2, 1), (2, 2), (1, 3), (2, 2), (2, 3)])
    widths = tuple(rng.choice([1000, 2000, 3000]) for _ in range(cols))
    heights = tuple(rng.choice([1000, 2000, 3000]) for _ in range(rows))
    blocked = frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < 0.1)
    members = tuple(
        Member(i, j, rng.choice(list(MemberKind)), rng.choice(list(Diagonal)))
        for i in range(1, rows + 1)
        for j in range(1, cols + 1)
        if (i, j) not in blocked and rng.random() < 0.2
    )
    frame = Frame(
        "n1", widths, heights, blocked=blocked, members=members,
        supports=rng.choice([Supports.FREE, Supports.FREE, Supports.BASE]),
        allow=rng.choice([frozenset(MemberKind), frozenset(MemberKind), frozenset({MemberKind.BRACE})]),
    )  # fmt: skip
    costs = CostCatalogue(
        brace=CostRate(rng.uniform(5, 40), rng.uniform(0, 10)), tie=CostRate(rng.uniform(2, 25), rng.uniform(0, 5))
    )
    return frame, costs


@pytest.mark.parametrize("seed", range(24))
def test_n_minus_1_optimum_matches_exhaustive(seed: int) -> None:
    frame, costs = _case(seed)
    try:
        sol = optimize_frame(frame, costs, options=OPTS)
    except InfeasibleError:
        assert exhaustive_n_minus_1(frame, costs, 10**12) is None
        return
    assert sol.status is SolveStatus.OPTIMAL
    assert sol.redundancy >= 1
    assert _survives_any_single_loss(frame, sol.members)
    for i in range(len(sol.members)):
        assert physically_rigid(frame, sol.members[:i] + sol.members[i + 1 :])
    assert not sol.verdict.critical_members
    new = [m for m in sol.members if m not in frame.members]
    added = sum(_units(costs, m.kind, frame, m.row, m.col) for m in new)
    assert exhaustive_n_minus_1(frame, costs, added) is None  # nothing strictly cheaper


@pytest.mark.parametrize("seed", range(12))
def test_n_minus_1_layouts_survive_every_single_loss_random(seed: int) -> None:
    """Larger random frames: brute force over every single removal (stability check)."""
    rng = random.Random(500 + seed)
    rows, cols = rng.randint(2, 6), rng.randint(2, 6)
    frame = Frame(
        "n1",
        tuple(rng.randint(10, 30) * 100 for _ in range(cols)),
        tuple(rng.randint(10, 30) * 100 for _ in range(rows)),
        blocked=frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < 0.1),
        supports=rng.choice(list(Supports)),
    )  # fmt: skip
    try:
        sol = optimize_frame(frame, CostCatalogue(), options=OPTS)
    except InfeasibleError:
        return
    assert _survives_any_single_loss(frame, sol.members)
    assert redundancy_of(frame, sol.members) >= 1
