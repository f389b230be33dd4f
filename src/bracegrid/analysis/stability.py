"""The stability check: the directed-cycle criterion on the row/column digraph, and loose parts.

The layout leaves no mechanism iff its row/column digraph (built by
:mod:`bracegrid.analysis.digraph`) is strongly connected; its strong components
other than the anchor's are the loose parts.

References:
    E. D. Bolker and H. Crapo, "Bracing rectangular frameworks. I",
    SIAM J. Appl. Math. 36(3), 473-490 (1979), doi:10.1137/0136036.
    J. A. Baglivo and J. E. Graver, *Incidence and Symmetry in Design and
    Architecture*, Cambridge University Press (1983), ch. 10.

All functions here are pure and run in time linear in rows + columns + members
(critical members: linear per remaining candidate arc, see
:func:`find_critical_members`).
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence

import numpy as np
from scipy.sparse.csgraph import breadth_first_order

from bracegrid.analysis.critical import critical_from_arcs
from bracegrid.analysis.digraph import ArcSet, IntArray, arc_strong_components, build_arcs, csr, split_nodes
from bracegrid.analysis.verdict import LoosePart, Verdict
from bracegrid.errors import InputError
from bracegrid.model import Frame, Member, Racking, Supports


def require_complete(frame: Frame) -> None:
    """Refuse a general frame: the row/column digraph decides complete grids only.

    Raises:
        InputError: If the frame has absent bays or missing grid bars (ask
            :func:`bracegrid.mechanics.check_any`, which uses the exact check there).
    """
    if not frame.is_complete:
        msg = (
            f"frame {frame.name!r} has missing grid bars or absent bays: the row/column digraph does not "
            "decide it, and this analysis is built on it (docs/general-frames.md); the stability check "
            "and the optimizer handle such frames exactly"
        )
        raise InputError(msg)


def is_stable(frame: Frame, members: Sequence[Member] | None = None) -> bool:
    """Whether the layout leaves the frame without any mechanism.

    Args:
        frame: The frame; its own members are used unless ``members`` is given.
        members: The layout to check instead of ``frame.members``.

    Returns:
        True iff the row/column digraph is strongly connected.

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> f = Frame("f", (3000, 3000), (2000,))
        >>> b = MemberKind.BRACE
        >>> is_stable(f, [Member(1, 1, b, Diagonal.RISING), Member(1, 2, b, Diagonal.RISING)])
        True
    """
    require_complete(frame)
    layout = frame.members if members is None else members
    count, _ = arc_strong_components(build_arcs(frame, layout))
    return count == 1


def _loose_parts(frame: Frame, arcs: ArcSet, count: int, labels: IntArray) -> tuple[int, list[LoosePart]]:
    """Anchor label and the other strong components with their racking sense."""
    sizes = np.bincount(labels, minlength=count)
    if frame.supports is Supports.BASE:
        anchor = int(labels[frame.rows + frame.cols])
    else:
        # Largest part; ties go to the part holding the lowest-numbered node.
        best = int(sizes.max())
        anchor = int(labels[int(np.flatnonzero(sizes[labels] == best)[0])])
    cs, cd = labels[arcs.src], labels[arcs.dst]
    between = cs != cd
    dag = csr(count, cs[between], cd[between])
    below = np.zeros(count, dtype=bool)  # anchor reaches the part: part >= anchor
    above = np.zeros(count, dtype=bool)  # part reaches the anchor: part <= anchor
    below[breadth_first_order(dag, anchor, directed=True, return_predecessors=False)] = True
    above[breadth_first_order(dag.T.tocsr(), anchor, directed=True, return_predecessors=False)] = True
    parts: list[LoosePart] = []
    order = np.argsort(labels, kind="stable")
    bounds = np.searchsorted(labels[order], np.arange(count + 1))
    for comp in range(count):
        if comp == anchor:
            continue
        rows, columns = split_nodes(frame.rows, frame.cols, order[bounds[comp] : bounds[comp + 1]].tolist())
        if below[comp]:
            racking = Racking.CLOCKWISE  # can only increase relative to the anchor
        elif above[comp]:
            racking = Racking.ANTICLOCKWISE
        else:
            racking = Racking.BOTH
        parts.append(LoosePart(rows=rows, columns=columns, racking=racking))
    parts.sort(key=lambda p: (p.rows[:1] or (10**9,), p.columns[:1] or (10**9,)))
    return anchor, parts


def remove_members(frame: Frame, without: Iterable[Member]) -> tuple[Member, ...]:
    """The frame's members less those given (matched by bay and diagonal)."""
    gone = {(m.row, m.col, m.diagonal) for m in without}
    return tuple(m for m in frame.members if (m.row, m.col, m.diagonal) not in gone)


def check_layout(frame: Frame, members: Sequence[Member], *, removed: tuple[Member, ...] = ()) -> Verdict:
    """Full stability verdict for a layout on a frame.

    Args:
        frame: Sizes and supports (its own members are ignored).
        members: The layout to check.
        removed: Members reported as taken out (for the verdict only).

    Returns:
        Stable or not, the racking modes, loose parts with their racking sense,
        critical members and the Maxwell-type count.
    """
    require_complete(frame)
    layout = tuple(members)
    arcs = build_arcs(frame, layout)
    count, labels = arc_strong_components(arcs)
    anchor, parts = _loose_parts(frame, arcs, count, labels)
    anchor_rows, anchor_cols = split_nodes(frame.rows, frame.cols, np.flatnonzero(labels == anchor).tolist())
    stable = count == 1
    braces = arcs.braces
    needed = frame.rows if frame.supports is Supports.BASE else frame.rows + frame.cols - 1
    return Verdict(
        frame=frame.name,
        stable=stable,
        racking_modes=count - 1,
        loose_parts=tuple(parts),
        anchor_rows=anchor_rows,
        anchor_columns=anchor_cols,
        critical_members=critical_from_arcs(arcs, layout) if stable else (),
        braces=braces,
        ties=len(layout) - braces,
        maxwell_needed=needed,
        supports=frame.supports,
        removed=removed,
    )


def check_frame(frame: Frame, *, without: Iterable[Member] = ()) -> Verdict:
    """Check a frame's own layout, optionally with some members taken out.

    Args:
        frame: The frame and its members.
        without: Members to take out before checking (matched by bay and diagonal).

    Returns:
        The verdict.

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> t = MemberKind.TIE
        >>> chain = (Member(1, 1, t, Diagonal.RISING), Member(1, 2, t, Diagonal.FALLING),
        ...          Member(2, 2, t, Diagonal.RISING))
        >>> f = Frame("2x2", (3000, 3000), (2000, 2000), members=chain)
        >>> check_frame(f).stable
        False
    """
    removed = tuple(without)
    return check_layout(frame, remove_members(frame, removed), removed=removed)


def count_racking_modes(frame: Frame, members: Sequence[Member] | None = None) -> int:
    """Independent racking modes left by a layout (0 when stable)."""
    require_complete(frame)
    layout = frame.members if members is None else members
    count, _ = arc_strong_components(build_arcs(frame, layout))
    return count - 1
