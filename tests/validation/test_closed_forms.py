"""Closed forms for complete frames with uniform bays.

References (cited per test):
* braces only, free: R + C - 1 braces (a spanning tree of K(R, C)):
  E. D. Bolker and H. Crapo, "Bracing rectangular frameworks. I", SIAM J. Appl.
  Math. 36(3):473-490 (1979), doi:10.1137/0136036.
* ties only, free: 2 max(R, C) ties: J. A. Baglivo and J. E. Graver,
  *Incidence and Symmetry in Design and Architecture*, Cambridge University
  Press (1983), ch. 10 (strong connectivity; each column node needs an arc in
  and an arc out).
* pinned base: R braces or 2R ties (each row needs one arc to and one from the
  ground; same sources).
* mixed, brace cost a and tie cost b, r = min(R, C), c = max(R, C):
  min((r+c-1)a, 2rb + (c-r)a, 2cb) -- derived here (docs/optimizer.md gives the
  counting argument) and cross-checked against the CP-SAT cut model with the
  closed form switched off and against exhaustive enumeration.
"""

from __future__ import annotations

import pytest

from bracegrid.model import CostCatalogue, CostRate, Frame, MemberKind, Supports
from bracegrid.optimize import SolveOptions, SolveStatus, optimize_frame
from bracegrid.optimize.bays import bay_table
from bracegrid.optimize.cutloop import solve_with_cuts
from bracegrid.optimize.patterns import closed_form_cost
from bracegrid.optimize.warmstart import constructive
from tests.physics import physically_rigid
from tests.validation.test_exhaustive_optimize import exhaustive_minimum

OPTS = SolveOptions(time_limit=30, workers=1, seed=0)
BRACES = frozenset({MemberKind.BRACE})
TIES = frozenset({MemberKind.TIE})
BOTH = frozenset(MemberKind)


def _uniform(rows: int, cols: int, **kw: object) -> Frame:
    return Frame(f"{rows}x{cols}", (2500,) * cols, (2000,) * rows, **kw)  # type: ignore[arg-type]


def _costs(brace: float, tie: float) -> CostCatalogue:
    return CostCatalogue(brace=CostRate(brace, 0.0), tie=CostRate(tie, 0.0))


def _count(sol: object, kind: MemberKind) -> int:
    return sum(1 for m in sol.members if m.kind is kind)  # type: ignore[attr-defined]


@pytest.mark.parametrize(("rows", "cols"), [(1, 1), (1, 5), (3, 3), (4, 7), (8, 12), (20, 30)])
def test_braces_only_need_r_plus_c_minus_1(rows: int, cols: int) -> None:
    """Bolker & Crapo 1979: a minimum rigid bracing is a spanning tree, R + C - 1 braces."""
    sol = optimize_frame(_uniform(rows, cols, allow=BRACES), _costs(10, 1), options=OPTS)
    assert sol.status is SolveStatus.OPTIMAL
    assert len(sol.members) == rows + cols - 1
    if rows * cols <= 30:
        assert physically_rigid(sol.frame, sol.members)


@pytest.mark.parametrize(("rows", "cols"), [(1, 1), (1, 4), (4, 1), (2, 5), (5, 3), (6, 6), (9, 14)])
def test_ties_only_need_two_max(rows: int, cols: int) -> None:
    """Baglivo & Graver 1983: strong connectivity needs 2 max(R, C) ties, and that many suffice."""
    sol = optimize_frame(_uniform(rows, cols, allow=TIES), _costs(10, 1), options=OPTS)
    assert sol.status is SolveStatus.OPTIMAL
    assert _count(sol, MemberKind.TIE) == 2 * max(rows, cols)
    assert _count(sol, MemberKind.BRACE) == 0
    if rows * cols <= 30:
        assert physically_rigid(sol.frame, sol.members)


@pytest.mark.parametrize(("rows", "cols"), [(1, 3), (4, 4), (8, 12)])
def test_pinned_base_r_braces_or_2r_ties(rows: int, cols: int) -> None:
    """Pinned base (THEORY: ground node joined to every column): R braces when a < 2b, else 2R ties."""
    f = _uniform(rows, cols, supports=Supports.BASE)
    braces = optimize_frame(f, _costs(10, 6), options=OPTS)
    assert (_count(braces, MemberKind.BRACE), _count(braces, MemberKind.TIE)) == (rows, 0)
    ties = optimize_frame(f, _costs(10, 4), options=OPTS)
    assert (_count(ties, MemberKind.BRACE), _count(ties, MemberKind.TIE)) == (0, 2 * rows)
    if rows * cols <= 16:
        assert physically_rigid(f, braces.members)
        assert physically_rigid(f, ties.members)


PRICES = [(10, 4), (10, 5), (10, 6), (10, 7), (10, 9), (10, 10), (10, 12), (7, 5), (9, 5)]


@pytest.mark.parametrize(("rows", "cols"), [(1, 3), (2, 2), (2, 3), (3, 2), (3, 4), (4, 3), (4, 6)])
@pytest.mark.parametrize(("a", "b"), PRICES)
def test_mixed_formula_matches_cut_model(rows: int, cols: int, a: int, b: int) -> None:
    """Derived here (docs/optimizer.md): the CP-SAT cut model, closed form bypassed, reaches the formula."""
    frame = _uniform(rows, cols)
    costs = _costs(a, b)
    table = bay_table(frame, costs, (), BOTH)
    import time

    result = solve_with_cuts(
        table, k=0, row_sizes=frame.heights, col_sizes=frame.widths, incumbent=constructive(table),
        improve=lambda x: constructive(table, x), deadline=time.monotonic() + 30, workers=1, seed=0,
    )  # fmt: skip
    assert result.proven
    assert result.additions is not None
    assert result.additions.cost(table) == closed_form_cost(rows, cols, a * 10_000, b * 10_000)
    sol = optimize_frame(frame, costs, options=OPTS)
    assert sol.status is SolveStatus.OPTIMAL
    assert sol.added_cost == pytest.approx(closed_form_cost(rows, cols, a, b))
    assert physically_rigid(frame, sol.members)


@pytest.mark.parametrize(("rows", "cols"), [(2, 2), (1, 3), (2, 3)])
@pytest.mark.parametrize(("a", "b"), [(10, 4), (10, 6), (10, 9), (10, 12)])
def test_mixed_formula_matches_enumeration(rows: int, cols: int, a: int, b: int) -> None:
    """Derived here, checked by exhaustive enumeration of every diagonal assignment."""
    frame = _uniform(rows, cols)
    best = exhaustive_minimum(frame, _costs(a, b), BOTH, 10**12)
    assert best == closed_form_cost(rows, cols, a * 10_000, b * 10_000)
