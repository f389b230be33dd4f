"""The cut loop: solve the cut model, separate the cuts its answer violates, repeat until proven or out of time.

Each round solves the relaxation (the model with the cuts found so far), turns its answer into a
stable layout (an upper bound) with the greedy repair, and adds the violated cuts; the
relaxation's bound is a valid lower bound throughout. When the LP stage leaves a gap, the block
search (:mod:`bracegrid.optimize.neighbourhood`) improves the incumbent before the rounds. A
large-neighbourhood search re-optimises the incumbent inside row x column windows, and once half
the time is gone an exact search pinned at the bound may close the gap (docs/optimizer.md).
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from bracegrid.optimize.bays import Additions, BayTable
from bracegrid.optimize.cutmodel import CutModel, ProbeOutcome, collector_for, configure
from bracegrid.optimize.lprelax import Cut, LpPoint, LpRelaxation, fixings
from bracegrid.optimize.neighbourhood import block_search, window_table
from bracegrid.optimize.separation import strong_labels, violated_cuts
from bracegrid.optimize.warmstart import constructive, constructive_redundant, prune

#: The block search runs after the LP stage only when the stage leaves more than this relative gap.
#: Measured after the LP stage: every benchmark frame but one is at 0.001% or less (the dive finds
#: the optimum or next to it, and the rounds then prove it fast), while ties at 0.55 of a brace on
#: 20 x 30 leave 2.1%, which the block search brings to 0.64% (docs/optimizer.md).
BLOCK_GAP = 1e-3

#: Blocks in a row without an improvement after which the block search hands over to the rounds
#: (20 x 30, 10 x 10 blocks: six blocks cover the frame's area once).
BLOCK_PATIENCE = 60


@dataclass(frozen=True, slots=True)
class CutSolveResult:
    """What the cut loop found.

    Attributes:
        additions: Best layout found that satisfies every cut (None if none).
        bound: Proven lower bound on the added cost (cost units).
        proven: True when the layout is proven minimal.
        iterations: Solver calls made.
        cuts: Cuts in the final model.
        lp_rounds: LP solves of the relaxation (0 when the LP stage did not run).
    """

    additions: Additions | None
    bound: int
    proven: bool
    iterations: int
    cuts: int
    lp_rounds: int = 0


@dataclass(frozen=True, slots=True)
class LoopReport:
    """One step of the cut loop, for progress display.

    Attributes:
        iteration: Solver calls so far.
        best: Best stable added cost so far (cost units), None if none.
        bound: Lower bound on the added cost (cost units).
        cuts: Cuts in the model.
    """

    iteration: int
    best: int | None
    bound: int
    cuts: int


def solve_with_cuts(
    table: BayTable,
    *,
    k: int,
    row_sizes: tuple[int, ...],
    col_sizes: tuple[int, ...],
    incumbent: Additions | None,
    improve: Callable[[Additions], Additions | None],
    deadline: float,
    workers: int,
    seed: int,
    on_step: Callable[[LoopReport], None] | None = None,
    initial_bound: int = 0,
    lns_rounds: int = 0,
    probe_after: float | None = None,
    lp_share: float = 0.0,
    block_until: float = 0.0,
) -> CutSolveResult:
    """Run the lazy-cut loop until proven optimal or the deadline.

    Args:
        table: The frame's table.
        k: Redundancy asked.
        row_sizes: Row heights (for symmetry classes).
        col_sizes: Column widths.
        incumbent: A layout satisfying every cut, used as the first hint.
        improve: Turns a relaxed answer into a layout satisfying every cut (or None).
        deadline: ``time.monotonic()`` value to stop at.
        workers: CP-SAT workers.
        seed: CP-SAT random seed.
        on_step: Called after every solver call.
        initial_bound: A lower bound known beforehand (e.g. the closed form of the complete frame).
        lns_rounds: Window re-optimisations of the incumbent after each round (0 = none).
        probe_after: For k = 0, once this share of the time is gone without a proof, spend up
            to a quarter of the time on one exact search for a layout costing the bound
            (``CutModel.probe``); None = never.
        lp_share: Share of the time the LP stage may take before the CP-SAT rounds (0 = no LP
            stage): the LP relaxation with cuts separated on fractional points gives a bound,
            its dive a layout, its reduced costs fix variables, and its cuts seed the model.
        block_until: For k = 0, when the LP stage leaves a gap above ``BLOCK_GAP``: the block
            search (:func:`bracegrid.optimize.neighbourhood.block_search`) may improve the
            incumbent until this share of the time is gone (0 = never), before the CP-SAT rounds.

    Returns:
        The best layout, a proven lower bound and whether it is optimal.
    """
    from ortools.sat.python import cp_model

    cm = CutModel(table, k=k, row_sizes=row_sizes, col_sizes=col_sizes)
    best = incumbent
    best_cost = incumbent.cost(table) if incumbent is not None else None
    bound = initial_bound
    iterations = 0
    proven = best_cost is not None and best_cost <= bound
    if proven:
        bound = best_cost or 0
    cutoff = None
    started = time.monotonic()
    budget = max(0.0, deadline - started)
    lp_rounds = 0
    root: LpPoint | None = None
    if lp_share > 0 and not proven:
        root, lp_rounds, found = _lp_stage(table, cm, k, deadline=started + lp_share * budget, incumbent=best_cost)
        if root is not None:
            bound = max(bound, root.bound)
        if found is not None:
            candidate = found if not violated_cuts(table, found, k) else improve(found)
            if candidate is not None and k == 0:
                candidate = prune(table, candidate)
            if candidate is not None and (best_cost is None or candidate.cost(table) < best_cost):
                best, best_cost = candidate, candidate.cost(table)
        if best_cost is not None and bound >= best_cost:
            proven, bound = True, best_cost
        if on_step is not None:
            on_step(LoopReport(iterations, best_cost, bound, len(cm.cuts)))
    if (
        k == 0
        and block_until > 0
        and not proven
        and best is not None
        and best_cost is not None
        and best_cost - bound > BLOCK_GAP * best_cost
        and min(table.rows, table.cols) > 4
    ):
        best = block_search(
            table, best, deadline=min(deadline, started + block_until * budget), seed=seed,
            pool=[Cut(s, need) for s, need in cm.cuts.items()], side_r=min(10, (table.rows + 1) // 2),
            side_c=min(10, (table.cols + 1) // 2), row_sizes=row_sizes, col_sizes=col_sizes, patience=BLOCK_PATIENCE,
        )  # fmt: skip
        best_cost = best.cost(table)
        if bound >= best_cost:
            proven, bound = True, best_cost
        if on_step is not None:
            on_step(LoopReport(iterations, best_cost, bound, len(cm.cuts)))
    fixed_for = None

    def fix_by_reduced_cost() -> None:
        # Valid for every layout cheaper than the incumbent, which is all the rounds look for.
        nonlocal fixed_for
        if root is not None and best_cost is not None and best_cost != fixed_for and not proven:
            cm.restrict(*fixings(root, cm.columns, best_cost))
            fixed_for = best_cost

    # Window search costs seconds per round: on frames where rounds are quick it only slows
    # the proof, so it waits until 30% of the budget is gone (large frames start at once).
    lns_from = started if table.rows * table.cols > 600 else started + 0.3 * budget
    probe_from = None if probe_after is None or k != 0 else started + probe_after * budget
    while not proven:
        remaining = deadline - time.monotonic()
        if remaining <= 0.01:
            break
        if probe_from is not None and time.monotonic() >= probe_from and best is not None and iterations > 0:
            # The cut rounds' bound is often already the optimum while the incumbent lags:
            # one exact search pinned at the bound then finds the layout (and so proves it).
            probe_from = None
            outcome, found = cm.probe(bound, best, workers=workers, seed=seed, seconds=min(remaining, 0.25 * budget))
            if outcome is ProbeOutcome.FOUND and found is not None and not violated_cuts(table, found, k):
                best, best_cost = found, found.cost(table)
                proven, bound = True, best_cost
            elif outcome is ProbeOutcome.NONE:
                bound += 1  # no stable layout costs the bound or less
                if best_cost is not None and bound >= best_cost:
                    proven, bound = True, best_cost
            if on_step is not None:
                on_step(LoopReport(iterations, best_cost, bound, len(cm.cuts)))
            continue
        if best is not None:
            cm.hint(best)
        fix_by_reduced_cost()
        if best_cost is not None and best_cost != cutoff and not isinstance(cm.objective, int):
            # Only strictly cheaper answers are of use: the relaxation then either finds one
            # (a new layout, or new cuts) or proves there is none (the incumbent is optimal).
            cm.model.add(cm.objective <= best_cost - 1)
            cutoff = best_cost
        solver = cp_model.CpSolver()
        p = solver.parameters
        configure(p, workers=workers, seed=seed, seconds=remaining)
        p.relative_gap_limit = 1e-4
        collector: Any = collector_for(cm)
        status = solver.solve(cm.model, collector)
        iterations += 1
        if status == cp_model.INFEASIBLE:
            if best is not None:
                # Nothing cheaper than the incumbent satisfies even the relaxation.
                proven = True
                bound = best_cost or 0
                if on_step is not None:
                    on_step(LoopReport(iterations, best_cost, bound, len(cm.cuts)))
            break
        if status not in (cp_model.OPTIMAL, cp_model.FEASIBLE):
            break
        # Valid for the full problem: any layout cheaper than the incumbent is in this relaxation.
        bound = max(bound, int(np.ceil(solver.best_objective_bound - 1e-6)))
        relaxed = cm.read(solver)
        cuts = violated_cuts(table, relaxed, k)
        # Past the deadline a repair would only overrun the limit, unless nothing is in hand yet.
        late = best is not None and time.monotonic() >= deadline
        candidate = relaxed if not cuts else (None if late else improve(relaxed))
        if candidate is not None:
            c = candidate.cost(table)
            if best_cost is None or c < best_cost:
                best, best_cost = candidate, c
        if best_cost is not None and bound >= best_cost:
            proven = True
            bound = best_cost
        if (
            not proven
            and best is not None
            and lns_rounds > 0
            and min(table.rows, table.cols) > 4
            and time.monotonic() >= lns_from
        ):
            better = improve_by_windows(
                table, best, k=k, rounds=lns_rounds, seed=seed + iterations, deadline=deadline,
                row_sizes=row_sizes, col_sizes=col_sizes,
            )  # fmt: skip
            if better is not None and better.cost(table) < (best_cost or 0):
                best, best_cost = better, better.cost(table)
                if bound >= best_cost:
                    proven, bound = True, best_cost
        if on_step is not None:
            on_step(LoopReport(iterations, best_cost, bound, len(cm.cuts)))
        if proven or status != cp_model.OPTIMAL or time.monotonic() >= deadline:
            break
        for s in cuts:
            cm.add_cut(s)
        # Answers met on the way violate other sets: their cuts come for free.
        for other in collector.seen[:-1]:
            for s in violated_cuts(table, other, k):
                cm.add_cut(s)
        if k == 0 and cuts:
            cm.add_partition(strong_labels(table, relaxed)[1])
    return CutSolveResult(best, bound, proven, iterations, len(cm.cuts), lp_rounds)


def _lp_stage(
    table: BayTable, cm: CutModel, k: int, *, deadline: float, incumbent: int | None
) -> tuple[LpPoint | None, int, Additions | None]:
    """The LP relaxation solved with separation, a dive for a layout, and its cuts copied into ``cm``.

    The dive is skipped when the bound already meets the incumbent's cost (it is then proven).

    Returns:
        (the root LP point whose duals give the bound and the reduced costs, LP solves, the
        dive's layout or None).
    """
    lp = LpRelaxation(table, k=k)
    now = time.monotonic()
    # Partition rounds raise the bound where braces and ties compete (measured: 20 x 30 with
    # ties at 0.55 of a brace, 1456.81 -> 1467.2 in about 40 rounds), but slowly: 40% of the stage.
    run = lp.run(deadline=deadline, partitions_until=now + 0.4 * max(0.0, deadline - now))
    rounds = run.rounds
    found = None
    root = run.point
    if root is not None and run.closed and (incumbent is None or root.bound < incumbent):
        found = lp.dive(root, deadline=deadline, cutoff=incumbent)
        # The dive's cuts are valid everywhere: re-solve the root with them, if time allows.
        again = lp.run(deadline=deadline)
        rounds += again.rounds
        if again.point is not None and again.point.bound >= root.bound:
            root = again.point
    if root is not None:
        # Only the directed cuts the bound rests on (positive multiplier) go to CP-SAT: they
        # give its own LP the same bound. The dense partition rows are left out: measured on
        # a 8 x 12 frame with ties at 0.55 of a brace, with them the first CP-SAT round never
        # finished in 60 s (gap 2.0%); without them 6 rounds and 1.0%.
        for cut in lp.binding(root)[0]:
            cm.add_cut(cut.nodes, need=cut.need)
    return root, rounds, found


def improve_by_windows(
    table: BayTable,
    incumbent: Additions,
    *,
    k: int,
    rounds: int,
    seed: int,
    deadline: float,
    row_sizes: tuple[int, ...],
    col_sizes: tuple[int, ...],
) -> Additions | None:
    """Large-neighbourhood search: re-optimise the incumbent inside random row x column windows.

    Members outside a window are frozen; inside it the cut model is solved
    exactly (small), so the result never costs more than the incumbent.

    Returns:
        An improved layout, or None if no window helped.
    """
    rng = np.random.default_rng(seed)
    best = incumbent
    best_cost = incumbent.cost(table)
    improved = False
    side_r = min((table.rows + 1) // 2, 10)
    side_c = min((table.cols + 1) // 2, 10)
    for _ in range(rounds):
        if deadline - time.monotonic() < 0.5:
            break
        rows = np.sort(rng.choice(table.rows, size=side_r, replace=False))
        cols = np.sort(rng.choice(table.cols, size=side_c, replace=False))
        sub = window_table(table, best, rows, cols)
        inside = np.zeros((table.rows, table.cols), dtype=np.int64)
        inside[np.ix_(rows, cols)] = 1
        start = Additions(best.braces * inside, best.rising * inside, best.falling * inside)

        def fix(a: Additions, sub: BayTable = sub) -> Additions | None:
            return constructive(sub, a) if k == 0 else constructive_redundant(sub, a, k, deadline=deadline)

        got = solve_with_cuts(
            sub, k=k, row_sizes=row_sizes, col_sizes=col_sizes, incumbent=start, improve=fix,
            deadline=min(deadline, time.monotonic() + 1.0), workers=1, seed=seed,
        )  # fmt: skip
        if got.additions is None:
            continue
        outside = 1 - inside
        merged = Additions(
            got.additions.braces * inside + best.braces * outside,
            got.additions.rising * inside + best.rising * outside,
            got.additions.falling * inside + best.falling * outside,
        )
        cost = merged.cost(table)
        if cost < best_cost:
            best, best_cost, improved = merged, cost, True
    return best if improved else None
