"""Separation: which node sets a candidate layout leaves with too few member arcs.

A layout survives the loss of any k members iff every node set S has at least k + 1 member arcs
leaving it (Menger; Edmonds). For k = 0 the violated sets come from the strong components of the
layout, for k > 0 from minimum cuts by maximum flow. The graph work is done by
:mod:`bracegrid.analysis.digraph`; this module only asks it the optimizer's questions.
"""

from __future__ import annotations

import numpy as np
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import breadth_first_order

from bracegrid.analysis.digraph import (
    BoolArray,
    IntArray,
    bay_arcs,
    csr,
    flow_cuts,
    leaving_bays,
    strong_components,
)
from bracegrid.optimize.bays import BayCounts, BayTable


def arc_lists(table: BayTable, add: BayCounts) -> tuple[IntArray, IntArray, IntArray]:
    """(tails, heads, multiplicities) of member arcs of a free frame, kept members included."""
    return bay_arcs(add.up(table), add.down(table))


def strong_labels(table: BayTable, add: BayCounts) -> tuple[int, IntArray]:
    """Strong components of kept + added members (free frame): (count, label per node)."""
    src, dst, _ = arc_lists(table, add)
    return strong_components(table.rows + table.cols, src, dst)


def is_strong(table: BayTable, add: BayCounts) -> bool:
    """Whether kept + added members leave the free frame without a mechanism."""
    return strong_labels(table, add)[0] == 1


def _closure(dag: csr_matrix, count: int) -> BoolArray:
    """reach[c, d] = d reachable from c (c included) in a small DAG."""
    reach = np.zeros((count, count), dtype=bool)
    for c in range(count):
        reach[c, breadth_first_order(dag, c, directed=True, return_predecessors=False)] = True
    return reach


def violated_cuts(table: BayTable, add: BayCounts, k: int) -> list[frozenset[int]]:
    """Node sets S with fewer than k + 1 member arcs leaving S.

    For k = 0: strong components of the layout, and the sets of components
    reachable from (reaching) each component. For k > 0: minimum cuts from
    maximum flows between node 0 and every other node, both ways.

    Returns:
        Violated sets, each a proper non-empty subset of the nodes (empty list = none violated).
    """
    n = table.rows + table.cols
    src, dst, cap = arc_lists(table, add)
    everything = frozenset(range(n))
    found: set[frozenset[int]] = set()
    if k == 0:
        count, labels = strong_components(n, src, dst)
        if count == 1:
            return []
        cs, cd = labels[src], labels[dst]
        between = cs != cd
        dag = csr(count, cs[between], cd[between])
        reach = _closure(dag, count)
        back = _closure(dag.T.tocsr(), count)
        members = [frozenset(np.flatnonzero(labels == c).tolist()) for c in range(count)]
        for c in range(count):
            down_set = frozenset().union(*(members[d] for d in np.flatnonzero(reach[c])))
            up_set = frozenset().union(*(members[d] for d in np.flatnonzero(back[c])))
            if down_set != everything:
                found.add(down_set)  # nothing leaves what c reaches
            if up_set != everything:
                found.add(everything - up_set)  # nothing enters what reaches c
        return sorted(found, key=lambda s: (len(s), sorted(s)))
    for cut in flow_cuts(n, src, dst, cap):
        if cut.value < k + 1:
            found.add(cut.leaving_set(n))
    return sorted(found, key=lambda s: (len(s), sorted(s)))


def meets(table: BayTable, add: BayCounts, k: int) -> bool:
    """Every cut has k + 1 member arcs (maximum flows from node 0 and back, stopping at the first short one)."""
    n = table.rows + table.cols
    src, dst, cap = arc_lists(table, add)
    return all(cut.value >= k + 1 for cut in flow_cuts(n, src, dst, cap))


def cut_short(table: BayTable, add: BayCounts, s: frozenset[int], k: int) -> bool:
    """Whether node set S still has fewer than k + 1 member arcs leaving it."""
    up_mask, down_mask = leaving_bays(table.rows, table.cols, s)
    leaving = add.up(table)[up_mask].sum() + add.down(table)[down_mask].sum()
    return bool(leaving < k + 1)
