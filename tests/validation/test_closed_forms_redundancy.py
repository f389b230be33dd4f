"""N-1 closed forms on complete frames with uniform bays.

References (derived here, following THEORY's redundancy section and Menger's
theorem: a layout survives any single loss iff every cut has two member arcs
each way):
* braces only: every node needs two distinct braces, each brace touches one
  column node, so at least 2 max(R, C) braces when R, C >= 2; a Hamiltonian
  cycle of K(R, R) shows 2R suffice when R = C.
* ties only: every column node needs two ties in and two out, each tie
  touches one column node: at least 4 max(R, C) ties (reached on the sizes
  below, checked by the optimizer's proof and the brute-force removal check).
"""

from __future__ import annotations

import pytest

from bracegrid.analysis import is_stable
from bracegrid.model import CostCatalogue, CostRate, Frame, MemberKind
from bracegrid.optimize import SolveOptions, SolveStatus, optimize_frame

OPTS = SolveOptions(time_limit=30, workers=1, seed=0, redundancy=1)
FLAT = CostCatalogue(brace=CostRate(10, 0), tie=CostRate(4, 0))


def _frame(rows: int, cols: int, allow: frozenset[MemberKind]) -> Frame:
    return Frame(f"{rows}x{cols}", (2500,) * cols, (2000,) * rows, allow=allow)


def _survives(frame: Frame, members: tuple) -> bool:  # type: ignore[type-arg]
    return all(is_stable(frame, members[:i] + members[i + 1 :]) for i in range(len(members)))


@pytest.mark.parametrize("side", [2, 3, 4, 5])
def test_braces_only_square_needs_2r(side: int) -> None:
    """Degree >= 2 at every node gives >= 2 max(R, C); a Hamiltonian cycle of K(R, R) reaches it."""
    sol = optimize_frame(_frame(side, side, frozenset({MemberKind.BRACE})), FLAT, options=OPTS)
    assert sol.status is SolveStatus.OPTIMAL
    assert len(sol.members) == 2 * side
    assert _survives(sol.frame, sol.members)


@pytest.mark.parametrize(("rows", "cols"), [(2, 3), (3, 5)])
def test_braces_only_at_least_2_max(rows: int, cols: int) -> None:
    sol = optimize_frame(_frame(rows, cols, frozenset({MemberKind.BRACE})), FLAT, options=OPTS)
    assert len(sol.members) >= 2 * max(rows, cols)
    assert _survives(sol.frame, sol.members)


@pytest.mark.parametrize(("rows", "cols"), [(2, 2), (2, 3), (3, 3), (3, 4), (4, 4)])
def test_ties_only_need_4_max(rows: int, cols: int) -> None:
    """Two ties in and two out at every column node: 4 max(R, C), reached on these sizes."""
    sol = optimize_frame(_frame(rows, cols, frozenset({MemberKind.TIE})), FLAT, options=OPTS)
    assert sol.status is SolveStatus.OPTIMAL
    assert len(sol.members) == 4 * max(rows, cols)
    assert _survives(sol.frame, sol.members)


def test_ties_only_one_row_is_impossible() -> None:
    """THEORY: ties-only N-1 is impossible when min(R, C) = 1 (a column's own bay holds at most an X)."""
    from bracegrid.errors import InfeasibleError

    with pytest.raises(InfeasibleError, match="redundancy 1"):
        optimize_frame(_frame(1, 4, frozenset({MemberKind.TIE})), FLAT, options=OPTS)


@pytest.mark.parametrize(("rows", "cols", "a", "b"), [(3, 3, 10, 4), (3, 3, 10, 6), (3, 4, 10, 9), (4, 4, 10, 3)])
def test_mixed_meets_degree_bound(rows: int, cols: int, a: int, b: int) -> None:
    """THEORY: mixed, uniform costs: at least c * min(2a, a + 2b, 4b) (each long-side node needs 2 in, 2 out)."""
    costs = CostCatalogue(brace=CostRate(a, 0), tie=CostRate(b, 0))
    sol = optimize_frame(_frame(rows, cols, frozenset(MemberKind)), costs, options=OPTS)
    c = max(rows, cols)
    assert sol.cost >= c * min(2 * a, a + 2 * b, 4 * b) - 1e-9
    assert _survives(sol.frame, sol.members)
