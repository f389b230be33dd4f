"""Redundancy: how many members a layout can lose, any of them, and stay stable."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from bracegrid.analysis.digraph import arc_strong_components, build_arcs, flow_cuts
from bracegrid.model import Frame, Member, Supports


def redundancy_of(frame: Frame, members: Sequence[Member] | None = None, *, at_most: int = 8) -> int:
    """How many members a layout can lose, any of them, and stay stable.

    Each member gives at most one arc across a cut in each direction, so the
    layout survives the loss of any k members iff every directed cut is crossed
    by at least k + 1 member arcs (Menger's theorem; Edmonds' branching
    theorem for the directed case). The smallest such crossing is the arc
    connectivity of the member multigraph: the least of the maximum flows from
    one node to every other and back, with each arc's capacity the number of
    members giving it (ground arcs never fail).

    Args:
        frame: Sizes and supports; its own members unless ``members`` is given.
        members: The layout.
        at_most: Stop counting above this (the flows are cut short there).

    Returns:
        -1 if the layout is not stable, else the largest k (capped at ``at_most``)
        such that the layout survives the loss of any k members.

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> f = Frame("f", (3000,), (2000,))
        >>> b = MemberKind.BRACE
        >>> redundancy_of(f, [Member(1, 1, b, Diagonal.RISING), Member(1, 1, b, Diagonal.FALLING)])
        1
    """
    layout = frame.members if members is None else members
    arcs = build_arcs(frame, layout)
    count, _ = arc_strong_components(arcs)
    if count != 1:
        return -1
    if arcs.nodes == 1:
        return at_most
    cap = at_most + 1
    capacity = np.minimum(arcs.multiplicity, cap)
    if frame.supports is Supports.BASE:
        ground = arcs.nodes - 1
        capacity[(arcs.src == ground) | (arcs.dst == ground)] = cap
    best = cap
    for cut in flow_cuts(arcs.nodes, arcs.src, arcs.dst, capacity):
        best = min(best, cut.value)
        if best == 1:
            return 0
    return min(best - 1, at_most)
