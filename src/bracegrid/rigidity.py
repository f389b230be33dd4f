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
from operator import attrgetter

import networkx as nx
import numpy as np
import numpy.typing as npt
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import breadth_first_order, connected_components, dijkstra, maximum_flow

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
    (pinned base only) is ``R + C``. An arc's key is ``tail * nodes + head``.

    Attributes:
        nodes: Number of nodes.
        src: Tail of each distinct arc (sorted by key).
        dst: Head of each distinct arc.
        multiplicity: Members giving each arc (ground arcs count as 2: never lost).
        member_keys: For each member, the keys of the arcs it gives, shape
            (M, 2): column 0 the row->col arc, column 1 the col->row arc, -1
            where the member gives no such arc.
        braces: Number of rigid braces among the members.
    """

    nodes: int
    src: IntArray
    dst: IntArray
    multiplicity: IntArray
    member_keys: IntArray
    braces: int

    @property
    def keys(self) -> IntArray:
        """Sorted keys of the distinct arcs."""
        return self.src * self.nodes + self.dst


def _ids(values: Iterable[object], count: int) -> IntArray:
    return np.fromiter(map(id, values), dtype=np.int64, count=count)


def member_arrays(members: Sequence[Member]) -> tuple[IntArray, IntArray, BoolArray, BoolArray]:
    """Rows, columns, is-brace and is-rising of members as numpy arrays (1-based bays).

    Enum members are singletons, so identity (``id``) comparison is exact and
    keeps the conversion at C speed for a million members.
    """
    n = len(members)
    rows = np.fromiter(map(attrgetter("row"), members), dtype=np.int64, count=n)
    cols = np.fromiter(map(attrgetter("col"), members), dtype=np.int64, count=n)
    brace = _ids(map(attrgetter("kind"), members), n) == id(MemberKind.BRACE)
    rising = _ids(map(attrgetter("diagonal"), members), n) == id(Diagonal.RISING)
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
    nodes = r_count + c_count + (1 if frame.supports is Supports.BASE else 0)
    row_node = rows - 1
    col_node = r_count + cols - 1
    # Up arc row->col: brace or rising tie. Down arc col->row: brace or falling tie.
    up_key = np.where(brace | rising, row_node * nodes + col_node, -1)
    down_key = np.where(brace | ~rising, col_node * nodes + row_node, -1)
    parts = [up_key[up_key >= 0], down_key[down_key >= 0]]
    if frame.supports is Supports.BASE:
        ground = nodes - 1
        cnodes = np.arange(r_count, r_count + c_count, dtype=np.int64)
        ground_keys = np.concatenate([ground * nodes + cnodes, cnodes * nodes + ground])
        parts += [ground_keys, ground_keys]  # twice: a ground arc can never be lost
    all_keys = np.concatenate(parts)
    counts = np.bincount(all_keys, minlength=0) if nodes * nodes <= 4 * len(all_keys) + 1024 else None
    if counts is not None:
        unique = np.flatnonzero(counts)
        mult = counts[unique]
    else:
        unique, mult = np.unique(all_keys, return_counts=True)
    return ArcSet(
        nodes=nodes,
        src=(unique // nodes).astype(np.int64),
        dst=(unique % nodes).astype(np.int64),
        multiplicity=mult.astype(np.int64),
        member_keys=np.stack([up_key, down_key], axis=1),
        braces=int(brace.sum()),
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
    weight = np.where(heavy, float(arcs.nodes + 1), 1.0)
    src, dst = (arcs.dst, arcs.src) if reverse else (arcs.src, arcs.dst)
    graph = csr_matrix((weight, (src, dst)), shape=(arcs.nodes, arcs.nodes))
    _, pred = dijkstra(graph, directed=True, indices=root, return_predecessors=True)
    child = np.flatnonzero(pred >= 0)
    parent = pred[child].astype(np.int64)
    tail, head = (child, parent) if reverse else (parent, child)
    used = np.zeros(len(arcs.src), dtype=bool)
    used[np.searchsorted(arcs.keys, tail * arcs.nodes + head)] = True
    return used


def _flowgraph_bridges(graph: nx.DiGraph, root: int, single: set[tuple[int, int]]) -> set[tuple[int, int]]:
    """Bridges of the flowgraph (graph, root): arcs on every path from root to their head.

    An arc (u, v) given once is such a bridge iff u is the immediate dominator
    of v and v dominates every other predecessor of v (Italiano, Laura and
    Santaroni, "Finding strong bridges and strong articulation points in
    linear time", Theor. Comput. Sci. 447:74-84, 2012, doi:10.1016/j.tcs.2011.11.011).
    """
    idom = nx.immediate_dominators(graph, root)
    children: dict[int, list[int]] = {}
    for v, u in idom.items():
        if v != u:
            children.setdefault(u, []).append(v)
    # Pre/post numbers of the dominator tree: v dominates w iff pre[v] <= pre[w] and post[w] <= post[v].
    pre: dict[int, int] = {}
    post: dict[int, int] = {}
    clock = 0
    stack: list[tuple[int, bool]] = [(root, False)]
    while stack:
        v, done = stack.pop()
        if done:
            post[v] = clock
            clock += 1
            continue
        pre[v] = clock
        clock += 1
        stack.append((v, True))
        stack.extend((c, False) for c in children.get(v, ()))
    out: set[tuple[int, int]] = set()
    for v, u in idom.items():
        if v == u or (u, v) not in single:
            continue
        if all(w == u or (pre[v] <= pre[w] and post[w] <= post[v]) for w in graph.predecessors(v)):
            out.add((u, v))
    return out


def strong_bridges(arcs: ArcSet) -> BoolArray:
    """Arcs whose single loss breaks strong connectivity of a strongly connected digraph.

    Candidates start as the arcs given by one member only. An arc missing from
    some pair of spanning trees (one out of, one into a root) cannot be a
    bridge, so trees that avoid the candidates are grown until the set stops
    shrinking (this clears dense layouts in a few sparse-graph passes). Few
    remaining candidates are tested one by one (a strong-components run each);
    many are settled at once with dominator trees: the strong bridges are the
    bridges of the flowgraphs of G and of its reverse from any root (Italiano,
    Laura and Santaroni 2012, doi:10.1016/j.tcs.2011.11.011).

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
    if cand.sum() <= 32:
        keep = np.ones(len(arcs.src), dtype=bool)
        for e in np.flatnonzero(cand):
            keep[e] = False
            count, _ = _strong_labels(arcs, keep)
            keep[e] = True
            bridges[e] = count > 1
        return bridges
    graph: nx.DiGraph = nx.DiGraph()
    graph.add_nodes_from(range(arcs.nodes))
    pairs = list(zip(arcs.src.tolist(), arcs.dst.tolist(), strict=True))
    graph.add_edges_from(pairs)
    single = {pairs[e] for e in np.flatnonzero(cand).tolist()}
    found = _flowgraph_bridges(graph, root, single)
    reversed_single = {(v, u) for u, v in single}
    found |= {(v, u) for u, v in _flowgraph_bridges(graph.reverse(copy=False), root, reversed_single)}
    if found:
        keys = np.array(sorted(u * arcs.nodes + v for u, v in found), dtype=np.int64)
        bridges[np.searchsorted(arcs.keys, keys)] = True
    return bridges


def _critical(arcs: ArcSet, layout: Sequence[Member]) -> tuple[Member, ...]:
    bridges = strong_bridges(arcs)
    if not bridges.any() or not layout:
        return ()
    hit = np.isin(arcs.member_keys, arcs.keys[bridges]).any(axis=1)
    return tuple(layout[i] for i in np.flatnonzero(hit).tolist())


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
    return _critical(arcs, layout) if count == 1 else ()


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
    braces = arcs.braces
    needed = frame.rows if frame.supports is Supports.BASE else frame.rows + frame.cols - 1
    return Verdict(
        frame=frame.name,
        stable=stable,
        racking_modes=count - 1,
        loose_parts=tuple(parts),
        anchor_rows=anchor_rows,
        anchor_columns=anchor_cols,
        critical_members=_critical(arcs, layout) if stable else (),
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
        >>> from bracegrid.model import Frame, Member, MemberKind, Diagonal
        >>> f = Frame("f", (3000,), (2000,))
        >>> b = MemberKind.BRACE
        >>> redundancy_of(f, [Member(1, 1, b, Diagonal.RISING), Member(1, 1, b, Diagonal.FALLING)])
        1
    """
    layout = frame.members if members is None else members
    arcs = build_arcs(frame, layout)
    count, _ = _strong_labels(arcs)
    if count != 1:
        return -1
    if arcs.nodes == 1:
        return at_most
    cap = at_most + 1
    capacity = np.minimum(arcs.multiplicity, cap).astype(np.int32)
    if frame.supports is Supports.BASE:
        ground = arcs.nodes - 1
        capacity[(arcs.src == ground) | (arcs.dst == ground)] = cap
    graph = csr_matrix((capacity, (arcs.src, arcs.dst)), shape=(arcs.nodes, arcs.nodes))
    best = cap
    for v in range(1, arcs.nodes):
        for s, t in ((0, v), (v, 0)):
            best = min(best, int(maximum_flow(graph, s, t).flow_value))
            if best == 1:
                return 0
    return min(best - 1, at_most)
