"""CP-SAT cut model of a free frame, solved with lazily separated directed cuts.

Variables per open bay: new braces ``b`` (0/1, or 0..2 when redundancy is
asked), new rising tie ``tr`` and falling tie ``tf`` (0/1), with
``b + tr + tf`` at most the free diagonals. Member arcs: ``b + tr`` up
(row -> column), ``b + tf`` down, plus kept members. A layout survives the
loss of any k members iff every node set S has at least k + 1 member arcs
leaving it (Menger; Edmonds). The model starts with the cuts of single
nodes and, after each solve, adds the cuts the answer violates (strong
components of the answer for k = 0, minimum cuts by maximum flow for k > 0),
then re-solves with the best stable layout as a hint. The relaxation's
bound is a valid lower bound throughout; an answer that violates no cut is
optimal for the full model.
"""

from __future__ import annotations

import itertools
import time
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import connected_components, maximum_flow

from bracegrid.costing import Additions, BayTable, BoolArray, IntArray, leaving_bays


@dataclass(frozen=True, slots=True)
class CutSolveResult:
    """What the cut loop found.

    Attributes:
        additions: Best layout found that satisfies every cut (None if none).
        bound: Proven lower bound on the added cost (cost units).
        proven: True when the layout is proven minimal.
        iterations: Solver calls made.
        cuts: Cuts in the final model.
    """

    additions: Additions | None
    bound: int
    proven: bool
    iterations: int
    cuts: int


def arc_lists(table: BayTable, add: Additions) -> tuple[IntArray, IntArray, IntArray]:
    """(tails, heads, multiplicities) of member arcs of a free frame."""
    r_count = table.rows
    up, down = add.up(table), add.down(table)
    ui, uj = np.nonzero(up)
    di, dj = np.nonzero(down)
    src = np.concatenate([ui, r_count + dj]).astype(np.int64)
    dst = np.concatenate([r_count + uj, di]).astype(np.int64)
    cap = np.concatenate([up[ui, uj], down[di, dj]]).astype(np.int64)
    return src, dst, cap


def violated_cuts(table: BayTable, add: Additions, k: int) -> list[frozenset[int]]:
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
        g = csr_matrix((np.ones(len(src), dtype=np.int8), (src, dst)), shape=(n, n))
        count, labels = connected_components(g, directed=True, connection="strong")
        if count == 1:
            return []
        cs, cd = labels[src], labels[dst]
        between = cs != cd
        dag = csr_matrix((np.ones(int(between.sum()), dtype=np.int8), (cs[between], cd[between])), shape=(count, count))
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
    g = csr_matrix((cap.astype(np.int32), (src, dst)), shape=(n, n))
    gt = g.T.tocsr()
    for v in range(1, n):
        for graph, reverse in ((g, False), (gt, True)):
            flow = maximum_flow(graph, 0, v)
            if flow.flow_value >= k + 1:
                continue
            residual = graph - flow.flow
            side = _reachable(residual.tocsr(), 0)
            # Forward: S = side (holds 0, not v), few arcs leave S.
            # Reverse graph: few arcs leave `side` in reverse = enter it forwards; S = complement.
            found.add(frozenset(side) if not reverse else everything - frozenset(side))
    return sorted(found, key=lambda s: (len(s), sorted(s)))


def _closure(dag: csr_matrix, count: int) -> BoolArray:
    """reach[c, d] = d reachable from c (c included) in a small DAG."""
    from scipy.sparse.csgraph import breadth_first_order

    reach = np.zeros((count, count), dtype=bool)
    for c in range(count):
        reach[c, breadth_first_order(dag, c, directed=True, return_predecessors=False)] = True
    return reach


def _reachable(residual: csr_matrix, start: int) -> list[int]:
    from scipy.sparse.csgraph import breadth_first_order

    positive = residual.copy()
    positive.data = (positive.data > 0).astype(np.int8)
    positive.eliminate_zeros()
    order: list[int] = breadth_first_order(positive, start, directed=True, return_predecessors=False).tolist()
    return order


def _interchangeable(sizes: tuple[int, ...], slots: IntArray, kept: IntArray) -> list[list[int]]:
    """Classes of rows (or columns) with equal size, equal free-diagonal pattern and nothing kept."""
    classes: dict[tuple[int, tuple[int, ...]], list[int]] = {}
    for idx in range(len(sizes)):
        if kept[idx]:
            continue
        classes.setdefault((sizes[idx], tuple(slots[idx].tolist())), []).append(idx)
    return [c for c in classes.values() if len(c) > 1]


class CutModel:
    """The CP-SAT model of one free frame and its growing set of cuts."""

    def __init__(self, table: BayTable, *, k: int, row_sizes: tuple[int, ...], col_sizes: tuple[int, ...]) -> None:
        from ortools.sat.python import cp_model

        self.table = table
        self.k = k
        self.model = cp_model.CpModel()
        r_count, c_count = table.rows, table.cols
        self.n = r_count + c_count
        m = self.model
        self.b: dict[tuple[int, int], Any] = {}
        self.tr: dict[tuple[int, int], Any] = {}
        self.tf: dict[tuple[int, int], Any] = {}
        self.up: dict[tuple[int, int], list[Any]] = {}
        self.down: dict[tuple[int, int], list[Any]] = {}
        terms = []
        coefs = []
        slots = table.free_slots
        for i in range(r_count):
            for j in range(c_count):
                s = int(slots[i, j])
                if s == 0:
                    continue
                here: list[Any] = []
                up: list[Any] = []
                down: list[Any] = []
                if table.brace_ok[i, j]:
                    top = min(s, 1 if k == 0 else 2)
                    v = m.new_bool_var(f"b{i}_{j}") if top == 1 else m.new_int_var(0, top, f"b{i}_{j}")
                    self.b[i, j] = v
                    here.append(v)
                    up.append(v)
                    down.append(v)
                    terms.append(v)
                    coefs.append(int(table.brace_cost[i, j]))
                if table.rising_tie_ok[i, j]:
                    v = m.new_bool_var(f"tr{i}_{j}")
                    self.tr[i, j] = v
                    here.append(v)
                    up.append(v)
                    terms.append(v)
                    coefs.append(int(table.tie_cost[i, j]))
                if table.falling_tie_ok[i, j]:
                    v = m.new_bool_var(f"tf{i}_{j}")
                    self.tf[i, j] = v
                    here.append(v)
                    down.append(v)
                    terms.append(v)
                    coefs.append(int(table.tie_cost[i, j]))
                if len(here) > 1:
                    m.add(sum(here) <= s)
                if k == 0 and (i, j) in self.b:
                    # A tie beside a brace adds no arc; dropping it never costs more.
                    for t in (self.tr.get((i, j)), self.tf.get((i, j))):
                        if t is not None:
                            m.add(self.b[i, j] + t <= 1)
                self.up[i, j] = up
                self.down[i, j] = down
        self.objective = cp_model.LinearExpr.weighted_sum(terms, coefs) if terms else 0
        m.minimize(self.objective)
        self.cuts: set[frozenset[int]] = set()
        for node in range(self.n):
            self.add_cut(frozenset({node}))
            self.add_cut(frozenset(range(self.n)) - {node})
        self.partitions: set[tuple[int, ...]] = set()
        if k == 0:
            self.add_partition(np.arange(self.n))
        self._break_symmetry(row_sizes, col_sizes)

    def add_partition(self, labels: IntArray) -> bool:
        """Partition inequality for the node partition given by labels (k = 0 only).

        Contract each part to a point: the members crossing parts must make
        the p points strongly connected. Braces alone need a spanning tree
        (p - 1); with any tie the members must number at least p (p - 1
        members joining p points form a tree, and a tie on a tree edge
        leaves that cut one-way). Both cases satisfy
        ``p * braces + (p - 1) * ties >= p (p - 1)``, the hull of the
        feasible (braces, ties) counts.
        """
        key = tuple(int(x) for x in labels)
        parts = len(set(key))
        if self.k != 0 or parts < 2 or key in self.partitions:
            return False
        self.partitions.add(key)
        t = self.table
        r_count = t.rows
        row_lab = np.asarray(labels[:r_count])
        col_lab = np.asarray(labels[r_count:])
        cross = row_lab[:, None] != col_lab[None, :]
        p = parts
        # Kept members crossing count as constants.
        kept_b = np.minimum(t.exist_up, t.exist_down)
        kept_t = t.exist_up + t.exist_down - 2 * kept_b
        need = p * (p - 1) - int(p * kept_b[cross].sum() + (p - 1) * kept_t[cross].sum())
        if need <= 0:
            return True
        terms, coefs = [], []
        for i, j in zip(*np.nonzero(cross), strict=True):
            bay = (int(i), int(j))
            if bay in self.b:
                terms.append(self.b[bay])
                coefs.append(p)
            for store in (self.tr, self.tf):
                if bay in store:
                    terms.append(store[bay])
                    coefs.append(p - 1)
        from ortools.sat.python import cp_model

        self.model.add(cp_model.LinearExpr.weighted_sum(terms, coefs) >= need)
        return True

    def add_flow_links(self, model: Any) -> None:
        """Add to ``model`` (this model or a clone) flows that make it exact for k = 0.

        Node 0 sends one unit of flow to every other node, and every other
        node sends one unit back to node 0, each along member arcs only
        (capacity n - 1 on an arc that carries a member, 0 otherwise). Both
        flows exist iff every node reaches node 0 and is reached from it,
        i.e. iff the layout is strongly connected, so every answer of the
        linked model is a stable layout.
        """
        from ortools.sat.python import cp_model

        t = self.table
        r_count, n = t.rows, self.n
        arcs: list[tuple[int, int, Any]] = []  # (tail, head, member count; None = a kept member)
        for i in range(r_count):
            for j in range(t.cols):
                for tail, head, kept, store in (
                    (i, r_count + j, int(t.exist_up[i, j]), self.up),
                    (r_count + j, i, int(t.exist_down[i, j]), self.down),
                ):
                    terms = store.get((i, j), [])
                    if kept > 0:
                        arcs.append((tail, head, None))
                    elif terms:
                        arcs.append((tail, head, sum(terms)))
        for name, sign in (("fo", 1), ("fi", -1)):
            net: list[list[Any]] = [[] for _ in range(n)]
            for a, (tail, head, cap) in enumerate(arcs):
                f = model.new_int_var(0, n - 1, f"{name}{a}")
                if cap is not None:
                    model.add(f <= (n - 1) * cap)
                net[tail].append(-f)
                net[head].append(f)
            for v in range(1, n):
                # Outward flow: every other node keeps one unit; inward: every other node emits one.
                model.add(cp_model.LinearExpr.sum(net[v]) == sign)

    def probe(
        self, bound: int, hint: Additions, *, workers: int, seed: int, seconds: float
    ) -> tuple[str, Additions | None]:
        """Look for a stable layout costing at most ``bound`` (a proven lower bound).

        A clone of the model gets the flow links (so every answer is stable)
        and ``objective <= bound``. A layout found is optimal at once; "none"
        proves that every stable layout costs more than ``bound``. The model
        itself is left unchanged.

        Returns:
            ("found", layout), ("none", None) or ("unknown", None) when time ran out.
        """
        from ortools.sat.python import cp_model

        self.hint(hint)
        probe = self.model.clone()
        self.add_flow_links(probe)
        probe.add(self.objective <= bound)
        solver = cp_model.CpSolver()
        configure(solver.parameters, workers=workers, seed=seed, seconds=seconds)
        status = solver.solve(probe)
        if status in (cp_model.OPTIMAL, cp_model.FEASIBLE):
            return "found", self.read(solver)
        return ("none", None) if status == cp_model.INFEASIBLE else ("unknown", None)

    def _break_symmetry(self, row_sizes: tuple[int, ...], col_sizes: tuple[int, ...]) -> None:
        """Order interchangeable rows (columns) by their member counts.

        Swapping two rows of equal height, equal blocked pattern and nothing
        kept maps layouts to layouts of equal cost and stability, and row
        counts do not change when columns are swapped, so some optimum has
        both row and column counts non-increasing within each class.
        """
        t = self.table
        kept_rows = (t.exist_up + t.exist_down).sum(axis=1)
        kept_cols = (t.exist_up + t.exist_down).sum(axis=0)
        slots = t.free_slots
        for axis, classes in (
            (0, _interchangeable(row_sizes, slots, kept_rows)),
            (1, _interchangeable(col_sizes, slots.T.copy(), kept_cols)),
        ):
            span = (t.cols if axis == 0 else t.rows) * 2 + 1
            for members in classes:
                sigs = [self._signature(axis, idx, span) for idx in members]
                for a, b in itertools.pairwise(sigs):
                    self.model.add(a >= b)

    def _signature(self, axis: int, idx: int, span: int) -> Any:
        from ortools.sat.python import cp_model

        bays = [(idx, j) for j in range(self.table.cols)] if axis == 0 else [(i, idx) for i in range(self.table.rows)]
        terms, coefs = [], []
        for weight, store in ((span * span, self.b), (span, self.tr), (1, self.tf)):
            for bay in bays:
                if bay in store:
                    terms.append(store[bay])
                    coefs.append(weight)
        return cp_model.LinearExpr.weighted_sum(terms, coefs)

    def add_cut(self, s: frozenset[int]) -> bool:
        """Require k + 1 member arcs leaving node set S; False if already present or trivially met."""
        if s in self.cuts or not s or len(s) == self.n:
            return False
        self.cuts.add(s)
        t = self.table
        up_mask, down_mask = leaving_bays(t.rows, t.cols, s)
        need = self.k + 1 - int(t.exist_up[up_mask].sum() + t.exist_down[down_mask].sum())
        if need <= 0:
            return True
        terms: list[Any] = []
        for i, j in zip(*np.nonzero(up_mask), strict=True):
            terms.extend(self.up.get((int(i), int(j)), ()))
        for i, j in zip(*np.nonzero(down_mask), strict=True):
            terms.extend(self.down.get((int(i), int(j)), ()))
        if not terms:
            self.model.add_bool_or([])  # no member can cross this cut: infeasible
            return True
        self.model.add(sum(terms) >= need)
        return True

    def read(self, solver: Any) -> Additions:
        """The solver's current answer as additions."""
        add = Additions.empty(self.table.rows, self.table.cols)
        value = solver.value
        for (i, j), v in self.b.items():
            add.braces[i, j] = value(v)
        for (i, j), v in self.tr.items():
            add.rising[i, j] = value(v)
        for (i, j), v in self.tf.items():
            add.falling[i, j] = value(v)
        return add

    def hint(self, add: Additions) -> None:
        """Use a layout as the solver's starting point."""
        self.model.clear_hints()  # type: ignore[no-untyped-call]
        for (i, j), v in self.b.items():
            self.model.add_hint(v, int(add.braces[i, j]))
        for (i, j), v in self.tr.items():
            self.model.add_hint(v, int(add.rising[i, j]))
        for (i, j), v in self.tf.items():
            self.model.add_hint(v, int(add.falling[i, j]))


def configure(params: object, *, workers: int, seed: int, seconds: float) -> None:
    """CP-SAT parameters that suit the cut model (measured, see docs/optimizer.md).

    The LP relaxation is what makes the cut model fast: with one worker the
    default search uses no LP, so ``linearization_level = 2`` is set; with
    several workers the portfolio is led by the LP-heavy ``max_lp`` worker.
    """
    p: Any = params
    p.num_workers = max(1, workers)
    p.random_seed = seed
    p.max_time_in_seconds = max(0.01, seconds)
    p.linearization_level = 2
    if workers > 1:
        p.subsolvers.extend(["max_lp", "quick_restart"])


class _Collector:
    """CP-SAT callback keeping the last few answers met during a solve."""

    def __new__(cls, cm: CutModel) -> Any:
        from ortools.sat.python import cp_model

        class _Impl(cp_model.CpSolverSolutionCallback):
            def __init__(self) -> None:
                super().__init__()
                self.seen: list[Additions] = []

            def on_solution_callback(self) -> None:
                self.seen.append(cm.read(self))
                del self.seen[:-8]

        return _Impl()

    seen: list[Additions]


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
    # Window search costs seconds per round: on frames where rounds are quick it only slows
    # the proof, so it waits until 30% of the budget is gone (large frames start at once).
    lns_from = started if table.rows * table.cols > 600 else started + 0.3 * max(0.0, deadline - started)
    budget = max(0.0, deadline - started)
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
            if outcome == "found" and found is not None and not violated_cuts(table, found, k):
                best, best_cost = found, found.cost(table)
                proven, bound = True, best_cost
            elif outcome == "none":
                bound += 1  # no stable layout costs the bound or less
                if best_cost is not None and bound >= best_cost:
                    proven, bound = True, best_cost
            if on_step is not None:
                on_step(LoopReport(iterations, best_cost, bound, len(cm.cuts)))
            continue
        if best is not None:
            cm.hint(best)
        if best_cost is not None and best_cost != cutoff and not isinstance(cm.objective, int):
            # Only strictly cheaper answers are of use: the relaxation then either finds one
            # (a new layout, or new cuts) or proves there is none (the incumbent is optimal).
            cm.model.add(cm.objective <= best_cost - 1)
            cutoff = best_cost
        solver = cp_model.CpSolver()
        p = solver.parameters
        configure(p, workers=workers, seed=seed, seconds=remaining)
        p.relative_gap_limit = 1e-4
        collector: Any = _Collector(cm)
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
        candidate = relaxed if not cuts else improve(relaxed)
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
            from bracegrid.warmstart import strong_labels

            cm.add_partition(strong_labels(table, relaxed)[1])
    return CutSolveResult(best, bound, proven, iterations, len(cm.cuts))


def window_table(table: BayTable, fixed: Additions, rows: IntArray, cols: IntArray) -> BayTable:
    """The table with every bay outside rows x cols frozen at ``fixed`` (its members then count as kept)."""
    import dataclasses

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
    from bracegrid.warmstart import constructive, constructive_redundant

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
