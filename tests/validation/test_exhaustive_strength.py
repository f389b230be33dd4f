"""Strength-aware optimum against exhaustive enumeration with an independent plastic check.

Every assignment of the diagonals of small random frames is tried. Each stable one is checked by a
plastic feasibility LP written here from scratch (nodal equilibrium of the pin-jointed frame, own
node numbering and geometry, scipy.optimize.linprog), not by the product's capacity module, and by
the elastic tension-only analysis (bracegrid.mechanics) for the second check. The optimizer's
proven cost must equal the least cost over layouts passing both checks (it claims optimality only
over those), and its layout must pass both.
"""

from __future__ import annotations

import dataclasses
import itertools
import math

import numpy as np
import pytest
from scipy.optimize import linprog

from bracegrid.errors import InfeasibleError
from bracegrid.mechanics import analyse_frame, check_any, nodal_loads
from bracegrid.model import (
    CostCatalogue,
    Diagonal,
    Edge,
    Frame,
    GridBar,
    GridBarKind,
    GridStrength,
    LoadCase,
    Member,
    MemberKind,
    MemberStrength,
    SpreadRules,
    StrengthCatalogue,
    Supports,
    layout_cost_cents,
)
from bracegrid.optimize import SolveOptions, SolveStatus, optimize_frame


def independent_plastic_ok(frame: Frame, strength: StrengthCatalogue, members: list[Member]) -> bool:
    """Does some set of bar forces within capacity balance every case? Written without the product's LP."""
    xs = np.cumsum([0, *frame.widths]).astype(float)
    ys = np.cumsum([0, *frame.heights]).astype(float)
    nodes = [(p, q) for p in range(frame.rows + 1) for q in range(frame.cols + 1)]
    index = {n: k for k, n in enumerate(nodes)}
    bars: list[tuple[tuple[int, int], tuple[int, int], float, float]] = []  # a, b, -lower, upper
    g = strength.grid
    big = math.inf

    def bay(i: int, j: int) -> bool:
        return 1 <= i <= frame.rows and 1 <= j <= frame.cols and (i, j) not in frame.absent

    # A grid bar is there unless listed missing or bordered by absent bays only (docs/general-frames.md).
    gone = {(b.kind.value, b.line, b.span) for b in frame.missing}
    for p in range(frame.rows + 1):
        for q in range(frame.cols):
            if ("ledger", p, q + 1) in gone or not (bay(p, q + 1) or bay(p + 1, q + 1)):
                continue
            cap = big if g.ledger_kn is None else g.ledger_kn
            bars.append(((p, q), (p, q + 1), cap, cap))
    for q in range(frame.cols + 1):
        for p in range(frame.rows):
            if ("standard", q, p + 1) in gone or not (bay(p + 1, q) or bay(p + 1, q + 1)):
                continue
            cap = big if g.standard_kn is None else g.standard_kn
            bars.append(((p, q), (p + 1, q), cap, cap))
    for m in members:
        s = strength.of(m.kind)
        t = big if s.tension_kn is None else s.tension_kn
        c = 0.0 if m.kind is MemberKind.TIE else (big if s.compression_kn is None else s.compression_kn)
        if m.diagonal is Diagonal.RISING:
            a, b = (m.row - 1, m.col - 1), (m.row, m.col)
        else:
            a, b = (m.row, m.col - 1), (m.row - 1, m.col)
        bars.append((a, b, c, t))
    n_bars = len(bars)
    base = [index[(0, q)] for q in range(frame.cols + 1)] if frame.supports is Supports.BASE else []
    # A wall line under a held edge gives a reaction along the edge's own direction at each of its
    # nodes (x for the bottom and top edges, y for the sides), of either sign and unlimited.
    held: list[tuple[int, int]] = []  # (node, axis)
    for edge in frame.held_edges:
        if edge in (Edge.BOTTOM, Edge.TOP):
            p_line = 0 if edge is Edge.BOTTOM else frame.rows
            held += [(index[(p_line, q)], 0) for q in range(frame.cols + 1)]
        else:
            q_line = 0 if edge is Edge.LEFT else frame.cols
            held += [(index[(p, q_line)], 1) for p in range(frame.rows + 1)]
    held = sorted(set(held))
    # unknowns: bar tensions, base reactions (x, y) per base node, then held-edge reactions
    n_var = n_bars + 2 * len(base) + len(held)
    a_eq = np.zeros((2 * len(nodes), n_var))
    for k, (a, b, _, _) in enumerate(bars):
        d = np.array([xs[b[1]] - xs[a[1]], ys[b[0]] - ys[a[0]]])
        u = d / np.linalg.norm(d)
        # tension pulls node a towards b and node b towards a
        a_eq[2 * index[a] : 2 * index[a] + 2, k] += u
        a_eq[2 * index[b] : 2 * index[b] + 2, k] -= u
    for r, node in enumerate(base):
        a_eq[2 * node, n_bars + 2 * r] = 1.0
        a_eq[2 * node + 1, n_bars + 2 * r + 1] = 1.0
    for r, (node, axis) in enumerate(held):
        a_eq[2 * node + axis, n_bars + 2 * len(base) + r] = 1.0
    bounds = [(None if math.isinf(lo) else -lo, None if math.isinf(hi) else hi) for _, _, lo, hi in bars]
    for _ in base:
        bounds += [(None, None), (None if g.uplift_kn is None else -g.uplift_kn, None)]
    bounds += [(None, None)] * len(held)
    for case in frame.loads:
        for sense in case.senses:
            loads = nodal_loads(frame, case, sense)
            res = linprog(np.zeros(n_var), A_eq=a_eq, b_eq=-loads, bounds=bounds, method="highs")
            if res.status != 0:
                return False
    return True


def _random_frame(rng: np.random.Generator, kinds: tuple[MemberKind, ...]) -> tuple[Frame, StrengthCatalogue]:
    rows, cols = (2, 2) if len(kinds) == 1 else (1, 3)
    widths = tuple(int(w) for w in rng.choice([1500, 2000, 2500], size=cols))
    heights = tuple(int(h) for h in rng.choice([1800, 2000], size=rows))
    shear = [0.0, *(float(v) for v in rng.uniform(0.5, 4.0, size=rows))]
    gravity = tuple(float(v) for v in rng.uniform(0.0, 6.0, size=cols + 1))
    case = LoadCase("w", tuple(shear), reverse=bool(rng.integers(0, 2)), gravity_kn=gravity)
    strength = StrengthCatalogue(
        brace=MemberStrength(tension_kn=float(rng.uniform(3, 12)), compression_kn=float(rng.uniform(2, 9)), ea_kn=1e5),
        tie=MemberStrength(tension_kn=float(rng.uniform(3, 12)), ea_kn=float(rng.choice([1e4, 1e5]))),
        grid=GridStrength(
            ea_kn=1e5,
            standard_kn=float(rng.uniform(8, 30)),
            ledger_kn=float(rng.uniform(2, 8)),
            uplift_kn=float(rng.uniform(0, 6)),
        ),
    )
    rules = SpreadRules(max_members_per_column=int(rng.integers(2, 4))) if rng.random() < 0.4 else SpreadRules()
    frame = Frame("f", widths, heights, supports=Supports.BASE, allow=frozenset(kinds), loads=(case,), rules=rules)
    return frame, strength


def _options(frame: Frame, kinds: tuple[MemberKind, ...]) -> list[tuple[Member | None, ...]]:
    slots = [(i, j, d) for i in range(1, frame.rows + 1) for j in range(1, frame.cols + 1) for d in Diagonal]
    choices = [[None, *(Member(i, j, k, d, existing=False) for k in kinds)] for i, j, d in slots]
    return [tuple(pick) for pick in itertools.product(*choices)]


def _meets_rules(frame: Frame, members: list[Member]) -> bool:
    cap = frame.rules.max_members_per_column
    return cap is None or all(sum(1 for m in members if m.col == j) <= cap for j in range(1, frame.cols + 1))


@pytest.mark.parametrize(("seed", "kinds"), [(s, (MemberKind.TIE,)) for s in range(3)]
                         + [(s, (MemberKind.BRACE, MemberKind.TIE)) for s in range(10, 12)])  # fmt: skip
def test_optimizer_matches_enumeration(seed: int, kinds: tuple[MemberKind, ...]) -> None:
    rng = np.random.default_rng(seed)
    frame, strength = _random_frame(rng, kinds)
    _agrees_with_enumeration(frame, strength, kinds)


def _agrees_with_enumeration(frame: Frame, strength: StrengthCatalogue, kinds: tuple[MemberKind, ...]) -> None:
    """The optimizer's answer against the least cost over every assignment that passes both checks."""
    costs = CostCatalogue()
    best_both: int | None = None
    best_plastic: int | None = None
    for pick in _options(frame, kinds):
        members = [m for m in pick if m is not None]
        if not _meets_rules(frame, members) or not check_any(frame, members).stable:
            continue
        cost = layout_cost_cents(frame, costs, members)
        if best_both is not None and cost >= best_both:
            continue
        if not independent_plastic_ok(frame, strength, members):
            continue
        best_plastic = cost if best_plastic is None else min(best_plastic, cost)
        if analyse_frame(frame, strength, members=members).ok:
            best_both = cost
    options = SolveOptions(time_limit=30, workers=1)
    if best_plastic is None:
        with pytest.raises(InfeasibleError):
            optimize_frame(frame, costs, strength=strength, options=options)
        return
    sol = optimize_frame(frame, costs, strength=strength, options=options)
    assert sol.strength is not None
    got = layout_cost_cents(frame, costs, sol.members)
    assert independent_plastic_ok(frame, strength, list(sol.members))
    if sol.strength.elastic_ok:
        assert best_both is not None
        assert sol.status is SolveStatus.OPTIMAL
        assert got == best_both
    else:  # reported plainly as failing elastically; never below the plastic minimum
        assert got >= best_plastic
        assert "FAILS" in sol.strength.words


def _random_plan_grid(rng: np.random.Generator, kinds: tuple[MemberKind, ...]) -> tuple[Frame, StrengthCatalogue]:
    """A free plan grid held by wall lines along its two sides, loaded along its vertical lines."""
    rows, cols = (2, 2) if len(kinds) == 1 else (1, 3)
    widths = tuple(int(w) for w in rng.choice([2000, 3000], size=cols))
    heights = tuple(int(h) for h in rng.choice([2000, 3000], size=rows))
    vertical = (0.0, *(float(v) for v in rng.uniform(2.0, 8.0, size=cols - 1)), 0.0)
    case = LoadCase("plan", (0.0,) * (rows + 1), vertical_kn=vertical, reverse=bool(rng.integers(0, 2)))
    strength = StrengthCatalogue(
        brace=MemberStrength(tension_kn=float(rng.uniform(3, 12)), compression_kn=float(rng.uniform(2, 9)), ea_kn=1e5),
        tie=MemberStrength(tension_kn=float(rng.uniform(3, 12)), ea_kn=float(rng.choice([1e4, 1e5]))),
        grid=GridStrength(ea_kn=1e5, standard_kn=float(rng.uniform(4, 20)), ledger_kn=float(rng.uniform(2, 6))),
    )
    frame = Frame("plan", widths, heights, held_edges=frozenset({Edge.LEFT, Edge.RIGHT}), allow=frozenset(kinds),
                  loads=(case,))  # fmt: skip
    return frame, strength


#: Seeds where the loads change the optimum (found by enumeration: with most seeds the cheapest
#: stable layout already carries the case, and the test would not exercise the capacity cuts).
#: Seeds 204 and 210 also have layouts that pass plastically and fail elastically (204: every one;
#: 210: the cheapest plastic layout costs 200.98, the cheapest passing both 275.40).
PLAN_SEEDS = [(s, (MemberKind.TIE,)) for s in (109, 110, 137)] + [
    (s, (MemberKind.BRACE, MemberKind.TIE)) for s in (204, 210, 231)
]


@pytest.mark.parametrize(("seed", "kinds"), PLAN_SEEDS)
def test_plan_grid_optimum_matches_enumeration(seed: int, kinds: tuple[MemberKind, ...]) -> None:
    """Free frames held on two edges: stability by directed cuts, capacity by the Benders loop."""
    rng = np.random.default_rng(seed)
    frame, strength = _random_plan_grid(rng, kinds)
    _agrees_with_enumeration(frame, strength, kinds)


#: Seeds of pinned-base frames with one grid bar left out where the loads matter (found by enumeration;
#: with most seeds ties alone cannot stabilise the frame, or the cheapest stable layout carries the
#: case): 26 and 39 (ties) and 21 (mixed) cost more than stability alone; 57 (ties) has layouts that
#: pass plastically and none that passes both; with seed 6 (ties) stable layouts exist and none
#: carries the case. (Mixed seeds enumerate 15 625 layouts with the exact check: one is enough.)
GENERAL_SEEDS = [(s, (MemberKind.TIE,)) for s in (6, 26, 39, 57)] + [(21, (MemberKind.BRACE, MemberKind.TIE))]


@pytest.mark.parametrize(("seed", "kinds"), GENERAL_SEEDS)
def test_general_frame_optimum_matches_enumeration(seed: int, kinds: tuple[MemberKind, ...]) -> None:
    """A missing ledger or standard: stability by the exact check, capacity on the frame's own bars."""
    rng = np.random.default_rng(seed)
    frame, strength = _random_frame(rng, kinds)
    kind = GridBarKind.LEDGER if rng.random() < 0.5 else GridBarKind.STANDARD
    line = int(rng.integers(1, frame.rows + 1)) if kind is GridBarKind.LEDGER else int(rng.integers(1, frame.cols))
    span = int(rng.integers(1, (frame.cols if kind is GridBarKind.LEDGER else frame.rows) + 1))
    frame = dataclasses.replace(frame, missing=frozenset({GridBar(kind, line, span)}))
    assert not frame.is_complete
    _agrees_with_enumeration(frame, strength, kinds)


def test_independent_lp_agrees_on_a_hand_case() -> None:
    """One bay, one rising tie, 6 kN at the top: tie force 6 x 5/3 = 10 kN (3 m wide, 4 m high)."""
    frame = Frame("bay", (3000,), (4000,), supports=Supports.BASE, loads=(LoadCase("push", (0.0, 6.0)),))
    tie = [Member(1, 1, MemberKind.TIE, Diagonal.RISING)]

    def strength(t: float) -> StrengthCatalogue:
        return StrengthCatalogue(tie=MemberStrength(tension_kn=t, ea_kn=1e4), grid=GridStrength(ea_kn=1e5))

    assert independent_plastic_ok(frame, strength(10.0 + 1e-6), tie)
    assert not independent_plastic_ok(frame, strength(9.99), tie)
    assert not independent_plastic_ok(dataclasses.replace(frame), strength(9.99), tie)
