"""The stability check's result: a frame's verdict and its loose parts."""

from __future__ import annotations

from dataclasses import dataclass

from bracegrid.model import Member, Racking, Supports


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
