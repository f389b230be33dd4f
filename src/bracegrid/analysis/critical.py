"""Critical members: those whose single loss leaves a stable layout with a mechanism.

A member is critical iff it gives a strong bridge of the layout's digraph (an arc whose loss
breaks strong connectivity) that no other member also gives.
"""

from __future__ import annotations

from collections.abc import Sequence

import networkx as nx
import numpy as np
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import dijkstra

from bracegrid.analysis.digraph import ArcSet, BoolArray, arc_strong_components, build_arcs
from bracegrid.model import Frame, Member


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
            count, _ = arc_strong_components(arcs, keep)
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


def critical_from_arcs(arcs: ArcSet, layout: Sequence[Member]) -> tuple[Member, ...]:
    """The members of a strongly connected layout that give a strong bridge (``arcs`` built from ``layout``)."""
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
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> f = Frame("f", (3000,), (2000,))
        >>> m = Member(1, 1, MemberKind.BRACE, Diagonal.RISING)
        >>> find_critical_members(f, [m]) == (m,)
        True
    """
    layout = tuple(frame.members if members is None else members)
    arcs = build_arcs(frame, layout)
    count, _ = arc_strong_components(arcs)
    return critical_from_arcs(arcs, layout) if count == 1 else ()
