"""The closed value sets of the model: member kinds, diagonals, supports, racking senses."""

from __future__ import annotations

from enum import Enum


class MemberKind(Enum):
    """What a diagonal member is."""

    BRACE = "brace"
    """Rigid diagonal: holds its length in tension and compression."""
    TIE = "tie"
    """Tension-only diagonal (strap, cable, rod): resists lengthening only."""


class GridBarKind(Enum):
    """What a grid bar segment is."""

    LEDGER = "ledger"
    """Horizontal: on a horizontal grid line, spanning one column."""
    STANDARD = "standard"
    """Vertical: on a vertical grid line, spanning one row."""

    @property
    def span_letter(self) -> str:
        """``c`` for a ledger (it spans a column), ``r`` for a standard (it spans a row)."""
        return "c" if self is GridBarKind.LEDGER else "r"


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


class Edge(Enum):
    """An edge of a frame that a wall line under it holds along its own direction (plan grids)."""

    BOTTOM = "bottom"
    """Horizontal grid line 0: its nodes are held horizontally (along x)."""
    TOP = "top"
    """Horizontal grid line R: its nodes are held horizontally (along x)."""
    LEFT = "left"
    """Vertical grid line 0: its nodes are held vertically (along y)."""
    RIGHT = "right"
    """Vertical grid line C: its nodes are held vertically (along y)."""

    @property
    def along_x(self) -> bool:
        """True for the bottom and top edges (they hold x), False for the sides (they hold y)."""
        return self in (Edge.BOTTOM, Edge.TOP)


class LoadSense(Enum):
    """Which way a load case acts: as written, or reversed."""

    PLUS = "+"
    MINUS = "-"

    @property
    def factor(self) -> float:
        """+1.0 or -1.0."""
        return 1.0 if self is LoadSense.PLUS else -1.0
