"""Unit tests of the directed-cycle check (bracegrid.analysis) on hand-checked frames."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from bracegrid.analysis import (
    check_frame,
    check_layout,
    count_racking_modes,
    find_critical_members,
    is_stable,
    redundancy_of,
)
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Racking, Supports
from tests.strategies import frames_with_layouts, near_minimal_layouts

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING


def frame(rows: int, cols: int, members: tuple[Member, ...] = (), supports: Supports = Supports.FREE) -> Frame:
    return Frame("t", (3000,) * cols, (2000,) * rows, supports=supports, members=members)


# 2x2 frame: three ties in a chain leave it floppy, a fourth closing the directed
# 4-cycle makes it rigid (common practice, no source; THEORY.md).
CHAIN = (Member(1, 1, T, R), Member(1, 2, T, F), Member(2, 2, T, R))
CLOSED = (*CHAIN, Member(2, 1, T, F))


def test_two_by_two_tie_chain_is_floppy_and_closing_tie_locks_it() -> None:
    assert not is_stable(frame(2, 2, CHAIN))
    assert count_racking_modes(frame(2, 2, CHAIN)) == 3
    assert is_stable(frame(2, 2, CLOSED))
    # Every tie of the directed 4-cycle is critical.
    assert set(find_critical_members(frame(2, 2, CLOSED))) == set(CLOSED)


def test_loose_part_racking_sense() -> None:
    # Row 1 -> col 1 (rising tie): col 1 can only rack clockwise relative to row 1.
    v = check_layout(frame(1, 2), (Member(1, 1, T, R), Member(1, 2, B, R)))
    assert not v.stable
    assert v.racking_modes == 1
    (part,) = v.loose_parts
    assert part.columns == (1,)
    assert part.racking is Racking.CLOCKWISE
    v2 = check_layout(frame(1, 2), (Member(1, 1, T, F), Member(1, 2, B, R)))
    assert v2.loose_parts[0].racking is Racking.ANTICLOCKWISE


def test_untied_part_racks_both_ways_relative_to_base() -> None:
    v = check_layout(frame(3, 2, supports=Supports.BASE), (Member(1, 1, B, R), Member(3, 2, T, R)))
    assert v.racking_modes == 2
    by_row = {p.rows: p.racking for p in v.loose_parts}
    assert by_row[(2,)] is Racking.BOTH
    # Row 3 only has row -> col (rising tie): it can only decrease: anticlockwise.
    assert by_row[(3,)] is Racking.ANTICLOCKWISE


@pytest.mark.parametrize("kind", [B, T])
def test_pinned_base_one_row_needs_brace_or_tie_pair(kind: MemberKind) -> None:
    single = (Member(1, 2, kind, R),)
    pair = (Member(1, 1, kind, R), Member(1, 2, kind, F))
    assert is_stable(frame(1, 3, single, Supports.BASE)) is (kind is B)
    assert is_stable(frame(1, 3, pair, Supports.BASE))


def test_x_of_ties_is_not_critical_when_doubled() -> None:
    # Brace plus a tie in the same bay: losing the tie keeps the brace's arcs.
    members = (Member(1, 1, B, R), Member(1, 1, T, F))
    crit = find_critical_members(frame(1, 1, members))
    assert crit == (Member(1, 1, B, R),)


def test_without_takes_members_out() -> None:
    f = frame(1, 1, (Member(1, 1, T, R), Member(1, 1, T, F)))
    assert check_frame(f).stable
    v = check_frame(f, without=(Member(1, 1, T, F),))
    assert not v.stable
    assert v.removed == (Member(1, 1, T, F),)


def test_maxwell_count() -> None:
    v = check_frame(frame(2, 3, (Member(1, 1, B, R), Member(2, 2, T, R))))
    assert v.maxwell_count == 1.5
    assert v.maxwell_needed == 4
    vb = check_frame(frame(2, 3, supports=Supports.BASE))
    assert vb.maxwell_needed == 2


def test_empty_frame_modes() -> None:
    # Free R x C frame with no diagonals: R + C nodes, each its own part.
    assert count_racking_modes(frame(3, 4)) == 6
    assert count_racking_modes(frame(3, 4, supports=Supports.BASE)) == 3


# Critical members against brute force: remove each member in turn and re-check.
# Near-minimal layouts push the search past the one-by-one threshold and into
# the dominator-tree path.
@settings(max_examples=150, deadline=None)
@given(st.one_of(frames_with_layouts(max_rows=9, max_cols=9), near_minimal_layouts()))
def test_critical_members_match_brute_force(f: Frame) -> None:
    if not is_stable(f):
        assert find_critical_members(f) == ()
        return
    brute = tuple(m for k, m in enumerate(f.members) if not is_stable(f, f.members[:k] + f.members[k + 1 :]))
    assert find_critical_members(f) == brute


def test_critical_members_of_a_large_spanning_tree_are_all_members() -> None:
    # A spanning tree of braces: every brace is critical (Bolker & Crapo 1979: removing
    # an edge of a spanning tree disconnects it).
    n = 60
    tree = tuple(Member(1, j, B, R) for j in range(1, n + 1)) + tuple(Member(i, 1, B, R) for i in range(2, n + 1))
    assert find_critical_members(frame(n, n), tree) == tree


# Redundancy against brute force: a layout has redundancy k iff it survives removing
# every set of k members and fails for some set of k + 1 (definition; Menger's theorem
# is what makes the flow computation equal to it).
@settings(max_examples=80, deadline=None)
@given(frames_with_layouts(max_rows=3, max_cols=3))
def test_redundancy_matches_brute_force(f: Frame) -> None:
    import itertools

    got = redundancy_of(f, at_most=3)
    if not is_stable(f):
        assert got == -1
        return
    members = f.members
    k = 0
    while k < 3 and all(
        is_stable(f, [m for m in members if m not in gone]) for gone in itertools.combinations(members, k + 1)
    ):
        k += 1
    assert got == k


def test_redundancy_of_x_braced_single_bay() -> None:
    # Two braces in one bay: lose either and the other holds: redundancy 1.
    both = (Member(1, 1, B, R), Member(1, 1, B, F))
    assert redundancy_of(frame(1, 1), both) == 1
    # An X of ties: each tie is the only arc one way: redundancy 0.
    assert redundancy_of(frame(1, 1), (Member(1, 1, T, R), Member(1, 1, T, F))) == 0
