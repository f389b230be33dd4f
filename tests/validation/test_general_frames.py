"""The exact check of general frames against independent references and hand cases.

* Complete grids: the exact check agrees with the directed-cycle criterion of the row/column
  digraph (Bolker & Crapo, SIAM J. Appl. Math. 36 (1979) 473; Baglivo & Graver, *Incidence and
  Symmetry in Design and Architecture*, 1983, ch. 10) on random layouts of braces, ties and X-ties,
  free and on a pinned base.
* General frames: it agrees with the floating-point physics reference in tests/physics_general.py
  (numpy SVD and scipy linprog, written without the product's code) on random frames with random
  missing bars, outlines, supports and members.

The full counts (10,000 complete-grid layouts, 2,000 general frames) are marked ``slow``; the
default suite runs a few hundred of each. Run the full counts with ``pytest -m slow
tests/validation/test_general_frames.py``.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from bracegrid.analysis import is_stable
from bracegrid.mechanics import check_any, exact_rigidity
from bracegrid.model import Diagonal, Edge, Frame, GridBar, GridBarKind, Member, MemberKind, Supports
from tests.physics_general import _segments, general_physically_rigid

B, T = MemberKind.BRACE, MemberKind.TIE
R_, F_ = Diagonal.RISING, Diagonal.FALLING


def _random_complete(rng: np.random.Generator) -> tuple[Frame, list[Member]]:
    rows, cols = (int(v) for v in rng.integers(1, 6, 2))
    supports = Supports.BASE if rng.random() < 0.5 else Supports.FREE
    frame = Frame(
        "f",
        tuple(int(v) for v in rng.integers(5, 40, cols) * 100),
        tuple(int(v) for v in rng.integers(5, 30, rows) * 100),
        supports=supports,
    )
    density = rng.uniform(0.1, 0.6)
    members = [
        Member(i, j, B if rng.random() < rng.uniform(0.0, 1.0) else T, d)
        for i in range(1, rows + 1)
        for j in range(1, cols + 1)
        for d in Diagonal
        if rng.random() < density
    ]
    return frame, members


def _agree_on_complete(count: int, seed: int) -> None:
    rng = np.random.default_rng(seed)
    for _ in range(count):
        frame, members = _random_complete(rng)
        assert exact_rigidity(frame, members).rigid == is_stable(frame, members), (frame, members)


def test_exact_agrees_with_digraph_on_complete_grids() -> None:
    _agree_on_complete(400, 11)


@pytest.mark.slow
def test_exact_agrees_with_digraph_on_10000_complete_grids() -> None:
    _agree_on_complete(10_000, 12)


def _random_general(rng: np.random.Generator) -> tuple[Frame, list[Member]]:
    rows, cols = (int(v) for v in rng.integers(1, 5, 2))
    frame = Frame(
        "g",
        tuple(int(v) for v in rng.integers(5, 40, cols) * 100),
        tuple(int(v) for v in rng.integers(5, 30, rows) * 100),
    )
    roll = rng.random()
    if roll < 0.35:
        frame = dataclasses.replace(frame, supports=Supports.BASE)
    elif roll < 0.55:
        edges = [e for e in Edge if rng.random() < 0.4]
        frame = dataclasses.replace(frame, held_edges=frozenset(edges))
    bays = [(i, j) for i in range(1, rows + 1) for j in range(1, cols + 1)]
    if rng.random() < 0.5 and len(bays) > 1:
        gone = {bays[k] for k in rng.choice(len(bays), size=int(rng.integers(1, len(bays))), replace=False)}
        frame = dataclasses.replace(frame, absent=frozenset(gone))
    segs = _segments(frame)
    share = rng.uniform(0.0, 0.25)
    missing = set()
    for a, b in segs:
        if rng.random() < share:
            if a[0] == b[0]:
                missing.add(GridBar(GridBarKind.LEDGER, a[0], b[1]))
            else:
                missing.add(GridBar(GridBarKind.STANDARD, a[1], b[0]))
    frame = dataclasses.replace(frame, missing=frozenset(missing))
    nodes = {n for s in _segments(frame) for n in s}
    if not nodes:
        return _random_general(rng)
    density = rng.uniform(0.2, 0.9)
    members = []
    for i, j in bays:
        corners = {(i - 1, j - 1), (i - 1, j), (i, j - 1), (i, j)}
        if (i, j) in frame.absent or not corners <= nodes:
            continue
        for d in Diagonal:
            if rng.random() < density:
                members.append(Member(i, j, B if rng.random() < 0.5 else T, d))
    return frame, members


def _agree_on_general(count: int, seed: int) -> tuple[int, int]:
    rng = np.random.default_rng(seed)
    rigid = 0
    for _ in range(count):
        frame, members = _random_general(rng)
        got = exact_rigidity(frame, members).rigid
        assert got == general_physically_rigid(frame, members), (frame, members)
        rigid += got
    return rigid, count


def test_exact_agrees_with_reference_on_general_frames() -> None:
    rigid, count = _agree_on_general(300, 21)
    assert 0.1 * count < rigid < 0.9 * count  # both answers well represented


@pytest.mark.slow
def test_exact_agrees_with_reference_on_2000_general_frames() -> None:
    rigid, count = _agree_on_general(2000, 22)
    assert 0.1 * count < rigid < 0.9 * count


# --------------------------------------------------------------------------- hand cases


def test_one_row_with_a_missing_top_ledger() -> None:
    """1 x 3 frame, a brace in every bay (the Bolker-Crapo minimum R + C - 1 = 3), the top ledger of
    the middle bay left out. Hand statics: bays 1 and 3 stay rigid bodies; they are joined only by
    the bottom ledger and the middle brace, two bars meeting at the middle bay's bottom-left node:
    a hinge, so the right body turns about that node. A falling brace in the middle bay adds a third,
    non-concurrent link: rigid."""
    gap = GridBar(GridBarKind.LEDGER, 1, 2)
    frame = Frame("row", (3000, 2500, 3000), (2000,), missing=frozenset({gap}))
    three = [Member(1, j, B, R_) for j in (1, 2, 3)]
    verdict = check_any(frame, three)
    assert not verdict.stable
    assert verdict.flex is not None
    assert verdict.flex.exact
    assert {(b.row, b.col) for b in verdict.flex.bays} == {(1, 2)}  # only the middle bay changes shape
    assert not general_physically_rigid(frame, three)
    four = [*three, Member(1, 2, B, F_)]
    assert check_any(frame, four).stable
    assert general_physically_rigid(frame, four)
    complete = dataclasses.replace(frame, missing=frozenset())
    assert is_stable(complete, three)  # the digraph, on the complete row, calls the three braces enough


def _window() -> Frame:
    """4 x 4 grid with interior node (2, 2) removed: its four grid bars are missing."""
    gone = {
        GridBar(GridBarKind.LEDGER, 2, 2), GridBar(GridBarKind.LEDGER, 2, 3),
        GridBar(GridBarKind.STANDARD, 2, 2), GridBar(GridBarKind.STANDARD, 2, 3),
    }  # fmt: skip
    return Frame("window", (3000,) * 4, (2500,) * 4, missing=frozenset(gone))


def test_window_needs_two_more_braces() -> None:
    """The window case (a grid with a hole; Gaspar, Radics & Recski, Comput. Assisted Methods Eng. Sci.
    6 (1999) 329). Maxwell count: 24 nodes give 2 * 24 - 3 = 45 degrees of freedom, 40 - 4 = 36 grid bars
    remain, so at least 9 braces are needed, two more than the 7 of the complete 4 x 4 grid. A 7-brace
    spanning tree of the row/column graph outside the window is rigid on the complete grid and not on
    the window; two more braces make it rigid only when they sit beside the window's open sides."""
    frame = _window()
    tree = [Member(i, j, B, R_) for i, j in ((1, 1), (1, 2), (1, 3), (1, 4), (2, 1), (3, 1), (4, 1))]
    assert is_stable(dataclasses.replace(frame, missing=frozenset()), tree)
    verdict = check_any(frame, tree)
    assert not verdict.stable
    assert verdict.racking_modes == 2
    assert verdict.maxwell_needed == 9
    assert not general_physically_rigid(frame, tree)
    corner = [*tree, Member(4, 4, B, R_), Member(2, 4, B, R_)]
    assert not check_any(frame, corner).stable
    assert not general_physically_rigid(frame, corner)
    nine = [*tree, Member(2, 4, B, R_), Member(4, 2, B, R_)]
    assert check_any(frame, nine).stable
    assert general_physically_rigid(frame, nine)
    # Every pair of extra braces: the product and the reference pick the same 16 pairs (one brace in a
    # bay beside the window's right side, r2c4 or r3c4, and one above it, r4c2 or r4c3; either diagonal).
    open_bays = [(i, j) for i in range(1, 5) for j in range(1, 5) if not (2 <= i <= 3 and 2 <= j <= 3)]
    extra = [Member(i, j, B, d) for i, j in open_bays for d in Diagonal if Member(i, j, B, d) not in tree]
    pairs = [(a, b) for k, a in enumerate(extra) for b in extra[k + 1 :]]
    ours = {(a, b) for a, b in pairs if exact_rigidity(frame, [*tree, a, b]).rigid}
    theirs = {(a, b) for a, b in pairs if general_physically_rigid(frame, [*tree, a, b])}
    assert ours == theirs
    assert len(ours) == 16
    assert {(a.row, a.col, b.row, b.col) for a, b in ours} <= {(r, 4, 4, c) for r in (2, 3) for c in (2, 3)} | {
        (4, c, r, 4) for r in (2, 3) for c in (2, 3)
    }


def test_l_shaped_roof_plan_is_rigid_when_the_arms_share_a_line() -> None:
    """L-shaped plan: a 2 x 4 arm (rows 1-2) and a 2 x 2 arm (rows 3-4, columns 1-2) above its left
    half. Each arm braced with its own digraph minimum (5 = 2 + 4 - 1 and 3 = 2 + 2 - 1 braces,
    Bolker-Crapo) is a rigid body; the arms share three nodes of grid line 2, and two rigid bodies
    with two common points cannot move relative to each other: the L is rigid as a whole."""
    frame = Frame("L", (3000,) * 4, (2500,) * 4, absent=frozenset({(3, 3), (3, 4), (4, 3), (4, 4)}))
    low = [Member(1, j, B, R_) for j in (1, 2, 3, 4)] + [Member(2, 1, B, R_)]
    high = [Member(3, 1, B, R_), Member(3, 2, B, R_), Member(4, 1, B, R_)]
    verdict = check_any(frame, low + high)
    assert verdict.stable
    assert verdict.method.value == "exact"
    assert general_physically_rigid(frame, low + high)


def test_stepped_plan_hinged_at_one_node_is_not_rigid() -> None:
    """Two bays that touch only at a corner node (a stepped outline), each braced (its minimum, one
    brace): rigid bodies sharing one point turn about it. The flex changes no bay's shape."""
    frame = Frame("step", (3000, 3000), (2500, 2500), absent=frozenset({(1, 2), (2, 1)}))
    members = [Member(1, 1, B, R_), Member(2, 2, B, R_)]
    verdict = check_any(frame, members)
    assert not verdict.stable
    assert verdict.flex is not None
    assert verdict.flex.bays == ()
    assert not general_physically_rigid(frame, members)


def test_ties_need_a_proper_self_stress() -> None:
    """Roth & Whiteley (Trans. AMS 265 (1981) 419): one tie in a single bay lets the bay rack one way
    (no self-stress can be positive on it); an X of ties carries a proper self-stress (both in
    tension) and is rigid. Same on a frame with a missing ledger elsewhere."""
    frame = Frame("ties", (3000, 3000), (2000,), missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 2)}))
    x_left = [Member(1, 1, T, R_), Member(1, 1, T, F_)]
    one = [*x_left, Member(1, 2, B, R_), Member(1, 2, T, F_)]
    assert check_any(frame, one).stable == general_physically_rigid(frame, one)
    lone = [Member(1, 1, T, R_), Member(1, 2, B, R_), Member(1, 2, B, F_)]
    verdict = check_any(frame, lone)
    assert not verdict.stable
    assert verdict.flex is not None
    assert not verdict.flex.exact
    assert not general_physically_rigid(frame, lone)


def test_critical_members_agree_with_reference_brute_force() -> None:
    """Critical members of rigid random general frames: the rank screen plus exact re-checks against
    the reference re-run without each member in turn."""
    rng = np.random.default_rng(31)
    seen = 0
    for _ in range(300):
        frame, members = _random_general(rng)
        if not exact_rigidity(frame, members).rigid:
            continue
        seen += 1
        ours = set(check_any(frame, members).critical_members)
        ref = {m for k, m in enumerate(members) if not general_physically_rigid(frame, members[:k] + members[k + 1 :])}
        assert ours == ref, (frame, members)
    assert seen >= 50
