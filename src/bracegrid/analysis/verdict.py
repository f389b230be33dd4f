"""The stability check's result: a frame's verdict and its loose parts."""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

from bracegrid.model import Member, Racking, Supports


class CheckMethod(Enum):
    """Which check decided a verdict."""

    DIGRAPH = "digraph"
    """The row/column digraph (directed-cycle criterion): exact for complete grids."""
    EXACT = "exact"
    """The rigidity-matrix check (exact rank, proper self-stress): any frame, used for general frames."""


@dataclass(frozen=True, slots=True)
class NodeMove:
    """How one node moves in a flex (largest move scaled to 1).

    Attributes:
        p: Horizontal grid line of the node.
        q: Vertical grid line of the node.
        dx: Horizontal move (positive to the right).
        dy: Vertical move (positive upwards).
    """

    p: int
    q: int
    dx: float
    dy: float


@dataclass(frozen=True, slots=True)
class BayRack:
    """A bay that a flex distorts, and which way it racks.

    Attributes:
        row: Row of the bay.
        col: Column of the bay.
        racking: Clockwise when the rising diagonal lengthens (top sways right), anticlockwise when it shortens.
    """

    row: int
    col: int
    racking: Racking


@dataclass(frozen=True, slots=True)
class Flex:
    """A first-order mechanism of a general frame: a motion that keeps every bar and brace length and
    lengthens no tie, with the rigid-body part taken out.

    Attributes:
        moves: Every node that moves, scaled so the largest move is 1.
        bays: Every present bay that changes shape.
        exact: True when the motion is an exact rational null vector; False when it comes from the
            tie LP (floating point, checked against the tolerance in docs/general-frames.md).
    """

    moves: tuple[NodeMove, ...]
    bays: tuple[BayRack, ...]
    exact: bool


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
        method: Which check decided.
        flex: A mechanism of an unstable general frame (the digraph's loose parts describe complete grids).
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
    method: CheckMethod = CheckMethod.DIGRAPH
    flex: Flex | None = None

    @property
    def maxwell_count(self) -> float:
        """The count to set against :attr:`maxwell_needed`.

        On a complete grid (digraph rule) braces plus half the ties: a tie holds one racking sense. On
        a general frame (exact check) braces plus ties: each member raises the rank of the rigidity
        matrix by at most one, and a rigid layout must reach the degrees of freedom left.
        """
        if self.method is CheckMethod.EXACT:
            return float(self.braces + self.ties)
        return self.braces + self.ties / 2
