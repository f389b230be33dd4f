"""The rule-of-thumb baseline layout (common practice, no source)."""

from __future__ import annotations

from bracegrid.analysis import is_stable
from bracegrid.compare import rule_of_thumb_layout
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports, blocked_bays


def test_every_row_braced_at_interval_on_a_base() -> None:
    f = Frame("face", (2500,) * 12, (2000,) * 4, supports=Supports.BASE)
    layout = rule_of_thumb_layout(f, interval=5)
    for row in range(1, 5):
        assert sorted(m.col for m in layout if m.row == row) == [1, 6, 11]
    assert all(m.kind is MemberKind.BRACE for m in layout)
    assert is_stable(f, layout)  # a brace per row on a pinned base (THEORY.md: rows decouple)


def test_blocked_bay_shifts_to_nearest_clear_bay() -> None:
    f = Frame("face", (2500,) * 6, (2000,), supports=Supports.BASE, blocked=frozenset({(1, 1)}))
    layout = rule_of_thumb_layout(f, interval=5)
    assert [m.col for m in layout] == [2, 6]
    assert not any(m.bay in blocked_bays(f) for m in layout)


def test_free_frame_also_braces_every_column() -> None:
    f = Frame("plan", (4000,) * 6, (5000,) * 4)
    layout = rule_of_thumb_layout(f, interval=5)
    assert {m.col for m in layout} == set(range(1, 7))
    assert is_stable(f, layout)


def test_ties_only_frame_gets_x_pairs_and_keeps_existing() -> None:
    old = Member(1, 1, MemberKind.TIE, Diagonal.RISING)
    f = Frame("wall", (3000,) * 3, (3000,), supports=Supports.BASE, allow=frozenset({MemberKind.TIE}), members=(old,))
    layout = rule_of_thumb_layout(f)
    assert layout[0] == old
    assert {(m.row, m.col, m.diagonal) for m in layout} == {(1, 1, Diagonal.RISING), (1, 1, Diagonal.FALLING)}
    assert all(m.kind is MemberKind.TIE for m in layout)
