"""The LP relaxation of the cut model: HiGHS through scipy, cuts separated on fractional points by maximum flow.

The same variables as the CP-SAT cut model (:mod:`bracegrid.optimize.cutmodel`), relaxed to
``0 <= x <= top``: new braces, rising ties and falling ties per bay, the per-bay slot rows, every
cut as a node set with a right-hand side (``Cut``), and for k = 0 the partition inequalities.
:meth:`LpRelaxation.run` solves it, separates the cuts the fractional answer violates (strong
components of its support first, then minimum cuts from maximum flows, :func:`flow_cuts`), and
repeats. Its value is a lower bound on every layout; the bound reported is computed from the
duals on a path that does not trust the LP solver's tolerances (``safe bound``), and the duals
give reduced costs that fix variables for any layout cheaper than an incumbent.
"""

from __future__ import annotations

import time
from dataclasses import dataclass
from enum import IntEnum

import numpy as np
import numpy.typing as npt

from bracegrid.analysis.digraph import IntArray, bay_arcs, flow_cuts, node_sides, strong_components
from bracegrid.optimize.bays import SCALE, Additions, AdditionsBuilder, BayTable

FloatArray = npt.NDArray[np.float64]

# scipy's own HiGHS binding (scipy.optimize._highspy: incremental rows, warm starts, no banner on
# standard output) is imported where an LP is built: scipy.optimize adds about 0.2 s to start-up,
# and `bracegrid --help`, `check` and `draw` never solve an LP.

#: Arc values are scaled to integers for scipy's maximum flow: 2**20 steps per member arc, so a
#: cut's flow value is known to within (number of arcs) / 2**20 of its exact value, far below the
#: violation a cut must show (``_VIOLATION``) to be added. The exact value is recomputed in floats.
_FLOW_STEPS = 2**20

#: A cut is added when the fractional point leaves it short by more than this many member arcs.
#: Cuts violated by less hardly move the bound; the LP solver's own feasibility tolerance is 1e-7.
_VIOLATION = 1e-4

#: Safety margin (cost units) when the float dual bound is rounded up to whole units. The bound is
#: a sum of about 10**5 terms of at most 10**8 units each; double rounding error stays below 1e-3.
_ROUND_MARGIN = 1e-3

#: The dive separates by maximum flow on every this many steps (strong components on the others);
#: measured at 100 x 100: every 4th step ended 0.001% above the bound, every 2nd met it (8.2 s).
_DIVE_FLOW_EVERY = 2


class Kind(IntEnum):
    """What one LP column (or CP-SAT variable) is: a new member kind and diagonal in one bay."""

    BRACE = 0
    RISING = 1
    FALLING = 2


@dataclass(frozen=True, slots=True)
class Cut:
    """A cut: node set ``nodes`` needs at least ``need`` member arcs leaving it (kept members included).

    The directed cuts of stability and redundancy have ``need = k + 1``. Other node-set
    inequalities with a right-hand side (e.g. capacity cut-sets) fit the same shape.
    """

    nodes: frozenset[int]
    need: int


@dataclass(frozen=True, slots=True)
class Columns:
    """The model's variables as arrays, one entry per (bay, kind), in CP-SAT creation order.

    Attributes:
        i: Bay row index (0-based).
        j: Bay column index (0-based).
        kind: :class:`Kind` value.
        cost: Cost units of one member.
        top: Upper bound (1, or 2 for braces when redundancy is asked).
        up: 1 when the column gives the up arc (row -> col).
        down: 1 when it gives the down arc (col -> row).
    """

    i: IntArray
    j: IntArray
    kind: IntArray
    cost: IntArray
    top: IntArray
    up: IntArray
    down: IntArray

    def __post_init__(self) -> None:
        for name in ("i", "j", "kind", "cost", "top", "up", "down"):
            getattr(self, name).setflags(write=False)

    @property
    def count(self) -> int:
        """Number of columns."""
        return len(self.i)


def columns(table: BayTable, k: int) -> Columns:
    """The variables of the cut model of ``table`` (same rules as :class:`CutModel`)."""
    slots = table.free_slots
    # Each *_tie_ok property builds a whole new array: worked out once, not per bay (it made this
    # quadratic in the number of bays, 9 s of a 200 x 200 frame's set-up).
    ties = ((table.rising_tie_ok, Kind.RISING), (table.falling_tie_ok, Kind.FALLING))
    entries: list[tuple[int, int, Kind, int, int]] = []  # (i, j, kind, cost, top)
    for i, j in zip(*np.nonzero(slots), strict=True):
        s = int(slots[i, j])
        if table.brace_ok[i, j]:
            entries.append((int(i), int(j), Kind.BRACE, int(table.brace_cost[i, j]), min(s, 1 if k == 0 else 2)))
        for ok, kd in ties:
            if ok[i, j]:
                entries.append((int(i), int(j), kd, int(table.tie_cost[i, j]), 1))
    ii, jj, kind, cost, top = (list(e) for e in zip(*entries, strict=True)) if entries else ([], [], [], [], [])
    kind_a = np.array(kind, dtype=np.int64)
    return Columns(
        i=np.array(ii, dtype=np.int64),
        j=np.array(jj, dtype=np.int64),
        kind=kind_a,
        cost=np.array(cost, dtype=np.int64),
        top=np.array(top, dtype=np.int64),
        up=(kind_a != Kind.FALLING).astype(np.int64),
        down=(kind_a != Kind.RISING).astype(np.int64),
    )


@dataclass(frozen=True, slots=True)
class LpPoint:
    """One solved LP: the fractional point, its value, and what its duals prove.

    Attributes:
        x: Column values.
        value: LP objective (cost units), as the solver reports it.
        bound: Proven lower bound on every layout's added cost (whole cost units, from the duals).
        reduced: Reduced cost of each column (cost units) under the duals behind ``bound``.
        dual_value: The float dual bound before rounding (cost units).
        duals: The multipliers behind it, one per LP row in the order added (cost units).
    """

    x: FloatArray
    value: float
    bound: int
    reduced: FloatArray
    dual_value: float
    duals: FloatArray


@dataclass(frozen=True, slots=True)
class LpRun:
    """What :meth:`LpRelaxation.run` reached.

    Attributes:
        point: The last solved LP (None if none was solved in time).
        rounds: LP solves.
        closed: True when the last point violates no directed cut (nor a partition inequality the
            heuristic finds, while partitions were being separated).
    """

    point: LpPoint | None
    rounds: int
    closed: bool


class LpRelaxation:
    """The LP relaxation of one frame's cut model, with its growing rows."""

    def __init__(self, table: BayTable, *, k: int) -> None:
        self.table = table
        self.k = k
        self.cols = columns(table, k)
        self.n = table.rows + table.cols
        c = self.cols
        from scipy.optimize._highspy import _core

        self._optimal = _core.HighsModelStatus.kOptimal
        h = _core._Highs()
        for name, value in (("output_flag", False), ("presolve", "off"), ("threads", 1), ("random_seed", 0)):
            h.setOptionValue(name, value)
        self._inf = float(h.getInfinity())
        none = np.array([], dtype=np.int32)
        h.addCols(c.count, c.cost / SCALE, np.zeros(c.count), c.top.astype(np.float64), 0, none, none, np.array([]))
        self._highs = h
        self._rows: list[tuple[IntArray, FloatArray]] = []
        self._origin: list[Cut | tuple[int, ...] | None] = []  # what each row is: a cut, a partition, a slot row
        self._lower: list[float] = []
        self._upper: list[float] = []
        # Slot rows per bay: all new members <= free diagonals; for k = 0 also brace + tie <= 1.
        bay_id = c.i * table.cols + c.j
        order = np.argsort(bay_id, kind="stable")
        starts = np.flatnonzero(np.r_[True, np.diff(bay_id[order]) != 0])
        slots = table.free_slots
        for group in np.split(order, starts[1:]):
            if len(group) < 2:
                continue
            self._push(group, np.ones(len(group)), -self._inf, float(slots[c.i[group[0]], c.j[group[0]]]))
            if k == 0:
                for t in group[c.kind[group] != Kind.BRACE]:
                    for b in group[c.kind[group] == Kind.BRACE]:
                        self._push(np.array([b, t]), np.ones(2), -self._inf, 1.0)
        self.cuts: set[Cut] = set()
        self.partitions: set[tuple[int, ...]] = set()
        for node in range(self.n):
            self.add_cut(Cut(frozenset({node}), k + 1))
            self.add_cut(Cut(frozenset(range(self.n)) - {node}, k + 1))
        if k == 0:
            self.add_partition(np.arange(self.n))

    # ------------------------------------------------------------------ rows

    def cut_row(self, cut: Cut) -> tuple[IntArray, FloatArray, float]:
        """Columns, coefficients and right-hand side of a cut (kept members moved to the right)."""
        t, c = self.table, self.cols
        in_row, in_col = node_sides(t.rows, t.cols, cut.nodes)
        r_in, c_in = in_row[c.i], in_col[c.j]
        coef = c.up * (r_in & ~c_in) + c.down * (c_in & ~r_in)
        kept = int(t.exist_up[in_row[:, None] & ~in_col[None, :]].sum())
        kept += int(t.exist_down[~in_row[:, None] & in_col[None, :]].sum())
        idx = np.flatnonzero(coef)
        return idx, coef[idx].astype(np.float64), float(cut.need - kept)

    def add_cut(self, cut: Cut) -> bool:
        """Add a cut row; False if already present or trivially met."""
        if cut in self.cuts or not cut.nodes or len(cut.nodes) == self.n:
            return False
        self.cuts.add(cut)
        idx, coef, need = self.cut_row(cut)
        if need <= 0:
            return False
        self._push(idx, coef, need, self._inf, cut)
        return True

    def add_partition(self, labels: IntArray) -> bool:
        """Partition inequality ``p * braces + (p - 1) * ties >= p (p - 1)`` over members crossing parts (k = 0).

        The argument is in :meth:`CutModel.add_partition`.
        """
        key = tuple(_canonical(np.asarray(labels)).tolist())
        p = len(set(key))
        if self.k != 0 or p < 2 or key in self.partitions:
            return False
        self.partitions.add(key)
        t, c = self.table, self.cols
        row_lab, col_lab = np.asarray(labels[: t.rows]), np.asarray(labels[t.rows :])
        cross = row_lab[:, None] != col_lab[None, :]
        kept_b = np.minimum(t.exist_up, t.exist_down)
        kept_t = t.exist_up + t.exist_down - 2 * kept_b
        need = p * (p - 1) - int(p * kept_b[cross].sum() + (p - 1) * kept_t[cross].sum())
        if need <= 0:
            return False
        on = cross[c.i, c.j]
        coef = np.where(c.kind == Kind.BRACE, p, p - 1) * on
        idx = np.flatnonzero(coef)
        self._push(idx, coef[idx].astype(np.float64), float(need), self._inf, key)
        return True

    def _push(
        self, idx: IntArray, coef: FloatArray, lower: float, upper: float, origin: Cut | tuple[int, ...] | None = None
    ) -> None:
        self._highs.addRow(lower, upper, len(idx), idx.astype(np.int32), coef)
        self._rows.append((idx, coef))
        self._origin.append(origin)
        self._lower.append(lower)
        self._upper.append(upper)

    # ------------------------------------------------------------------ solving

    def solve(self, *, seconds: float) -> LpPoint | None:
        """Re-solve the LP with the current rows (dual simplex from the last basis).

        Returns:
            The point and its proven bound, or None if HiGHS did not finish in time.
        """
        c = self.cols
        if c.count == 0:
            return None
        h = self._highs
        # HiGHS' time limit counts the object's whole run time, so it is set past what has been used.
        h.setOptionValue("time_limit", float(h.getRunTime()) + max(0.01, float(seconds)))
        h.run()
        if h.getModelStatus() != self._optimal:
            return None
        sol = h.getSolution()
        x = np.clip(np.asarray(sol.col_value, dtype=np.float64), 0.0, c.top)
        # Safe bound. HiGHS' row duals y (money per unit of row activity) satisfy, for a
        # minimisation, y >= 0 on active lower bounds (cut rows) and y <= 0 on active upper
        # bounds (slot rows); clipped to those signs, for every x in the box 0 <= x <= top
        # meeting the rows, cost(x) >= sum_i y_i (lower_i or upper_i) + sum_j min(0, d_j) top_j
        # with d = cost - A^T y. That holds for any such y, so the solver's tolerances never
        # enter the bound; only the float sums do (see _ROUND_MARGIN).
        y = np.asarray(sol.row_dual, dtype=np.float64) * SCALE
        lower, upper = np.array(self._lower), np.array(self._upper)
        y = np.where(np.isfinite(lower), np.maximum(y, 0.0), np.minimum(y, 0.0))
        y = np.where(np.isfinite(lower) | np.isfinite(upper), y, 0.0)
        side = np.where(y > 0, np.where(np.isfinite(lower), lower, 0.0), np.where(np.isfinite(upper), upper, 0.0))
        d = c.cost.astype(np.float64)
        for r in np.flatnonzero(y):
            idx, coef = self._rows[r]
            d[idx] -= y[r] * coef  # columns are distinct within a row
        dual = float(y @ side + np.minimum(0.0, d) @ c.top)
        bound = max(0, int(np.ceil(dual - _ROUND_MARGIN)))
        value = float(h.getInfo().objective_function_value) * SCALE
        return LpPoint(x, value, bound, d, dual, y)

    def arc_values(self, x: FloatArray) -> tuple[FloatArray, FloatArray]:
        """Fractional member arcs per bay (up, down), kept members included."""
        t, c = self.table, self.cols
        up = t.exist_up.astype(np.float64)
        down = t.exist_down.astype(np.float64)
        np.add.at(up, (c.i, c.j), x * c.up)
        np.add.at(down, (c.i, c.j), x * c.down)
        return up, down

    def separate(self, x: FloatArray, *, deadline: float, flows: bool = True) -> list[Cut]:
        """Cuts the fractional point violates: support components first, then minimum cuts by maximum flow.

        With ``flows`` false only the support's strong components are looked at (cheap, and
        exact for k = 0 at an integral point).
        """
        need = self.k + 1
        up, down = self.arc_values(x)
        found: set[frozenset[int]] = set()
        src, dst, _ = bay_arcs((up > 1e-9).astype(np.int64), (down > 1e-9).astype(np.int64))
        count, labels = strong_components(self.n, src, dst)
        if count > 1:
            everything = frozenset(range(self.n))
            for comp in range(count):
                part = frozenset(np.flatnonzero(labels == comp).tolist())
                found.add(part)
                found.add(everything - part)
        elif flows:
            iu = np.round(up * _FLOW_STEPS).astype(np.int64)
            idn = np.round(down * _FLOW_STEPS).astype(np.int64)
            src, dst, cap = bay_arcs(iu, idn)
            limit = (need - _VIOLATION) * _FLOW_STEPS
            for cut in flow_cuts(self.n, src, dst, cap):
                if cut.value < limit:
                    found.add(cut.leaving_set(self.n))
                if time.monotonic() > deadline:
                    break
        out: list[Cut] = []
        for s in sorted(found, key=lambda s: (len(s), sorted(s))):
            candidate = Cut(s, need)
            if candidate in self.cuts or not s or len(s) == self.n:
                continue
            idx, coef, rhs = self.cut_row(candidate)
            if coef @ x[idx] < rhs - _VIOLATION:
                out.append(candidate)
        return out

    def binding(self, point: LpPoint) -> tuple[list[Cut], list[IntArray]]:
        """The cuts and partitions with a positive multiplier at ``point``: the rows its bound rests on."""
        cuts: list[Cut] = []
        parts: list[IntArray] = []
        for r in np.flatnonzero(point.duals[: len(self._origin)] > 0):
            origin = self._origin[r]
            if isinstance(origin, Cut):
                cuts.append(origin)
            elif origin is not None:
                parts.append(np.array(origin, dtype=np.int64))
        return cuts, parts

    def set_bounds(self, lower: FloatArray, upper: FloatArray) -> None:
        """Change every column's bounds (the rows stay)."""
        idx = np.arange(self.cols.count, dtype=np.int32)
        self._highs.changeColsBounds(len(idx), idx, lower.astype(np.float64), upper.astype(np.float64))

    def layout(self, x: FloatArray) -> Additions:
        """An integral point as additions (values rounded to the nearest integer)."""
        t, c = self.table, self.cols
        add = AdditionsBuilder.empty(t.rows, t.cols)
        v = np.round(x).astype(np.int64)
        for arr, kind in ((add.braces, Kind.BRACE), (add.rising, Kind.RISING), (add.falling, Kind.FALLING)):
            sel = c.kind == kind
            np.add.at(arr, (c.i[sel], c.j[sel]), v[sel])
        return add.build()

    def dive(self, start: LpPoint, *, deadline: float, cutoff: int | None = None) -> Additions | None:
        """LP diving: fix members up, one fractional column at a time, re-solving with separation.

        Each step fixes at their value every column the point already sets to 1 (or 2), and the
        largest fractional column to its ceiling, then re-solves the LP and separates again, until
        the point is integral: it then meets every cut the separation knows (for k = 0, it is
        strongly connected). Fixing a column up never makes a covering row harder, so the dive
        only stops on the deadline. The column bounds are restored afterwards; the cuts found on
        the way stay (they are valid for every layout). The dive gives up once its LP value
        reaches ``cutoff`` (an incumbent's cost): fixing only raises the value, so its layout
        could not be cheaper.

        Returns:
            The integral point as additions (the caller re-checks and prunes it), or None.
        """
        c = self.cols
        lower = np.zeros(c.count)
        top = c.top.astype(np.float64)
        x = start.x
        found = None
        step = 0
        try:
            while time.monotonic() < deadline:
                frac = np.flatnonzero(np.abs(x - np.round(x)) > 1e-6)
                if len(frac) == 0:
                    # An integral point: separate in full (maximum flows) before accepting it.
                    cuts = self.separate(x, deadline=deadline)
                    if not cuts:
                        found = self.layout(x)
                        break
                    for cut in cuts:
                        self.add_cut(cut)
                else:
                    pick = frac[np.argmax(x[frac])]  # first of the largest: deterministic
                    settled = np.flatnonzero(x >= 1 - 1e-6)
                    lower[settled] = np.maximum(lower[settled], np.floor(x[settled] + 1e-6))
                    lower[pick] = np.ceil(x[pick])
                    self.set_bounds(lower, top)
                step += 1
                # Maximum flows on every step cost most of the dive's time (measured: 8.6 of
                # 10.3 s at 80 x 80); between the every-second full steps only the support's
                # strong components are checked, which catches any cut the point leaves empty.
                got = self.run(deadline=deadline, flows=step % _DIVE_FLOW_EVERY == 0)
                if got.point is None or not got.closed or (cutoff is not None and got.point.value >= cutoff):
                    break
                x = got.point.x
        finally:
            self.set_bounds(np.zeros(c.count), top)
        return found

    def violated_partitions(self, x: FloatArray, *, limit: int = 20) -> list[IntArray]:
        """Partitions whose inequality the fractional point violates, most violated first (k = 0).

        A heuristic: merge nodes along bays in decreasing LP weight (Kruskal's order), and test
        the partition into the current pieces after every merge (at most n - 1 partitions).
        """
        t, c = self.table, self.cols
        if self.k != 0 or c.count == 0:
            return []
        weight = np.zeros((t.rows, t.cols))
        np.add.at(weight, (c.i, c.j), x)
        parent = np.arange(self.n)

        def find(a: int) -> int:
            while parent[a] != a:
                parent[a] = parent[parent[a]]
                a = int(parent[a])
            return a

        brace = c.kind == Kind.BRACE
        kept_b = np.minimum(t.exist_up, t.exist_down)
        kept_t = t.exist_up + t.exist_down - 2 * kept_b
        found: list[tuple[float, tuple[int, ...]]] = []
        for flat in np.argsort(-weight, axis=None, kind="stable"):
            i, j = divmod(int(flat), t.cols)
            if weight[i, j] <= 1e-9:
                break
            a, b = find(i), find(t.rows + j)
            if a == b:
                continue
            parent[a] = b
            roots = np.array([find(v) for v in range(self.n)])
            labels = np.unique(roots, return_inverse=True)[1]
            p = int(labels.max()) + 1
            if p < 3:  # two parts: the sum of the two directed cuts, already in
                continue
            cross = labels[c.i] != labels[t.rows + c.j]
            lhs = float(np.where(brace, p, p - 1) @ (x * cross))
            kept_cross = labels[: t.rows, None] != labels[None, t.rows :]
            lhs += p * float(kept_b[kept_cross].sum()) + (p - 1) * float(kept_t[kept_cross].sum())
            short = (p * (p - 1) - lhs) / p
            if short > _VIOLATION:
                found.append((short, tuple(_canonical(labels).tolist())))
        found.sort(key=lambda e: (-e[0], e[1]))
        return [np.array(key, dtype=np.int64) for _, key in found[:limit]]

    def run(
        self, *, deadline: float, max_rounds: int = 200, partitions_until: float | None = None, flows: bool = True
    ) -> LpRun:
        """Solve, separate, add the violated rows, repeat: until none is violated, or the deadline.

        Directed cuts are separated first; once the point meets them all, partition
        inequalities (k = 0) while ``time.monotonic()`` is before ``partitions_until``
        (None = never). Their rows are dense and each round raises the bound a little. Without
        ``flows`` only cuts the support's strong components show are separated.
        """
        point = None
        rounds = 0
        while rounds < max_rounds:
            remaining = deadline - time.monotonic()
            if remaining <= 0.05:
                break
            got = self.solve(seconds=remaining)
            if got is None:
                break
            point = got
            rounds += 1
            cuts = self.separate(point.x, deadline=deadline, flows=flows)
            for cut in cuts:
                self.add_cut(cut)
            if cuts:
                continue
            added = 0
            if partitions_until is not None and time.monotonic() < partitions_until:
                for labels in self.violated_partitions(point.x):
                    added += self.add_partition(labels)
            if not added:
                return LpRun(point, rounds, True)
        return LpRun(point, rounds, False)


def _canonical(labels: IntArray) -> IntArray:
    """Part labels numbered by first appearance (one key per partition)."""
    _, first, inverse = np.unique(labels, return_index=True, return_inverse=True)
    rank = np.empty(len(first), dtype=np.int64)
    rank[np.argsort(first, kind="stable")] = np.arange(len(first))
    return rank[inverse]


def fixings(point: LpPoint, cols: Columns, incumbent: int) -> tuple[IntArray, IntArray]:
    """Reduced-cost fixing: bounds every layout costing at most ``incumbent - 1`` must obey.

    With the multipliers behind ``point.bound``, such a layout x has
    ``incumbent - 1 >= cost(x) >= dual + d_j x_j`` for ``d_j > 0`` (and
    ``dual + |d_j| (top_j - x_j)`` for ``d_j < 0``), so ``x_j <= (incumbent - 1 - dual) / d_j``.

    Returns:
        (lower, upper) bound per column, integers.
    """
    slack = float(incumbent - 1) - point.dual_value + _ROUND_MARGIN
    d = point.reduced
    lower = np.zeros(cols.count, dtype=np.int64)
    upper = cols.top.copy()
    if slack < 0:
        return cols.top.copy(), np.zeros(cols.count, dtype=np.int64)  # nothing cheaper exists (empty box)
    pos = d > 0
    with np.errstate(divide="ignore"):
        upper[pos] = np.minimum(cols.top[pos], np.floor(slack / d[pos])).astype(np.int64)
        neg = d < 0
        lower[neg] = np.maximum(0, cols.top[neg] - np.floor(slack / -d[neg])).astype(np.int64)
    return lower, upper
