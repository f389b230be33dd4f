"""Independent physical reference: first-order rigidity of the real bar framework.

This module does not use the row/column digraph at all. It builds the
pin-jointed bar framework of a frame (every grid node, every horizontal and
vertical bar, every diagonal at its true coordinates) and decides, with
general-purpose linear algebra, whether any motion other than a rigid-body
motion exists:

* bars and rigid braces keep their length to first order: ``A_eq v = 0``
  (rows of the rigidity matrix; the rank test is the classical one, e.g.
  Graver, Servatius & Servatius, *Combinatorial Rigidity*, AMS 1993, ch. 2);
* a tension-only tie may shorten but not lengthen: ``a_tie . v <= 0``;
* a free frame has 3 rigid-body motions (2 translations, 1 rotation); on a
  pinned base every node of the bottom line is held (v = 0) and none remain.

Braces only: rigid iff the null space of ``A_eq`` (less rigid-body motions)
is trivial (numpy SVD rank). With ties: restrict to that null space,
``v = Z w``, and ask scipy.optimize.linprog whether some ``w`` lengthens no tie
yet moves (``M w <= 0`` with ``M w != 0``), after checking ``rank M`` equals
``dim w``. Tie rows that are numerically zero (the tie's length is already
fixed by braces) are dropped, not normalised: normalising them would invent a
constraint that is not there.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from scipy.linalg import null_space
from scipy.optimize import linprog

from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports

_TOL = 1e-9


def _bar_row(n_dof: int, pa: np.ndarray, pb: np.ndarray, ia: int, ib: int) -> np.ndarray:
    row = np.zeros(n_dof)
    d = pa - pb
    row[2 * ia : 2 * ia + 2] = d
    row[2 * ib : 2 * ib + 2] = -d
    return row


def rigidity_rows(frame: Frame, members: Sequence[Member]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Equality rows (bars, braces), tie rows, and node coordinates in metres."""
    xs = np.array(frame.x_lines(), dtype=float) / 1000.0
    ys = np.array(frame.y_lines(), dtype=float) / 1000.0
    rows, cols = frame.rows, frame.cols

    def node(p: int, q: int) -> int:
        return p * (cols + 1) + q

    coords = np.array([[xs[q], ys[p]] for p in range(rows + 1) for q in range(cols + 1)])
    n_dof = 2 * len(coords)
    eq: list[np.ndarray] = []
    for p in range(rows + 1):
        for q in range(cols):
            a, b = node(p, q), node(p, q + 1)
            eq.append(_bar_row(n_dof, coords[a], coords[b], a, b))
    for p in range(rows):
        for q in range(cols + 1):
            a, b = node(p, q), node(p + 1, q)
            eq.append(_bar_row(n_dof, coords[a], coords[b], a, b))
    ties: list[np.ndarray] = []
    for m in members:
        i, j = m.row, m.col
        if m.diagonal is Diagonal.RISING:
            a, b = node(i - 1, j - 1), node(i, j)
        else:
            a, b = node(i, j - 1), node(i - 1, j)
        r = _bar_row(n_dof, coords[a], coords[b], a, b)
        (eq if m.kind is MemberKind.BRACE else ties).append(r)
    tie_rows = np.array(ties) if ties else np.zeros((0, n_dof))
    return np.array(eq), tie_rows, coords


def _free_dofs(frame: Frame, coords: np.ndarray) -> np.ndarray:
    n = len(coords)
    keep = np.ones(2 * n, dtype=bool)
    if frame.supports is Supports.BASE:
        for q in range(frame.cols + 1):  # bottom line: nodes 0..C
            keep[2 * q : 2 * q + 2] = False
    return keep


def _motion_space(frame: Frame, eq: np.ndarray, coords: np.ndarray, keep: np.ndarray) -> np.ndarray:
    """Orthonormal basis of first-order motions that are not rigid-body motions."""
    basis = null_space(eq[:, keep], rcond=_TOL)
    if frame.supports is Supports.BASE or basis.shape[1] == 0:
        return basis
    n = len(coords)
    trivial = np.zeros((2 * n, 3))
    trivial[0::2, 0] = 1.0
    trivial[1::2, 1] = 1.0
    trivial[0::2, 2] = -coords[:, 1]
    trivial[1::2, 2] = coords[:, 0]
    t, _ = np.linalg.qr(trivial)
    projected = basis - t @ (t.T @ basis)
    u, s, _ = np.linalg.svd(projected, full_matrices=False)
    return u[:, s > 1e-7]


def physically_rigid(frame: Frame, members: Sequence[Member] | None = None) -> bool:
    """Whether the bar framework with these diagonals has no first-order mechanism.

    Args:
        frame: Sizes and supports.
        members: Diagonals in place (default: the frame's own).

    Returns:
        True iff every motion that lengthens no tie and keeps every bar and
        brace length is a rigid-body motion.
    """
    layout = frame.members if members is None else members
    eq, tie_rows, coords = rigidity_rows(frame, layout)
    keep = _free_dofs(frame, coords)
    z = _motion_space(frame, eq, coords, keep)
    dim = z.shape[1]
    if dim == 0:
        return True
    m = tie_rows[:, keep] @ z if len(tie_rows) else np.zeros((0, dim))
    norms = np.linalg.norm(m, axis=1)
    m = m[norms > 1e-9]
    if len(m) == 0 or np.linalg.matrix_rank(m, tol=1e-9) < dim:
        return False  # some motion keeps every tie length: a mechanism
    # Some w with M w <= 0 and M w != 0 lengthens no tie and moves the frame.
    res = linprog(
        c=m.sum(axis=0),
        A_ub=np.vstack([m, -m]),
        b_ub=np.concatenate([np.zeros(len(m)), np.ones(len(m))]),
        bounds=[(None, None)] * dim,
        method="highs",
    )
    if res.status != 0:
        msg = f"linprog failed: {res.message}"
        raise RuntimeError(msg)
    return bool(res.fun > -1e-7)
