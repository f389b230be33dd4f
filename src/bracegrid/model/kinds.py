"""The closed value sets of the model: member kinds, diagonals, supports, racking senses."""

from __future__ import annotations

from enum import Enum


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
