"""Frozen value types for frames, members, costs and check results.

Conventions (see docs/theory.md): rows are numbered 1..R from the bottom,
columns 1..C from the left; lengths are whole millimetres; the rising diagonal
runs from a bay's bottom-left to its top-right corner.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

from bracegrid.units import diagonal_mm


class MemberKind(Enum):
    """What a diagonal member is."""

    BRACE = "brace"
    """Rigid diagonal: holds its length in tension and compression."""
    TIE = "tie"
    """Tension-only diagonal (strap, cable, rod): resists lengthening only."""


class Diagonal(Enum):
    """Which diagonal of a bay a member lies on."""

    RISING = "rising"
    """Bottom-left to top-right."""
    FALLING = "falling"
    """Top-left to bottom-right."""

    @property
    def other(self) -> Diagonal:
        """The other diagonal of the same bay."""
        return Diagonal.FALLING if self is Diagonal.RISING else Diagonal.RISING


class Supports(Enum):
    """How a frame is held."""

    FREE = "free"
    """Nothing held: the check asks whether the frame is rigid on its own."""
    BASE = "base"
    """Every node of the bottom grid line pinned."""


class Racking(Enum):
    """Which way a loose part can rack relative to the anchored rest.

    Clockwise racking of a row means its top sways right relative to its
    bottom; of a column, its right side drops relative to its left.
    """

    BOTH = "both"
    CLOCKWISE = "clockwise"
    ANTICLOCKWISE = "anticlockwise"


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
            block more (see :func:`bracegrid.geometry.blocked_bays`).
        openings: Clear zones.
        allow: Member kinds the optimizer may add.
        members: Members in place.
        opening_overlap: A bay is blocked by an opening when the overlap area
            exceeds this fraction of the bay area (0 = any positive area).
        redundancy: Members whose loss the layout must survive (0 = none).
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
class CostRate:
    """Price of one member kind.

    Attributes:
        per_piece: Money per member (supply and fixings).
        per_metre: Money per metre of diagonal length.
        labour_per_piece: Money per member for fitting it.
    """

    per_piece: float
    per_metre: float
    labour_per_piece: float = 0.0


@dataclass(frozen=True, slots=True)
class CostCatalogue:
    """Prices for every member kind.

    Attributes:
        brace: Rigid diagonal prices.
        tie: Tension-only diagonal prices.
        contingency_pct: Percentage added on top of every member's price.
    """

    brace: CostRate = CostRate(25.0, 8.0)
    tie: CostRate = CostRate(9.0, 3.0)
    contingency_pct: float = 0.0

    def rate(self, kind: MemberKind) -> CostRate:
        """The rate for one member kind."""
        return self.brace if kind is MemberKind.BRACE else self.tie

    def member_cost(self, kind: MemberKind, length_mm: float) -> float:
        """Price of one member of the given diagonal length.

        Example:
            >>> CostCatalogue().member_cost(MemberKind.BRACE, 5000.0)
            65.0
        """
        r = self.rate(kind)
        base = r.per_piece + r.labour_per_piece + r.per_metre * length_mm / 1000.0
        return base * (1.0 + self.contingency_pct / 100.0)


@dataclass(frozen=True, slots=True)
class Project:
    """A project: frames and a cost catalogue.

    Attributes:
        name: Free text.
        frames: The frames, in file order.
        costs: Prices.
        length_unit: Unit of bare numbers in the file (kept for writing back).
        source: The file it was read from, if any.
    """

    name: str
    frames: tuple[Frame, ...]
    costs: CostCatalogue = CostCatalogue()
    length_unit: str = "m"
    source: str = ""

    def frame(self, name: str) -> Frame:
        """The frame with this name.

        Raises:
            KeyError: If there is none.
        """
        for f in self.frames:
            if f.name == name:
                return f
        raise KeyError(name)


@dataclass(frozen=True, slots=True)
class LoosePart:
    """Rows and columns that rack together, independently of the anchored rest.

    Attributes:
        rows: 1-based row numbers in the part.
        columns: 1-based column numbers in the part.
        racking: Which way it can move relative to the anchor.
    """

    rows: tuple[int, ...]
    columns: tuple[int, ...]
    racking: Racking


@dataclass(frozen=True, slots=True)
class Verdict:
    """Result of the stability check of one frame's layout.

    Attributes:
        frame: Frame name.
        stable: True iff the layout leaves no mechanism.
        racking_modes: Number of independent racking modes left.
        loose_parts: Parts that can move relative to the anchor.
        anchor_rows: Rows of the part the others are measured against.
        anchor_columns: Columns of that part.
        critical_members: Members whose single loss makes a stable frame unstable.
        braces: Number of rigid braces.
        ties: Number of ties.
        maxwell_needed: Braces a minimum rigid layout needs (R+C-1 free, R on a base).
        supports: How the frame is held (a pinned base is then the anchor).
        removed: Members taken out for this check.
    """

    frame: str
    stable: bool
    racking_modes: int
    loose_parts: tuple[LoosePart, ...]
    anchor_rows: tuple[int, ...]
    anchor_columns: tuple[int, ...]
    critical_members: tuple[Member, ...]
    braces: int
    ties: int
    maxwell_needed: int
    supports: Supports = Supports.FREE
    removed: tuple[Member, ...] = ()

    @property
    def maxwell_count(self) -> float:
        """Braces plus half the ties, to set against :attr:`maxwell_needed`."""
        return self.braces + self.ties / 2
