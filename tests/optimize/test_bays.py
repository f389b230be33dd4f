"""The optimizer's per-bay tables (src/bracegrid/optimize/bays.py): cost units, BayTable, Additions, builders.

References: prices by hand from CostCatalogue's rule (per piece + per metre x diagonal) with the
default catalogue (brace 25 + 8/m, tie 9 + 3/m) and diagonals from the 3-4-5 triangle or side x
sqrt(2); one cost unit is 1/10000 of a money unit (module docstring); the read-only arrays are
numpy's ``writeable = False`` flag (assignment raises ValueError, numpy documentation of
``ndarray.setflags``). Arc counts follow the THEORY.md table (brace both ways, rising tie up,
falling tie down).
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from bracegrid.model import CostCatalogue, Diagonal, Frame, Member, MemberKind, Opening
from bracegrid.optimize.bays import SCALE, Additions, AdditionsBuilder, BayTable, bay_table, cost_units, money

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING
BOTH = frozenset(MemberKind)


def test_cost_units() -> None:
    assert SCALE == 10_000
    # Hand: brace on a 5 m diagonal = 65.00 -> 650000 units; tie = 24.00 -> 240000.
    assert cost_units(CostCatalogue(), B, 5000) == 650_000
    assert cost_units(CostCatalogue(), T, 5000) == 240_000
    # Hand: tie on a 1 m x 1 m bay, cut 1414 mm = 9 + 3 x 1.414 = 13.242 -> 13.24 (the bill's
    # price to the cent) -> 132400 units.
    assert cost_units(CostCatalogue(), T, 1414) == 132_400


def test_money() -> None:
    assert money(650_049) == 65.0  # 65.0049 -> 65.00
    assert money(123_456) == 12.35  # 12.3456 -> 12.35
    assert money(0) == 0.0
    assert money(1_000_000.0) == 100.0


def test_bay_table_costs() -> None:
    t = bay_table(Frame("f", (3000, 4000), (4000,)), CostCatalogue(), (), BOTH)
    # Hand: bay (1, 1) 3 x 4 m -> 5 m diagonal; bay (1, 2) 4 x 4 m -> 5.65685 m, cut 5657 mm.
    # Brace: 65.00 and 25 + 8 x 5.657 = 70.256 -> 70.26. Tie: 24.00 and 9 + 3 x 5.657 = 25.971 -> 25.97.
    assert t.brace_cost.tolist() == [[650_000, 702_600]]
    assert t.tie_cost.tolist() == [[240_000, 259_700]]
    assert (t.rows, t.cols) == (1, 2)
    assert t.existing_cost == 0
    assert t.free_slots.tolist() == [[2, 2]]
    assert t.brace_ok.all()
    assert t.tie_ok


def test_blocked_and_opening_bays_are_closed() -> None:
    door = Opening("door", ((3200, 0), (3800, 0), (3800, 1000), (3200, 1000)))
    f = Frame("f", (3000, 3000), (2000, 2000), blocked=frozenset({(2, 1)}), openings=(door,))
    t = bay_table(f, CostCatalogue(), (), BOTH)
    # Hand: (2, 1) listed, the door (x 3200-3800, y 0-1000) blocks (1, 2).
    closed = [[False, True], [True, False]]
    assert t.rising_free.tolist() == [[True, False], [False, True]]
    assert t.falling_free.tolist() == [[True, False], [False, True]]
    assert t.brace_ok.tolist() == [[True, False], [False, True]]
    assert (~t.rising_tie_ok).tolist() == closed
    assert t.free_slots.tolist() == [[2, 0], [0, 2]]


def test_existing_members() -> None:
    f = Frame("f", (3000, 3000), (4000,))
    kept = (Member(1, 1, T, R), Member(1, 2, B, F), Member(1, 2, T, R))
    t = bay_table(f, CostCatalogue(), kept, BOTH)
    # Hand: (1, 1) rising tie -> up arc, rising diagonal taken; (1, 2) brace + rising tie -> up 2, down 1, full.
    assert t.exist_up.tolist() == [[1, 2]]
    assert t.exist_down.tolist() == [[0, 1]]
    assert t.rising_free.tolist() == [[False, False]]
    assert t.falling_free.tolist() == [[True, False]]
    assert t.free_slots.tolist() == [[1, 0]]
    assert t.brace_ok.tolist() == [[True, False]]
    assert t.falling_tie_ok.tolist() == [[True, False]]
    assert t.rising_tie_ok.tolist() == [[False, False]]
    # Hand: 5 m diagonals: tie 240000 + brace 650000 + tie 240000.
    assert t.existing_cost == 1_130_000


def test_allowed_kinds() -> None:
    f = Frame("f", (3000,), (4000,))
    braces = bay_table(f, CostCatalogue(), (), frozenset({B}))
    ties = bay_table(f, CostCatalogue(), (), frozenset({T}))
    assert braces.brace_ok.all()
    assert not braces.tie_ok
    assert not braces.rising_tie_ok.any()
    assert not ties.brace_ok.any()
    assert ties.tie_ok
    assert ties.rising_tie_ok.all()
    assert ties.falling_tie_ok.all()


def test_bay_table_arrays_are_read_only() -> None:
    t = bay_table(Frame("f", (3000, 3000), (2000,)), CostCatalogue(), (Member(1, 1, B, R),), BOTH)
    for field in dataclasses.fields(t):
        value = getattr(t, field.name)
        if isinstance(value, np.ndarray):
            with pytest.raises(ValueError, match="read-only"):
                value[0, 0] = 0
    # A changed table is derived with dataclasses.replace (the class docstring's advice).
    changed = dataclasses.replace(t, brace_ok=np.zeros((1, 2), dtype=bool))
    assert not changed.brace_ok.any()
    assert t.brace_ok.any()


def _table(rows: int, cols: int, kept: tuple[Member, ...] = ()) -> BayTable:
    return bay_table(Frame("f", (3000,) * cols, (4000,) * rows), CostCatalogue(), kept, BOTH)


def test_additions_are_read_only_copies() -> None:
    braces = np.array([[1, 0]])
    a = Additions(braces, np.zeros((1, 2), dtype=np.int64), np.array([[0, 1]]))
    braces[0, 1] = 5  # the caller's array is not shared
    assert a.braces.tolist() == [[1, 0]]
    for arr in (a.braces, a.rising, a.falling):
        assert arr.dtype == np.int64
        with pytest.raises(ValueError, match="read-only"):
            arr[0, 0] = 1
    with pytest.raises(dataclasses.FrozenInstanceError):
        a.braces = np.zeros((1, 2), dtype=np.int64)  # type: ignore[misc]
    empty = Additions.empty(2, 3)
    assert empty.braces.shape == (2, 3)
    assert int(empty.braces.sum() + empty.rising.sum() + empty.falling.sum()) == 0


def test_builder_is_a_mutable_copy() -> None:
    a = Additions(np.array([[1, 0]]), np.array([[0, 0]]), np.array([[0, 1]]))
    b = a.builder()
    assert isinstance(b, AdditionsBuilder)
    b.braces[0, 1] = 1  # writable
    b.rising[0, 0] += 1
    assert a.braces.tolist() == [[1, 0]]  # the frozen original is untouched
    assert a.rising.tolist() == [[0, 0]]
    built = b.build()
    assert built.braces.tolist() == [[1, 1]]
    b.falling[0, 0] = 1  # later changes to the builder do not reach what it built
    assert built.falling.tolist() == [[0, 1]]
    with pytest.raises(ValueError, match="read-only"):
        built.braces[0, 0] = 0
    fresh = AdditionsBuilder.empty(1, 2)
    fresh.braces[0, 0] = 2
    assert fresh.braces.tolist() == [[2, 0]]


def test_cost_and_arcs() -> None:
    t = _table(1, 2, kept=(Member(1, 1, T, R),))
    a = Additions(np.array([[0, 1]]), np.array([[0, 1]]), np.array([[1, 0]]))
    # Hand: 5 m diagonals. New brace 650000 + new rising tie 240000 + new falling tie 240000.
    assert a.cost(t) == 1_130_000
    # Arcs per bay, kept included: (1, 1) kept rising tie up + new falling tie down; (1, 2) brace + rising tie.
    assert a.up(t).tolist() == [[1, 2]]
    assert a.down(t).tolist() == [[1, 1]]


def test_members_places_ties_then_braces() -> None:
    t = _table(2, 2)
    a = Additions(np.array([[1, 2], [0, 1]]), np.array([[0, 0], [1, 0]]), np.array([[0, 0], [0, 1]]))
    got = a.members(t)
    # Bays in row-major order; in each bay the ties take their own diagonal first, braces fill the rest
    # (rising first).
    assert got == (
        Member(1, 1, B, R, existing=False),
        Member(1, 2, B, R, existing=False),
        Member(1, 2, B, F, existing=False),
        Member(2, 1, T, R, existing=False),
        Member(2, 2, T, F, existing=False),
        Member(2, 2, B, R, existing=False),
    )
    assert all(not m.existing for m in got)


def test_members_use_the_free_diagonal_beside_a_kept_member() -> None:
    t = _table(1, 1, kept=(Member(1, 1, B, R),))
    a = Additions(np.array([[1]]), np.array([[0]]), np.array([[0]]))
    assert a.members(t) == (Member(1, 1, B, F, existing=False),)


def test_members_raise_when_a_bay_is_over_full() -> None:
    t = _table(1, 1, kept=(Member(1, 1, T, F),))
    two_braces = Additions(np.array([[2]]), np.array([[0]]), np.array([[0]]))
    with pytest.raises(ValueError, match="bay r1c1: no free diagonal left for a brace"):
        two_braces.members(t)
    tie_on_taken = Additions(np.array([[0]]), np.array([[0]]), np.array([[1]]))
    with pytest.raises(ValueError, match="bay r1c1: falling diagonal is not free for a tie"):
        tie_on_taken.members(t)
    full = _table(1, 1)
    three = Additions(np.array([[1]]), np.array([[1]]), np.array([[1]]))
    with pytest.raises(ValueError, match="no free diagonal left"):
        three.members(full)
