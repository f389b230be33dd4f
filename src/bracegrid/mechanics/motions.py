"""First-order motions of a complete grid in racking coordinates: free parts, supports, load work.

With every standard and ledger present, the first-order motions of the bar framework are exactly
the racking motions of the row/column digraph (docs/theory.md): every node on horizontal line p
moves sideways by the same ``U_p`` and every node on vertical line q up by the same ``V_q``. The
coordinates used here are ``z = [U_0, V_0, x_0, ..., x_{R+C-1}]`` where ``x_v`` is the racking of
digraph node v (rows first, then columns, as numbered by :mod:`bracegrid.analysis.digraph`), so

    U_p = U_0 + sum_{i <= p} h_i r_i,      V_q = V_0 - sum_{j <= q} w_j c_j.

Supports are linear equations in z with whole-millimetre coefficients, which is what lets the free
motions (the lineality) be found exactly, in rational arithmetic. Whether a load case drives a
motion that no member resists is a small linear programme over the digraph's cone.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from fractions import Fraction

import numpy as np
from scipy.optimize import linprog

from bracegrid.analysis import build_arcs
from bracegrid.analysis.digraph import bay_nodes, member_arrays, node_count, strong_components
from bracegrid.mechanics.framework import FloatArray, IntArray, node_index
from bracegrid.model import Edge, Frame, Member, Supports

#: A load drives a motion when its work over the box |z| <= 1 exceeds this fraction of the largest
#: possible work sum |coefficients|. The LP (HiGHS) meets its constraints to about 1e-9 of their
#: size, so a smaller threshold could report noise as a mechanism; a load that does work of 1e-6 of
#: its size on a motion no member resists is, for the user, a mechanism.
DRIVEN_REL = 1e-6


def z_size(frame: Frame) -> int:
    """Number of racking coordinates: U_0, V_0 and one per row and column."""
    return 2 + frame.rows + frame.cols


def z_of_row(i: int) -> int:
    """Index in z of the racking of row i (1-based)."""
    return 2 + bay_nodes(0, i - 1, 0)[0]


def z_of_col(frame: Frame, j: int) -> int:
    """Index in z of the racking of column j (1-based)."""
    return 2 + bay_nodes(frame.rows, 0, j - 1)[1]


def support_equations(frame: Frame) -> list[list[int]]:
    """Rows ``a`` (whole numbers, over z) with ``a . z = 0`` for every motion the supports allow.

    Example:
        >>> from bracegrid.model import Edge
        >>> support_equations(Frame("f", (3000,), (2000,), held_edges=frozenset({Edge.TOP})))
        [[1, 0, 2000, 0]]
    """
    size = z_size(frame)
    rows: list[list[int]] = []

    def unit(k: int) -> list[int]:
        row = [0] * size
        row[k] = 1
        return row

    if frame.supports is Supports.BASE:
        # U_0 = 0 and V_q = 0 for every q: V_0 = 0 and every column's racking is 0
        rows += [unit(0), unit(1)] + [unit(z_of_col(frame, j)) for j in range(1, frame.cols + 1)]
    held = frame.held_edges
    if Edge.BOTTOM in held:
        rows.append(unit(0))
    if Edge.TOP in held:
        row = unit(0)
        for i, h in enumerate(frame.heights, start=1):
            row[z_of_row(i)] = h
        rows.append(row)
    if Edge.LEFT in held:
        rows.append(unit(1))
    if Edge.RIGHT in held:
        row = unit(1)
        for j, w in enumerate(frame.widths, start=1):
            row[z_of_col(frame, j)] = -w
        rows.append(row)
    return rows


def node_motion(frame: Frame, z: FloatArray) -> FloatArray:
    """Nodal displacements (2 per node, node order of the framework) of a racking motion z.

    Example:
        >>> node_motion(Frame("f", (3000,), (2000,)), np.array([0.0, 0.0, 1.0, 1.0])).tolist()
        [0.0, 0.0, 0.0, -3000.0, 2000.0, 0.0, 2000.0, -3000.0]
    """
    r_count, c_count = frame.rows, frame.cols
    r = np.array([z[z_of_row(i)] for i in range(1, r_count + 1)])
    c = np.array([z[z_of_col(frame, j)] for j in range(1, c_count + 1)])
    u_line = z[0] + np.concatenate([[0.0], np.cumsum(np.array(frame.heights, dtype=np.float64) * r)])
    v_line = z[1] - np.concatenate([[0.0], np.cumsum(np.array(frame.widths, dtype=np.float64) * c)])
    out = np.zeros(2 * (r_count + 1) * (c_count + 1))
    for p in range(r_count + 1):
        for q in range(c_count + 1):
            n = node_index(frame, p, q)
            out[2 * n] = u_line[p]
            out[2 * n + 1] = v_line[q]
    return out


def work_coefficients(frame: Frame, loads: FloatArray) -> FloatArray:
    """Coefficients ``c`` with ``c . z`` the work of the nodal loads on the racking motion z.

    Example:
        >>> f = Frame("f", (3000,), (2000,))
        >>> work_coefficients(f, np.array([0.0, 0, 0, 0, 1.0, 0, 0, 0])).tolist()
        [1.0, 0.0, 2000.0, 0.0]
    """
    r_count, c_count = frame.rows, frame.cols
    grid = loads.reshape(r_count + 1, c_count + 1, 2)
    fx_line = grid[:, :, 0].sum(axis=1)  # per horizontal line p
    fy_line = grid[:, :, 1].sum(axis=0)  # per vertical line q
    out = np.zeros(z_size(frame))
    out[0] = fx_line.sum()
    out[1] = fy_line.sum()
    above = np.cumsum(fx_line[::-1])[::-1]  # sum over p >= i
    right = np.cumsum(fy_line[::-1])[::-1]  # sum over q >= j
    for i, h in enumerate(frame.heights, start=1):
        out[z_of_row(i)] = h * above[i]
    for j, w in enumerate(frame.widths, start=1):
        out[z_of_col(frame, j)] = -w * right[j]
    return out + 0.0  # no negative zeros


def member_parts(frame: Frame, members: Sequence[Member]) -> tuple[int, IntArray]:
    """Parts of rows and columns joined by members of any kind (a tie counted as a bar).

    Returns:
        (count, label of each digraph node except the ground).
    """
    nodes = frame.rows + frame.cols
    if not members:
        return nodes, np.arange(nodes, dtype=np.int64)
    rows, cols, _, _ = member_arrays(members)
    pairs = np.array([bay_nodes(frame.rows, int(i) - 1, int(j) - 1) for i, j in zip(rows, cols, strict=True)])
    src = np.concatenate([pairs[:, 0], pairs[:, 1]]).astype(np.int64)
    dst = np.concatenate([pairs[:, 1], pairs[:, 0]]).astype(np.int64)
    return strong_components(nodes, src, dst)


@dataclass(frozen=True, slots=True)
class FreeMotions:
    """Motions that change no member's length (every tie counted as a bar) and that the supports allow.

    Attributes:
        basis: One racking motion z per row, shape (k, size of z); k = 0 when there are none.
        internal: True when some of them bend the frame (not a rigid motion of the whole frame):
            a part that no member holds.
    """

    basis: FloatArray
    internal: bool

    @property
    def count(self) -> int:
        """Dimension of the free motions."""
        return int(self.basis.shape[0])


def _null_space(rows: list[list[int]], size: int) -> list[list[Fraction]]:
    """Exact basis of ``{y : A y = 0}`` by Gauss-Jordan elimination over the rationals."""
    matrix = [[Fraction(v) for v in row] for row in rows if any(row)]
    pivots: list[int] = []
    r = 0
    for col in range(size):
        pivot = next((k for k in range(r, len(matrix)) if matrix[k][col] != 0), None)
        if pivot is None:
            continue
        matrix[r], matrix[pivot] = matrix[pivot], matrix[r]
        lead = matrix[r][col]
        matrix[r] = [v / lead for v in matrix[r]]
        for k in range(len(matrix)):
            if k != r and matrix[k][col] != 0:
                factor = matrix[k][col]
                matrix[k] = [a - factor * b for a, b in zip(matrix[k], matrix[r], strict=True)]
        pivots.append(col)
        r += 1
        if r == len(matrix):
            break
    free = [c for c in range(size) if c not in pivots]
    basis = []
    for f in free:
        y = [Fraction(0)] * size
        y[f] = Fraction(1)
        for k, pc in enumerate(pivots):
            y[pc] = -matrix[k][f]
        basis.append(y)
    return basis


def free_motions(frame: Frame, members: Sequence[Member]) -> FreeMotions:
    """The motions no member resists in either sense, exactly (rational arithmetic).

    Each part of rows and columns joined by members racks as one value; the supports are a few
    linear equations on those values and on U_0, V_0, solved exactly over the rationals (the
    coefficients are whole millimetres), so "free or not" is never a floating-point judgement.

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind, Supports
        >>> f = Frame("f", (3000,), (2000, 2000), supports=Supports.BASE)
        >>> free_motions(f, [Member(1, 1, MemberKind.TIE, Diagonal.RISING)]).count
        1
    """
    count, labels = member_parts(frame, members)
    size = z_size(frame)
    equations = support_equations(frame)
    # variables y = [U_0, V_0, alpha_0 .. alpha_{count-1}]; z[2 + v] = alpha[label[v]]
    reduced = []
    for row in equations:
        out = [row[0], row[1]] + [0] * count
        for v in range(size - 2):
            out[2 + int(labels[v])] += row[2 + v]
        reduced.append(out)
    basis_y = _null_space(reduced, 2 + count)
    basis = np.zeros((len(basis_y), size))
    internal = False
    for k, y in enumerate(basis_y):
        alphas = y[2:]
        if any(a != alphas[0] for a in alphas):
            internal = True
        basis[k, 0], basis[k, 1] = float(y[0]), float(y[1])
        basis[k, 2:] = [float(alphas[int(labels[v])]) for v in range(size - 2)]
    return FreeMotions(basis=basis, internal=internal)


def driven_motion(frame: Frame, members: Sequence[Member], work: FloatArray) -> FloatArray | None:
    """A first-order motion that lengthens no tie, keeps every brace, and on which the load does work.

    The motions form the cone ``x_u <= x_v`` over the arcs of the layout's digraph, cut by the
    support equations; this maximises the load's work over that cone within the box |z| <= 1
    (HiGHS through scipy). The digraph's arcs come from :func:`bracegrid.analysis.build_arcs`.

    Returns:
        The motion z (scaled to the box), or None when the load does no work on any motion.

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind, Supports
        >>> f = Frame("f", (3000,), (2000,), supports=Supports.BASE)
        >>> tie = [Member(1, 1, MemberKind.TIE, Diagonal.RISING)]
        >>> driven_motion(f, tie, np.array([1.0, 0.0, 2000.0, 0.0])) is None   # pushed right: held
        True
        >>> driven_motion(f, tie, np.array([-1.0, 0.0, -2000.0, 0.0])).tolist()  # pushed left: racks
        [0.0, 0.0, -1.0, 0.0]
    """
    scale = float(np.abs(work).sum())
    if scale == 0.0:
        return None
    size = z_size(frame)
    arcs = build_arcs(frame, members)
    ground = node_count(frame) - 1 if frame.supports is Supports.BASE else -1
    keep = (arcs.src != ground) & (arcs.dst != ground)
    src, dst = arcs.src[keep], arcs.dst[keep]
    a_ub = np.zeros((len(src), size))
    a_ub[np.arange(len(src)), 2 + src] = 1.0
    a_ub[np.arange(len(src)), 2 + dst] -= 1.0
    equations = support_equations(frame)
    a_eq = np.array(equations, dtype=np.float64) if equations else None
    result = linprog(
        c=-work / scale,
        A_ub=a_ub if len(src) else None,
        b_ub=np.zeros(len(src)) if len(src) else None,
        A_eq=a_eq,
        b_eq=np.zeros(len(equations)) if equations else None,
        bounds=[(-1.0, 1.0)] * size,
        method="highs",
    )
    if result.status != 0:  # the box keeps it bounded and z = 0 is feasible: any failure is ours
        msg = f"the mechanism check's linear programme failed: {result.message}"
        raise RuntimeError(msg)
    z = np.asarray(result.x, dtype=np.float64)
    z[np.abs(z) < 1e-9] = 0.0
    return z if float(work @ z) > DRIVEN_REL * scale else None
