"""The optimizer on general frames against exhaustive enumeration.

Every layout of a small general frame (nothing, a brace or a tie on each free diagonal of each open
bay) is priced to the cent and checked with the independent physics reference of
tests/physics_general.py (numpy SVD and scipy linprog, no product code); the cheapest stable one
must cost what the optimizer returns, and the optimizer must call it proven optimal.
"""

from __future__ import annotations

import itertools

import pytest

from bracegrid.errors import InfeasibleError
from bracegrid.model import (
    CostCatalogue,
    CostRate,
    Diagonal,
    Frame,
    GridBar,
    GridBarKind,
    Member,
    MemberKind,
    Supports,
)
from bracegrid.optimize import SolveOptions, SolveStatus, optimize_frame, repair_frame
from tests.physics_general import general_physically_rigid

COSTS = CostCatalogue(brace=CostRate(per_piece=23.0, per_metre=6.0), tie=CostRate(per_piece=7.0, per_metre=2.5))

CASES = [
    Frame("row-gap", (3000, 2400, 3000), (2000,), missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 2)})),
    Frame(
        "base-gap",
        (2500, 2500),
        (2000, 2000),
        supports=Supports.BASE,
        missing=frozenset({GridBar(GridBarKind.STANDARD, 1, 1)}),
    ),
    Frame("L3", (3000, 2000), (2500, 2000), absent=frozenset({(2, 2)})),
    Frame(
        "L3-gap",
        (3000, 2000),
        (2500, 2000),
        absent=frozenset({(2, 2)}),
        missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 1)}),
    ),
    Frame(
        "step-base",
        (2000, 3000, 2500),
        (2000,),
        supports=Supports.BASE,
        missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 3), GridBar(GridBarKind.STANDARD, 1, 1)}),
    ),
]


def _cheapest(frame: Frame, kept: tuple[Member, ...] = ()) -> int | None:
    """Cheapest stable addition to ``kept`` by enumeration, whole cents (None: no stable layout)."""
    bays = [(i, j) for i in range(1, frame.rows + 1) for j in range(1, frame.cols + 1) if (i, j) not in frame.absent]
    held = {(m.row, m.col, m.diagonal) for m in kept}
    slots = [(i, j, d) for i, j in bays for d in Diagonal if (i, j, d) not in held]
    choices = (None, MemberKind.BRACE, MemberKind.TIE)
    best: int | None = None
    for pick in itertools.product(choices, repeat=len(slots)):
        layout = [Member(i, j, k, d) for (i, j, d), k in zip(slots, pick, strict=True) if k is not None]
        cents = sum(COSTS.member_price_cents(m.kind, frame.cut_length_mm(m.row, m.col)) for m in layout)
        if best is not None and cents >= best:
            continue
        if general_physically_rigid(frame, [*kept, *layout]):
            best = cents
    return best


@pytest.mark.parametrize("frame", CASES, ids=lambda f: f.name)
def test_optimizer_matches_enumeration(frame: Frame) -> None:
    best = _cheapest(frame)
    assert best is not None
    sol = optimize_frame(frame, COSTS, options=SolveOptions(time_limit=30, workers=2))
    assert sol.status is SolveStatus.OPTIMAL
    assert round(sol.cost * 100) == best
    assert general_physically_rigid(frame, sol.members)


def test_repair_on_a_general_frame_matches_enumeration() -> None:
    """Take a member out of a stable L plan: the repair keeps every other member, and what it adds
    costs what the enumeration's cheapest completion of the kept members costs."""
    frame = CASES[2]
    first = optimize_frame(frame, COSTS, options=SolveOptions(time_limit=30, workers=2))
    placed = first.frame
    gone = placed.members[0]
    rest = tuple(m for m in placed.members if m is not gone)
    done = repair_frame(placed, COSTS, [gone], options=SolveOptions(time_limit=30, workers=2))
    assert done.status is SolveStatus.OPTIMAL
    assert set(rest) <= set(done.members)
    assert general_physically_rigid(frame, done.members)
    added = [m for m in done.members if m not in rest]
    cents = sum(COSTS.member_price_cents(m.kind, frame.cut_length_mm(m.row, m.col)) for m in added)
    assert cents == _cheapest(frame, rest)


def _cheapest_surviving(frame: Frame, k: int) -> int | None:
    """Cheapest layout that stays stable after any k member losses, by enumeration and the reference."""
    bays = [(i, j) for i in range(1, frame.rows + 1) for j in range(1, frame.cols + 1) if (i, j) not in frame.absent]
    slots = [(i, j, d) for i, j in bays for d in Diagonal]
    best: int | None = None
    for pick in itertools.product((None, MemberKind.BRACE, MemberKind.TIE), repeat=len(slots)):
        layout = [Member(i, j, kind, d) for (i, j, d), kind in zip(slots, pick, strict=True) if kind is not None]
        cents = sum(COSTS.member_price_cents(m.kind, frame.cut_length_mm(m.row, m.col)) for m in layout)
        if best is not None and cents >= best:
            continue
        if not general_physically_rigid(frame, layout):
            continue
        survives = all(
            general_physically_rigid(frame, [m for n, m in enumerate(layout) if n not in gone])
            for size in range(1, k + 1)
            for gone in itertools.combinations(range(len(layout)), size)
        )
        if survives:
            best = cents
    return best


@pytest.mark.parametrize("frame", [CASES[0], CASES[1], CASES[2]], ids=lambda f: f.name)
def test_redundant_optimum_matches_enumeration(frame: Frame) -> None:
    """Redundancy 1 on general frames (before: refused as not built): the cheapest layout that survives
    the loss of any one member, by the independent reference, is what the optimizer proves; where no
    layout survives, the optimizer says so."""
    best = _cheapest_surviving(frame, 1)
    options = SolveOptions(time_limit=30, workers=2, redundancy=1)
    if best is None:
        with pytest.raises(InfeasibleError):
            optimize_frame(frame, COSTS, options=options)
        return
    sol = optimize_frame(frame, COSTS, options=options)
    assert sol.status is SolveStatus.OPTIMAL
    assert round(sol.cost * 100) == best
    assert sol.redundancy == 1
    for gone in range(len(sol.members)):
        assert general_physically_rigid(frame, [m for n, m in enumerate(sol.members) if n != gone])
