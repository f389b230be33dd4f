"""Member prices: the cost catalogue of a project."""

from __future__ import annotations

from dataclasses import dataclass
from decimal import ROUND_HALF_UP, Decimal

from bracegrid.model.kinds import MemberKind

#: Largest price a project file may give per piece, per metre or for labour (money units). Far above any
#: real rate; with :data:`MAX_CONTINGENCY_PCT` it keeps one member's price below 1.6e10.
MAX_RATE = 1_000_000.0

#: Largest contingency percentage.
MAX_CONTINGENCY_PCT = 1000.0

#: Largest price of the dearest layout of a frame (both diagonals of every bay at the dearest rate), in
#: money units. The optimizer counts money in 1/10000 units (optimize/bays.py); 9e11 x 1e4 = 9e15 stays
#: below 2**53, so every sum of member prices is exact in CP-SAT's integers and in a double.
MAX_LAYOUT_PRICE = 900_000_000_000


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

    def member_price_cents(self, kind: MemberKind, cut_length_mm: int) -> int:
        """Price of one member of a whole-millimetre cut length, in whole cents.

        The one rounding rule of every price bracegrid reports (docs/drawings.md, "Bill of
        materials"): the price is worked out exactly in decimal from the rates as written
        (``repr`` of each number) and the cut length, then rounded half up to the cent once.
        Every subtotal and total is a sum of these whole cents, so totals always equal the
        sum of the rows printed.

        Example:
            >>> CostCatalogue().member_price_cents(MemberKind.BRACE, 5000)
            6500
            >>> CostCatalogue(contingency_pct=12.5).member_price_cents(MemberKind.TIE, 2385)
            1817
        """
        r = self.rate(kind)
        exact = (
            (_dec(r.per_piece) + _dec(r.labour_per_piece) + _dec(r.per_metre) * Decimal(cut_length_mm) / 1000)
            * (100 + _dec(self.contingency_pct))
            / 100
        )
        return int((exact * 100).quantize(Decimal(1), rounding=ROUND_HALF_UP))


def _dec(value: float) -> Decimal:
    """A rate as the decimal number it was written as (``repr`` gives the shortest round-trip form)."""
    return Decimal(repr(float(value)))
