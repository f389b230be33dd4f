"""Independent reference for general frames: first-order rigidity of the bar framework with missing
grid bars and absent bays, by floating-point linear algebra (numpy SVD) and scipy's linprog.

It does not import the product's rigidity, grid-bar or digraph code: it reads the frame's plain
fields (sizes, supports, held edges, ``absent``, ``missing``) and works out itself which grid bars
exist (a segment exists when one of the two bays it borders is on the grid and not absent, and it
is not listed missing), which nodes exist (the ends of existing segments) and the full rigidity
matrix over every node's two displacements, as in tests/physics.py:

* bars and braces keep their length to first order (rows of the rigidity matrix; Graver,
  Servatius & Servatius, *Combinatorial Rigidity*, AMS 1993, ch. 2);
* a tie may shorten, never lengthen;
* supports fix degrees of freedom: a pinned base both at every existing node of line 0; a held
  edge fixes x (bottom, top) or y (left, right) at its existing nodes;
* the rigid-body motions the supports leave are taken out.

Rigid iff every motion that keeps every bar and brace and lengthens no tie is such a rigid-body
motion: the null space of the bar rows (SVD) restricted by the tie rows, decided by one LP.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from scipy.linalg import null_space
from scipy.optimize import linprog

from bracegrid.model import Frame, Member

_TOL = 1e-9


def _segments(frame: Frame) -> list[tuple[tuple[int, int], tuple[int, int]]]:
    """Existing grid bar segments as node pairs ((p, q), (p, q))."""
    gone = {(b.kind.value, b.line, b.span) for b in frame.missing}
    rows, cols = frame.rows, frame.cols

    def bay(i: int, j: int) -> bool:
        return 1 <= i <= rows and 1 <= j <= cols and (i, j) not in frame.absent

    out = []
    for p in range(rows + 1):
        for j in range(1, cols + 1):
            if ("ledger", p, j) not in gone and (bay(p, j) or bay(p + 1, j)):
                out.append(((p, j - 1), (p, j)))
    for q in range(cols + 1):
        for i in range(1, rows + 1):
            if ("standard", q, i) not in gone and (bay(i, q) or bay(i, q + 1)):
                out.append(((i - 1, q), (i, q)))
    return out


def general_physically_rigid(frame: Frame, members: Sequence[Member]) -> bool:
    """Whether the general frame with these diagonals has no first-order mechanism."""
    segs = _segments(frame)
    nodes = sorted({n for s in segs for n in s})
    index = {n: k for k, n in enumerate(nodes)}
    xs = np.array(frame.x_lines(), dtype=float) / 1000.0
    ys = np.array(frame.y_lines(), dtype=float) / 1000.0
    coords = np.array([[xs[q], ys[p]] for p, q in nodes])
    n = len(nodes)

    def row(a: tuple[int, int], b: tuple[int, int]) -> np.ndarray:
        r = np.zeros(2 * n)
        ia, ib = index[a], index[b]
        d = coords[ib] - coords[ia]
        r[2 * ia : 2 * ia + 2] = -d
        r[2 * ib : 2 * ib + 2] = d
        return r

    eq = [row(a, b) for a, b in segs]
    ties = []
    for m in members:
        i, j = m.row, m.col
        a, b = ((i - 1, j - 1), (i, j)) if m.diagonal.value == "rising" else ((i, j - 1), (i - 1, j))
        (eq if m.kind.value == "brace" else ties).append(row(a, b))
    fixed = np.zeros(2 * n, dtype=bool)
    held = {e.value for e in frame.held_edges}
    for (p, q), k in index.items():
        if frame.supports.value == "base" and p == 0:
            fixed[2 * k : 2 * k + 2] = True
        if ("bottom" in held and p == 0) or ("top" in held and p == frame.rows):
            fixed[2 * k] = True
        if ("left" in held and q == 0) or ("right" in held and q == frame.cols):
            fixed[2 * k + 1] = True
    keep = ~fixed
    a_eq = np.array(eq)[:, keep]
    basis = null_space(a_eq, rcond=_TOL)
    trivial = np.zeros((2 * n, 3))
    trivial[0::2, 0] = 1.0
    trivial[1::2, 1] = 1.0
    trivial[0::2, 2] = -coords[:, 1]
    trivial[1::2, 2] = coords[:, 0]
    allowed = trivial @ null_space(trivial[fixed], rcond=_TOL) if fixed.any() else trivial
    allowed = allowed[keep]
    if basis.shape[1] and allowed.shape[1]:
        t, _ = np.linalg.qr(allowed)
        basis = basis - t @ (t.T @ basis)
    if basis.shape[1] == 0:
        return True
    u, s, _ = np.linalg.svd(basis, full_matrices=False)
    z = u[:, s > 1e-7]
    dim = z.shape[1]
    if dim == 0:
        return True
    m = np.array(ties)[:, keep] @ z if ties else np.zeros((0, dim))
    m = m[np.linalg.norm(m, axis=1) > 1e-9]
    if len(m) == 0 or np.linalg.matrix_rank(m, tol=1e-9) < dim:
        return False
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
