"""The exact first-order rigidity check of any frame: rigidity matrix, exact rank, proper self-stress.

A frame with its layout is a bar-and-joint framework: present grid bars and braces are rigid bars,
ties are tension-only (they may shorten, never lengthen). By Roth and Whiteley (Trans. AMS 265
(1981) 419-446, Thm 5.2) it is first-order rigid iff (a) the framework with every member as a bar
is infinitesimally rigid, and (b) when ties are present, it carries a proper self-stress: an
equilibrium stress strictly positive (tension) on every tie. Supports are fixed degrees of freedom.

Exact reduction. A ledger between nodes a and b has the rigidity row ``w (u_b - u_a)_x = 0``: both
ends share one horizontal displacement; a standard makes its ends share one vertical displacement.
So the grid bars are eliminated exactly by union-find: every chain of ledgers is one
*x-class* with one unknown U, every chain of standards one *y-class* with one unknown V (on a
complete grid: the R + 1 horizontal and C + 1 vertical grid lines of docs/theory.md). A diagonal
from a to b with integer offsets (dx, dy) mm then gives the integer row
``dx (U_b - U_a) + dy (V_b - V_a)``; a support fixes its class's unknown at 0. The reduced matrix
``A`` (members x free classes) has the same rank deficiency and the same self-stresses on the
diagonals as the full rigidity matrix (grid-bar stresses are then fixed by equilibrium).

Exact rank. ``G = A^T A`` is formed in exact integers (int64, guarded against overflow); over the
rationals ``rank G = rank A``. Its rank modulo the prime 2^61 - 1 can only underestimate the
rational rank, so full rank modulo the prime proves full rank; when the prime says "deficient" the
rank is recomputed by exact integer elimination (python-flint ``fmpz_mat``), and a deficient frame
gets an exact integer null vector: a flex.

Self-stress. With (a) proven, (b) is a linear feasibility problem solved by HiGHS: stresses ``w``
on the member rows (scaled to unit direction, so every coefficient is at most 1 in size) with
``A^T w = 0`` and ``w >= 1`` on every tie (the condition is a cone, so ``> 0`` and ``>= 1`` are the
same). The answer is re-checked: the residual must stay below ``STRESS_TOLERANCE`` times the largest
stress. When no proper stress exists, a second LP (the Farkas alternative) finds a motion that keeps
every brace, lengthens no tie and shortens some: the mechanism. Model limits: first order,
pin-jointed, rigid grid bars, no buckling and no second-order effects.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import flint
import numpy as np
import numpy.typing as npt
import scipy.sparse as sp
from scipy.optimize import linprog

from bracegrid.errors import NumericalError
from bracegrid.model import Diagonal, Edge, Frame, GridBarKind, Member, MemberKind, Supports, present_grid_bars

IntArray = npt.NDArray[np.int64]
FloatArray = npt.NDArray[np.float64]

#: The prime of the modular rank: 2^61 - 1 (a Mersenne prime; flint's nmod arithmetic takes any
#: word-size modulus). A random-looking fixed prime is enough: a wrong "deficient" is caught by
#: the exact fallback, and "full rank" modulo any prime is a proof.
PRIME = (1 << 61) - 1
#: A second prime (2^60 + 33, prime by flint's proven test) for the member screen of critical members.
PRIME_2 = (1 << 60) + 33
#: Relative residual accepted for a self-stress from the LP: HiGHS's primal feasibility tolerance
#: is 1e-7 absolute on rows whose coefficients are direction cosines (at most 1), so an honest
#: stress scaled to max 1 has a residual near 1e-7 per row; 1e-6 leaves a margin of ten, and a
#: frame whose best stress is that close to failing would be flagged by the flex LP instead.
STRESS_TOLERANCE = 1.0e-6
#: Smallest total tie shortening (ties scaled to shorten by at most 1) that counts as a mechanism in
#: the Farkas LP: well above the LP's 1e-7 feasibility tolerance, far below a real flex (>= 1).
FLEX_TOLERANCE = 1.0e-5
_INT64_SAFE = 1 << 62


@dataclass(frozen=True, slots=True)
class Reduced:
    """The frame's framework after the exact elimination of its grid bars.

    Attributes:
        nodes: Every present node (p, q), sorted.
        xclass: Index of each node's x-class (its U unknown), aligned with ``nodes``.
        yclass: Index of each node's y-class (its V unknown), offset by the number of x-classes.
        classes: Number of unknowns (x-classes then y-classes).
        fixed: True for an unknown a support holds at 0.
        members: The diagonals, in row order.
        tails: Start node index (into ``nodes``) of every member.
        heads: End node index of every member.
        offsets: Integer (dx, dy) mm from start to end of every member.
        coords: Integer (x, y) mm of every node.
    """

    nodes: tuple[tuple[int, int], ...]
    xclass: IntArray
    yclass: IntArray
    classes: int
    fixed: npt.NDArray[np.bool_]
    members: tuple[Member, ...]
    tails: IntArray
    heads: IntArray
    offsets: IntArray
    coords: IntArray

    def matrix(self) -> sp.csr_matrix:
        """The integer reduced rigidity matrix over all unknowns (members x classes)."""
        m = len(self.members)
        r = np.repeat(np.arange(m), 4)
        dx, dy = self.offsets[:, 0], self.offsets[:, 1]
        c = np.stack(
            [self.xclass[self.heads], self.xclass[self.tails], self.yclass[self.heads], self.yclass[self.tails]],
            axis=1,
        ).ravel()
        v = np.stack([dx, -dx, dy, -dy], axis=1).ravel()
        return sp.csr_matrix((v, (r, c)), shape=(m, self.classes), dtype=np.int64)

    def trivial(self) -> IntArray:
        """The rigid-body motions in class unknowns (classes x 3): x-translation, y-translation, rotation."""
        t = np.zeros((self.classes, 3), dtype=np.int64)
        t[self.xclass, 0] = 1
        t[self.yclass, 1] = 1
        t[self.xclass, 2] = -self.coords[:, 1]
        t[self.yclass, 2] = self.coords[:, 0]
        return t


@dataclass(frozen=True, slots=True)
class Rigidity:
    """The exact check's answer for one layout.

    Attributes:
        rigid: True iff the layout is first-order rigid.
        bar_rigid: Whether the framework with every member as a bar is rigid (rank proven exactly).
        flexes: Independent flexes of the all-bars framework beyond rigid-body motions (0 if bar-rigid).
        motion: A mechanism in class unknowns (None when rigid): exact integers when it comes from
            the null space, floats from the tie LP.
        exact_motion: True when ``motion`` is an exact integer null vector.
        prime_certified: True when full rank was proven modulo the prime (no rational elimination needed).
        reduced: The reduced framework the answer refers to.
        others: Further exact flexes (with ``motion``, a basis of the flexes beyond rigid-body motions,
            up to rigid-body parts), for the optimizer's cuts.
    """

    rigid: bool
    bar_rigid: bool
    flexes: int
    motion: tuple[float, ...] | tuple[int, ...] | None
    exact_motion: bool
    prime_certified: bool
    reduced: Reduced
    others: tuple[tuple[int, ...], ...] = ()

    def node_motion(self) -> FloatArray:
        """Displacement (x, y) of every present node under the mechanism (zeros when rigid)."""
        z = np.zeros(self.reduced.classes)
        if self.motion is not None:
            big = max(abs(float(v)) for v in self.motion) or 1.0
            z = np.array([float(v) / big for v in self.motion])
        return np.stack([z[self.reduced.xclass], z[self.reduced.yclass]], axis=1)


class _UnionFind:
    def __init__(self, n: int) -> None:
        self.parent = list(range(n))

    def find(self, a: int) -> int:
        root = a
        while self.parent[root] != root:
            root = self.parent[root]
        while self.parent[a] != root:
            self.parent[a], a = root, self.parent[a]
        return root

    def union(self, a: int, b: int) -> None:
        self.parent[self.find(a)] = self.find(b)


def _fixed_points(frame: Frame, nodes: dict[tuple[int, int], int]) -> tuple[list[int], list[int]]:
    """Node indices held in x and in y by the frame's supports (pinned base, held edges)."""
    hold_x: list[int] = []
    hold_y: list[int] = []
    for (p, q), k in nodes.items():
        if frame.supports is Supports.BASE and p == 0:
            hold_x.append(k)
            hold_y.append(k)
        if (Edge.BOTTOM in frame.held_edges and p == 0) or (Edge.TOP in frame.held_edges and p == frame.rows):
            hold_x.append(k)
        if (Edge.LEFT in frame.held_edges and q == 0) or (Edge.RIGHT in frame.held_edges and q == frame.cols):
            hold_y.append(k)
    return hold_x, hold_y


def reduce_frame(frame: Frame, members: Sequence[Member]) -> Reduced:
    """Eliminate the grid bars exactly (x- and y-classes) and list the members' integer rows.

    Raises:
        ValueError: If a member's corner node is not a node of the frame (the reader rejects such files).

    Example:
        >>> r = reduce_frame(Frame("f", (3000, 3000), (2000,)), [])
        >>> r.classes  # 2 horizontal lines + 3 vertical lines
        5
    """
    bars = present_grid_bars(frame)
    node_set = sorted({end for bar in bars for end in bar.ends()})
    index = {n: k for k, n in enumerate(node_set)}
    n = len(node_set)
    ux, uy = _UnionFind(n), _UnionFind(n)
    for bar in bars:
        a, b = (index[e] for e in bar.ends())
        (ux if bar.kind is GridBarKind.LEDGER else uy).union(a, b)
    xs, ys = frame.x_lines(), frame.y_lines()
    coords = np.array([[xs[q], ys[p]] for p, q in node_set], dtype=np.int64).reshape(-1, 2)
    xroot = [ux.find(k) for k in range(n)]
    yroot = [uy.find(k) for k in range(n)]
    xid = {r: k for k, r in enumerate(sorted(set(xroot)))}
    yid = {r: k + len(xid) for k, r in enumerate(sorted(set(yroot)))}
    xclass = np.array([xid[r] for r in xroot], dtype=np.int64)
    yclass = np.array([yid[r] for r in yroot], dtype=np.int64)
    classes = len(xid) + len(yid)
    fixed = np.zeros(classes, dtype=bool)
    hold_x, hold_y = _fixed_points(frame, index)
    fixed[xclass[hold_x]] = True
    fixed[yclass[hold_y]] = True
    tails: list[int] = []
    heads: list[int] = []
    for m in members:
        if m.diagonal is Diagonal.RISING:
            start, end = (m.row - 1, m.col - 1), (m.row, m.col)
        else:
            start, end = (m.row, m.col - 1), (m.row - 1, m.col)
        if start not in index or end not in index:
            msg = f"member {m.label} of frame {frame.name!r} ends at a node the frame does not have"
            raise ValueError(msg)
        tails.append(index[start])
        heads.append(index[end])
    t = np.array(tails, dtype=np.int64)
    h = np.array(heads, dtype=np.int64)
    offsets = (coords[h] - coords[t]) if len(members) else np.zeros((0, 2), dtype=np.int64)
    return Reduced(
        nodes=tuple(node_set), xclass=xclass, yclass=yclass, classes=classes, fixed=fixed,
        members=tuple(members), tails=t, heads=h, offsets=offsets, coords=coords,
    )  # fmt: skip


def rank_target(red: Reduced) -> tuple[int, IntArray, IntArray]:
    """The rank a rigid layout reaches, the free unknowns, and the rigid-body motions the supports leave.

    The motions are ``T alpha`` with ``T_fixed alpha = 0`` (T: :meth:`Reduced.trivial`), restricted
    to the free unknowns, as integer columns; the target is free unknowns less their number.
    """
    free = np.flatnonzero(~red.fixed)
    t = red.trivial()
    held = t[red.fixed]
    if held.size:
        basis, count = flint.fmpz_mat(held.tolist()).nullspace()
        alphas = np.array([[int(basis[i, k]) for k in range(count)] for i in range(3)], dtype=np.int64)
    else:
        alphas, count = np.eye(3, dtype=np.int64), 3
    motions = (t[free] @ alphas).reshape(len(free), count)
    return len(free) - count, free, motions


def _gram(a: sp.csr_matrix) -> list[list[int]]:
    """``A^T A`` in exact integers (int64 when the bound allows, Python integers otherwise)."""
    if a.nnz == 0:
        return [[0] * a.shape[1] for _ in range(a.shape[1])]
    biggest = int(np.abs(a.data).max())
    per_col = int(np.diff(a.tocsc().indptr).max())
    if biggest * biggest * per_col < _INT64_SAFE:
        g = (a.T @ a).toarray()
        out: list[list[int]] = g.tolist()
        return out
    exact = flint.fmpz_mat(a.toarray().tolist())
    prod = exact.transpose() * exact
    return [[int(prod[i, j]) for j in range(prod.ncols())] for i in range(prod.nrows())]


def _spread(v: Sequence[int]) -> tuple[int, int]:
    """How much of the frame a null vector moves: nonzero unknowns, then the largest entry."""
    return (sum(x != 0 for x in v), max(map(abs, v)))


def _exact_flexes(gram: list[list[int]], trivial: IntArray) -> list[tuple[int, ...]]:
    """Exact integer null vectors of the Gram matrix that are not rigid-body motions, most local first.

    Args:
        gram: ``A^T A`` over the free unknowns.
        trivial: The rigid-body motions the supports leave (columns, free unknowns).
    """
    basis, nullity = flint.fmpz_mat(gram).nullspace()
    vectors = [[int(basis[i, k]) for i in range(basis.nrows())] for k in range(nullity)]
    rows = trivial.tolist()
    base_rank = flint.fmpz_mat(rows).rank() if trivial.shape[1] else 0
    found: list[tuple[int, ...]] = []
    for v in vectors:
        if trivial.shape[1]:
            stacked = flint.fmpz_mat([[*row, v[i]] for i, row in enumerate(rows)])
            if stacked.rank() == base_rank:
                continue  # a rigid-body motion
        found.append(tuple(v))
    if not found:  # pragma: no cover - the rank count says a non-trivial null vector exists
        msg = "exact null space holds only rigid-body motions although the rank is deficient"
        raise NumericalError(msg)
    # the most local flex first: fewest unknowns moving, then the smallest entries
    return sorted(found, key=_spread)


def _unit_rows(red: Reduced, a: sp.csr_matrix) -> sp.csr_matrix:
    length = np.hypot(red.offsets[:, 0].astype(float), red.offsets[:, 1].astype(float))
    out: sp.csr_matrix = sp.diags(1.0 / length) @ a.astype(np.float64)
    return out.tocsr()


def _proper_stress(a_unit: sp.csr_matrix, ties: npt.NDArray[np.bool_]) -> bool:
    """Whether a self-stress positive on every tie exists (HiGHS, residual re-checked)."""
    m = a_unit.shape[0]
    bounds = [(1.0, None) if t else (None, None) for t in ties]
    res = linprog(np.zeros(m), A_eq=a_unit.T.tocsr(), b_eq=np.zeros(a_unit.shape[1]), bounds=bounds, method="highs")
    if res.status == 2:  # infeasible
        return False
    if res.status != 0:
        msg = f"the self-stress LP ended with HiGHS status {res.status} ({res.message}); the check is undecided"
        raise NumericalError(msg)
    w = np.asarray(res.x, dtype=float)
    scale = float(np.abs(w).max())
    residual = float(np.abs(a_unit.T @ w).max()) if a_unit.shape[1] else 0.0
    return bool(residual <= STRESS_TOLERANCE * max(scale, 1.0) and (w[ties] >= 1.0 - 1e-7).all())


def _tie_flex(a_unit: sp.csr_matrix, ties: npt.NDArray[np.bool_]) -> FloatArray | None:
    """A motion keeping every brace, lengthening no tie and shortening some (the Farkas LP), or None."""
    k = a_unit.shape[1]
    a_t = a_unit[np.flatnonzero(ties)]
    a_b = a_unit[np.flatnonzero(~ties)]
    # minimise the total tie elongation (<= 0) with each tie shortening by at most 1
    cost = np.asarray(a_t.sum(axis=0)).ravel()
    a_ub = sp.vstack([a_t, -a_t]).tocsr()
    b_ub = np.concatenate([np.zeros(a_t.shape[0]), np.ones(a_t.shape[0])])
    res = linprog(
        cost, A_ub=a_ub, b_ub=b_ub, A_eq=a_b if a_b.shape[0] else None,
        b_eq=np.zeros(a_b.shape[0]) if a_b.shape[0] else None, bounds=[(None, None)] * k, method="highs",
    )  # fmt: skip
    if res.status != 0:
        msg = f"the flex LP ended with HiGHS status {res.status} ({res.message}); the check is undecided"
        raise NumericalError(msg)
    if -float(res.fun) <= FLEX_TOLERANCE:
        return None
    z: FloatArray = np.asarray(res.x, dtype=float)
    return z


def member_rank(frame: Frame, members: Sequence[Member]) -> tuple[int, int]:
    """The exact rank the members give the framework (all as bars), and the rank a rigid layout needs.

    The prime's rank is a lower bound; it is exact when it meets the largest possible value
    (members, or the target), otherwise integer elimination decides.
    """
    red = reduce_frame(frame, members)
    target, free, _ = rank_target(red)
    if not members or not len(free):
        return 0, target
    gram = _gram(red.matrix()[:, free].tocsr())
    rank = flint.nmod_mat(gram, PRIME).rank()
    if rank < min(len(members), len(free)):
        rank = flint.fmpz_mat(gram).rank()
    return rank, target


def bar_critical(frame: Frame, members: Sequence[Member]) -> list[bool] | None:
    """For a layout whose all-bars framework is rigid: which members' single loss leaves it flexible.

    With ``G = A^T A`` invertible, removing member e leaves ``G - a_e a_e^T``, whose determinant is
    ``det G (1 - a_e^T G^-1 a_e)`` (matrix determinant lemma, any field). Modulo a prime, a nonzero
    ``1 - a_e^T G^-1 a_e`` proves that e is not critical (the rational determinant is then nonzero);
    zero modulo both :data:`PRIME` and :data:`PRIME_2` marks e critical (a rational nonzero value
    divisible by both 61-bit primes is possible in principle; docs/general-frames.md says so).

    Returns:
        One flag per member, or None when the all-bars framework is not rigid modulo the primes.
    """
    layout = tuple(members)
    red = reduce_frame(frame, layout)
    _, free, trivial = rank_target(red)
    # Hold the rigid-body motions the supports leave: drop unknowns where they are independent
    # (then the layout is rigid iff the rest of A has full column rank).
    held: list[int] = []
    for k in range(trivial.shape[0]):
        if len(held) == trivial.shape[1]:
            break
        if flint.fmpz_mat(trivial[[*held, k]].tolist()).rank() == len(held) + 1:
            held.append(k)
    keep = np.setdiff1d(np.arange(len(free)), held)
    free = free[keep]
    a = red.matrix()[:, free].tocsr()
    gram = _gram(a)
    flags: list[bool] | None = None
    for prime in (PRIME, PRIME_2):
        g = flint.nmod_mat(gram, prime)
        if g.rank() < len(free):
            return None
        inv = [[int(v) for v in row] for row in g.inv().tolist()]
        hits = []
        for k in range(a.shape[0]):
            cols = a.indices[a.indptr[k] : a.indptr[k + 1]].tolist()
            vals = a.data[a.indptr[k] : a.indptr[k + 1]].tolist()
            h = sum(
                vi * vj * inv[ci][cj]
                for ci, vi in zip(cols, vals, strict=True)
                for cj, vj in zip(cols, vals, strict=True)
            )
            hits.append((1 - h) % prime == 0)
        flags = hits if flags is None else [x and y for x, y in zip(flags, hits, strict=True)]
    return flags


def exact_rigidity(frame: Frame, members: Sequence[Member] | None = None) -> Rigidity:
    """Decide first-order rigidity of a frame's layout exactly (rank) and by LP (ties).

    Args:
        frame: The frame (complete or general).
        members: The layout (default: the frame's own members).

    Returns:
        The answer, with a mechanism when the layout is not rigid.

    Raises:
        NumericalError: If HiGHS cannot decide the tie condition (never seen on whole-millimetre frames).

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> b = MemberKind.BRACE
        >>> f = Frame("f", (3000, 3000), (2000,))
        >>> exact_rigidity(f, [Member(1, 1, b, Diagonal.RISING), Member(1, 2, b, Diagonal.RISING)]).rigid
        True
        >>> exact_rigidity(f, [Member(1, 1, b, Diagonal.RISING)]).flexes
        1
    """
    layout = tuple(frame.members if members is None else members)
    red = reduce_frame(frame, layout)
    target, free, trivial = rank_target(red)
    full = red.matrix()
    a = full[:, free].tocsr()
    gram = _gram(a)
    size = len(free)
    rank = flint.nmod_mat(gram, PRIME).rank() if size else 0
    certified = rank == target
    if not certified:
        rank = flint.fmpz_mat(gram).rank() if size else 0
    if rank < target:
        spread = []
        for motion in _exact_flexes(gram, trivial):
            whole = [0] * red.classes
            for k, v in zip(free.tolist(), motion, strict=True):
                whole[k] = v
            spread.append(tuple(whole))
        return Rigidity(False, False, target - rank, spread[0], True, False, red, others=tuple(spread[1:]))
    ties = np.array([m.kind is MemberKind.TIE for m in layout], dtype=bool)
    if not ties.any():
        return Rigidity(True, True, 0, None, False, certified, red)
    a_unit = _unit_rows(red, a)
    if _proper_stress(a_unit, ties):
        return Rigidity(True, True, 0, None, False, certified, red)
    z = _tie_flex(a_unit, ties)
    if z is None:
        msg = (
            f"frame {frame.name!r}: no proper self-stress was found, yet no mechanism either (within the "
            "tolerances of docs/general-frames.md); the tie condition is numerically undecided"
        )
        raise NumericalError(msg)
    whole_f = np.zeros(red.classes)
    whole_f[free] = z
    return Rigidity(False, True, 0, tuple(float(v) for v in whole_f), False, certified, red)
