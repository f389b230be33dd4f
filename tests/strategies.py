"""Hypothesis generators shared by the property tests."""

from __future__ import annotations

from dataclasses import replace

from hypothesis import strategies as st

from bracegrid.model import CostCatalogue, CostRate, Diagonal, Frame, Member, MemberKind, Project, Supports

#: What one diagonal of a bay holds: nothing, a brace or a tie.
_CHOICES = (None, MemberKind.BRACE, MemberKind.TIE)


@st.composite
def frames_with_layouts(
    draw: st.DrawFn, *, max_rows: int = 4, max_cols: int = 4, supports: Supports | None = None
) -> Frame:
    """A frame with random bay sizes (0.5-4 m), supports and diagonals."""
    rows = draw(st.integers(1, max_rows))
    cols = draw(st.integers(1, max_cols))
    widths = tuple(draw(st.lists(st.integers(500, 4000), min_size=cols, max_size=cols)))
    heights = tuple(draw(st.lists(st.integers(500, 4000), min_size=rows, max_size=rows)))
    sup = supports if supports is not None else draw(st.sampled_from(list(Supports)))
    density = draw(st.sampled_from([0.15, 0.3, 0.5]))
    members: list[Member] = []
    for i in range(1, rows + 1):
        for j in range(1, cols + 1):
            for d in Diagonal:
                if draw(st.floats(0, 1)) < density:
                    kind = draw(st.sampled_from([MemberKind.BRACE, MemberKind.TIE]))
                    members.append(Member(i, j, kind, d))
    return Frame("generated", widths, heights, supports=sup, members=tuple(members))


def transpose(frame: Frame) -> Frame:
    """Swap rows and columns (reflect in the rising diagonal line y = x).

    Reflection maps a bay's rising diagonal to the rising diagonal of the
    transposed bay and keeps it rising; a falling diagonal stays falling.
    Only meaningful for free frames (a base is not transposed).
    """
    members = tuple(Member(m.col, m.row, m.kind, m.diagonal) for m in frame.members)
    return Frame(frame.name, frame.heights, frame.widths, supports=frame.supports, members=members)


@st.composite
def near_minimal_layouts(draw: st.DrawFn, *, max_side: int = 12) -> Frame:
    """A stable layout pruned to a minimal one (every member critical) plus a few extras.

    Such layouts have many single-member arcs, which drives the critical-member
    search into its dominator-tree path.
    """
    import random

    from bracegrid.analysis import is_stable

    rng = random.Random(draw(st.integers(0, 2**32 - 1)))
    rows, cols = rng.randint(3, max_side), rng.randint(3, max_side)
    sup = rng.choice(list(Supports))
    kinds = list(MemberKind)
    members = [
        Member(i, j, rng.choice(kinds), d)
        for i in range(1, rows + 1)
        for j in range(1, cols + 1)
        for d in Diagonal
        if rng.random() < 0.45
    ]
    frame = Frame("near-minimal", (2000,) * cols, (2000,) * rows, supports=sup)
    if is_stable(frame, members):
        rng.shuffle(members)
        k = 0
        while k < len(members):
            trial = members[:k] + members[k + 1 :]
            if is_stable(frame, trial):
                members = trial
            else:
                k += 1
    taken = {(m.row, m.col, m.diagonal) for m in members}
    for _ in range(rng.randint(0, 4)):
        extra = Member(rng.randint(1, rows), rng.randint(1, cols), rng.choice(kinds), rng.choice(list(Diagonal)))
        if (extra.row, extra.col, extra.diagonal) not in taken:
            taken.add((extra.row, extra.col, extra.diagonal))
            members.append(extra)
    return Frame("near-minimal", (2000,) * cols, (2000,) * rows, supports=sup, members=tuple(members))


#: Money amounts as a user types them: up to three decimals (0.005 steps hit the half-cent case).
_MONEY = st.decimals(min_value=0, max_value=60, places=3, allow_nan=False, allow_infinity=False).map(float)


@st.composite
def cost_catalogues(draw: st.DrawFn) -> CostCatalogue:
    """Random prices per piece, per metre and for labour, and a contingency of 0-25 % in 0.5 % steps."""
    brace = CostRate(draw(_MONEY), draw(_MONEY), draw(_MONEY))
    tie = CostRate(draw(_MONEY), draw(_MONEY), draw(_MONEY))
    return CostCatalogue(brace=brace, tie=tie, contingency_pct=draw(st.integers(0, 50)) / 2)


@st.composite
def priced_projects(draw: st.DrawFn, *, max_frames: int = 3) -> Project:
    """One to three random frames with random layouts (some members existing, some proposed) and prices."""
    frames = []
    for k in range(draw(st.integers(1, max_frames))):
        f = draw(frames_with_layouts(max_rows=5, max_cols=5))
        members = tuple(replace(m, existing=draw(st.booleans())) for m in f.members)
        frames.append(replace(f, name=f"frame {k + 1}", members=members))
    return Project("generated", tuple(frames), costs=draw(cost_catalogues()))
