"""Member prices: the cost catalogue of a project."""

from __future__ import annotations

from dataclasses import dataclass

from bracegrid.model.kinds import MemberKind


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
        """The rate for one member kind (the field named after the kind's value)."""
        rate: CostRate = getattr(self, kind.value)
        return rate

    def member_cost(self, kind: MemberKind, length_mm: float) -> float:
        """Price of one member of the given diagonal length.

        Example:
            >>> CostCatalogue().member_cost(MemberKind.BRACE, 5000.0)
            65.0
        """
        r = self.rate(kind)
        base = r.per_piece + r.labour_per_piece + r.per_metre * length_mm / 1000.0
        return base * (1.0 + self.contingency_pct / 100.0)
