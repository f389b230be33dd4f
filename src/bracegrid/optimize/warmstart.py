"""Constructive layouts: greedy repair to strong connectivity, then pruning.

Used as the first incumbent, to turn every relaxed solver answer into a
stable layout (an upper bound), and as the fallback when the time limit
leaves nothing better. Work in progress lives in an :class:`AdditionsBuilder`;
every function returns frozen :class:`Additions`.
"""

from __future__ import annotations

import time

import numpy as np

from bracegrid.analysis.digraph import BoolArray, IntArray, leaving_bays, split_labels
from bracegrid.optimize.bays import Additions, AdditionsBuilder, BayCounts, BayTable
from bracegrid.optimize.patterns import PatternKind, pattern
from bracegrid.optimize.separation import cut_short, is_strong, meets, strong_labels, violated_cuts

_BIG = np.iinfo(np.int64).max // 4


def _arc_prices(table: BayTable, add: BayCounts) -> tuple[IntArray, IntArray, IntArray, IntArray]:
    """Cheapest new member giving each up / down arc per bay, and whether it is a brace (1) or tie (0)."""
    used = add.braces + add.rising + add.falling
    slots = table.free_slots - used
    brace_ok = table.brace_ok & (slots > 0)
    up_tie = table.rising_tie_ok & (add.rising == 0) & (slots > 0)
    down_tie = table.falling_tie_ok & (add.falling == 0) & (slots > 0)
    brace = np.where(brace_ok, table.brace_cost, _BIG)
    up = np.minimum(np.where(up_tie, table.tie_cost, _BIG), brace)
    down = np.minimum(np.where(down_tie, table.tie_cost, _BIG), brace)
    up_kind = np.where(np.where(up_tie, table.tie_cost, _BIG) <= brace, 0, 1)
    down_kind = np.where(np.where(down_tie, table.tie_cost, _BIG) <= brace, 0, 1)
    return up, down, up_kind, down_kind


def repair(table: BayTable, add: BayCounts) -> Additions | None:
    """Add cheap members until the free frame is strongly connected.

    Repeatedly takes a component with no arc leaving it (a sink of the
    condensation) and adds the cheapest member giving an arc out of it,
    preferring arcs into a source component; then the same for components
    with no arc entering. O(components x RC).

    Returns:
        The repaired additions, or None if no allowed member can finish the job.
    """
    cur = AdditionsBuilder(add.braces, add.rising, add.falling)
    while True:
        count, labels = strong_labels(table, cur)
        if count == 1:
            return cur.build()
        row_lab, col_lab = split_labels(table.rows, labels)
        up_arcs = cur.up(table) > 0
        down_arcs = cur.down(table) > 0
        cross_up = up_arcs & (row_lab[:, None] != col_lab[None, :])
        cross_down = down_arcs & (row_lab[:, None] != col_lab[None, :])
        has_out = np.zeros(count, dtype=bool)
        has_in = np.zeros(count, dtype=bool)
        has_out[row_lab[np.nonzero(cross_up)[0]]] = True
        has_in[col_lab[np.nonzero(cross_up)[1]]] = True
        has_out[col_lab[np.nonzero(cross_down)[1]]] = True
        has_in[row_lab[np.nonzero(cross_down)[0]]] = True
        up, down, up_kind, down_kind = _arc_prices(table, cur)
        sinks = np.flatnonzero(~has_out)
        sources = np.flatnonzero(~has_in)
        if len(sinks):
            comp, leave = int(sinks[0]), True
        else:
            comp, leave = int(sources[0]), False
        in_s_row = row_lab == comp
        in_s_col = col_lab == comp
        target_row = np.isin(row_lab, sources) if leave else np.isin(row_lab, sinks)
        target_col = np.isin(col_lab, sources) if leave else np.isin(col_lab, sinks)
        if leave:
            # up arcs from rows in S to columns outside; down arcs from columns in S to rows outside
            up_mask = in_s_row[:, None] & ~in_s_col[None, :]
            down_mask = ~in_s_row[:, None] & in_s_col[None, :]
            up_pref = up_mask & target_col[None, :]
            down_pref = down_mask & target_row[:, None]
        else:
            up_mask = ~in_s_row[:, None] & in_s_col[None, :]
            down_mask = in_s_row[:, None] & ~in_s_col[None, :]
            up_pref = up_mask & target_row[:, None]
            down_pref = down_mask & target_col[None, :]
        choice = None
        for um, dm in ((up_pref, down_pref), (up_mask, down_mask)):
            cu = np.where(um, up, _BIG)
            cd = np.where(dm, down, _BIG)
            iu, idn = int(cu.argmin()), int(cd.argmin())
            best = min(cu.flat[iu], cd.flat[idn])
            if best < _BIG:
                choice = (True, iu) if cu.flat[iu] <= cd.flat[idn] else (False, idn)
                break
        if choice is None:
            return None
        is_up, flat = choice
        i, j = divmod(flat, table.cols)
        kind = (up_kind if is_up else down_kind)[i, j]
        if kind == 1:
            cur.braces[i, j] += 1
        elif is_up:
            cur.rising[i, j] += 1
        else:
            cur.falling[i, j] += 1


def prune(table: BayTable, add: BayCounts) -> Additions:
    """Drop new members (dearest first) and turn braces into ties while the frame stays stable.

    Args:
        table: The frame's table.
        add: A stable set of additions.

    Returns:
        Additions no more expensive, still stable, with no member removable.
    """
    cur = AdditionsBuilder(add.braces, add.rising, add.falling)
    items: list[tuple[int, int, int, str]] = []
    for name, arr, price in (("b", cur.braces, table.brace_cost), ("r", cur.rising, table.tie_cost),
                             ("f", cur.falling, table.tie_cost)):  # fmt: skip
        for i, j in zip(*np.nonzero(arr), strict=True):
            items.extend([(-int(price[i, j]), int(i), int(j), name)] * int(arr[i, j]))  # one try per member
    items.sort()
    arrays = {"b": cur.braces, "r": cur.rising, "f": cur.falling}
    for _, i, j, name in items:
        arr = arrays[name]
        if arr[i, j] == 0:
            continue
        arr[i, j] -= 1
        if is_strong(table, cur):
            continue
        if name == "b" and table.tie_ok and table.tie_cost[i, j] < table.brace_cost[i, j]:
            for tie_name, ok in (("r", table.rising_free), ("f", table.falling_free)):
                tarr = arrays[tie_name]
                if ok[i, j] and tarr[i, j] == 0:
                    tarr[i, j] += 1
                    if is_strong(table, cur):
                        break
                    tarr[i, j] -= 1
            else:
                arr[i, j] += 1
            continue
        arr[i, j] += 1
    return cur.build()


def _fit(table: BayTable, add: BayCounts) -> Additions:
    """Keep only the members of a pattern that the bays can take."""
    slots = table.free_slots
    braces = np.where(table.brace_ok, np.minimum(add.braces, slots), 0)
    rising = np.where(table.rising_tie_ok & (braces + add.rising <= slots), add.rising, 0)
    falling = np.where(table.falling_tie_ok & (braces + rising + add.falling <= slots), add.falling, 0)
    return Additions(braces.astype(np.int64), rising.astype(np.int64), falling.astype(np.int64))


def pattern_starts(
    table: BayTable, *, tries: int = 12, seed: int = 0, deadline: float | None = None
) -> Additions | None:
    """Closed-form patterns laid on the frame under row/column shuffles, then repaired and pruned.

    On near-uniform frames (a grid with an opening) the complete-frame
    optimum is usually a few repairs away from the true one, which the cut
    model then only has to prove. Deterministic for a given seed.

    Args:
        table: The frame's table.
        tries: Row/column orders to try (identity, cheapest first, then seeded shuffles).
        seed: Seed of the shuffles.
        deadline: ``time.monotonic()`` after which no further order is tried.

    Returns:
        The cheapest stable layout found, or None.
    """
    rng = np.random.default_rng(seed)
    kinds = []
    if table.brace_ok.any():
        kinds.append(PatternKind.TREE)
    if table.tie_ok:
        kinds.append(PatternKind.CYCLE)
        if table.brace_ok.any():
            kinds.append(PatternKind.MIXED)
    best: Additions | None = None
    best_cost = 0
    row_order = np.argsort(table.tie_cost.mean(axis=1), kind="stable")
    col_order = np.argsort(table.tie_cost.mean(axis=0), kind="stable")
    for attempt in range(tries):
        if attempt > 0 and deadline is not None and time.monotonic() > deadline:
            break
        if attempt == 0:
            rows, cols = np.arange(table.rows), np.arange(table.cols)
        elif attempt == 1:
            rows, cols = row_order, col_order
        else:
            rows, cols = rng.permutation(table.rows), rng.permutation(table.cols)
        for kind in kinds:
            base = pattern(table.rows, table.cols, kind)
            placed = AdditionsBuilder.empty(table.rows, table.cols)
            for arr_in, arr_out in ((base.braces, placed.braces), (base.rising, placed.rising),
                                    (base.falling, placed.falling)):  # fmt: skip
                arr_out[np.ix_(rows, cols)] = arr_in
            got = constructive(table, _fit(table, placed))
            if got is not None and (best is None or got.cost(table) < best_cost):
                best, best_cost = got, got.cost(table)
    return best


def constructive(table: BayTable, start: BayCounts | None = None) -> Additions | None:
    """Repair then prune, from ``start`` or from nothing.

    Returns:
        A stable set of additions, or None if the allowed members cannot make the frame stable.
    """
    base = start if start is not None else Additions.empty(table.rows, table.cols)
    fixed = repair(table, base)
    return None if fixed is None else prune(table, fixed)


def _brace_for_tie(table: BayTable, cur: AdditionsBuilder, up_mask: BoolArray, down_mask: BoolArray) -> bool:
    """Where no free slot gives a cut an arc, swap the cheapest tie across it for a brace.

    A bay whose slots are full of ties (or a tie and a brace) gives the cut no new arc, yet a brace
    in place of its tie pointing the other way does: the bay keeps its arc into the set and gains
    one out of it. Each swap adds one arc, so the greedy still ends. Returns False if no bay can.
    """
    extra = table.brace_cost - table.tie_cost
    # up arcs leave the set through bays in up_mask: a falling tie there becomes a brace, and vice versa
    up = np.where(up_mask & table.brace_ok & (cur.falling > 0), extra, _BIG)
    down = np.where(down_mask & table.brace_ok & (cur.rising > 0), extra, _BIG)
    iu, idn = int(up.argmin()), int(down.argmin())
    if min(up.flat[iu], down.flat[idn]) >= _BIG:
        return False
    if up.flat[iu] <= down.flat[idn]:
        i, j = divmod(iu, table.cols)
        cur.falling[i, j] -= 1
    else:
        i, j = divmod(idn, table.cols)
        cur.rising[i, j] -= 1
    cur.braces[i, j] += 1
    return True


def constructive_redundant(
    table: BayTable, start: BayCounts | None, k: int, *, deadline: float | None = None
) -> Additions | None:
    """Greedy layout of a free frame whose every cut has k + 1 member arcs, then pruned.

    Repeatedly takes the violated cuts (minimum cuts with too few arcs) and,
    for each still short, adds the cheapest member giving an arc across it;
    then drops new members, dearest first, while every cut stays satisfied
    (pruning stops at the deadline; the layout is valid either way).

    Returns:
        The additions, or None if the allowed members cannot satisfy some cut.
    """
    cur = (
        AdditionsBuilder.empty(table.rows, table.cols)
        if start is None
        else AdditionsBuilder(start.braces, start.rising, start.falling)
    )
    while True:
        cuts = violated_cuts(table, cur, k)
        if not cuts:
            break
        for s in cuts:
            if not cut_short(table, cur, s, k):
                continue
            up_mask, down_mask = leaving_bays(table.rows, table.cols, s)
            up, down, up_kind, down_kind = _arc_prices(table, cur)
            cu = np.where(up_mask, up, _BIG)
            cd = np.where(down_mask, down, _BIG)
            iu, idn = int(cu.argmin()), int(cd.argmin())
            if min(cu.flat[iu], cd.flat[idn]) >= _BIG:
                if not _brace_for_tie(table, cur, up_mask, down_mask):
                    return None
                continue
            is_up = cu.flat[iu] <= cd.flat[idn]
            i, j = divmod(iu if is_up else idn, table.cols)
            if (up_kind if is_up else down_kind)[i, j] == 1:
                cur.braces[i, j] += 1
            elif is_up:
                cur.rising[i, j] += 1
            else:
                cur.falling[i, j] += 1
    items = []
    for name, arr, price in (("b", cur.braces, table.brace_cost), ("r", cur.rising, table.tie_cost),
                             ("f", cur.falling, table.tie_cost)):  # fmt: skip
        for i, j in zip(*np.nonzero(arr), strict=True):
            items.extend([(-int(price[i, j]), int(i), int(j), name)] * int(arr[i, j]))
    items.sort()
    arrays = {"b": cur.braces, "r": cur.rising, "f": cur.falling}
    for _, i, j, name in items:
        if deadline is not None and time.monotonic() > deadline:
            break
        arrays[name][i, j] -= 1
        if not meets(table, cur, k):
            arrays[name][i, j] += 1
    return cur.build()


def _fit_many(table: BayTable, add: BayCounts) -> Additions:
    """Clip summed patterns to what each bay can take (ties first, braces on what is left)."""
    slots = table.free_slots
    rising = np.where(table.rising_tie_ok, np.minimum(add.rising, 1), 0)
    falling = np.where(table.falling_tie_ok, np.minimum(add.falling, 1), 0)
    room = np.maximum(slots - rising - falling, 0)
    braces = np.where(table.brace_ok, np.minimum(add.braces, np.minimum(room, 2)), 0)
    return Additions(braces.astype(np.int64), rising.astype(np.int64), falling.astype(np.int64))


def redundant_pattern_starts(
    table: BayTable, k: int, *, tries: int = 3, seed: int = 0, deadline: float | None = None
) -> Additions | None:
    """Closed walks through every long-side node, each step a brace or an X of ties, k of them overlaid.

    A closed walk using each bay once is 2-edge-connected, so with a brace
    (both arcs) or an X of ties (one arc each way) in every bay it survives
    the loss of any one member; overlaying k such walks under different
    row/column shuffles gives k + 1 arcs across most cuts. The greedy repair
    (:func:`constructive_redundant`) closes the rest, then prunes.

    Returns:
        The cheapest layout found whose every cut has k + 1 member arcs, or None.
    """
    rng = np.random.default_rng(seed)
    base = pattern(table.rows, table.cols, PatternKind.CYCLE)
    walk = (base.rising + base.falling) > 0
    styles = []
    if table.brace_ok.any():
        styles.append("brace")
    if table.tie_ok:
        styles.append("x")
    best: Additions | None = None
    best_cost = 0
    for attempt in range(tries):
        if attempt > 0 and deadline is not None and time.monotonic() > deadline:
            break
        for style in styles:
            total = AdditionsBuilder.empty(table.rows, table.cols)
            for layer in range(max(1, k)):
                if attempt == 0:
                    rows = np.roll(np.arange(table.rows), layer)
                    cols = np.roll(np.arange(table.cols), layer)
                else:
                    rows, cols = rng.permutation(table.rows), rng.permutation(table.cols)
                placed = np.zeros_like(walk)
                placed[np.ix_(rows, cols)] = walk
                if style == "brace":
                    total.braces[placed] += 1
                else:
                    total.rising[placed] += 1
                    total.falling[placed] += 1
            got = constructive_redundant(table, _fit_many(table, total), k, deadline=deadline)
            if got is not None and (best is None or got.cost(table) < best_cost):
                best, best_cost = got, got.cost(table)
    return best
