"""Independent reference for member forces: the force method, solved by a general convex solver.

This module does not use ``bracegrid.mechanics``. It writes the equilibrium equations of the
pin-jointed bar framework of a frame at true coordinates (metres, dense numpy), and finds the
member forces as the minimiser of the complementary energy

    sum_k t_k^2 L_k / (2 EA_k)   subject to   A^T t = f  (every unsupported degree of freedom),
                                               t_k >= 0   (every tension-only tie),

which for a linear-elastic framework with ties that may go slack is the unique elastic answer
(the dual of the minimum of total potential energy; e.g. Y. Kanno, *Nonsmooth Mechanics and Convex
Optimization*, CRC Press 2011, ch. 3). The problem is handed to cvxpy and solved by Clarabel, an
interior-point conic solver (a different method from the product's semismooth Newton on the
displacements). For a statically determinate layout the same equations are square and
:func:`statics_forces` solves them directly, with no stiffness at all.
"""

from __future__ import annotations

import warnings
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from bracegrid.model import Diagonal, Edge, Frame, Member, MemberKind, Supports


@dataclass(frozen=True)
class ForceModel:
    """Bars (with keys matching the product's member keys), equilibrium matrix and supports."""

    keys: list[tuple[str, int, int, int, str]]
    lengths: np.ndarray
    ea: np.ndarray
    tie: np.ndarray
    equilibrium: np.ndarray  # (free dofs, bars): column k = nodal force of a unit tension in bar k
    free: np.ndarray  # global dof indices that are not supported


def force_model(frame: Frame, members: Sequence[Member], *, grid_ea: float, ea: dict[MemberKind, float]) -> ForceModel:
    xs = np.array(frame.x_lines(), dtype=float) / 1000.0
    ys = np.array(frame.y_lines(), dtype=float) / 1000.0
    c_count, r_count = frame.cols, frame.rows

    def node(p: int, q: int) -> int:
        return p * (c_count + 1) + q

    pts = {node(p, q): (xs[q], ys[p]) for p in range(r_count + 1) for q in range(c_count + 1)}
    bars: list[tuple[tuple[str, int, int, int, str], int, int, float, bool]] = []
    for p in range(r_count + 1):
        for j in range(1, c_count + 1):
            bars.append((("ledger", p, 0, j, ""), node(p, j - 1), node(p, j), grid_ea, False))
    for q in range(c_count + 1):
        for i in range(1, r_count + 1):
            bars.append((("standard", q, i, 0, ""), node(i - 1, q), node(i, q), grid_ea, False))
    for m in members:
        if m.diagonal is Diagonal.RISING:
            a, b = node(m.row - 1, m.col - 1), node(m.row, m.col)
        else:
            a, b = node(m.row, m.col - 1), node(m.row - 1, m.col)
        bars.append(((m.kind.value, 0, m.row, m.col, m.diagonal.value), a, b, ea[m.kind], m.kind is MemberKind.TIE))
    n_dof = 2 * len(pts)
    a_full = np.zeros((n_dof, len(bars)))
    lengths = np.zeros(len(bars))
    for k, (_, a, b, _, _) in enumerate(bars):
        d = np.array(pts[b]) - np.array(pts[a])
        length = float(np.hypot(*d))
        e = d / length
        lengths[k] = length
        # a tension pulls node a towards b and node b towards a
        a_full[2 * a : 2 * a + 2, k] = e
        a_full[2 * b : 2 * b + 2, k] = -e
    fixed = np.zeros(n_dof, dtype=bool)
    if frame.supports is Supports.BASE:
        for q in range(c_count + 1):
            fixed[2 * node(0, q) : 2 * node(0, q) + 2] = True
    for edge in frame.held_edges:
        if edge in (Edge.BOTTOM, Edge.TOP):
            p = 0 if edge is Edge.BOTTOM else r_count
            for q in range(c_count + 1):
                fixed[2 * node(p, q)] = True
        else:
            q = 0 if edge is Edge.LEFT else c_count
            for p in range(r_count + 1):
                fixed[2 * node(p, q) + 1] = True
    free = np.flatnonzero(~fixed)
    return ForceModel(
        keys=[b[0] for b in bars],
        lengths=lengths,
        ea=np.array([b[3] for b in bars]),
        tie=np.array([b[4] for b in bars]),
        # equilibrium at a node: sum of member forces on it + load = 0, i.e. -A t = f
        equilibrium=-a_full[free],
        free=free,
    )


def line_loads(frame: Frame, horizontal: Sequence[float], vertical: Sequence[float] = ()) -> np.ndarray:
    """Nodal loads (kN) written out again from the tributary rule of docs/project-file.md."""
    c_count, r_count = frame.cols, frame.rows
    w = [0, *frame.widths, 0]
    h = [0, *frame.heights, 0]
    f = np.zeros(2 * (r_count + 1) * (c_count + 1))
    for p, load in enumerate(horizontal):
        for q in range(c_count + 1):
            f[2 * (p * (c_count + 1) + q)] += load * (w[q] + w[q + 1]) / (2 * frame.width_mm)
    for q, load in enumerate(vertical):
        for p in range(r_count + 1):
            f[2 * (p * (c_count + 1) + q) + 1] += load * (h[p] + h[p + 1]) / (2 * frame.height_mm)
    return f


def complementary_energy_forces(model: ForceModel, loads: np.ndarray) -> np.ndarray | None:
    """Member forces minimising the complementary energy (None if no statically admissible set exists)."""
    import cvxpy as cp

    t = cp.Variable(len(model.keys))
    flex = model.lengths / model.ea
    scale = float(np.abs(loads).max()) or 1.0
    constraints = [model.equilibrium @ t == loads[model.free] / scale]
    if model.tie.any():
        constraints.append(t[np.flatnonzero(model.tie)] >= 0)
    problem = cp.Problem(cp.Minimize(0.5 * cp.sum(cp.multiply(flex / flex.max(), cp.square(t)))), constraints)
    with warnings.catch_warnings():
        # "solution may be inaccurate" at these tight tolerances: the test compares to 1e-6 anyway
        warnings.simplefilter("ignore", UserWarning)
        try:
            problem.solve(solver=cp.CLARABEL, tol_gap_abs=1e-12, tol_gap_rel=1e-12, tol_feas=1e-12, max_iter=400)
        except cp.error.SolverError:  # the tightest tolerances can stall; Clarabel's defaults are 1e-8
            problem.solve(solver=cp.CLARABEL, tol_gap_abs=1e-10, tol_gap_rel=1e-10, tol_feas=1e-10, max_iter=400)
    if problem.status not in (cp.OPTIMAL, cp.OPTIMAL_INACCURATE):
        return None
    return np.asarray(t.value, dtype=float) * scale


def statics_forces(model: ForceModel, loads: np.ndarray, *, drop: Sequence[int] = ()) -> np.ndarray:
    """Member forces from equilibrium alone (determinate layouts): a square dense solve.

    Bars in ``drop`` (slack ties, or bars between two supported nodes) carry zero and are left out.
    """
    keep = [k for k in range(len(model.keys)) if k not in set(drop)]
    a = model.equilibrium[:, keep]
    assert a.shape[0] == a.shape[1], f"not square: {a.shape}"
    t = np.zeros(len(model.keys))
    t[keep] = np.linalg.solve(a, loads[model.free])
    return t
