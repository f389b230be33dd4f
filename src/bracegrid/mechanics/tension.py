"""The tension-only equilibrium: semismooth Newton with an exact line search on the potential.

With ties that may go slack, the equilibrium displacement minimises the convex, piecewise
quadratic potential

    P(u) = 1/2 sum_bars k g^2 + 1/2 sum_ties k max(g, 0)^2 - f . u,      g = B u,

(g the elongations, k = EA / L). Its gradient ``B^T t - f`` with ``t = k g`` (bars) and
``t = k max(g, 0)`` (ties) is the out-of-balance force, so a minimiser is an equilibrium in which
no tie pushes. Each step solves with a generalised Hessian: every bar, and every tie that is taut or
just taut (elongation not below ``-TAUT_TOL`` of the largest), at full stiffness; the other ties
drop out. Where that leaves the Newton matrix singular (the taut members alone would not hold the
frame), the slack ties keep ``SLACK_STIFFNESS`` of their stiffness as a numerical device in the
matrix only; the potential, the gradient and every reported force use the true law, so a slack
tie's force is exactly 0. The step length is the exact minimiser of P along the step (P is a convex
piecewise quadratic along any line: sort the ties' switch points, walk the pieces).

Finite termination (exact arithmetic): the exact line search makes P decrease strictly and the
iterates converge to the minimiser (a descent method with uniformly bounded, positive definite step
matrices on a function bounded below with a unique set of forces); once an iterate lies in a piece
whose closure holds the minimiser, that piece's quadratic is minimised there too (a just-taut tie
adds nothing to the gradient either way), so the full Newton step lands on it and the exact line
search takes it. In floating point the loop stops when the out-of-balance force is at rounding level.

References:
    M. Hintermueller, K. Ito and K. Kunisch, "The primal-dual active set strategy as a semismooth
    Newton method", SIAM J. Optim. 13(3), 865-888 (2002), doi:10.1137/S1052623401383558.
    Y. Kanno, *Nonsmooth Mechanics and Convex Optimization*, CRC Press (2011).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from scipy.sparse import csr_matrix

from bracegrid.mechanics.framework import BoolArray, FloatArray
from bracegrid.mechanics.stiffness import Factorisation

#: A tie whose elongation is above -TAUT_TOL x (largest |elongation|) counts as taut in the Newton
#: matrix. At the solution such a tie carries (almost) nothing either way, and counting it taut keeps
#: the matrix of a lift with zero shear non-singular. 1e-12 is far below any elongation that carries
#: a force worth reporting and far above rounding (1e-16).
TAUT_TOL = 1e-12
#: Share of its stiffness a slack tie keeps in the Newton matrix when the taut members alone leave it
#: singular: small enough that the step is the Newton step of the taut structure to 1e-8, large
#: enough that the matrix's conditioning stays within double precision for stiffness ratios up to
#: about 1e6.
SLACK_STIFFNESS = 1e-8
#: Stop when the largest out-of-balance force is below STOP_REL x (sum of |load|): rounding level.
STOP_REL = 1e-14
#: Accept the equilibrium only if the largest out-of-balance force is below ACCEPT_REL x (sum of
#: |load|): the figure the tests and docs promise. Between STOP_REL and this, the loop stops when it
#: no longer improves (rounding floor of a tall frame with large standard forces).
ACCEPT_REL = 1e-9
#: Newton steps allowed. Active sets settle in a handful of steps (the benchmark prints counts).
MAX_STEPS = 200


@dataclass(frozen=True, slots=True)
class Equilibrium:
    """The outcome of the tension-only solve.

    Attributes:
        bounded: False when the potential has no minimum (the load drives a mechanism); the other
            fields then hold the last iterate and mean nothing.
        displacement: Free displacements, mm.
        elongation: Every bar's elongation, mm.
        force: Every bar's axial force, kN (tension +; exactly 0 in a slack tie).
        residual: Largest out-of-balance force at a free degree of freedom, kN.
        steps: Newton steps taken.
    """

    bounded: bool
    displacement: FloatArray
    elongation: FloatArray
    force: FloatArray
    residual: float
    steps: int


def bar_forces(elongation: FloatArray, stiffness: FloatArray, tension_only: BoolArray) -> FloatArray:
    """Axial forces: ``k g`` for bars, ``k max(g, 0)`` for ties (a slack tie gives exactly 0).

    Example:
        >>> bar_forces(np.array([1.0, -1.0, -1.0]), np.array([2.0, 2.0, 2.0]), np.array([False, False, True]))
        array([ 2., -2.,  0.])
    """
    g = np.where(tension_only, np.maximum(elongation, 0.0), elongation)
    out: FloatArray = stiffness * g
    return out


def exact_step(
    elongation: FloatArray, change: FloatArray, stiffness: FloatArray, tension_only: BoolArray, load_work: float
) -> float | None:
    """The step length minimising the potential along a direction (None: it decreases for ever).

    Along ``u + a d`` the slope of the potential is
    ``sum_bars k (g + a dg) dg + sum_ties k max(g + a dg, 0) dg - f.d``, piecewise linear and
    non-decreasing in a, with a kink where a tie's elongation crosses zero. The pieces are walked in
    order of their switch points; the root of the slope is the exact minimiser.

    Args:
        elongation: g at a = 0.
        change: dg = B d.
        stiffness: k of every bar.
        tension_only: Ties.
        load_work: f . d.

    Returns:
        The minimising a >= 0.

    Example:
        >>> k, tie = np.array([1.0]), np.array([True])
        >>> exact_step(np.array([-1.0]), np.array([1.0]), k, tie, 2.0)  # slack until a = 1, then k (a - 1) = 2
        3.0
    """
    bar = ~tension_only
    c0 = float(np.dot(stiffness[bar] * elongation[bar], change[bar])) - load_work
    c1 = float(np.dot(stiffness[bar] * change[bar], change[bar]))
    g, dg, k = elongation[tension_only], change[tension_only], stiffness[tension_only]
    moving = dg != 0.0
    g, dg, k = g[moving], dg[moving], k[moving]
    start = np.where(dg > 0, g >= 0, g > 0)  # taut just after a = 0
    c0 += float(np.dot(k[start] * g[start], dg[start]))
    c1 += float(np.dot(k[start] * dg[start], dg[start]))
    if c0 >= 0.0:
        return 0.0
    switch = -g / dg
    later = switch > 0
    order = np.argsort(switch[later], kind="stable")
    at = switch[later][order]
    sign = np.where(dg[later] > 0, 1.0, -1.0)[order]  # +1: becomes taut, -1: goes slack
    dc0 = sign * (k[later] * g[later] * dg[later])[order]
    dc1 = sign * (k[later] * dg[later] * dg[later])[order]
    before0 = c0 + np.concatenate([[0.0], np.cumsum(dc0)])  # slope pieces: piece m runs up to at[m]
    before1 = c1 + np.concatenate([[0.0], np.cumsum(dc1)])
    slope_at = before0[:-1] + before1[:-1] * at
    hit = np.flatnonzero(slope_at >= 0.0)
    if len(hit):
        m = int(hit[0])
    else:
        m = len(at)
        scale = float(np.dot(stiffness * change, change))
        if before1[m] <= 1e-12 * scale:  # flat and still falling: no minimum along this line
            return None
    a0, a1 = float(before0[m]), float(before1[m])
    low = float(at[m - 1]) if m > 0 else 0.0
    return max(low, -a0 / a1) if a1 > 0 else low


def solve_tension_only(
    compat: csr_matrix,
    stiffness: FloatArray,
    tension_only: BoolArray,
    load: FloatArray,
    newton_matrix: Callable[[BoolArray], Factorisation],
) -> Equilibrium:
    """Minimise the tension-only potential by semismooth Newton with exact line searches.

    Args:
        compat: B, elongations per free displacement (bars x free dofs).
        stiffness: k = EA / L of every bar, kN/mm.
        tension_only: True for ties.
        load: Nodal loads at the free degrees of freedom, kN.
        newton_matrix: Gives the factorised Newton matrix for a set of taut bars (every non-tie
            bar is always taut); the caller decides the slack stiffness and caches.

    Returns:
        The equilibrium, or ``bounded=False`` when the load drives a mechanism.
    """
    total = float(np.abs(load).sum())
    stop = STOP_REL * total
    u = np.zeros(compat.shape[1])
    g = np.zeros(compat.shape[0])
    best = np.inf
    flat = 0
    previous = b""
    steps = 0
    residual = float(np.abs(load).max()) if len(load) else 0.0
    while True:
        t = bar_forces(g, stiffness, tension_only)
        grad = compat.T @ t - load
        residual = float(np.abs(grad).max()) if len(grad) else 0.0
        if residual <= stop or steps >= MAX_STEPS:
            break
        scale = float(np.abs(g).max()) if len(g) else 0.0
        taut = ~tension_only | (g >= -TAUT_TOL * scale)
        key = taut.tobytes()
        # Once the taut set repeats, the steps only refine: stop when rounding stops the progress
        # (two steps on the same set without halving the imbalance).
        if key == previous and residual >= 0.5 * best:
            flat += 1
            if flat >= 2:
                break
        else:
            flat = 0
        best = min(best, residual) if key == previous else residual
        previous = key
        direction = -newton_matrix(taut).solve(grad)
        change = compat @ direction
        step = exact_step(g, change, stiffness, tension_only, float(load @ direction))
        steps += 1
        if step is None:
            return Equilibrium(False, u, g, t, residual, steps)
        if step == 0.0:
            break
        u = u + step * direction
        g = compat @ u
    t = bar_forces(g, stiffness, tension_only)
    return Equilibrium(True, u, g, t, residual, steps)
