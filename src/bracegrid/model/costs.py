"""Member prices: the cost catalogue of a project and the price of a layout."""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from typing import TYPE_CHECKING

from bracegrid.model.kinds import MemberKind

if TYPE_CHECKING:
    from bracegrid.model.frame import Frame, Member


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


def layout_cost(frame: Frame, costs: CostCatalogue, members: Iterable[Member]) -> float:
    """Price of every member of a layout, from the exact member prices, rounded to cents.

    Example:
        >>> from bracegrid.model import Diagonal, Frame, Member
        >>> f = Frame("f", (3000,), (4000,))
        >>> layout_cost(f, CostCatalogue(), [Member(1, 1, MemberKind.BRACE, Diagonal.RISING)])
        65.0
    """
    return round(sum(costs.member_cost(m.kind, frame.diagonal_length_mm(m.row, m.col)) for m in members), 2)
