"""The optimizer's cost equals the exhaustive minimum on frames small enough to enumerate.

Reference: exhaustive enumeration (an independent computation): every
assignment of each free diagonal to nothing, a rigid brace or a tie (within the
allowed kinds) is tried by branch and bound, with stability decided by a
self-contained bitmask reachability test of the directed-cycle criterion
(Baglivo & Graver 1983, *Incidence and Symmetry in Design and Architecture*,
ch. 10; Bolker & Crapo 1979, SIAM J. Appl. Math. 36(3):473-490,
doi:10.1137/0136036), not the optimizer's code. The optimizer's layout is
also checked against the bar framework (tests/physics.py: numpy rank + scipy
linprog).
"""

from __future__ import annotations

import math
import random
from fractions import Fraction

import pytest

from bracegrid.analysis import is_stable
from bracegrid.errors import InfeasibleError
from bracegrid.model import CostCatalogue, CostRate, Diagonal, Frame, Member, MemberKind, Supports, blocked_bays
from bracegrid.optimize import SolveOptions, SolveStatus, optimize_frame
from tests.physics import physically_rigid

SIZES = [(1, 2), (1, 3), (2, 1), (2, 2), (2, 3), (3, 2), (1, 4), (3, 1)]


def _units(costs: CostCatalogue, kind: MemberKind, frame: Frame, row: int, col: int) -> int:
    """The documented price rule, written out again with exact fractions (docs/drawings.md, "Bill of
    materials"): cut length = diagonal to the nearest mm, price rounded half up to the cent."""
    cut = round(math.hypot(frame.widths[col - 1], frame.heights[row - 1]))
    rate = costs.rate(kind)
    exact = (
        (
            Fraction(repr(rate.per_piece))
            + Fraction(repr(rate.labour_per_piece))
            + Fraction(repr(rate.per_metre)) * cut / 1000
        )
        * (100 + Fraction(repr(costs.contingency_pct)))
        / 100
    )
    return math.floor(exact * 100 + Fraction(1, 2)) * 100


def _strong(n: int, out: list[int], inn: list[int]) -> bool:
    full = (1 << n) - 1
    for adj in (out, inn):
        seen, todo = 1, 1
        while todo:
            v = (todo & -todo).bit_length() - 1
            todo &= todo - 1
            new = adj[v] & ~seen
            seen |= new
            todo |= new
        if seen != full:
            return False
    return True


def exhaustive_minimum(frame: Frame, costs: CostCatalogue, allow: frozenset[MemberKind], bound: int) -> int | None:
    """Cheapest added cost of a stable layout below ``bound`` (None if none is cheaper than bound)."""
    r_count, c_count = frame.rows, frame.cols
    base = frame.supports is Supports.BASE
    n = r_count + c_count + (1 if base else 0)
    out0 = [0] * n
    inn0 = [0] * n

    def arc(out: list[int], inn: list[int], u: int, v: int) -> None:
        out[u] |= 1 << v
        inn[v] |= 1 << u

    if base:
        for j in range(c_count):
            arc(out0, inn0, n - 1, r_count + j)
            arc(out0, inn0, r_count + j, n - 1)
    taken = set()
    for m in frame.members:
        taken.add((m.row, m.col, m.diagonal))
        row, col = m.row - 1, r_count + m.col - 1
        if m.kind is MemberKind.BRACE or m.diagonal is Diagonal.RISING:
            arc(out0, inn0, row, col)
        if m.kind is MemberKind.BRACE or m.diagonal is Diagonal.FALLING:
            arc(out0, inn0, col, row)
    closed = blocked_bays(frame)
    slots = [
        (i, j, d)
        for i in range(1, r_count + 1)
        for j in range(1, c_count + 1)
        for d in Diagonal
        if (i, j) not in closed and (i, j, d) not in taken
    ]
    best = [bound]
    found = [False]

    def go(k: int, cost: int, out: list[int], inn: list[int]) -> None:
        if cost >= best[0]:
            return
        if _strong(n, out, inn):
            best[0] = cost
            found[0] = True
            return
        if k == len(slots):
            return
        i, j, d = slots[k]
        go(k + 1, cost, out, inn)
        row, col = i - 1, r_count + j - 1
        for kind in sorted(allow, key=lambda x: x.value):
            o2, i2 = out.copy(), inn.copy()
            if kind is MemberKind.BRACE or d is Diagonal.RISING:
                arc(o2, i2, row, col)
            if kind is MemberKind.BRACE or d is Diagonal.FALLING:
                arc(o2, i2, col, row)
            go(k + 1, cost + _units(costs, kind, frame, i, j), o2, i2)

    go(0, 0, out0, inn0)
    return best[0] if found[0] else None


def _random_case(seed: int) -> tuple[Frame, CostCatalogue]:
    rng = random.Random(seed)
    rows, cols = rng.choice(SIZES)
    widths = tuple(rng.choice([1000, 1500, 2000, 2500, 3000]) for _ in range(cols))
    heights = tuple(rng.choice([1000, 2000, 3000]) for _ in range(rows))
    blocked = frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < 0.15)
    supports = rng.choice([Supports.FREE, Supports.FREE, Supports.BASE])
    allow = rng.choice([frozenset(MemberKind), frozenset(MemberKind), frozenset({MemberKind.TIE}),
                        frozenset({MemberKind.BRACE})])  # fmt: skip
    members = []
    for i in range(1, rows + 1):
        for j in range(1, cols + 1):
            if (i, j) not in blocked and rng.random() < 0.15:
                members.append(Member(i, j, rng.choice(list(MemberKind)), rng.choice(list(Diagonal))))
    costs = CostCatalogue(
        brace=CostRate(rng.uniform(0, 40), rng.uniform(0, 12), rng.choice([0.0, 3.0])),
        tie=CostRate(rng.uniform(0, 25), rng.uniform(0, 6)),
        contingency_pct=rng.choice([0.0, 7.5]),
    )
    frame = Frame("enum", widths, heights, supports=supports, blocked=blocked, allow=allow, members=tuple(members))
    return frame, costs


def _full_layout(frame: Frame) -> list[Member]:
    """Every free diagonal filled with the strongest allowed member."""
    closed = blocked_bays(frame)
    taken = {(m.row, m.col, m.diagonal) for m in frame.members}
    kind = MemberKind.BRACE if MemberKind.BRACE in frame.allow else MemberKind.TIE
    extra = [
        Member(i, j, kind, d)
        for i in range(1, frame.rows + 1)
        for j in range(1, frame.cols + 1)
        for d in Diagonal
        if (i, j) not in closed and (i, j, d) not in taken
    ]
    return list(frame.members) + extra


@pytest.mark.parametrize("seed", range(60))
def test_optimizer_matches_exhaustive_minimum(seed: int) -> None:
    frame, costs = _random_case(seed)
    options = SolveOptions(time_limit=20, workers=1, seed=0)
    if not is_stable(frame, _full_layout(frame)):
        # Monotone: if filling every free diagonal is not stable, nothing is.
        with pytest.raises(InfeasibleError):
            optimize_frame(frame, costs, options=options)
        return
    sol = optimize_frame(frame, costs, options=options)
    assert sol.status is SolveStatus.OPTIMAL
    new = [m for m in sol.members if not m.existing or m not in frame.members]
    added_units = sum(_units(costs, m.kind, frame, m.row, m.col) for m in new)
    assert is_stable(frame, sol.members)
    assert physically_rigid(frame, sol.members)
    assert all(m in sol.members for m in frame.members), "kept members must stay"
    assert all(m.bay not in blocked_bays(frame) for m in new)
    assert all(m.kind in frame.allow for m in new)
    # Nothing strictly cheaper exists (bound = optimizer's cost).
    assert exhaustive_minimum(frame, costs, frame.allow, added_units) is None
    assert sol.added_cost == pytest.approx(added_units / 10_000, abs=0.006)


@pytest.mark.parametrize("seed", range(8))
def test_exhaustive_minimum_found_from_scratch(seed: int) -> None:
    """Enumerate without the optimizer's bound on 2 x 2 frames: the two minima agree exactly."""
    rng = random.Random(1000 + seed)
    frame = Frame("2x2", (rng.choice([1000, 3000]), 2000), (2000, rng.choice([1000, 2500])))
    costs = CostCatalogue(brace=CostRate(rng.uniform(5, 30), rng.uniform(0, 9)), tie=CostRate(rng.uniform(2, 20), 1.0))
    sol = optimize_frame(frame, costs, options=SolveOptions(time_limit=20, workers=1))
    best = exhaustive_minimum(frame, costs, frame.allow, 10**12)
    assert best is not None
    assert sol.added_cost == pytest.approx(best / 10_000, abs=0.006)
