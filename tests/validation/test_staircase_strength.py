"""A face whose ledger limit decides where ties go: proven optimum against a hand count and an independent LP.

Each lift's ties must carry its storey shear; a tie's horizontal capacity is ``T w / L`` (hand
statics), so lift i needs at least ``ceil(V_i L / (T w))`` ties in each sense, and at least one
(stability). That count is a lower bound on every layout; the optimizer must prove a layout of
exactly that cost and the layout must pass the equilibrium LP written in the test from scratch.
With a 6 kN ledger limit, stacking the ties in one bay column fails that LP (the shear of 7.5 kN
would run along a ledger between lifts), so the optimum has to pass shear from node to node.
"""

from __future__ import annotations

import math

from bracegrid.model import (
    CostCatalogue,
    CostRate,
    Diagonal,
    Frame,
    GridStrength,
    LoadCase,
    Member,
    MemberKind,
    MemberStrength,
    StrengthCatalogue,
    Supports,
    layout_cost,
)
from bracegrid.optimize import SolveOptions, SolveStatus, optimize_frame
from tests.validation.test_exhaustive_strength import independent_plastic_ok

COLS, ROWS, W, H = 10, 5, 2500, 2000
COSTS = CostCatalogue(tie=CostRate(per_piece=7.0, per_metre=2.0, labour_per_piece=3.0))
STRENGTH = StrengthCatalogue(
    tie=MemberStrength(tension_kn=12.0, ea_kn=10000.0),
    grid=GridStrength(ea_kn=110000.0, standard_kn=40.0, ledger_kn=6.0, uplift_kn=10.0),
)
LINE_KN, TOP_KN = 3.0, 1.5


def _frame() -> Frame:
    wind = LoadCase("wind", (0.0, *([LINE_KN] * (ROWS - 1)), TOP_KN), reverse=True, gravity_kn=(10.0,) * (COLS + 1))
    ties = frozenset({MemberKind.TIE})
    return Frame("face", (W,) * COLS, (H,) * ROWS, supports=Supports.BASE, loads=(wind,), allow=ties)


def _hand_count() -> int:
    """Fewest ties over both senses: per lift ``max(1, ceil(V_i / (T w / L)))`` each way."""
    per_tie = 12.0 * W / math.hypot(W, H)  # 9.37 kN horizontal
    total = 0
    for i in range(1, ROWS + 1):
        shear = LINE_KN * (ROWS - i) + TOP_KN
        total += 2 * max(1, math.ceil(shear / per_tie))
    return total


def test_ledger_limited_face_is_proven_at_the_hand_count() -> None:
    frame = _frame()
    sol = optimize_frame(frame, COSTS, options=SolveOptions(time_limit=30.0, workers=2), strength=STRENGTH)
    assert sol.status is SolveStatus.OPTIMAL
    ties = _hand_count()
    assert ties == 14
    assert len(sol.members) == ties
    one_tie = layout_cost(frame, COSTS, [Member(1, 1, MemberKind.TIE, Diagonal.RISING)])
    assert math.isclose(sol.cost, ties * one_tie, abs_tol=0.01)
    assert independent_plastic_ok(frame, STRENGTH, list(sol.members))
    assert sol.strength is not None
    assert sol.strength.plastic_ok
    assert sol.strength.elastic_ok


def test_stacked_ties_of_the_same_count_fail_the_independent_lp() -> None:
    """Same number of ties, all in bay columns 5 and 6: the shear crosses ledgers between lifts."""
    counts = [2, 2, 1, 1, 1]
    members = []
    for i, n in enumerate(counts, start=1):
        for j in range(n):
            members.append(Member(i, 5 + j, MemberKind.TIE, Diagonal.RISING))
            members.append(Member(i, 5 + j, MemberKind.TIE, Diagonal.FALLING))
    assert len(members) == _hand_count()
    assert not independent_plastic_ok(_frame(), STRENGTH, members)
