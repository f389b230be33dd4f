"""The plastic capacity model of a layout: statically admissible member forces within capacity.

A layout *carries* a load case plastically when some set of bar forces ``t`` balances the nodal
loads at every unsupported degree of freedom (``B^T t = P``, B the compatibility matrix of the bar
framework, :mod:`bracegrid.mechanics.stiffness`) with every bar within its capacity: a tie in
``[0, tension]``, a brace in ``[-compression, tension]``, a standard or ledger within
``+- standard_kn`` / ``ledger_kn``, and every base node holding down at most ``uplift_kn``. A
capacity the project does not give is no limit. This is the lower-bound (static) theorem of
plasticity; it assumes members can share load, which the elastic check then tests.

With every grid bar rigid the diagonal forces are a flow on the row/column digraph (docs/theory.md):
node supplies are the work of the load on each racking coordinate, a diagonal's arc capacity is its
force capacity times ``w h / L``, and a layout carries the case iff no node set has more supply than
leaving capacity (Gale 1957; Ahuja, Magnanti & Orlin, *Network Flows*, 1993, sec. 6.2). Grid-bar
limits are side constraints on that flow; the linear programme here holds both at once, and when it
is infeasible its dual (a Farkas ray: a virtual motion whose load work exceeds what the members can
dissipate, the upper-bound theorem) gives a cut valid for every layout (Benders; Costa, Cordeau &
Gendron, Comput. Optim. Appl. 42 (2009) 371).

Tolerances: HiGHS meets constraints to about 1e-9 of their size. A case counts as carried when the
least total imbalance (phase one) is below :data:`CARRY_REL` of the case's total load, and a
utilisation is reported to that relative accuracy: a layout short by a millionth of the load is,
for anyone sizing members, carrying it.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
from scipy.sparse import csr_matrix, hstack, identity, vstack

from bracegrid.analysis.digraph import short_supply_set
from bracegrid.mechanics.framework import BAR_KINDS, BarKind, FloatArray, IntArray, build_framework
from bracegrid.mechanics.loading import nodal_loads
from bracegrid.mechanics.motions import work_coefficients, z_of_col, z_of_row
from bracegrid.mechanics.stiffness import full_compatibility_matrix
from bracegrid.model import (
    Diagonal,
    Frame,
    GridStrength,
    LoadSense,
    Member,
    MemberKind,
    MemberStrength,
    StrengthCatalogue,
    Supports,
)

#: A case is carried when the least imbalance is below this share of its total load (see above).
CARRY_REL = 1e-6
#: Integer resolution of a cut's right-hand side in the CP-SAT master (coefficients rounded up,
#: the right-hand side down, so a scaled cut is never stronger than the real one).
CUT_SCALE = 1_000_000


@dataclass(frozen=True, slots=True)
class Candidate:
    """A member the layout may hold: a kind on one diagonal of one bay.

    Attributes:
        row: Bay row (1-based).
        col: Bay column (1-based).
        diagonal: Rising or falling.
        kind: Brace or tie.
        kept: A member already in place (always present, no cost).
    """

    row: int
    col: int
    diagonal: Diagonal
    kind: MemberKind
    kept: bool = False

    @property
    def member(self) -> Member:
        """The member (``existing`` for a kept one)."""
        return Member(self.row, self.col, self.kind, self.diagonal, existing=self.kept)

    @property
    def label(self) -> str:
        """``tie r2c3:rising``."""
        return f"{self.kind.value} r{self.row}c{self.col}:{self.diagonal.value}"


@dataclass(frozen=True, slots=True)
class SenseLoad:
    """One load case in one sense: nodal forces and their work on the racking coordinates."""

    case: str
    sense: LoadSense
    nodal: FloatArray
    work: FloatArray
    total_kn: float

    @property
    def title(self) -> str:
        """``wind (+)``."""
        return f"{self.case} ({self.sense.value})"


@dataclass(frozen=True, slots=True)
class CapacityCut:
    """A linear requirement on the candidates: ``sum coefficient * x >= need`` (whole numbers).

    Attributes:
        terms: (candidate index, coefficient) pairs, coefficients > 0.
        need: Right-hand side.
        reason: What the cut enforces, in words.
    """

    terms: tuple[tuple[int, int], ...]
    need: int
    reason: str

    @property
    def key(self) -> tuple[tuple[tuple[int, int], ...], int]:
        """Identity of the cut (its terms and need)."""
        return (self.terms, self.need)

    def holds(self, chosen: Sequence[bool]) -> bool:
        """Whether a choice of candidates meets the cut."""
        return sum(c for k, c in self.terms if chosen[k]) >= self.need


@dataclass(frozen=True, slots=True)
class Utilisation:
    """The least largest utilisation over the admissible force sets of one case.

    Attributes:
        title: ``wind (+)``.
        value: Least achievable largest force / capacity (None: no admissible set at any scale,
            e.g. a mechanism or uplift where none is allowed; 0.0 where nothing is rated).
        governing: The bar at that utilisation (``ledger p3 c5``, ``base q4 uplift``), or why none.
    """

    title: str
    value: float | None
    governing: str

    @property
    def carried(self) -> bool:
        """Within capacity (to :data:`CARRY_REL`)."""
        return self.value is not None and self.value <= 1.0 + CARRY_REL


def _cap(value: float | None) -> float:
    return math.inf if value is None else float(value)


def _member_caps(strength: MemberStrength, kind: MemberKind) -> tuple[float, float]:
    """(tension, compression) capacity of a member kind; a tie takes no compression."""
    tension = _cap(strength.tension_kn)
    compression = _cap(strength.compression_kn) if kind is MemberKind.BRACE else 0.0
    return tension, compression


def has_capacities(strength: StrengthCatalogue) -> bool:
    """Whether the project gives any capacity the plastic model can check.

    Example:
        >>> has_capacities(StrengthCatalogue()), has_capacities(StrengthCatalogue(grid=GridStrength(ledger_kn=6.0)))
        (False, True)
    """
    g = strength.grid
    values = (strength.brace.tension_kn, strength.brace.compression_kn, strength.tie.tension_kn,
              g.standard_kn, g.ledger_kn, g.uplift_kn)  # fmt: skip
    return any(v is not None for v in values)


@dataclass(frozen=True, slots=True)
class PlasticFrame:
    """The plastic model of one frame over a list of candidate members (arrays read-only).

    Variables are the grid bars' forces (framework order) followed by one force per candidate.

    Attributes:
        frame: The frame (its load cases).
        candidates: Every member the layout may hold, kept ones included.
        grid_labels: Label of every grid bar (``standard q0 r1``).
        equilibrium: ``B^T`` at the unsupported degrees of freedom, shape (free dofs, variables).
        uplift: ``-B^T`` at the base's vertical degrees of freedom (None without a limit).
        base_y: Those degrees of freedom.
        base_q: Vertical grid line of each.
        uplift_kn: The hold-down a base node can give (None: no limit).
        grid_tension: Tension capacity of each grid bar (inf where none is given).
        tension: Tension capacity of each candidate.
        compression: Compression capacity of each candidate (0 for ties).
        loads: Every case in every sense.
    """

    frame: Frame
    candidates: tuple[Candidate, ...]
    grid_labels: tuple[str, ...]
    equilibrium: csr_matrix
    uplift: csr_matrix | None
    base_y: IntArray
    base_q: IntArray
    uplift_kn: float | None
    free_dofs: IntArray
    grid_tension: FloatArray
    tension: FloatArray
    compression: FloatArray
    loads: tuple[SenseLoad, ...]

    @property
    def grid_count(self) -> int:
        """Number of grid bars."""
        return len(self.grid_labels)

    def bounds(self, chosen: Sequence[bool], scale: float = 1.0) -> list[tuple[float | None, float | None]]:
        """Force bounds of every variable for a choice of candidates (absent ones carry nothing)."""
        out: list[tuple[float | None, float | None]] = []
        for cap in self.grid_tension:
            out.append((None, None) if math.isinf(cap) else (-cap * scale, cap * scale))
        for k, on in enumerate(chosen):
            if not on:
                out.append((0.0, 0.0))
                continue
            t, c = float(self.tension[k]), float(self.compression[k])
            out.append((None if math.isinf(c) else -c * scale, None if math.isinf(t) else t * scale))
        return out


def plastic_frame(frame: Frame, strength: StrengthCatalogue, candidates: Sequence[Candidate]) -> PlasticFrame:
    """Build the plastic model of a frame over its candidate members.

    Example:
        >>> from bracegrid.model import LoadCase
        >>> f = Frame("f", (3000,), (4000,), supports=Supports.BASE, loads=(LoadCase("w", (0.0, 6.0)),))
        >>> pf = plastic_frame(f, StrengthCatalogue(), [Candidate(1, 1, Diagonal.RISING, MemberKind.TIE)])
        >>> pf.equilibrium.shape, len(pf.loads)
        ((4, 5), 1)
    """
    # The equilibrium matrix does not depend on stiffness: build the framework with unit values.
    unit = StrengthCatalogue(
        brace=MemberStrength(ea_kn=1.0), tie=MemberStrength(ea_kn=1.0), grid=GridStrength(ea_kn=1.0)
    )
    cands = tuple(candidates)
    fw = build_framework(frame, unit, members=[c.member for c in cands])
    b_t = full_compatibility_matrix(fw).T.tocsr()  # (dofs, bars): B^T t = P + R
    fixed = fw.fixed_mask()
    free = np.flatnonzero(~fixed)
    g = strength.grid
    # A bar between two supported nodes (the base ledgers) takes no part in any balance: it is
    # left unrated, or its arbitrary LP force would pass for the governing one.
    idle = np.diff(b_t[free].tocsc().indptr) == 0
    labels, caps = [], []
    for k in range(fw.first_diagonal):
        kind = BAR_KINDS[int(fw.kind[k])]
        if kind is BarKind.STANDARD:
            labels.append(f"standard q{int(fw.line[k])} r{int(fw.row[k])}")
            caps.append(math.inf if idle[k] else _cap(g.standard_kn))
        else:
            labels.append(f"ledger p{int(fw.line[k])} c{int(fw.col[k])}")
            caps.append(math.inf if idle[k] else _cap(g.ledger_kn))
    base = [s for s in fw.supports if s.support == "base" and s.dof % 2 == 1]
    base_y = np.array([s.dof for s in base], dtype=np.int64)
    limited = g.uplift_kn is not None and frame.supports is Supports.BASE and base_y.size > 0
    tension, compression = [], []
    for c in cands:
        t, comp = _member_caps(strength.of(c.kind), c.kind)
        tension.append(t)
        compression.append(comp)
    loads = []
    for case in frame.loads:
        for sense in case.senses:
            p = nodal_loads(frame, case, sense)
            loads.append(SenseLoad(case.name, sense, p, work_coefficients(frame, p), float(np.abs(p).sum())))
    return PlasticFrame(
        frame=frame,
        candidates=cands,
        grid_labels=tuple(labels),
        equilibrium=b_t[free],
        uplift=(-b_t[base_y]).tocsr() if limited else None,
        base_y=base_y,
        base_q=np.array([s.q for s in base], dtype=np.int64),
        uplift_kn=float(g.uplift_kn) if limited and g.uplift_kn is not None else None,
        free_dofs=free,
        grid_tension=np.array(caps, dtype=np.float64),
        tension=np.array(tension, dtype=np.float64),
        compression=np.array(compression, dtype=np.float64),
        loads=tuple(loads),
    )


def _linprog() -> Any:
    """scipy's ``linprog``, imported where an LP is solved (scipy.optimize adds 0.2 s to start-up)."""
    from scipy.optimize import linprog

    return linprog


def phase_one(pf: PlasticFrame, load: SenseLoad, chosen: Sequence[bool]) -> tuple[float, FloatArray, FloatArray]:
    """The least total imbalance of a case over force sets within capacity, and its dual.

    Solves ``min 1.(a+ + a-) + 1.s`` subject to ``E t + a+ - a- = P_free``, ``U t - s <= U_limit - ...``
    (base uplift) and the force bounds. Returns (imbalance, duals of the equilibrium rows, duals of
    the uplift rows, <= 0).
    """
    eq, up = pf.equilibrium, pf.uplift
    n = eq.shape[1]
    m = eq.shape[0]
    u_rows = 0 if up is None else up.shape[0]
    a_eq = hstack([eq, identity(m), -identity(m), csr_matrix((m, u_rows))]).tocsr()
    c = np.concatenate([np.zeros(n), np.ones(2 * m + u_rows)])
    b_eq = load.nodal[pf.free_dofs]
    bounds = pf.bounds(chosen) + [(0.0, None)] * (2 * m + u_rows)
    kwargs = {}
    if up is not None and pf.uplift_kn is not None:
        kwargs["A_ub"] = hstack([up, csr_matrix((u_rows, 2 * m)), -identity(u_rows)]).tocsr()
        kwargs["b_ub"] = pf.uplift_kn - load.nodal[pf.base_y]
    res = _linprog()(c, A_eq=a_eq, b_eq=b_eq, bounds=bounds, method="highs", **kwargs)
    if res.status != 0:  # pragma: no cover - phase one is always feasible and bounded
        msg = f"phase-one LP failed: {res.message}"
        raise RuntimeError(msg)
    v = np.minimum(np.asarray(res.ineqlin.marginals, dtype=np.float64), 0.0) if u_rows else np.zeros(0)
    return float(res.fun), np.asarray(res.eqlin.marginals, dtype=np.float64), v


def carries(pf: PlasticFrame, load: SenseLoad, chosen: Sequence[bool]) -> bool:
    """Whether the chosen candidates carry one case plastically (see :data:`CARRY_REL`)."""
    return phase_one(pf, load, chosen)[0] <= CARRY_REL * max(load.total_kn, 1e-12)


def farkas_cut(pf: PlasticFrame, load: SenseLoad, chosen: Sequence[bool]) -> CapacityCut | None:
    """A cut that every layout carrying the case meets and the chosen one does not (None if it carries).

    For any multipliers u (equilibrium rows) and v <= 0 (uplift rows), every admissible force set
    satisfies ``g . t = u . P + v . (U t) >= u . P + v . b_U =: beta`` with ``g = E^T u + U^T v``,
    while the bounds give ``g . t <= sum_k max(g_k l_k, g_k u_k) =: D(x)``; so ``D(x) >= beta`` for
    every layout x that carries the case. D is linear in the candidates (a present candidate adds
    ``g+ tension + g- compression``), which is the cut. The phase-one duals make it violated; when
    rounding leaves it satisfied by the chosen layout, the monotone cover cut is used instead (more
    members never lose capacity: an absent member is one carrying zero).
    """
    ray = farkas_ray(pf, load, chosen)
    if ray is None:
        return None
    cut = cut_from(pf, load, *ray)
    if cut is not None and not cut.holds(chosen):
        return cut
    return cover_cut(pf, chosen, f"case {load.title}")


def farkas_ray(pf: PlasticFrame, load: SenseLoad, chosen: Sequence[bool]) -> tuple[FloatArray, FloatArray] | None:
    """The phase-one multipliers (u, v) of a case the chosen layout does not carry (None if it does)."""
    imbalance, u, v = phase_one(pf, load, chosen)
    if imbalance <= CARRY_REL * max(load.total_kn, 1e-12):
        return None
    return u, v


def cut_from(pf: PlasticFrame, load: SenseLoad, u: FloatArray, v: FloatArray) -> CapacityCut | None:
    """The cut ``D(x) >= beta`` of any multipliers (u, v <= 0), whole-numbered (None when it asks nothing).

    Valid for every layout whatever the multipliers (see :func:`farkas_cut`); strong only for
    multipliers near a ray of some layout.
    """
    v = np.minimum(v, 0.0)
    g = pf.equilibrium.T @ u
    beta = float(u @ load.nodal[pf.free_dofs])
    if pf.uplift is not None and pf.uplift_kn is not None and v.size:
        g = g + pf.uplift.T @ v
        beta += float(v @ (pf.uplift_kn - load.nodal[pf.base_y]))
    noise = 1e-9 * max(float(np.abs(g).max(initial=0.0)), 1e-300)
    g = np.where(np.abs(g) <= noise, 0.0, g)
    plus, minus = np.maximum(g, 0.0), np.maximum(-g, 0.0)
    n_grid = pf.grid_count
    grid_g = plus[:n_grid] + minus[:n_grid]
    if np.any((grid_g > 0) & np.isinf(pf.grid_tension)):
        return None
    fixed = float(grid_g[grid_g > 0] @ pf.grid_tension[grid_g > 0])
    gp, gm = plus[n_grid:], minus[n_grid:]
    with np.errstate(invalid="ignore"):
        worth = np.where(gp > 0, gp * pf.tension, 0.0) + np.where(gm > 0, gm * pf.compression, 0.0)
    terms: list[tuple[int, float]] = []
    for k, cand in enumerate(pf.candidates):
        if worth[k] <= 0:
            continue
        if cand.kept:
            fixed += float(worth[k])
        else:
            terms.append((k, float(worth[k])))
    rhs = beta - fixed
    if not (rhs > 0 and math.isfinite(rhs)):
        return None
    scale = CUT_SCALE / rhs
    need = math.floor(CUT_SCALE * (1.0 - 1e-9))
    ints = tuple((k, min(math.ceil(w * scale) if math.isfinite(w) else need, need)) for k, w in terms)
    return CapacityCut(tuple((k, c) for k, c in ints if c > 0), need, f"case {load.title}")


def ray_images(pf: PlasticFrame, u: FloatArray, v: FloatArray) -> list[tuple[FloatArray, FloatArray]]:
    """The multipliers moved along the frame by whole bays, and mirrored: more valid cuts from one ray.

    Any multipliers give a valid cut (:func:`cut_from`); images of a ray are strong where the frame
    repeats itself (uniform bays), which is where one ray's cut alone would only move the bracing
    to the next bay. Grid lines moved past an edge repeat the edge line's multipliers.
    """
    frame = pf.frame
    rows, cols = frame.rows + 1, frame.cols + 1
    full = np.zeros(2 * rows * cols)
    full[pf.free_dofs] = u
    grid = full.reshape(rows, cols, 2)
    base = np.zeros(cols)
    if v.size:
        base[pf.base_q] = v
    out = []
    for mirror in (False, True):
        g0 = grid[:, ::-1, :] * np.array([-1.0, 1.0]) if mirror else grid
        b0 = base[::-1] if mirror else base
        for m in range(-(cols - 1), cols):
            if m == 0 and not mirror:
                continue
            # lines moved past an edge repeat the edge line's motion (a rigid sway stays a rigid sway)
            take = np.clip(np.arange(cols) - m, 0, cols - 1)
            moved = g0[:, take, :]
            out.append((moved.reshape(-1)[pf.free_dofs], b0[take][pf.base_q] if v.size else v))
    return out


def rounded_cut(cut: CapacityCut) -> CapacityCut | None:
    """The rounded form of a cut: at least ``ceil(need / largest coefficient)`` of its candidates.

    Valid because no candidate gives more than the largest coefficient; None when it asks for one
    member only (the cut itself already does).

    Example:
        >>> rounded_cut(CapacityCut(((0, 4), (1, 4), (2, 3)), 10, "c")).need
        3
    """
    largest = max((c for _, c in cut.terms), default=0)
    if largest <= 0:
        return None
    fewest = -(-cut.need // largest)
    if fewest <= 1:
        return None
    return CapacityCut(tuple((k, 1) for k, _ in cut.terms), fewest, cut.reason + " (rounded)")


def cover_cut(pf: PlasticFrame, chosen: Sequence[bool], reason: str) -> CapacityCut:
    """At least one candidate the layout lacks (valid wherever more members never hurt)."""
    terms = tuple((k, 1) for k, c in enumerate(pf.candidates) if not c.kept and not chosen[k])
    return CapacityCut(terms, 1, reason)


def min_utilisation(pf: PlasticFrame, load: SenseLoad, chosen: Sequence[bool]) -> Utilisation:
    """The least largest utilisation of one case over admissible force sets (an LP in t and lambda).

    Every rated bar is bounded by lambda times its capacity, the base's hold-down by lambda times
    ``uplift_kn``; lambda is minimised. Bars without a capacity are free; with nothing rated the
    answer is 0.0 when the case can be balanced at all.
    """
    eq, up = pf.equilibrium, pf.uplift
    n = eq.shape[1]
    caps: list[tuple[float, float]] = [(float(c), float(c)) for c in pf.grid_tension]
    for k, on in enumerate(chosen):
        caps.append((float(pf.tension[k]), float(pf.compression[k])) if on else (0.0, 0.0))
    # the sign limits (a tie never in compression, an absent member carries nothing) stay bounds;
    # finite capacities become rows  t <= lambda T  and  -t <= lambda C
    bounds: list[tuple[float | None, float | None]] = []
    rows: list[int] = []
    cols: list[int] = []
    vals: list[float] = []
    rated: list[int] = []
    count = 0
    for k, (t_cap, c_cap) in enumerate(caps):
        bounds.append((0.0 if c_cap == 0.0 else None, 0.0 if t_cap == 0.0 else None))
        for sign, cap in ((1.0, t_cap), (-1.0, c_cap)):
            if 0.0 < cap < math.inf:
                rows += [count, count]
                cols += [k, n]
                vals += [sign, -cap]
                count += 1
                if not rated or rated[-1] != k:
                    rated.append(k)
    blocks = [csr_matrix((vals, (rows, cols)), shape=(count, n + 1))]
    b_ub = [np.zeros(count)]
    if up is not None and pf.uplift_kn is not None:
        # hold-down at each base node: -(B^T t) + P  <=  lambda * uplift_kn
        blocks.append(hstack([up, csr_matrix(-pf.uplift_kn * np.ones((up.shape[0], 1)))]).tocsr())
        b_ub.append(-load.nodal[pf.base_y])
    a_eq = hstack([eq, csr_matrix((eq.shape[0], 1))]).tocsr()
    c = np.zeros(n + 1)
    c[n] = 1.0
    res = _linprog()(c, A_ub=vstack(blocks).tocsr(), b_ub=np.concatenate(b_ub), A_eq=a_eq,
                     b_eq=load.nodal[pf.free_dofs], bounds=[*bounds, (0.0, None)], method="highs")  # fmt: skip
    if res.status != 0:
        return Utilisation(load.title, None, "no admissible force set: the load cannot be balanced within the limits")
    t = res.x[:n]
    best, label = 0.0, "nothing rated"
    for k in rated:
        f = float(t[k])
        cap = caps[k][0] if f >= 0 else caps[k][1]
        if 0.0 < cap < math.inf and abs(f) / cap > best:
            best = abs(f) / cap
            label = pf.grid_labels[k] if k < pf.grid_count else pf.candidates[k - pf.grid_count].label
    if up is not None and pf.uplift_kn:
        hold = up @ t + load.nodal[pf.base_y]
        for q, pull in zip(pf.base_q.tolist(), hold.tolist(), strict=True):
            if pull / pf.uplift_kn > best:
                best, label = pull / pf.uplift_kn, f"base q{q} uplift"
    value = float(res.x[n]) if count or (up is not None and pf.uplift_kn) else 0.0
    return Utilisation(load.title, max(value, 0.0) + 0.0, label)


# --------------------------------------------------------------------------- the flow view


def arc_capacity(frame: Frame, cand: Candidate, tension: float, compression: float) -> tuple[float, float]:
    """Capacity of a candidate on the arc row -> col and on col -> row, in work units (kN mm).

    A diagonal's force t does work ``t w h / L`` per unit racking difference; a rising member
    resists row -> col in tension and col -> row in compression, a falling one the other way.

    Example:
        >>> f = Frame("f", (3000,), (4000,))
        >>> arc_capacity(f, Candidate(1, 1, Diagonal.RISING, MemberKind.TIE), 10.0, 0.0)
        (24000.0, 0.0)
    """
    w, h = frame.widths[cand.col - 1], frame.heights[cand.row - 1]
    k = w * h / frame.diagonal_length_mm(cand.row, cand.col)
    if cand.diagonal is Diagonal.RISING:
        return tension * k, compression * k
    return compression * k, tension * k


def lift_cuts(pf: PlasticFrame) -> list[CapacityCut]:
    """Pinned base: the capacity cut-set inequalities, each lift on its own, with their rounded forms.

    With every column held by the base the only node sets that matter are sets of lifts, and their
    inequalities are sums of single-lift ones: lift i's arcs toward the columns must cover
    ``h_i V_i`` (and its reverse the other way). The rounded form asks for at least
    ``ceil(need / largest capacity)`` members across. Kept members count toward the need.
    """
    frame = pf.frame
    if frame.supports is not Supports.BASE:
        return []
    out: list[CapacityCut] = []
    for load in pf.loads:
        for i in range(1, frame.rows + 1):
            supply = float(load.work[z_of_row(i)])
            if abs(supply) <= CARRY_REL * max(load.total_kn, 1e-12) * frame.heights[i - 1]:
                continue
            side = 0 if supply > 0 else 1
            need = abs(supply)
            terms: list[tuple[int, float]] = []
            for k, cand in enumerate(pf.candidates):
                if cand.row != i:
                    continue
                cap = arc_capacity(frame, cand, float(pf.tension[k]), float(pf.compression[k]))[side]
                if cap <= 0:
                    continue
                if cand.kept:
                    need -= cap
                else:
                    terms.append((k, cap))
            reason = f"case {load.title}: lift {i} horizontal capacity"
            out += _scaled(terms, need, reason)
    return out


def _scaled(terms: list[tuple[int, float]], need: float, reason: str) -> list[CapacityCut]:
    """A real cut ``sum w x >= need`` as a whole-number cut, and its rounded form."""
    if need <= 0:
        return []
    scale = CUT_SCALE / need
    top = math.floor(CUT_SCALE * (1.0 - 1e-9))
    ints = tuple((k, min(math.ceil(w * scale) if math.isfinite(w) else top, top)) for k, w in terms)
    out = [CapacityCut(ints, top, reason)]
    largest = max((w for _, w in terms), default=0.0)
    if largest > 0 and math.isfinite(largest):
        fewest = math.ceil(need / largest * (1.0 - 1e-9))
        if fewest > 1:
            out.append(CapacityCut(tuple((k, 1) for k, _ in terms), fewest, reason + " (rounded)"))
    return out


def flow_cut(pf: PlasticFrame, load: SenseLoad, chosen: Sequence[bool]) -> list[CapacityCut]:
    """Free frames: a node set whose supply exceeds the chosen arcs leaving it, by one maximum flow.

    Returns its capacity cut-set inequality and the rounded form (empty when the flow meets every
    supply; the LP check then decides, grid-bar limits included).
    """
    frame = pf.frame
    if frame.supports is not Supports.FREE or frame.held_edges:
        return []
    r_count, c_count = frame.rows, frame.cols
    supply = np.array(
        [load.work[z_of_row(i)] for i in range(1, r_count + 1)]
        + [load.work[z_of_col(frame, j)] for j in range(1, c_count + 1)]
    )
    src, dst, cap, owner = [], [], [], []
    for k, cand in enumerate(pf.candidates):
        up, down = arc_capacity(frame, cand, float(pf.tension[k]), float(pf.compression[k]))
        row, col = cand.row - 1, r_count + cand.col - 1
        for a, b, c in ((row, col, up), (col, row, down)):
            if c > 0:
                src.append(a)
                dst.append(b)
                cap.append(c)
                owner.append(k)
    plus = float(np.maximum(supply, 0).sum())
    if plus <= 0:
        return []
    scale = 1e8 / plus
    cap_arr = np.array(cap, dtype=np.float64)
    present = np.array([chosen[k] for k in owner], dtype=bool) if owner else np.zeros(0, dtype=bool)
    int_cap = np.floor(np.minimum(cap_arr, plus) * scale).astype(np.int64) * present
    int_supply = np.where(supply > 0, np.ceil(supply * scale), np.floor(supply * scale)).astype(np.int64)
    s = short_supply_set(r_count + c_count, np.array(src, dtype=np.int64), np.array(dst, dtype=np.int64),
                         int_cap, int_supply)  # fmt: skip
    if not s:
        return []
    need = float(supply[sorted(s)].sum())
    terms: list[tuple[int, float]] = []
    for a, b, c, k in zip(src, dst, cap, owner, strict=True):
        if a in s and b not in s:
            if pf.candidates[k].kept:
                need -= c
            else:
                terms.append((k, c))
    got = sum(c for k, c in terms if chosen[k])
    if got >= need * (1 - CARRY_REL):
        return []
    return _scaled(terms, need, f"case {load.title}: cut-set of {len(s)} rows and columns")
