"""The optimizer's per-bay tables: integer member costs, free diagonals, kept arcs, and new members.

Money in the optimizer is an integer number of *cost units*: one unit is
1/10000 of the project's money unit (a hundredth of a cent). Each member's
price is the bill's price (per piece + per metre x its bay's cut length, plus
contingency, rounded half up to the cent once: ``CostCatalogue.member_price_cents``),
so every solver works on exact integers, minimises exactly the money the bill of
materials prints, and every reported total is the exact sum of its members' prices.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np
import numpy.typing as npt

from bracegrid.analysis.digraph import BoolArray, IntArray, bay_arc_counts, member_bay_counts
from bracegrid.model import CostCatalogue, Diagonal, Frame, Member, MemberKind, blocked_bays


def _read_only(array: npt.NDArray[np.generic]) -> npt.NDArray[np.generic]:
    array.setflags(write=False)
    return array


#: Cost units per money unit.
SCALE = 10_000


def cost_units(costs: CostCatalogue, kind: MemberKind, cut_length_mm: int) -> int:
    """Price of one member in whole cost units (1/10000 of a money unit): its price to the cent.

    Example:
        >>> cost_units(CostCatalogue(), MemberKind.BRACE, 5000)
        650000
    """
    return costs.member_price_cents(kind, cut_length_mm) * (SCALE // 100)


def money(units: int | float) -> float:
    """Cost units to money, rounded to two decimals.

    Example:
        >>> money(650049)
        65.0
    """
    return round(units / SCALE, 2)


@dataclass(frozen=True, slots=True)
class BayTable:
    """What each bay of a frame can still take, and what it already has.

    Arrays have shape (R, C) and are indexed [row - 1, col - 1].

    Attributes:
        rows: R.
        cols: C.
        brace_cost: Cost units of a new brace in each bay.
        tie_cost: Cost units of a new tie in each bay.
        rising_free: The rising diagonal is not blocked and holds no member.
        falling_free: Likewise for the falling diagonal.
        brace_ok: A new brace may go in the bay (allowed, a diagonal free).
        tie_ok: Tie kinds allowed at all.
        exist_up: Existing members giving the arc row -> col.
        exist_down: Existing members giving the arc col -> row.
        existing_cost: Cost units of the existing members together.

    Every array is read-only: derive a changed table with ``dataclasses.replace``.
    """

    rows: int
    cols: int
    brace_cost: IntArray
    tie_cost: IntArray
    rising_free: BoolArray
    falling_free: BoolArray
    brace_ok: BoolArray
    tie_ok: bool
    exist_up: IntArray
    exist_down: IntArray
    existing_cost: int

    def __post_init__(self) -> None:
        for f in fields(self):
            value = getattr(self, f.name)
            if isinstance(value, np.ndarray):
                _read_only(value)

    @property
    def free_slots(self) -> IntArray:
        """Free diagonals per bay (0, 1 or 2)."""
        return self.rising_free.astype(np.int64) + self.falling_free.astype(np.int64)

    @property
    def rising_tie_ok(self) -> BoolArray:
        """A new rising tie may go in the bay."""
        return self.rising_free & self.tie_ok

    @property
    def falling_tie_ok(self) -> BoolArray:
        """A new falling tie may go in the bay."""
        return self.falling_free & self.tie_ok


def bay_table(
    frame: Frame, costs: CostCatalogue, members: tuple[Member, ...], allow: frozenset[MemberKind]
) -> BayTable:
    """Tabulate costs, free diagonals and existing arcs of a frame.

    Args:
        frame: Sizes, blocked bays and openings.
        costs: Prices.
        members: Members kept in place.
        allow: Kinds the optimizer may add.

    Returns:
        The table.

    Example:
        >>> from bracegrid.model import Frame
        >>> t = bay_table(Frame("f", (3000, 4000), (4000,)), CostCatalogue(), (), frozenset(MemberKind))
        >>> t.brace_cost.tolist()
        [[650000, 702600]]
    """
    r_count, c_count = frame.rows, frame.cols
    # Prices depend only on the bay's size: price each distinct (width, height) once.
    priced: dict[tuple[MemberKind, int, int], int] = {}

    def units(kind: MemberKind, i: int, j: int) -> int:
        key = (kind, frame.widths[j - 1], frame.heights[i - 1])
        if key not in priced:
            priced[key] = cost_units(costs, kind, frame.cut_length_mm(i, j))
        return priced[key]

    rows, cols = range(1, r_count + 1), range(1, c_count + 1)
    brace_cost = np.array([[units(MemberKind.BRACE, i, j) for j in cols] for i in rows], dtype=np.int64)
    tie_cost = np.array([[units(MemberKind.TIE, i, j) for j in cols] for i in rows], dtype=np.int64)
    open_bay = np.ones((r_count, c_count), dtype=bool)
    for r, c in blocked_bays(frame):
        open_bay[r - 1, c - 1] = False
    rising_free = open_bay.copy()
    falling_free = open_bay.copy()
    exist_up, exist_down = member_bay_counts(members, r_count, c_count)
    existing_cost = 0
    for m in members:
        i, j = m.row - 1, m.col - 1
        (rising_free if m.diagonal is Diagonal.RISING else falling_free)[i, j] = False
        existing_cost += int((brace_cost if m.kind is MemberKind.BRACE else tie_cost)[i, j])
    brace_ok = (rising_free | falling_free) & (MemberKind.BRACE in allow)
    return BayTable(
        rows=r_count,
        cols=c_count,
        brace_cost=brace_cost,
        tie_cost=tie_cost,
        rising_free=rising_free,
        falling_free=falling_free,
        brace_ok=brace_ok,
        tie_ok=MemberKind.TIE in allow,
        exist_up=exist_up,
        exist_down=exist_down,
        existing_cost=existing_cost,
    )


class BayCounts:
    """New members per bay, read side: braces (0-2), rising ties (0/1), falling ties (0/1).

    Shared by the frozen :class:`Additions` and the mutable :class:`AdditionsBuilder`; every
    array has shape (R, C), indexed [row - 1, col - 1].
    """

    __slots__ = ()
    braces: IntArray
    rising: IntArray
    falling: IntArray

    def cost(self, table: BayTable) -> int:
        """Cost units of the new members."""
        return int((self.braces * table.brace_cost).sum() + ((self.rising + self.falling) * table.tie_cost).sum())

    def up(self, table: BayTable) -> IntArray:
        """Member arcs row -> col per bay, existing included."""
        return table.exist_up + bay_arc_counts(self.braces, self.rising, self.falling)[0]

    def down(self, table: BayTable) -> IntArray:
        """Member arcs col -> row per bay, existing included."""
        return table.exist_down + bay_arc_counts(self.braces, self.rising, self.falling)[1]

    def members(self, table: BayTable) -> tuple[Member, ...]:
        """The new members, each on a free diagonal (ties on their own, braces on what is left).

        Raises:
            ValueError: If a bay is asked to hold more than its free diagonals.
        """
        out: list[Member] = []
        for i, j in zip(*np.nonzero(self.braces + self.rising + self.falling), strict=True):
            row, col = int(i) + 1, int(j) + 1
            free = {Diagonal.RISING: bool(table.rising_free[i, j]), Diagonal.FALLING: bool(table.falling_free[i, j])}
            for diagonal, count in ((Diagonal.RISING, self.rising[i, j]), (Diagonal.FALLING, self.falling[i, j])):
                if count:
                    if not free[diagonal]:
                        msg = f"bay r{row}c{col}: {diagonal.value} diagonal is not free for a tie"
                        raise ValueError(msg)
                    free[diagonal] = False
                    out.append(Member(row, col, MemberKind.TIE, diagonal, existing=False))
            for _ in range(int(self.braces[i, j])):
                spot = next((d for d in (Diagonal.RISING, Diagonal.FALLING) if free[d]), None)
                if spot is None:
                    msg = f"bay r{row}c{col}: no free diagonal left for a brace"
                    raise ValueError(msg)
                free[spot] = False
                out.append(Member(row, col, MemberKind.BRACE, spot, existing=False))
        return tuple(out)


@dataclass(frozen=True, slots=True)
class Additions(BayCounts):
    """A finished set of new members per bay; its arrays are read-only copies.

    Attributes:
        braces: New braces per bay.
        rising: New rising ties per bay.
        falling: New falling ties per bay.
    """

    braces: IntArray
    rising: IntArray
    falling: IntArray

    def __post_init__(self) -> None:
        for name in ("braces", "rising", "falling"):
            object.__setattr__(self, name, _read_only(np.array(getattr(self, name), dtype=np.int64)))

    @classmethod
    def empty(cls, rows: int, cols: int) -> Additions:
        """No new members."""
        z = np.zeros((rows, cols), dtype=np.int64)
        return cls(z, z, z)

    def builder(self) -> AdditionsBuilder:
        """A mutable copy to add members to."""
        return AdditionsBuilder(self.braces, self.rising, self.falling)


class AdditionsBuilder(BayCounts):
    """New members per bay while a construction is under way: the arrays may be changed in place.

    Call :meth:`build` for the frozen :class:`Additions` once the layout is done.
    """

    __slots__ = ("braces", "falling", "rising")

    def __init__(self, braces: IntArray, rising: IntArray, falling: IntArray) -> None:
        self.braces = np.array(braces, dtype=np.int64)
        self.rising = np.array(rising, dtype=np.int64)
        self.falling = np.array(falling, dtype=np.int64)

    @classmethod
    def empty(cls, rows: int, cols: int) -> AdditionsBuilder:
        """Nothing added yet."""
        z = np.zeros((rows, cols), dtype=np.int64)
        return cls(z, z, z)

    def build(self) -> Additions:
        """The frozen additions (copies: later changes to the builder do not reach them)."""
        return Additions(self.braces, self.rising, self.falling)
