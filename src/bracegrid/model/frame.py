"""Frozen value types of a frame: members, openings, the frame itself, the project, and a layout's price.

Conventions (see docs/theory.md): rows are numbered 1..R from the bottom,
columns 1..C from the left; lengths are whole millimetres; the rising diagonal
runs from a bay's bottom-left to its top-right corner.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass

from bracegrid.model.costs import CostCatalogue
from bracegrid.model.kinds import Diagonal, Edge, GridBarKind, MemberKind, Supports
from bracegrid.model.loads import LoadCase, StrengthCatalogue
from bracegrid.model.losses import LossLikelihood
from bracegrid.model.rules import SpreadRules
from bracegrid.units import cut_length_mm, diagonal_mm


@dataclass(frozen=True, slots=True)
class Member:
    """One diagonal member in a bay.

    Attributes:
        row: Row of the bay, 1-based from the bottom.
        col: Column of the bay, 1-based from the left.
        kind: Brace or tie.
        diagonal: Rising or falling.
        existing: True for a member already in place (or fixed by the user);
            False for one proposed by the optimizer.
    """

    row: int
    col: int
    kind: MemberKind
    diagonal: Diagonal
    existing: bool = True

    @property
    def bay(self) -> tuple[int, int]:
        """The (row, col) of the member's bay."""
        return (self.row, self.col)

    @property
    def sort_key(self) -> tuple[int, int, str, str]:
        """Key that orders members by bay, then diagonal, then kind."""
        return (self.row, self.col, self.diagonal.value, self.kind.value)

    @property
    def label(self) -> str:
        """Compact label used by the CLI, e.g. ``r2c3:rising``."""
        return f"r{self.row}c{self.col}:{self.diagonal.value}"


@dataclass(frozen=True, slots=True, order=True)
class GridBar:
    """One grid bar segment between two adjacent nodes.

    Attributes:
        kind: Ledger (horizontal) or standard (vertical).
        line: The horizontal grid line of a ledger (0..R) or the vertical grid line of a standard (0..C).
        span: The column a ledger spans or the row a standard spans, 1-based.
    """

    kind: GridBarKind
    line: int
    span: int

    @property
    def label(self) -> str:
        """Compact reference, e.g. ``ledger3c4`` (line 3, column 4) or ``standard2r5`` (line 2, row 5)."""
        return f"{self.kind.value}{self.line}{self.kind.span_letter}{self.span}"

    def ends(self) -> tuple[tuple[int, int], tuple[int, int]]:
        """The two nodes (p, q) it joins, in grid-line coordinates.

        Example:
            >>> GridBar(GridBarKind.LEDGER, 3, 4).ends()
            ((3, 3), (3, 4))
        """
        if self.kind is GridBarKind.LEDGER:
            return (self.line, self.span - 1), (self.line, self.span)
        return (self.span - 1, self.line), (self.span, self.line)

    def bays(self) -> tuple[tuple[int, int], tuple[int, int]]:
        """The two bays (row, col) it borders (one may lie outside the grid).

        Example:
            >>> GridBar(GridBarKind.STANDARD, 0, 2).bays()
            ((2, 0), (2, 1))
        """
        if self.kind is GridBarKind.LEDGER:
            return (self.line, self.span), (self.line + 1, self.span)
        return (self.span, self.line), (self.span, self.line + 1)


@dataclass(frozen=True, slots=True)
class Opening:
    """A clear zone in a frame (door, hoist run, duct).

    Attributes:
        name: Label shown in reports and drawings.
        polygon: Vertices in millimetres, frame origin at its bottom-left corner.
    """

    name: str
    polygon: tuple[tuple[int, int], ...]


@dataclass(frozen=True, slots=True)
class Frame:
    """One rectangular pin-jointed frame and the members it holds.

    Attributes:
        name: Unique name within the project.
        widths: Column widths in mm, left to right.
        heights: Row heights in mm, bottom to top.
        supports: How the frame is held.
        blocked: Bays (row, col) listed as blocked in the file; openings may
            block more (see :func:`bracegrid.model.geometry.blocked_bays`).
        openings: Clear zones.
        allow: Member kinds the optimizer may add.
        members: Members in place.
        opening_overlap: A bay is blocked by an opening when the overlap area
            exceeds this fraction of the bay area (0 = any positive area).
        redundancy: Members whose loss the layout must survive (0 = none).
        loads: Load cases for the member-force analysis (none: stability only).
        held_edges: Edges a wall line under them holds along their own direction (plan grids,
            ``supports`` free); they enter the force analysis, and the exact check of a general frame.
        missing: Grid bar segments left out (see :mod:`bracegrid.model.gridbars`).
        absent: Bays outside the frame's outline; their grid bars go with them unless a present
            bay still needs them.
        rules: Bracing-spread rules the optimizer follows (none by default).
    """

    name: str
    widths: tuple[int, ...]
    heights: tuple[int, ...]
    supports: Supports = Supports.FREE
    blocked: frozenset[tuple[int, int]] = frozenset()
    openings: tuple[Opening, ...] = ()
    allow: frozenset[MemberKind] = frozenset(MemberKind)
    members: tuple[Member, ...] = ()
    opening_overlap: float = 0.0
    redundancy: int = 0
    loads: tuple[LoadCase, ...] = ()
    held_edges: frozenset[Edge] = frozenset()
    rules: SpreadRules = SpreadRules()  # noqa: RUF009 - frozen, so one shared default is safe
    missing: frozenset[GridBar] = frozenset()
    absent: frozenset[tuple[int, int]] = frozenset()

    @property
    def is_complete(self) -> bool:
        """True when every bay and every grid bar is present (the row/column digraph then decides)."""
        return not self.missing and not self.absent

    @property
    def rows(self) -> int:
        """Number of rows (lifts)."""
        return len(self.heights)

    @property
    def cols(self) -> int:
        """Number of columns (bays along the frame)."""
        return len(self.widths)

    @property
    def width_mm(self) -> int:
        """Overall width."""
        return sum(self.widths)

    @property
    def height_mm(self) -> int:
        """Overall height."""
        return sum(self.heights)

    def diagonal_length_mm(self, row: int, col: int) -> float:
        """Length of either diagonal of bay (row, col), 1-based."""
        return diagonal_mm(self.widths[col - 1], self.heights[row - 1])

    def cut_length_mm(self, row: int, col: int) -> int:
        """Cut length of either diagonal of bay (row, col): node to node, whole millimetres."""
        return cut_length_mm(self.widths[col - 1], self.heights[row - 1])

    def x_lines(self) -> tuple[int, ...]:
        """x of the vertical grid lines 0..C in mm."""
        xs = [0]
        for w in self.widths:
            xs.append(xs[-1] + w)
        return tuple(xs)

    def y_lines(self) -> tuple[int, ...]:
        """y of the horizontal grid lines 0..R in mm."""
        ys = [0]
        for h in self.heights:
            ys.append(ys[-1] + h)
        return tuple(ys)


@dataclass(frozen=True, slots=True)
class Project:
    """A project: frames and a cost catalogue.

    Attributes:
        name: Free text.
        frames: The frames, in file order.
        costs: Prices.
        length_unit: Unit of bare numbers in the file (kept for writing back).
        source: The file it was read from, if any.
        loss_likelihood: How likely each member kind is to go missing (robustness statistics).
        strength: Capacities and stiffness of members, grid bars and base (force analysis).
    """

    name: str
    frames: tuple[Frame, ...]
    costs: CostCatalogue = CostCatalogue()
    length_unit: str = "m"
    source: str = ""
    loss_likelihood: LossLikelihood = LossLikelihood()
    strength: StrengthCatalogue = StrengthCatalogue()

    def frame(self, name: str) -> Frame:
        """The frame with this name.

        Raises:
            KeyError: If there is none.
        """
        for f in self.frames:
            if f.name == name:
                return f
        raise KeyError(name)


def layout_cost_cents(frame: Frame, costs: CostCatalogue, members: Iterable[Member]) -> int:
    """Price of every member of a layout in whole cents: the sum of each member's price to the cent.

    Example:
        >>> from bracegrid.model import Diagonal
        >>> f = Frame("f", (3000,), (4000,))
        >>> layout_cost_cents(f, CostCatalogue(), [Member(1, 1, MemberKind.BRACE, Diagonal.RISING)])
        6500
    """
    return sum(costs.member_price_cents(m.kind, frame.cut_length_mm(m.row, m.col)) for m in members)


def layout_cost(frame: Frame, costs: CostCatalogue, members: Iterable[Member]) -> float:
    """Price of every member of a layout (money, two decimals): :func:`layout_cost_cents` / 100.

    Example:
        >>> from bracegrid.model import Diagonal
        >>> f = Frame("f", (3000,), (4000,))
        >>> layout_cost(f, CostCatalogue(), [Member(1, 1, MemberKind.BRACE, Diagonal.RISING)])
        65.0
    """
    return layout_cost_cents(frame, costs, members) / 100


def layout_length_mm(frame: Frame, members: Iterable[Member]) -> int:
    """Total cut length of a layout's members, whole millimetres (the sum of each member's cut length).

    Example:
        >>> from bracegrid.model import Diagonal
        >>> layout_length_mm(Frame("f", (3000,), (4000,)), [Member(1, 1, MemberKind.TIE, Diagonal.RISING)])
        5000
    """
    return sum(frame.cut_length_mm(m.row, m.col) for m in members)
