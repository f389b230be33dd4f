"""Block search: large-neighbourhood search on a stable layout, each sub-problem solved exactly by CP-SAT.

A block is a set of rows and a set of columns; every bay outside rows x columns is frozen at the
incumbent (its members count as kept), and the cut model of the bays inside is solved with the
cutoff "strictly cheaper than the incumbent's members inside the block" and lazy directed cuts
(strong components of each answer, k = 0). Either CP-SAT proves no cheaper block exists, or it
returns an answer that is strongly connected together with the frozen members (accepted), or one
that is not (its violated cuts are added and the block is solved again). Every directed cut is a
node set with a right-hand side, valid for every layout whatever is frozen, so cuts learned in one
block are kept in a pool and seeded into the next. Each CP-SAT call runs on one worker with a
limit in deterministic time, so for a given seed the sequence of blocks and answers is the same
on every run (unless the wall-clock deadline cuts it short). The layout returned is never dearer
than the start and is stable (checked by the caller's independent verification as well).
"""

from __future__ import annotations

import dataclasses
import time
from collections.abc import Iterable
from dataclasses import dataclass, field

import numpy as np

from bracegrid.analysis.digraph import IntArray
from bracegrid.optimize.bays import Additions, BayTable
from bracegrid.optimize.cutmodel import CutModel, configure
from bracegrid.optimize.lprelax import Cut
from bracegrid.optimize.separation import is_strong, violated_cuts
from bracegrid.optimize.warmstart import constructive, prune

#: CP-SAT calls per block at most (each adds the cuts its answer violates); a block whose cuts
#: keep coming is left for the next one.
_SOLVES_PER_BLOCK = 8


def window_table(table: BayTable, fixed: Additions, rows: IntArray, cols: IntArray) -> BayTable:
    """The table with every bay outside rows x cols frozen at ``fixed`` (its members then count as kept)."""
    inside = np.zeros((table.rows, table.cols), dtype=bool)
    inside[np.ix_(rows, cols)] = True
    outside = ~inside
    return dataclasses.replace(
        table,
        rising_free=table.rising_free & inside,
        falling_free=table.falling_free & inside,
        brace_ok=table.brace_ok & inside,
        exist_up=table.exist_up + np.where(outside, fixed.braces + fixed.rising, 0),
        exist_down=table.exist_down + np.where(outside, fixed.braces + fixed.falling, 0),
    )


@dataclass(slots=True)
class BlockStats:
    """What a block search did (for the docs' measurements and the tests).

    Attributes:
        blocks: Blocks looked at.
        proven: Blocks proven to have nothing cheaper.
        improved: Blocks that lowered the layout's cost.
        solves: CP-SAT calls.
        pool: Directed cuts in the pool at the end.
        last_gain: Number of the last block that improved (0 = none did).
        history: The layout's cost after each improvement (cost units).
    """

    blocks: int = 0
    proven: int = 0
    improved: int = 0
    solves: int = 0
    pool: int = 0
    last_gain: int = 0
    history: list[int] = field(default_factory=list)


def blocks(rows: int, cols: int, *, side_r: int, side_c: int, seed: int) -> Iterable[tuple[IntArray, IntArray]]:
    """An endless, seeded sequence of blocks: random row and column subsets of the given sides."""
    rng = np.random.default_rng(seed)
    while True:
        r = np.sort(rng.choice(rows, size=min(side_r, rows), replace=False))
        c = np.sort(rng.choice(cols, size=min(side_c, cols), replace=False))
        yield r, c


def block_search(
    table: BayTable,
    start: Additions,
    *,
    deadline: float,
    seed: int,
    pool: Iterable[Cut] = (),
    side_r: int,
    side_c: int,
    work: float = 1.0,
    row_sizes: tuple[int, ...] = (),
    col_sizes: tuple[int, ...] = (),
    stats: BlockStats | None = None,
    max_blocks: int | None = None,
    patience: int | None = None,
) -> Additions:
    """Improve a stable layout (k = 0) by re-solving blocks exactly, until the deadline.

    Args:
        table: The frame's table.
        start: A stable layout.
        deadline: ``time.monotonic()`` value to stop at.
        seed: Seeds the block sequence.
        pool: Directed cuts known valid (e.g. from the LP stage); grown by the search.
        side_r: Rows per block.
        side_c: Columns per block.
        work: CP-SAT deterministic-time limit per call (CP-SAT's own work units, about seconds).
        row_sizes: Row heights (symmetry classes inside a block).
        col_sizes: Column widths.
        stats: Filled in with what was done, if given.
        max_blocks: Stop after this many blocks (None = only the deadline).
        patience: Stop after this many blocks in a row without an improvement (None = never).

    Returns:
        The best layout: stable, and never dearer than ``start``.
    """
    from ortools.sat.python import cp_model

    st = stats if stats is not None else BlockStats()
    best = start
    best_cost = start.cost(table)
    cuts: dict[frozenset[int], int] = {}
    for c in pool:
        cuts[c.nodes] = max(cuts.get(c.nodes, 0), c.need)
    sizes_ok = len(row_sizes) == table.rows and len(col_sizes) == table.cols
    for rows, cols in blocks(table.rows, table.cols, side_r=side_r, side_c=side_c, seed=seed):
        if time.monotonic() >= deadline or (max_blocks is not None and st.blocks >= max_blocks):
            break
        if patience is not None and st.blocks - st.last_gain >= patience:
            break
        st.blocks += 1
        sub = window_table(table, best, rows, cols)
        inside = np.zeros((table.rows, table.cols), dtype=np.int64)
        inside[np.ix_(rows, cols)] = 1
        outside = 1 - inside
        part = Additions(best.braces * inside, best.rising * inside, best.falling * inside)
        part_cost = part.cost(sub)
        cm = CutModel(sub, k=0, row_sizes=row_sizes if sizes_ok else (), col_sizes=col_sizes if sizes_ok else ())
        for nodes, need in cuts.items():
            cm.add_cut(nodes, need=need)
        if isinstance(cm.objective, int):
            continue  # nothing free inside the block
        cm.model.add(cm.objective <= part_cost - 1)
        cm.hint(part)
        for _ in range(_SOLVES_PER_BLOCK):
            if time.monotonic() >= deadline:
                break
            solver = cp_model.CpSolver()
            configure(solver.parameters, workers=1, seed=seed, seconds=max(0.01, deadline - time.monotonic()))
            solver.parameters.max_deterministic_time = work
            status = solver.solve(cm.model)
            st.solves += 1
            if status == cp_model.INFEASIBLE:
                st.proven += 1
                break
            if status not in (cp_model.OPTIMAL, cp_model.FEASIBLE):
                break
            answer = cm.read(solver)
            found = violated_cuts(sub, answer, 0)
            candidate = answer if not found else constructive(sub, answer)
            if candidate is not None:
                merged = Additions(
                    candidate.braces * inside + best.braces * outside,
                    candidate.rising * inside + best.rising * outside,
                    candidate.falling * inside + best.falling * outside,
                )
                merged = prune(table, merged)
                cost = merged.cost(table)
                if cost < best_cost and is_strong(table, merged):
                    best, best_cost = merged, cost
                    st.improved += 1
                    st.last_gain = st.blocks
                    st.history.append(cost)
                    break  # the block's frozen part changed: go on to the next block
            if not found:
                break
            for s in found:
                if cuts.get(s, 0) < 1:
                    cuts[s] = 1
                cm.add_cut(s)
    st.pool = len(cuts)
    return best
