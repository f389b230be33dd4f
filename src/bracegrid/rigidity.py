"""The stability check: the directed-cycle criterion on the row/column digraph.

Every row and every column of a frame is a node. A rigid brace in bay (i, j)
gives arcs row_i -> col_j and col_j -> row_i; a rising tie gives row_i -> col_j
and a falling tie col_j -> row_i (arc u -> v reads "racking of u <= racking of
v"). A pinned base adds a ground node joined both ways to every column. The
layout leaves no mechanism iff this digraph is strongly connected.

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
from dataclasses import dataclass

import networkx as nx
import numpy as np
import numpy.typing as npt
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import breadth_first_order, connected_components, dijkstra

from bracegrid.model import (
    Diagonal,
    Frame,
    LoosePart,
    Member,
    MemberKind,
    Racking,
    Supports,
    Verdict,
)

IntArray = npt.NDArray[np.int64]
BoolArray = npt.NDArray[np.bool_]


@dataclass(frozen=True, slots=True)
class ArcSet:
    """The distinct arcs of a frame's digraph with the members behind them.

    Nodes: row i (1-based) is ``i - 1``, column j is ``R + j - 1``, the ground
    (pinned base only) is ``R + C``.

    Attributes:
        nodes: Number of nodes.
        src: Tail of each distinct arc.
        dst: Head of each distinct arc.
        multiplicity: Members giving each arc (ground arcs count as 2: never lost).
        member_arcs: For each member, the distinct-arc indices it gives
            (-1 where a brace's second arc is absent for a tie), shape (M, 2).
    """

    nodes: int
    src: IntArray
    dst: IntArray
    multiplicity: IntArray
    member_arcs: IntArray


def member_arrays(members: Sequence[Member]) -> tuple[IntArray, IntArray, BoolArray, BoolArray]:
    """Rows, columns, is-brace and is-rising of members as numpy arrays (1-based bays)."""
    n = len(members)
    rows = np.fromiter((m.row for m in members), dtype=np.int64, count=n)
    cols = np.fromiter((m.col for m in members), dtype=np.int64, count=n)
    brace = np.fromiter((m.kind is MemberKind.BRACE for m in members), dtype=np.bool_, count=n)
    rising = np.fromiter((m.diagonal is Diagonal.RISING for m in members), dtype=np.bool_, count=n)
    return rows, cols, brace, rising


def build_arcs(frame: Frame, members: Sequence[Member]) -> ArcSet:
    """Build the distinct arcs of the layout's digraph.

    Args:
        frame: Gives the numbers of rows and columns and the supports.
        members: The members in place.

    Returns:
        The arcs, merged where several members give the same arc.
    """
    r_count, c_count = frame.rows, frame.cols
    rows, cols, brace, rising = member_arrays(members)
    row_node = rows - 1
    col_node = r_count + cols - 1
    # Up arc row->col: brace or rising tie. Down arc col->row: brace or falling tie.
    up = brace | rising
    down = brace | ~rising
    m = len(members)
    idx = np.arange(m)
    tails = [row_node[up], col_node[down]]
    heads = [col_node[up], row_node[down]]
    owners = [idx[up], idx[down]]
    slot = [np.zeros(int(up.sum()), dtype=np.int64), np.ones(int(down.sum()), dtype=np.int64)]
    nodes = r_count + c_count
    if frame.supports is Supports.BASE:
        ground = nodes
        nodes += 1
        cnodes = np.arange(r_count, r_count + c_count, dtype=np.int64)
        gnodes = np.full(c_count, ground, dtype=np.int64)
        none = np.full(c_count, -1, dtype=np.int64)
        for _ in range(2):  # each ground arc twice: it can never be lost
            tails += [gnodes, cnodes]
            heads += [cnodes, gnodes]
            owners += [none, none]
            slot += [none, none]
    tail, head = np.concatenate(tails), np.concatenate(heads)
    owner, which = np.concatenate(owners), np.concatenate(slot)
    key = tail * nodes + head
    unique, inverse, counts = np.unique(key, return_inverse=True, return_counts=True)
    member_arcs = np.full((m, 2), -1, dtype=np.int64)
    real = owner >= 0
    member_arcs[owner[real], which[real]] = inverse[real]
    return ArcSet(
        nodes=nodes,
        src=(unique // nodes).astype(np.int64),
        dst=(unique % nodes).astype(np.int64),
        multiplicity=counts.astype(np.int64),
        member_arcs=member_arcs,
    )


def _csr(nodes: int, src: IntArray, dst: IntArray) -> csr_matrix:
    data = np.ones(len(src), dtype=np.int8)
    return csr_matrix((data, (src, dst)), shape=(nodes, nodes))


def _strong_labels(arcs: ArcSet, keep: BoolArray | None = None) -> tuple[int, IntArray]:
    src, dst = (arcs.src, arcs.dst) if keep is None else (arcs.src[keep], arcs.dst[keep])
    count, labels = connected_components(_csr(arcs.nodes, src, dst), directed=True, connection="strong")
    return int(count), labels.astype(np.int64)


def frame_digraph(frame: Frame, members: Iterable[Member] | None = None) -> nx.DiGraph:
    """The layout's digraph as networkx, with readable node names.

    Nodes are ``("row", i)``, ``("col", j)`` and, on a pinned base,
    ``("ground", 0)``. Meant for inspection and teaching; the check itself
    works on arrays.

    Example:
        >>> from bracegrid.model import Frame, Member, MemberKind, Diagonal
        >>> f = Frame("f", (3000,), (2000,))
        >>> g = frame_digraph(f, [Member(1, 1, MemberKind.TIE, Diagonal.RISING)])
        >>> sorted(g.edges())
        [(('row', 1), ('col', 1))]
    """
    g: nx.DiGraph = nx.DiGraph()
    g.add_nodes_from(("row", i) for i in range(1, frame.rows + 1))
    g.add_nodes_from(("col", j) for j in range(1, frame.cols + 1))
    if frame.supports is Supports.BASE:
        for j in range(1, frame.cols + 1):
            g.add_edge(("ground", 0), ("col", j))
            g.add_edge(("col", j), ("ground", 0))
    for m in frame.members if members is None else members:
        r, c = ("row", m.row), ("col", m.col)
        if m.kind is MemberKind.BRACE or m.diagonal is Diagonal.RISING:
            g.add_edge(r, c)
        if m.kind is MemberKind.BRACE or m.diagonal is Diagonal.FALLING:
            g.add_edge(c, r)
    return g


def is_stable(frame: Frame, members: Sequence[Member] | None = None) -> bool:
    """Whether the layout leaves the frame without any mechanism.

    Args:
        frame: The frame; its own members are used unless ``members`` is given.
        members: The layout to check instead of ``frame.members``.

    Returns:
        True iff the row/column digraph is strongly connected.

    Example:
        >>> from bracegrid.model import Frame, Member, MemberKind, Diagonal
        >>> f = Frame("f", (3000, 3000), (2000,))
        >>> b = MemberKind.BRACE
        >>> is_stable(f, [Member(1, 1, b, Diagonal.RISING), Member(1, 2, b, Diagonal.RISING)])
        True
    """
    layout = frame.members if members is None else members
    count, _ = _strong_labels(build_arcs(frame, layout))
    return count == 1


def _node_name(frame: Frame, node: int) -> tuple[str, int]:
    if node < frame.rows:
        return ("row", node + 1)
    if node < frame.rows + frame.cols:
        return ("col", node - frame.rows + 1)
    return ("ground", 0)


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
    dag = _csr(count, cs[between], cd[between])
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
        nodes = order[bounds[comp] : bounds[comp + 1]]
        rows = tuple(int(n) + 1 for n in nodes if n < frame.rows)
        columns = tuple(int(n) - frame.rows + 1 for n in nodes if frame.rows <= n < frame.rows + frame.cols)
        if below[comp]:
            racking = Racking.CLOCKWISE  # can only increase relative to the anchor
        elif above[comp]:
            racking = Racking.ANTICLOCKWISE
        else:
            racking = Racking.BOTH
        parts.append(LoosePart(rows=rows, columns=columns, racking=racking))
    parts.sort(key=lambda p: (p.rows[:1] or (10**9,), p.columns[:1] or (10**9,)))
    return anchor, parts


def _tree_arcs(arcs: ArcSet, root: int, heavy: BoolArray, *, reverse: bool) -> BoolArray:
    """Arcs of a shortest-path tree from (or, reversed, into) root avoiding heavy arcs."""
    big = float(arcs.nodes + 1)
    weight = np.where(heavy, big, 1.0)
    src, dst = (arcs.dst, arcs.src) if reverse else (arcs.src, arcs.dst)
    graph = csr_matrix((weight, (src, dst)), shape=(arcs.nodes, arcs.nodes))
    _, pred = dijkstra(graph, directed=True, indices=root, return_predecessors=True)
    child = np.flatnonzero(pred >= 0)
    parent = pred[child].astype(np.int64)
    # Map (parent -> child) in the traversed orientation back to arc indices.
    tail, head = (child, parent) if reverse else (parent, child)
    key = arcs.src * arcs.nodes + arcs.dst
    order = np.argsort(key)
    pos = order[np.searchsorted(key[order], tail * arcs.nodes + head)]
    used = np.zeros(len(arcs.src), dtype=bool)
    used[pos] = True
    return used


def strong_bridges(arcs: ArcSet) -> BoolArray:
    """Arcs whose single loss breaks strong connectivity of a strongly connected digraph.

    Candidates start as the arcs given by one member only; an arc missing
    from some pair of spanning trees (one out of, one into a root) cannot be
    a bridge, so trees that avoid the candidates are grown repeatedly until
    the set stops shrinking. Each remaining candidate is then tested by a
    strong-components run without it (linear each).

    Args:
        arcs: A strongly connected arc set.

    Returns:
        Mask over ``arcs.src`` of the strong bridges.
    """
    cand = arcs.multiplicity == 1
    root = 0
    while cand.any():
        used = _tree_arcs(arcs, root, cand, reverse=False) | _tree_arcs(arcs, root, cand, reverse=True)
        new = cand & used
        if new.sum() == cand.sum():
            break
        cand = new
    bridges = np.zeros(len(arcs.src), dtype=bool)
    keep = np.ones(len(arcs.src), dtype=bool)
    for e in np.flatnonzero(cand):
        keep[e] = False
        count, _ = _strong_labels(arcs, keep)
        keep[e] = True
        bridges[e] = count > 1
    return bridges


def find_critical_members(frame: Frame, members: Sequence[Member] | None = None) -> tuple[Member, ...]:
    """Members whose single loss makes a stable layout unstable.

    Args:
        frame: The frame; its own members are used unless ``members`` is given.
        members: The layout to examine.

    Returns:
        The critical members in layout order; empty if the layout is not stable.

    Example:
        >>> from bracegrid.model import Frame, Member, MemberKind, Diagonal
        >>> f = Frame("f", (3000,), (2000,))
        >>> m = Member(1, 1, MemberKind.BRACE, Diagonal.RISING)
        >>> find_critical_members(f, [m]) == (m,)
        True
    """
    layout = tuple(frame.members if members is None else members)
    arcs = build_arcs(frame, layout)
    count, _ = _strong_labels(arcs)
    if count != 1 or not layout:
        return ()
    bridges = strong_bridges(arcs)
    ma = arcs.member_arcs
    hit = np.zeros(len(layout), dtype=bool)
    for k in range(2):
        valid = ma[:, k] >= 0
        hit[valid] |= bridges[ma[valid, k]]
    return tuple(layout[i] for i in np.flatnonzero(hit))


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
    layout = tuple(members)
    arcs = build_arcs(frame, layout)
    count, labels = _strong_labels(arcs)
    anchor, parts = _loose_parts(frame, arcs, count, labels)
    anchor_nodes = np.flatnonzero(labels == anchor)
    anchor_rows = tuple(int(n) + 1 for n in anchor_nodes if n < frame.rows)
    anchor_cols = tuple(int(n) - frame.rows + 1 for n in anchor_nodes if frame.rows <= n < frame.rows + frame.cols)
    stable = count == 1
    braces = sum(1 for m in layout if m.kind is MemberKind.BRACE)
    needed = frame.rows if frame.supports is Supports.BASE else frame.rows + frame.cols - 1
    return Verdict(
        frame=frame.name,
        stable=stable,
        racking_modes=count - 1,
        loose_parts=tuple(parts),
        anchor_rows=anchor_rows,
        anchor_columns=anchor_cols,
        critical_members=find_critical_members(frame, layout) if stable else (),
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
        >>> from bracegrid.model import Frame, Member, MemberKind, Diagonal
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
    layout = frame.members if members is None else members
    count, _ = _strong_labels(build_arcs(frame, layout))
    return count - 1
