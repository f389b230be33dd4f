"""The rule-of-thumb baseline: a hand-drawn style layout to cost the optimizer against.

The rule (common practice, no source): a rigid brace in every row (lift) at a
fixed bay interval, starting from the left end, with successive braces in a
row alternating rising and falling; on a free frame also a brace in every
column that has no member yet, in its lowest clear bay. Where braces are not
allowed, an X of ties stands in for each brace. Blocked bays shift a brace to
the nearest clear bay in the same row. Members already in place are kept.

The result is what a designer might draw by hand; it need not be stable (a
row with every bay blocked, say). Callers repair it with the optimizer and
report it as drawn.
"""

from __future__ import annotations

from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports, blocked_bays

#: Default bay interval between braces in a row (common practice, no source).
DEFAULT_INTERVAL = 5


def _place(
    frame: Frame, bay: tuple[int, int], diagonal: Diagonal, taken: set[tuple[int, int, Diagonal]]
) -> list[Member]:
    row, col = bay
    kinds = frame.allow
    if MemberKind.BRACE in kinds:
        for d in (diagonal, diagonal.other):
            if (row, col, d) not in taken:
                return [Member(row, col, MemberKind.BRACE, d, existing=False)]
        return []
    free = [d for d in Diagonal if (row, col, d) not in taken]
    return [Member(row, col, MemberKind.TIE, d, existing=False) for d in free]


def _nearest_clear(cols: int, start: int, clear: set[int]) -> int | None:
    for offset in range(cols):
        for col in (start - offset, start + offset):
            if 1 <= col <= cols and col in clear:
                return col
    return None


def rule_of_thumb_layout(frame: Frame, *, interval: int = DEFAULT_INTERVAL) -> tuple[Member, ...]:
    """The frame's members plus braces placed by the rule of thumb above.

    Args:
        frame: The frame (its members are kept as they are).
        interval: Bays between braces along a row.

    Returns:
        Existing members, then the added ones (``existing=False``).

    Example:
        >>> from bracegrid.model import Supports
        >>> f = Frame("f", (2500,) * 7, (2000,) * 2, supports=Supports.BASE)
        >>> [(m.row, m.col, m.diagonal.value) for m in rule_of_thumb_layout(f)]
        [(1, 1, 'rising'), (1, 6, 'falling'), (2, 1, 'rising'), (2, 6, 'falling')]
    """
    if interval < 1:
        msg = f"interval must be at least 1, got {interval}"
        raise ValueError(msg)
    closed = blocked_bays(frame)
    taken = {(m.row, m.col, m.diagonal) for m in frame.members}
    added: list[Member] = []

    def add(new: list[Member]) -> None:
        for m in new:
            taken.add((m.row, m.col, m.diagonal))
            added.append(m)

    for row in range(1, frame.rows + 1):
        clear = {c for c in range(1, frame.cols + 1) if (row, c) not in closed}
        used: set[int] = set()
        for k, start in enumerate(range(1, frame.cols + 1, interval)):
            col = _nearest_clear(frame.cols, start, clear - used)
            if col is None:
                break
            used.add(col)
            add(_place(frame, (row, col), Diagonal.RISING if k % 2 == 0 else Diagonal.FALLING, taken))
    if frame.supports is Supports.FREE:
        braced = {m.col for m in (*frame.members, *added)}
        for col in range(1, frame.cols + 1):
            if col in braced:
                continue
            rows = [r for r in range(1, frame.rows + 1) if (r, col) not in closed]
            if rows:
                add(_place(frame, (rows[0], col), Diagonal.RISING, taken))
    return (*frame.members, *added)
