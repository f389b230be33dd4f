"""The marginal value of one more member: which single addition locks the most loose parts of an unstable frame.

One member can lock several loose parts at once when it closes a directed cycle through them
(a fourth tie closing a 4-cycle locks three). For every member that could be added (a free
diagonal of a clear bay, of a kind the frame allows) the drop in the number of strong components
is computed exactly (:func:`bracegrid.analysis.digraph.components_merged`), and every addition
reported is re-checked from scratch with the stability check.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from bracegrid.analysis.digraph import components_merged, gives_down, gives_up
from bracegrid.analysis.stability import count_racking_modes
from bracegrid.model import CostCatalogue, Diagonal, Frame, Member, MemberKind, blocked_bays


@dataclass(frozen=True, slots=True)
class Addition:
    """One member that could be added, and what it would lock.

    Attributes:
        member: The member (``existing=False``).
        parts_locked: Loose parts (racking modes) it removes on its own.
        cost: Its price (money).
    """

    member: Member
    parts_locked: int
    cost: float

    @property
    def per_cost(self) -> float:
        """Loose parts locked per unit of money."""
        return self.parts_locked / self.cost if self.cost > 0 else float("inf")


@dataclass(frozen=True, slots=True)
class AdditionAdvice:
    """The best single additions to an unstable frame.

    Attributes:
        frame: Frame name.
        racking_modes: Loose parts before any addition.
        candidates: Members that could be added (free diagonals of clear bays, allowed kinds).
        most: The additions that lock the most parts (ties broken by price).
        per_cost: The additions that lock the most parts per unit of money.
    """

    frame: str
    racking_modes: int
    candidates: int
    most: tuple[Addition, ...]
    per_cost: tuple[Addition, ...]


def candidate_additions(frame: Frame, members: Sequence[Member] | None = None) -> tuple[Member, ...]:
    """Every member that could be added: each free diagonal of a clear bay, in each allowed kind.

    A kind that gives the same arcs on either diagonal (a brace) is offered once per bay, at the
    same price either way: on the rising diagonal when that is free, else on the falling one.

    Example:
        >>> f = Frame("f", (3000,), (2000,))
        >>> [f"{m.kind.value} {m.label}" for m in candidate_additions(f)]
        ['brace r1c1:rising', 'tie r1c1:rising', 'tie r1c1:falling']
    """
    layout = frame.members if members is None else members
    taken = {(m.row, m.col, m.diagonal) for m in layout}
    closed = blocked_bays(frame)
    kinds = [k for k in MemberKind if k in frame.allow]
    either = {k: len({(gives_up(k, d), gives_down(k, d)) for d in Diagonal}) == 1 for k in kinds}
    out: list[Member] = []
    for row in range(1, frame.rows + 1):
        for col in range(1, frame.cols + 1):
            if (row, col) in closed:
                continue
            free = [d for d in Diagonal if (row, col, d) not in taken]
            for kind in kinds:
                out.extend(Member(row, col, kind, d, existing=False) for d in (free[:1] if either[kind] else free))
    return tuple(out)


def rank_additions(
    frame: Frame, costs: CostCatalogue, *, members: Sequence[Member] | None = None, limit: int = 3
) -> AdditionAdvice:
    """The single additions that lock the most loose parts, and the most per unit cost.

    Args:
        frame: The frame; its own members are the layout unless ``members`` is given.
        costs: Prices of the member kinds.
        members: The layout in place.
        limit: How many additions to keep in each list.

    Returns:
        The advice; both lists are empty for a stable frame or when no addition locks anything.

    Raises:
        RuntimeError: If the re-check disagrees with the fast count (a bracegrid bug).

    Example:
        >>> t = MemberKind.TIE
        >>> chain = (Member(1, 1, t, Diagonal.RISING), Member(1, 2, t, Diagonal.FALLING),
        ...          Member(2, 2, t, Diagonal.RISING))
        >>> f = Frame("2x2", (3000, 3000), (2000, 2000), members=chain)
        >>> best = rank_additions(f, CostCatalogue()).most[0]
        >>> best.member.kind.value, best.member.label, best.parts_locked
        ('tie', 'r2c1:falling', 3)
    """
    layout = tuple(frame.members if members is None else members)
    modes = count_racking_modes(frame, layout)
    candidates = candidate_additions(frame, layout) if modes else ()
    merged = components_merged(frame, layout, candidates).tolist()
    useful = [
        Addition(m, n, round(costs.member_cost(m.kind, frame.diagonal_length_mm(m.row, m.col)), 2))
        for m, n in zip(candidates, merged, strict=True)
        if n > 0
    ]
    most = sorted(useful, key=lambda a: (-a.parts_locked, a.cost, a.member.sort_key))[:limit]
    cheap = sorted(useful, key=lambda a: (-a.per_cost, -a.parts_locked, a.member.sort_key))[:limit]
    for addition in {*most, *cheap}:
        after = count_racking_modes(frame, (*layout, addition.member))
        if modes - after != addition.parts_locked:
            msg = (
                f"frame {frame.name!r}: adding {addition.member.label} locks {modes - after} loose parts on "
                f"re-check, not {addition.parts_locked}"
            )
            raise RuntimeError(msg)
    return AdditionAdvice(frame.name, modes, len(candidates), tuple(most), tuple(cheap))
