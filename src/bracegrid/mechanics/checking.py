"""Which check decides: the row/column digraph on complete grids, the exact rigidity check on general frames.

Every command asks here. A complete grid (every bay, every grid bar) goes to
:mod:`bracegrid.analysis` (the directed-cycle criterion, linear time, exact there); a frame with an
outline or missing grid bars goes to :func:`bracegrid.mechanics.rigidity.exact_rigidity`, where the
digraph rule no longer holds. Every verdict names its method.

Critical members and redundancy of a general frame are found by brute force over members with the
exact check (each loss, or each set of up to k losses, re-checked).
"""

from __future__ import annotations

import dataclasses
import itertools
from collections.abc import Iterable, Sequence

import numpy as np

from bracegrid.analysis import (
    BayRack,
    CheckMethod,
    Flex,
    NodeMove,
    Verdict,
    check_layout,
    find_critical_members,
    is_stable,
    redundancy_of,
    remove_members,
)
from bracegrid.mechanics.rigidity import Rigidity, bar_critical, exact_rigidity, rank_target, reduce_frame
from bracegrid.model import Frame, GridBar, Member, MemberKind, Racking, bay_corners, closed_bays

#: A node or bay counts as moved when its share of the largest move is above this: the motion is
#: scaled to a largest node move of 1, exact flexes are rational (so zero is zero up to rounding,
#: 1e-12), LP flexes carry HiGHS's 1e-7 tolerance; 1e-6 separates both from real moves.
MOVE_TOLERANCE = 1.0e-6


def without_bars(frame: Frame, bars: Iterable[GridBar]) -> Frame:
    """The frame with more grid bars missing (a ``--without ledger3c4`` question)."""
    extra = frozenset(bars)
    return dataclasses.replace(frame, missing=frame.missing | extra) if extra else frame


def _moving(u: np.ndarray) -> int:
    big = float(np.abs(u).max()) if u.size else 0.0
    return int((np.hypot(u[:, 0], u[:, 1]) > MOVE_TOLERANCE * big).sum()) if big > 0 else 0


def _deformation(result: Rigidity) -> np.ndarray:
    """Node moves of the mechanism to draw and describe, largest move 1.

    Where the supports leave rigid-body motions, the flex is also shown with the rigid-body motion
    that holds the bottom-left node and the bottom line's far node still (the "anchor", as the
    digraph's loose parts are measured against an anchored part); whichever picture moves fewer
    nodes is kept.
    """
    u = result.node_motion()
    red = result.reduced
    options = [u]
    if not red.fixed.any() and len(red.nodes) > 1:
        coords = red.coords.astype(float)
        first = 0
        far = max(range(len(red.nodes)), key=lambda k: (-red.nodes[k][0], red.nodes[k][1]))
        if coords[far, 0] != coords[first, 0]:
            # rigid motion (tx, ty, theta) that cancels the moves of both anchor nodes (x, y of first, y of far)
            a = np.array([[1.0, 0.0, -coords[first, 1]], [0.0, 1.0, coords[first, 0]], [0.0, 1.0, coords[far, 0]]])
            tx, ty, theta = np.linalg.solve(a, np.array([u[first, 0], u[first, 1], u[far, 1]]))
            rigid = np.stack([tx - theta * coords[:, 1], ty + theta * coords[:, 0]], axis=1)
            options.append(u - rigid)
    best = min(options, key=_moving)
    big = float(np.abs(best).max()) if best.size else 0.0
    return best / big if big > 0 else best


def flex_of(frame: Frame, result: Rigidity) -> Flex | None:
    """The mechanism of a non-rigid result as nodes and bays that move (None when rigid)."""
    if result.rigid or result.motion is None:
        return None
    u = _deformation(result)
    red = result.reduced
    where = {n: k for k, n in enumerate(red.nodes)}
    moves = tuple(
        NodeMove(p, q, float(u[k, 0]), float(u[k, 1]))
        for k, (p, q) in enumerate(red.nodes)
        if float(np.hypot(*u[k])) > MOVE_TOLERANCE
    )
    xs, ys = frame.x_lines(), frame.y_lines()
    closed = closed_bays(frame)
    bays: list[BayRack] = []
    for row in range(1, frame.rows + 1):
        for col in range(1, frame.cols + 1):
            if (row, col) in closed:
                continue
            corners = [where[n] for n in bay_corners(row, col)]  # bl, br, tl, tr
            w, h = xs[col] - xs[col - 1], ys[row] - ys[row - 1]
            pts = np.array([[0, 0], [w, 0], [0, h], [w, h]], dtype=float)
            moved = u[corners]
            # a bay changes shape when some distance between two of its corners changes (first order)
            change = max(
                abs(float((pts[b] - pts[a]) @ (moved[b] - moved[a]))) / float(np.hypot(*(pts[b] - pts[a])))
                for a in range(4)
                for b in range(a + 1, 4)
            )
            if change <= MOVE_TOLERANCE:
                continue
            # row racking minus column racking (docs/theory.md): top sways right / right side drops
            sway = (moved[2, 0] + moved[3, 0] - moved[0, 0] - moved[1, 0]) / (2 * h)
            drop = (moved[1, 1] + moved[3, 1] - moved[0, 1] - moved[2, 1]) / (2 * w)
            bays.append(BayRack(row, col, Racking.CLOCKWISE if sway + drop >= 0 else Racking.ANTICLOCKWISE))
    return Flex(moves=moves, bays=tuple(bays), exact=result.exact_motion)


def _needed(frame: Frame) -> int:
    """Braces a minimum rigid layout of the general frame needs (the rank target of the exact check)."""
    target, _, _ = rank_target(reduce_frame(frame, []))
    return target


#: Largest redundancy counted on a general frame (brute force over every set of that many losses).
GENERAL_REDUNDANCY_CAP = 2
#: Up to this many members, every member of a rigid general layout with ties is re-checked without
#: it (exact check each time); above it only the rank screen runs
#: (:func:`bracegrid.mechanics.rigidity.bar_critical`), which finds every member whose loss leaves the
#: all-bars framework flexible but not a tie whose loss only spoils the proper self-stress
#: (docs/general-frames.md).
BRUTE_FORCE_MEMBERS = 400


def general_critical(frame: Frame, members: Sequence[Member]) -> tuple[Member, ...]:
    """Members of a rigid general layout whose single loss leaves a mechanism.

    The rank screen first (one inverse modulo two primes for all members); then, up to
    :data:`BRUTE_FORCE_MEMBERS` members and when ties are present, every member the screen passes is
    re-checked exactly without it (its loss may leave the ties without a proper self-stress).
    """
    layout = tuple(members)
    flags = bar_critical(frame, layout)
    if flags is None:  # pragma: no cover - callers pass rigid layouts
        flags = [False] * len(layout)
    has_ties = any(m.kind is MemberKind.TIE for m in layout)
    out = []
    for k, m in enumerate(layout):
        if flags[k] or (
            has_ties
            and len(layout) <= BRUTE_FORCE_MEMBERS
            and not exact_rigidity(frame, layout[:k] + layout[k + 1 :]).rigid
        ):
            out.append(m)
    return tuple(out)


def check_any(frame: Frame, members: Sequence[Member], *, removed: tuple[Member, ...] = ()) -> Verdict:
    """The verdict of a layout on any frame, by the method that is exact for it.

    Args:
        frame: Sizes, supports, outline and missing bars (its own members are ignored).
        members: The layout to check.
        removed: Members reported as taken out (for the verdict only).

    Returns:
        The verdict; ``method`` says which check decided. A general frame's verdict has no loose
        parts (they are a digraph notion) but a :class:`~bracegrid.analysis.Flex` when not stable.

    Example:
        >>> from bracegrid.model import Diagonal, GridBarKind
        >>> b = MemberKind.BRACE
        >>> f = Frame("f", (3000, 3000), (2000,), missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 2)}))
        >>> v = check_any(f, [Member(1, 1, b, Diagonal.RISING), Member(1, 2, b, Diagonal.RISING)])
        >>> v.stable, v.method.value
        (False, 'exact')
    """
    layout = tuple(members)
    if frame.is_complete:
        return check_layout(frame, layout, removed=removed)
    return exact_verdict(frame, layout, exact_rigidity(frame, layout), removed=removed)


def exact_verdict(
    frame: Frame,
    members: Sequence[Member],
    result: Rigidity,
    *,
    removed: tuple[Member, ...] = (),
    critical: bool = True,
) -> Verdict:
    """The verdict of a general frame's layout from its exact check (``critical=False`` skips the
    critical members, which cost one exact check each)."""
    layout = tuple(members)
    braces = sum(m.kind is MemberKind.BRACE for m in layout)
    return Verdict(
        frame=frame.name,
        stable=result.rigid,
        racking_modes=max(result.flexes, 0 if result.rigid else 1),
        loose_parts=(),
        anchor_rows=(),
        anchor_columns=(),
        critical_members=general_critical(frame, layout) if result.rigid and critical else (),
        braces=braces,
        ties=len(layout) - braces,
        maxwell_needed=_needed(frame),
        supports=frame.supports,
        removed=removed,
        method=CheckMethod.EXACT,
        flex=flex_of(frame, result),
    )


def check_frame_any(frame: Frame, *, without: Iterable[Member] = (), without_bars_: Iterable[GridBar] = ()) -> Verdict:
    """Check a frame's own layout, optionally with some members and grid bars taken out.

    Taking out a grid bar makes the frame general, so the exact check decides.
    """
    removed = tuple(without)
    shaped = without_bars(frame, without_bars_)
    return check_any(shaped, remove_members(shaped, removed), removed=removed)


def stable_any(frame: Frame, members: Sequence[Member]) -> bool:
    """Whether the layout leaves no mechanism, by the method exact for the frame."""
    if frame.is_complete:
        return is_stable(frame, members)
    return exact_rigidity(frame, members).rigid


def critical_any(frame: Frame, members: Sequence[Member]) -> tuple[Member, ...]:
    """Critical members of a stable layout on any frame."""
    if frame.is_complete:
        return find_critical_members(frame, members)
    return general_critical(frame, members)


def redundancy_any(frame: Frame, members: Sequence[Member], *, at_most: int = 8) -> int:
    """How many member losses (any set of that size) the layout survives, on any frame; -1 if not stable.

    On a general frame every set of up to ``min(at_most, GENERAL_REDUNDANCY_CAP)`` losses is re-checked
    exactly (brute force), stopping at the first set that leaves a mechanism; the count is capped
    there (the number of sets grows as members^k).
    """
    layout = tuple(members)
    if frame.is_complete:
        return redundancy_of(frame, layout, at_most=at_most)
    at_most = min(at_most, GENERAL_REDUNDANCY_CAP)
    if not exact_rigidity(frame, layout).rigid:
        return -1
    for k in range(1, min(at_most, len(layout)) + 1):
        for gone in itertools.combinations(range(len(layout)), k):
            rest = [m for i, m in enumerate(layout) if i not in gone]
            if not exact_rigidity(frame, rest).rigid:
                return k - 1
    return at_most
