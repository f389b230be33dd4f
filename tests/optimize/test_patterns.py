"""Closed-form layouts of a complete frame (src/bracegrid/optimize/patterns.py).

References (THEORY.md, "Consequences worth testing"):
* a spanning tree of braces has R + C - 1 members (Bolker & Crapo 1979);
* the fewest ties are 2 max(R, C) (Baglivo & Graver 1983, degree counting);
* the mixed layout: 2 min(R, C) ties in a cycle plus max - min braces;
* the cheapest complete uniform frame, brace a, tie b, r = min, c = max: 2cb if 2b <= a,
  (r + c - 1) a if b >= a, otherwise min((r + c - 1) a, 2rb + (c - r) a).
Every pattern is checked stable with the stability check (bracegrid.analysis.is_stable), and the
piecewise formula is evaluated in this file as the reference for closed_form_cost.
"""

from __future__ import annotations

import itertools

import pytest

from bracegrid.analysis import is_stable
from bracegrid.model import CostCatalogue, Frame, MemberKind
from bracegrid.optimize.bays import bay_table
from bracegrid.optimize.patterns import PatternKind, closed_form_cost, pattern

SIDES = range(1, 7)


def test_pattern_kinds() -> None:
    assert [k.value for k in PatternKind] == ["tree", "cycle", "mixed"]
    assert PatternKind.TREE.words == "spanning tree of braces"
    assert PatternKind.CYCLE.words == "one cycle of ties"
    assert PatternKind.MIXED.words == "tie cycle plus braces"


def _expected_counts(rows: int, cols: int, kind: PatternKind) -> tuple[int, int]:
    """(braces, ties) of each closed-form layout, THEORY.md."""
    r, c = min(rows, cols), max(rows, cols)
    return {
        PatternKind.TREE: (rows + cols - 1, 0),
        PatternKind.CYCLE: (0, 2 * c),
        PatternKind.MIXED: (c - r, 2 * r),
    }[kind]


@pytest.mark.parametrize(("rows", "cols"), list(itertools.product(SIDES, SIDES)))
def test_every_pattern_has_its_count_and_is_stable(rows: int, cols: int) -> None:
    frame = Frame("complete", (3000,) * cols, (2000,) * rows)
    table = bay_table(frame, CostCatalogue(), (), frozenset(MemberKind))
    for kind in PatternKind:
        add = pattern(rows, cols, kind)
        assert add.braces.shape == (rows, cols)
        braces, ties = int(add.braces.sum()), int(add.rising.sum() + add.falling.sum())
        assert (braces, ties) == _expected_counts(rows, cols, kind), kind
        members = add.members(table)  # raises if any bay were over-full
        assert len(members) == braces + ties
        assert is_stable(frame, members), (rows, cols, kind)
        if kind is PatternKind.TREE:
            assert ties == 0
        if kind is PatternKind.CYCLE:
            assert braces == 0


def test_mixed_example() -> None:
    # Docstring example: 2 x 3 -> 1 brace (3 - 2) and 4 ties (2 x 2).
    a = pattern(2, 3, PatternKind.MIXED)
    assert (int(a.braces.sum()), int(a.rising.sum() + a.falling.sum())) == (1, 4)


def _theory_cost(rows: int, cols: int, a: int, b: int) -> int:
    """THEORY.md's piecewise minimum for a complete uniform frame with both kinds allowed."""
    r, c = min(rows, cols), max(rows, cols)
    if 2 * b <= a:
        return 2 * c * b
    if b >= a:
        return (r + c - 1) * a
    return min((r + c - 1) * a, 2 * r * b + (c - r) * a)


@pytest.mark.parametrize(
    ("rows", "cols", "a", "b", "expected"),
    [
        (4, 6, 10, 7, 76),  # middle regime: min(9 x 10, 2 x 4 x 7 + 2 x 10) = min(90, 76); docstring example
        (2, 3, 10, 5, 30),  # 2b <= a: ties only, 2 x 3 x 5
        (2, 3, 10, 4, 24),  # 2b < a: 2 x 3 x 4
        (3, 3, 10, 10, 50),  # b >= a: braces only, (3 + 3 - 1) x 10
        (5, 2, 10, 12, 60),  # b > a: (2 + 5 - 1) x 10
        (1, 6, 10, 6, 60),  # middle: r = 1, c = 6: min(6 x 10, 2 x 1 x 6 + 5 x 10) = min(60, 62); 2cb = 72
    ],
)
def test_closed_form_cost_cases(rows: int, cols: int, a: int, b: int, expected: int) -> None:
    assert closed_form_cost(rows, cols, a, b) == expected
    assert closed_form_cost(cols, rows, a, b) == expected  # symmetric in R and C


def test_closed_form_cost_with_one_kind() -> None:
    # Only braces: (r + c - 1) a; only ties: 2 max(R, C) b (THEORY.md).
    assert closed_form_cost(4, 6, 10, None) == 90
    assert closed_form_cost(4, 6, None, 7) == 84
    assert closed_form_cost(1, 1, None, 3) == 6


@pytest.mark.parametrize(("rows", "cols"), list(itertools.product(SIDES, SIDES)))
def test_closed_form_cost_matches_the_piecewise_formula_and_the_patterns(rows: int, cols: int) -> None:
    for a, b in itertools.product((1, 3, 7, 10, 13, 20), repeat=2):
        best = closed_form_cost(rows, cols, a, b)
        assert best == _theory_cost(rows, cols, a, b), (a, b)
        # The cheapest of the three patterns reaches it.
        costs = []
        for kind in PatternKind:
            add = pattern(rows, cols, kind)
            costs.append(int(add.braces.sum()) * a + int(add.rising.sum() + add.falling.sum()) * b)
        assert min(costs) == best
