"""Exact solutions without a solver: spanning trees, pinned-base rows, closed forms.

Three cases need no search (docs/optimizer.md gives the arguments):

* rigid braces only on a free frame whose kept members are all braces (or
  give arcs both ways): braces form a graphic matroid on the bipartite
  row/column graph, so Kruskal's minimum spanning tree is optimal
  (Bolker & Crapo 1979);
* a pinned base: the ground and every column form one strong part, so each
  row only needs ``k + 1`` member arcs out of it and ``k + 1`` into it, which
  a small dynamic programme over the row's bays settles exactly;
* a complete free frame with uniform bays and nothing in place: the closed
  form ``min((r+c-1)a, 2rb + (c-r)a, 2cb)`` with its construction.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from bracegrid.analysis.digraph import BoolArray, IntArray, bay_arcs, strong_components
from bracegrid.optimize.bays import Additions, AdditionsBuilder, BayTable
from bracegrid.optimize.patterns import PatternKind, closed_form_cost, pattern
from bracegrid.optimize.results import SolveMethod, method_how


@dataclass(frozen=True, slots=True)
class Shortcut:
    """A layout found without search, with how it was found.

    Attributes:
        additions: The new members.
        method: Which exact route found it.
        pattern: The closed-form layout, for :attr:`SolveMethod.CLOSED_FORM`.
    """

    additions: Additions
    method: SolveMethod
    pattern: PatternKind | None = None

    @property
    def words(self) -> str:
        """The method in words (a progress stage; every shortcut is exact)."""
        return method_how(self.method, pattern=self.pattern)


class _Union:
    def __init__(self, n: int) -> None:
        self.parent = list(range(n))

    def find(self, a: int) -> int:
        while self.parent[a] != a:
            self.parent[a] = self.parent[self.parent[a]]
            a = self.parent[a]
        return a

    def join(self, a: int, b: int) -> bool:
        ra, rb = self.find(a), self.find(b)
        if ra == rb:
            return False
        self.parent[ra] = rb
        return True


def existing_is_symmetric(table: BayTable) -> bool:
    """Whether the kept members' strong parts equal their connected parts (braces then act as undirected)."""
    n = table.rows + table.cols
    src, dst, _ = bay_arcs(table.exist_up, table.exist_down)
    strong, _ = strong_components(n, src, dst)
    weak, _ = strong_components(n, np.concatenate([src, dst]), np.concatenate([dst, src]))
    return strong == weak


def spanning_tree_braces(table: BayTable) -> Shortcut | None:
    """Minimum-cost braces joining every row and column (Kruskal), kept members contracted.

    Valid on a free frame when kept members give arcs both ways (see
    :func:`existing_is_symmetric`). O(RC log RC).

    Returns:
        The braces, or None when the allowed bays cannot connect every node.

    Example:
        >>> from bracegrid.optimize.bays import bay_table
        >>> from bracegrid.model import CostCatalogue, Frame, MemberKind
        >>> t = bay_table(Frame("f", (3000,) * 3, (2000,) * 2), CostCatalogue(), (), frozenset({MemberKind.BRACE}))
        >>> int(spanning_tree_braces(t).additions.braces.sum())  # R + C - 1
        4
    """
    r_count, c_count = table.rows, table.cols
    uf = _Union(r_count + c_count)
    for i, j in zip(*np.nonzero((table.exist_up > 0) | (table.exist_down > 0)), strict=True):
        uf.join(int(i), r_count + int(j))
    add = AdditionsBuilder.empty(r_count, c_count)
    bi, bj = np.nonzero(table.brace_ok)
    order = np.lexsort((bj, bi, table.brace_cost[bi, bj]))
    for k in order:
        i, j = int(bi[k]), int(bj[k])
        if uf.join(i, r_count + j):
            add.braces[i, j] = 1
    roots = {uf.find(v) for v in range(r_count + c_count)}
    if len(roots) > 1:
        return None
    return Shortcut(add.build(), SolveMethod.SPANNING_TREE)


def _row_options(
    table: BayTable, free: tuple[IntArray, BoolArray, BoolArray], i: int, j: int, k: int
) -> list[tuple[int, int, int, int]]:
    """(braces, rising, falling, cost) choices for one bay (dominated X+brace mixes dropped for k = 0).

    ``free`` holds the table's ``free_slots``, ``rising_tie_ok`` and ``falling_tie_ok`` arrays, worked
    out once per table (each property builds a whole new array: read per bay, they made the
    shortcut quadratic in the number of bays, 13 s on a 200 x 200 frame).
    """
    slots_all, rising_ok, falling_ok = free
    slots = int(slots_all[i, j])
    max_b = min(slots, 2 if k > 0 else 1) if table.brace_ok[i, j] else 0
    out = []
    for b in range(max_b + 1):
        for tr in range(int(rising_ok[i, j]) + 1):
            for tf in range(int(falling_ok[i, j]) + 1):
                if b + tr + tf > slots or (k == 0 and b and (tr or tf)):
                    continue
                cost = b * int(table.brace_cost[i, j]) + (tr + tf) * int(table.tie_cost[i, j])
                out.append((b, tr, tf, cost))
    return out


def pinned_base_rows(table: BayTable, *, k: int = 0) -> Shortcut | None:
    """Cheapest members so that every row has k+1 member arcs to and from the columns.

    Exact for a pinned base: ground and columns form one strong part joined
    by never-lost arcs, so the only cuts are sets of rows and the tightest
    are single rows. Each row is a dynamic programme over its bays with state
    (arcs out, arcs in) capped at k + 1: O(R C (k+2)^2).

    Returns:
        The members, or None when some row cannot reach k+1 arcs each way.

    Example:
        >>> from bracegrid.optimize.bays import bay_table
        >>> from bracegrid.model import CostCatalogue, Frame, MemberKind
        >>> t = bay_table(Frame("f", (3000,) * 3, (2000,) * 4), CostCatalogue(), (), frozenset(MemberKind))
        >>> s = pinned_base_rows(t)
        >>> int(s.additions.braces.sum()), int(s.additions.rising.sum() + s.additions.falling.sum())
        (0, 8)
    """
    need = k + 1
    add = AdditionsBuilder.empty(table.rows, table.cols)
    free = (table.free_slots, table.rising_tie_ok, table.falling_tie_ok)
    for i in range(table.rows):
        start = (min(need, int(table.exist_up[i].sum())), min(need, int(table.exist_down[i].sum())))
        # best[state] = (cost, choices)
        best: dict[tuple[int, int], tuple[int, list[tuple[int, int, int, int]]]] = {start: (0, [])}
        for j in range(table.cols):
            options = _row_options(table, free, i, j, k)
            nxt: dict[tuple[int, int], tuple[int, list[tuple[int, int, int, int]]]] = {}
            for (u, d), (cost, picks) in best.items():
                for b, tr, tf, c in options:
                    state = (min(need, u + b + tr), min(need, d + b + tf))
                    total = cost + c
                    if state not in nxt or total < nxt[state][0]:
                        pick = [*picks, (j, b, tr, tf)] if (b or tr or tf) else picks
                        nxt[state] = (total, pick)
            best = nxt
        if (need, need) not in best:
            return None
        for j, b, tr, tf in best[(need, need)][1]:
            add.braces[i, j] += b
            add.rising[i, j] += tr
            add.falling[i, j] += tf
    return Shortcut(add.build(), SolveMethod.PINNED_ROWS)


def closed_form_applies(table: BayTable) -> bool:
    """Complete frame (nothing blocked or in place) with uniform member costs."""
    return bool(
        table.free_slots.min() == 2
        and table.exist_up.sum() + table.exist_down.sum() == 0
        and (table.brace_cost == table.brace_cost.flat[0]).all()
        and (table.tie_cost == table.tie_cost.flat[0]).all()
    )


def closed_form(table: BayTable) -> Shortcut | None:
    """The closed-form optimum and a layout reaching it, on a complete uniform free frame.

    Returns:
        The layout, or None when the frame is not complete and uniform.

    Example:
        >>> from bracegrid.optimize.bays import bay_table
        >>> from bracegrid.model import CostCatalogue, Frame, MemberKind
        >>> t = bay_table(Frame("f", (3000,) * 6, (3000,) * 4), CostCatalogue(), (), frozenset(MemberKind))
        >>> s = closed_form(t)
        >>> s.additions.cost(t) == closed_form_cost(4, 6, int(t.brace_cost[0, 0]), int(t.tie_cost[0, 0]))
        True
    """
    if not closed_form_applies(table):
        return None
    r_count, c_count = table.rows, table.cols
    a = int(table.brace_cost[0, 0]) if table.brace_ok.all() else None
    b = int(table.tie_cost[0, 0]) if table.tie_ok else None
    if a is None and b is None:
        return None
    best = closed_form_cost(r_count, c_count, a, b)
    if a is not None and best == (r_count + c_count - 1) * a:
        kind = PatternKind.TREE
    elif b is not None and best == 2 * max(r_count, c_count) * b:
        kind = PatternKind.CYCLE
    else:
        kind = PatternKind.MIXED
    return Shortcut(pattern(r_count, c_count, kind), SolveMethod.CLOSED_FORM, kind)
