"""The real pin-jointed bar framework of a frame and its layout: nodes, bars, stiffness values, supports.

Node ``(p, q)`` sits where horizontal grid line p (0..R, bottom up) meets vertical grid line q
(0..C, left to right); its index is ``p * (C + 1) + q`` and its degrees of freedom are
``2 * index`` (x) and ``2 * index + 1`` (y). Coordinates stay whole millimetres. Bars are stored
in a fixed order: the ledgers (line p = 0..R, column j = 1..C), the standards (line q = 0..C,
row i = 1..R), then the diagonals in the order of the layout's members. Grid bars a general frame
does not have (missing, or outside its outline: :func:`bracegrid.model.present_grid_bars`) and
those the caller leaves out (``omitted``) are simply absent; whether such a framework can carry
load is decided by the exact rigidity check (:mod:`bracegrid.mechanics.rigidity`), not by the
row/column digraph.

The node index keeps the full rectangle, so node ``(p, q)`` has the same index on every frame; a
node no present bar reaches (inside an absent region) is marked inactive (``active``): it carries
no support, no load and no unknown of the solve.

Supports are fixed degrees of freedom: a pinned base fixes both at every active node of line 0; a
held edge (plan grids) fixes each active node of that edge along the edge's own direction.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from enum import Enum

import numpy as np
import numpy.typing as npt

from bracegrid.errors import InputError
from bracegrid.model import (
    Diagonal,
    Edge,
    Frame,
    GridBarKind,
    Member,
    MemberKind,
    StrengthCatalogue,
    Supports,
    present_grid_bars,
)

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.int64]
BoolArray = npt.NDArray[np.bool_]


class BarKind(Enum):
    """What a bar of the framework is."""

    LEDGER = "ledger"
    """A horizontal grid bar segment (line p, spanning column j)."""
    STANDARD = "standard"
    """A vertical grid bar segment (line q, spanning row i)."""
    BRACE = "brace"
    """A rigid diagonal."""
    TIE = "tie"
    """A tension-only diagonal."""

    @property
    def is_grid(self) -> bool:
        """True for standards and ledgers."""
        return self in (BarKind.LEDGER, BarKind.STANDARD)

    @classmethod
    def of_member(cls, kind: MemberKind) -> BarKind:
        """The bar kind of a diagonal member kind."""
        return cls.BRACE if kind is MemberKind.BRACE else cls.TIE


@dataclass(frozen=True, slots=True)
class GridBarRef:
    """A grid bar segment: a ledger on horizontal line ``line`` spanning column ``span``, or a
    standard on vertical line ``line`` spanning row ``span`` (both 1-based spans)."""

    kind: BarKind
    line: int
    span: int


@dataclass(frozen=True, slots=True)
class SupportDof:
    """One fixed degree of freedom and what holds it.

    Attributes:
        support: ``"base"`` or the held edge's value (``"bottom"``, ``"top"``, ``"left"``, ``"right"``).
        p: Horizontal grid line of the node.
        q: Vertical grid line of the node.
        dof: The global degree of freedom (2 * node + 0 for x, + 1 for y).
    """

    support: str
    p: int
    q: int
    dof: int


def _readonly(a: npt.NDArray[np.generic]) -> npt.NDArray[np.generic]:
    a.setflags(write=False)
    return a


@dataclass(frozen=True, slots=True)
class BarFramework:
    """The bar framework of one frame with one layout (arrays are read-only).

    Attributes:
        frame: The frame (sizes, supports, held edges).
        members: The diagonals, in bar order after the grid bars.
        coords_mm: Node coordinates, shape (n, 2), whole millimetres.
        ends: Start and end node of every bar, shape (m, 2).
        kind: :class:`BarKind` of every bar, as the index into ``BAR_KINDS``.
        line: Grid line of a grid bar (ledger: p; standard: q), -1 for diagonals.
        row: Row a standard or diagonal spans (1-based), 0 for ledgers.
        col: Column a ledger or diagonal spans (1-based), 0 for standards.
        ea_kn: Axial stiffness of every bar.
        length_mm: Length of every bar.
        tension_only: True for ties.
        supports: Every fixed degree of freedom, in node order.
        first_diagonal: Index of the first diagonal bar.
        active: True for every node some bar reaches (all nodes of a complete grid).
    """

    frame: Frame
    members: tuple[Member, ...]
    coords_mm: IntArray
    ends: IntArray
    kind: IntArray
    line: IntArray
    row: IntArray
    col: IntArray
    ea_kn: FloatArray
    length_mm: FloatArray
    tension_only: BoolArray
    supports: tuple[SupportDof, ...]
    first_diagonal: int
    active: BoolArray

    @property
    def nodes(self) -> int:
        """Number of nodes."""
        return int(self.coords_mm.shape[0])

    @property
    def dofs(self) -> int:
        """Number of degrees of freedom (two per node)."""
        return 2 * self.nodes

    @property
    def bars(self) -> int:
        """Number of bars."""
        return int(self.ends.shape[0])

    @property
    def stiffness_kn_per_mm(self) -> FloatArray:
        """Axial stiffness EA / L of every bar."""
        out: FloatArray = self.ea_kn / self.length_mm
        return out

    def fixed_mask(self) -> BoolArray:
        """True at every degree of freedom a support fixes."""
        mask = np.zeros(self.dofs, dtype=bool)
        mask[[s.dof for s in self.supports]] = True
        return mask

    def inactive_mask(self) -> BoolArray:
        """True at both degrees of freedom of every node no bar reaches (not part of the solve)."""
        out: BoolArray = np.repeat(~self.active, 2)
        return out

    def bar_kind(self, k: int) -> BarKind:
        """Kind of bar k."""
        return BAR_KINDS[int(self.kind[k])]

    def unit_vectors(self) -> FloatArray:
        """Unit vector from start to end node of every bar, shape (m, 2)."""
        d = (self.coords_mm[self.ends[:, 1]] - self.coords_mm[self.ends[:, 0]]).astype(np.float64)
        out: FloatArray = d / self.length_mm[:, None]
        return out


#: The order of :class:`BarKind` codes in :attr:`BarFramework.kind`.
BAR_KINDS: tuple[BarKind, ...] = tuple(BarKind)


def node_index(frame: Frame, p: int, q: int) -> int:
    """Index of node (p, q).

    Example:
        >>> node_index(Frame("f", (3000, 3000), (2000,)), 1, 2)
        5
    """
    return p * (frame.cols + 1) + q


def diagonal_ends(frame: Frame, row: int, col: int, diagonal: Diagonal) -> tuple[int, int]:
    """Start and end node of a diagonal: rising bottom-left to top-right, falling top-left to bottom-right.

    Example:
        >>> diagonal_ends(Frame("f", (3000,), (2000,)), 1, 1, Diagonal.FALLING)
        (2, 1)
    """
    if diagonal is Diagonal.RISING:
        return node_index(frame, row - 1, col - 1), node_index(frame, row, col)
    return node_index(frame, row, col - 1), node_index(frame, row - 1, col)


def support_dofs(frame: Frame, active: BoolArray | None = None) -> tuple[SupportDof, ...]:
    """The degrees of freedom the frame's supports fix (a pinned base, or its held edges).

    Only nodes flagged in ``active`` (default: every node) are held: a node of an absent region
    does not exist, so nothing supports it.

    Example:
        >>> from bracegrid.model import Supports
        >>> [s.dof for s in support_dofs(Frame("f", (3000,), (2000,), supports=Supports.BASE))]
        [0, 1, 2, 3]
    """
    r_count, c_count = frame.rows, frame.cols
    found: dict[int, SupportDof] = {}
    if frame.supports is Supports.BASE:
        for q in range(c_count + 1):
            n = node_index(frame, 0, q)
            for axis in (0, 1):
                found[2 * n + axis] = SupportDof("base", 0, q, 2 * n + axis)
    for edge in sorted(frame.held_edges, key=lambda e: list(Edge).index(e)):
        if edge.along_x:
            p = 0 if edge is Edge.BOTTOM else r_count
            points = [(p, q) for q in range(c_count + 1)]
            axis = 0
        else:
            q = 0 if edge is Edge.LEFT else c_count
            points = [(p, q) for p in range(r_count + 1)]
            axis = 1
        for p, q in points:
            dof = 2 * node_index(frame, p, q) + axis
            found.setdefault(dof, SupportDof(edge.value, p, q, dof))
    if active is not None:
        found = {d: s for d, s in found.items() if active[d // 2]}
    return tuple(found[d] for d in sorted(found))


def missing_stiffness(frame: Frame, strength: StrengthCatalogue, members: Iterable[Member]) -> list[str]:
    """The stiffness fields a force analysis of this layout needs but the project does not give.

    Example:
        >>> missing_stiffness(Frame("f", (3000,), (2000,)), StrengthCatalogue(), [])
        ['[grid].ea_kn']
    """
    out = []
    if strength.grid.ea_kn is None:
        out.append("[grid].ea_kn")
    for kind in sorted({m.kind for m in members}, key=lambda k: k.value):
        if strength.of(kind).ea_kn is None:
            out.append(f"[costs.{kind.value}].ea_kn")
    return out


def build_framework(
    frame: Frame,
    strength: StrengthCatalogue,
    *,
    members: Sequence[Member] | None = None,
    omitted: Iterable[GridBarRef] = (),
) -> BarFramework:
    """Build the bar framework of a frame and a layout.

    Args:
        frame: Sizes, supports and held edges.
        strength: Gives the axial stiffness of grid bars and of each member kind.
        members: The diagonals (default: the frame's own).
        omitted: Grid bar segments to leave out, besides those the frame does not have.

    Returns:
        The framework.

    Raises:
        InputError: If a stiffness the layout needs is not given (naming the field).

    Example:
        >>> from bracegrid.model import GridStrength, MemberStrength
        >>> s = StrengthCatalogue(brace=MemberStrength(ea_kn=9e4), grid=GridStrength(ea_kn=3e5))
        >>> fw = build_framework(Frame("f", (3000,), (4000,)), s, members=[Member(1, 1, MemberKind.BRACE,
        ...     Diagonal.RISING)])
        >>> fw.bars, fw.length_mm.tolist()
        (5, [3000.0, 3000.0, 4000.0, 4000.0, 5000.0])
    """
    layout = tuple(frame.members if members is None else members)
    missing = missing_stiffness(frame, strength, layout)
    if missing:
        fields = ", ".join(missing)
        msg = (
            f"frame {frame.name!r}: member forces need the axial stiffness {fields} (E times A, kN); "
            "add it to the project file: forces in an indeterminate layout depend on it"
        )
        raise InputError(msg)
    r_count, c_count = frame.rows, frame.cols
    gone = {(g.kind, g.line, g.span) for g in omitted}
    if not frame.is_complete:
        have = {(BarKind.LEDGER if b.kind is GridBarKind.LEDGER else BarKind.STANDARD, b.line, b.span)
                for b in present_grid_bars(frame)}  # fmt: skip
        gone |= {
            (kind, line, span)
            for kind, lines, spans in ((BarKind.LEDGER, r_count + 1, c_count), (BarKind.STANDARD, c_count + 1, r_count))
            for line in range(lines)
            for span in range(1, spans + 1)
            if (kind, line, span) not in have
        }
    xs, ys = frame.x_lines(), frame.y_lines()
    coords = np.array([[xs[q], ys[p]] for p in range(r_count + 1) for q in range(c_count + 1)], dtype=np.int64)
    ends: list[tuple[int, int]] = []
    kinds: list[int] = []
    lines: list[int] = []
    rows: list[int] = []
    cols: list[int] = []
    ledger, standard = BAR_KINDS.index(BarKind.LEDGER), BAR_KINDS.index(BarKind.STANDARD)
    for p in range(r_count + 1):
        for j in range(1, c_count + 1):
            if (BarKind.LEDGER, p, j) not in gone:
                ends.append((node_index(frame, p, j - 1), node_index(frame, p, j)))
                kinds.append(ledger)
                lines.append(p)
                rows.append(0)
                cols.append(j)
    for q in range(c_count + 1):
        for i in range(1, r_count + 1):
            if (BarKind.STANDARD, q, i) not in gone:
                ends.append((node_index(frame, i - 1, q), node_index(frame, i, q)))
                kinds.append(standard)
                lines.append(q)
                rows.append(i)
                cols.append(0)
    first_diagonal = len(ends)
    grid_ea = float(strength.grid.ea_kn)  # type: ignore[arg-type]  # checked above
    ea = [grid_ea] * first_diagonal
    for m in layout:
        ends.append(diagonal_ends(frame, m.row, m.col, m.diagonal))
        kinds.append(BAR_KINDS.index(BarKind.of_member(m.kind)))
        lines.append(-1)
        rows.append(m.row)
        cols.append(m.col)
        ea.append(float(strength.of(m.kind).ea_kn))  # type: ignore[arg-type]  # checked above
    end_arr = np.array(ends, dtype=np.int64).reshape(-1, 2)
    delta = coords[end_arr[:, 1]] - coords[end_arr[:, 0]]
    length = np.hypot(delta[:, 0].astype(np.float64), delta[:, 1].astype(np.float64))
    kind_arr = np.array(kinds, dtype=np.int64)
    active = np.zeros(len(coords), dtype=bool)
    active[end_arr.ravel()] = True
    return BarFramework(
        frame=frame,
        members=layout,
        coords_mm=_readonly(coords),  # type: ignore[arg-type]
        ends=_readonly(end_arr),  # type: ignore[arg-type]
        kind=_readonly(kind_arr),  # type: ignore[arg-type]
        line=_readonly(np.array(lines, dtype=np.int64)),  # type: ignore[arg-type]
        row=_readonly(np.array(rows, dtype=np.int64)),  # type: ignore[arg-type]
        col=_readonly(np.array(cols, dtype=np.int64)),  # type: ignore[arg-type]
        ea_kn=_readonly(np.array(ea, dtype=np.float64)),  # type: ignore[arg-type]
        length_mm=_readonly(length),  # type: ignore[arg-type]
        tension_only=_readonly(kind_arr == BAR_KINDS.index(BarKind.TIE)),  # type: ignore[arg-type]
        supports=support_dofs(frame, active),
        first_diagonal=first_diagonal,
        active=_readonly(active),  # type: ignore[arg-type]
    )
