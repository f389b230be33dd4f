"""The CP-SAT cut model of a free frame: variables per bay, directed cuts, partition inequalities.

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
from enum import Enum
from typing import Any

import numpy as np

from bracegrid.analysis.digraph import IntArray, bay_nodes, leaving_bays
from bracegrid.optimize.bays import Additions, AdditionsBuilder, BayCounts, BayTable
from bracegrid.optimize.lprelax import Cut, Kind, columns

# ortools is imported inside the functions that use it: it is heavy (about 0.5 s to import)
# and `bracegrid --help`, `check` and `draw` never need it.


class ProbeOutcome(Enum):
    """What an exact search pinned at a bound found (:meth:`CutModel.probe`)."""

    FOUND = "found"
    """A stable layout costing the bound: optimal."""
    NONE = "none"
    """Proven: every stable layout costs more than the bound."""
    UNKNOWN = "unknown"
    """The time ran out first."""


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
        self.table = table
        self.k = k
        from ortools.sat.python import cp_model

        self.model = cp_model.CpModel()
        r_count, c_count = table.rows, table.cols
        self.n = r_count + c_count
        m = self.model
        self.b: dict[tuple[int, int], Any] = {}
        self.tr: dict[tuple[int, int], Any] = {}
        self.tf: dict[tuple[int, int], Any] = {}
        self.up: dict[tuple[int, int], list[Any]] = {}
        self.down: dict[tuple[int, int], list[Any]] = {}
        # One variable per LP column (lprelax.columns), in the same order, so LP reduced costs
        # and bounds map onto the CP-SAT variables by index.
        self.columns = columns(table, k)
        cols = self.columns
        self.vars: list[Any] = []
        stores = {Kind.BRACE: self.b, Kind.RISING: self.tr, Kind.FALLING: self.tf}
        names = {Kind.BRACE: "b", Kind.RISING: "tr", Kind.FALLING: "tf"}
        for q in range(cols.count):
            i, j, kind, top = int(cols.i[q]), int(cols.j[q]), Kind(int(cols.kind[q])), int(cols.top[q])
            name = f"{names[kind]}{i}_{j}"
            v = m.new_bool_var(name) if top == 1 else m.new_int_var(0, top, name)
            stores[kind][i, j] = v
            self.vars.append(v)
            if cols.up[q]:
                self.up.setdefault((i, j), []).append(v)
            if cols.down[q]:
                self.down.setdefault((i, j), []).append(v)
        slots = table.free_slots
        bays = zip(cols.i.tolist(), cols.j.tolist(), self.vars, strict=True)
        for (i, j), here in itertools.groupby(bays, key=lambda e: (e[0], e[1])):
            group = [e[2] for e in here]
            if len(group) > 1:
                m.add(sum(group) <= int(slots[i, j]))
            if k == 0 and (i, j) in self.b:
                # A tie beside a brace adds no arc; dropping it never costs more.
                for t in (self.tr.get((i, j)), self.tf.get((i, j))):
                    if t is not None:
                        m.add(self.b[i, j] + t <= 1)
        terms = self.vars
        coefs = cols.cost.tolist()
        self.objective = cp_model.LinearExpr.weighted_sum(terms, coefs) if terms else 0
        m.minimize(self.objective)
        self.cuts: dict[frozenset[int], int] = {}  # node set -> member arcs it needs leaving it
        for node in range(self.n):
            self.add_cut(frozenset({node}))
            self.add_cut(frozenset(range(self.n)) - {node})
        self._low = [0] * cols.count
        self._high = cols.top.tolist()
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
                row, col = bay_nodes(r_count, i, j)
                for tail, head, kept, store in (
                    (row, col, int(t.exist_up[i, j]), self.up),
                    (col, row, int(t.exist_down[i, j]), self.down),
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
        self, bound: int, hint: BayCounts, *, workers: int, seed: int, seconds: float
    ) -> tuple[ProbeOutcome, Additions | None]:
        """Look for a stable layout costing at most ``bound`` (a proven lower bound).

        A clone of the model gets the flow links (so every answer is stable)
        and ``objective <= bound``. A layout found is optimal at once; "none"
        proves that every stable layout costs more than ``bound``. The model
        itself is left unchanged.

        Returns:
            (FOUND, layout), (NONE, None) or (UNKNOWN, None) when time ran out.
        """
        self.hint(hint)
        probe = self.model.clone()
        self.add_flow_links(probe)
        probe.add(self.objective <= bound)
        from ortools.sat.python import cp_model

        solver = cp_model.CpSolver()
        configure(solver.parameters, workers=workers, seed=seed, seconds=seconds)
        status = solver.solve(probe)
        if status in (cp_model.OPTIMAL, cp_model.FEASIBLE):
            return ProbeOutcome.FOUND, self.read(solver)
        return (ProbeOutcome.NONE, None) if status == cp_model.INFEASIBLE else (ProbeOutcome.UNKNOWN, None)

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
        bays = [(idx, j) for j in range(self.table.cols)] if axis == 0 else [(i, idx) for i in range(self.table.rows)]
        terms, coefs = [], []
        for weight, store in ((span * span, self.b), (span, self.tr), (1, self.tf)):
            for bay in bays:
                if bay in store:
                    terms.append(store[bay])
                    coefs.append(weight)
        from ortools.sat.python import cp_model

        return cp_model.LinearExpr.weighted_sum(terms, coefs)

    def add_cut(self, s: frozenset[int], *, need: int | None = None) -> bool:
        """Require ``need`` (default k + 1) member arcs leaving node set S.

        Returns:
            False if already in the model (or S is empty or everything), True otherwise.
        """
        cut = Cut(s, self.k + 1 if need is None else need)
        if self.cuts.get(s, 0) >= cut.need or not s or len(s) == self.n:
            return False
        self.cuts[s] = cut.need
        t = self.table
        up_mask, down_mask = leaving_bays(t.rows, t.cols, s)
        short = cut.need - int(t.exist_up[up_mask].sum() + t.exist_down[down_mask].sum())
        if short <= 0:
            return True
        terms: list[Any] = []
        for i, j in zip(*np.nonzero(up_mask), strict=True):
            terms.extend(self.up.get((int(i), int(j)), ()))
        for i, j in zip(*np.nonzero(down_mask), strict=True):
            terms.extend(self.down.get((int(i), int(j)), ()))
        if not terms:
            self.model.add_bool_or([])  # no member can cross this cut: infeasible
            return True
        self.model.add(sum(terms) >= short)
        return True

    def restrict(self, lower: IntArray, upper: IntArray) -> int:
        """Tighten variable bounds (per column, e.g. from LP reduced costs); returns how many changed.

        Only valid together with the objective cutoff the bounds were derived for (see
        :func:`bracegrid.optimize.lprelax.fixings`).
        """
        changed = 0
        for q, v in enumerate(self.vars):
            lo, hi = max(int(lower[q]), self._low[q]), min(int(upper[q]), self._high[q])
            if lo > self._low[q]:
                self.model.add(v >= lo)
                self._low[q] = lo
                changed += 1
            if hi < self._high[q]:
                self.model.add(v <= hi)
                self._high[q] = hi
                changed += 1
        return changed

    def read(self, solver: Any) -> Additions:
        """The solver's current answer as additions."""
        add = AdditionsBuilder.empty(self.table.rows, self.table.cols)
        value = solver.value
        for (i, j), v in self.b.items():
            add.braces[i, j] = value(v)
        for (i, j), v in self.tr.items():
            add.rising[i, j] = value(v)
        for (i, j), v in self.tf.items():
            add.falling[i, j] = value(v)
        return add.build()

    def hint(self, add: BayCounts) -> None:
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
    # CP-SAT's own Ctrl-C handler would swallow the signal (the run then ends "early" with exit 0) and
    # put the default handler back afterwards (a later Ctrl-C kills the process mid-write); the shells
    # handle SIGINT themselves (cli.py: "interrupted", exit 130, temp files removed).
    p.catch_sigint_signal = False
    p.linearization_level = 2
    if workers > 1:
        p.subsolvers.extend(["max_lp", "quick_restart"])


def collector_for(cm: CutModel) -> Any:
    """A CP-SAT solution callback keeping the last few answers met during a solve (in ``.seen``).

    The callback class derives from CP-SAT's own, so it is made when first needed (ortools is
    imported lazily, see above).
    """
    from ortools.sat.python import cp_model

    class _Collector(cp_model.CpSolverSolutionCallback):
        def __init__(self) -> None:
            super().__init__()
            self.seen: list[Additions] = []

        def on_solution_callback(self) -> None:
            self.seen.append(cm.read(self))
            del self.seen[:-8]

    return _Collector()
