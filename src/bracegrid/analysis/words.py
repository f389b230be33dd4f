"""Explanations in plain words: loose parts, racking sense, redundancy, additions, robustness limits, the caution.

Shared by every output (text, JSON, drawings, the HTML report) and by the optimizer's
reasons for infeasible requests, so the same situation is always worded the same way.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence

from bracegrid.analysis.additions import Addition
from bracegrid.analysis.verdict import Flex, LoosePart, Verdict
from bracegrid.model import Racking, Supports

#: The caution every report, drawing title block and the README carries.
CAUTION = (
    "bracegrid checks only that the layout leaves no mechanism and, where loads and capacities "
    "are entered, carries those loads within them (first-order, pin-jointed, ties taut). Member "
    "sizing, connections, foundations, loads and code compliance rest with a licensed engineer "
    "and the local codes."
)


def format_numbers(values: Iterable[int]) -> str:
    """Compress sorted numbers into ranges.

    Example:
        >>> format_numbers([1, 2, 3, 5, 7, 8])
        '1-3, 5, 7-8'
    """
    items = sorted(set(values))
    spans: list[str] = []
    start = prev = None
    for v in items:
        if start is None:
            start = prev = v
        elif prev is not None and v == prev + 1:
            prev = v
        else:
            spans.append(f"{start}" if start == prev else f"{start}-{prev}")
            start = prev = v
    if start is not None:
        spans.append(f"{start}" if start == prev else f"{start}-{prev}")
    return ", ".join(spans)


def _who(rows: Sequence[int], columns: Sequence[int]) -> str:
    parts = []
    if rows:
        parts.append(f"row{'s' if len(rows) > 1 else ''} {format_numbers(rows)}")
    if columns:
        parts.append(f"column{'s' if len(columns) > 1 else ''} {format_numbers(columns)}")
    return " with ".join(parts) if parts else "nothing"


def anchor_words(verdict: Verdict) -> str:
    """What loose parts move relative to."""
    if verdict.supports is Supports.BASE:
        return "the pinned base"
    return f"the part holding {_who(verdict.anchor_rows, verdict.anchor_columns)}"


def describe_part(part: LoosePart, anchor: str) -> str:
    """One loose part in plain words.

    Example:
        >>> describe_part(LoosePart((3, 4), (), Racking.CLOCKWISE), "the pinned base").split(";")[0]
        'rows 3-4 can rack clockwise only (tops sway right) relative to the pinned base'
    """
    who = _who(part.rows, part.columns)
    if part.racking is Racking.BOTH:
        return f"{who} can rack both ways relative to {anchor}: no member ties it to the rest"
    if part.racking is Racking.CLOCKWISE:
        hint = "tops sway right" if part.rows else "right side drops"
    else:
        hint = "tops sway left" if part.rows else "right side rises"
    return (
        f"{who} can rack {part.racking.value} only ({hint}) relative to {anchor}; "
        "a tie or brace must stop the other sense too"
    )


def redundancy_words(k: int) -> str:
    """A layout's redundancy in plain words.

    Example:
        >>> redundancy_words(1)
        'survives the loss of any one member'
        >>> redundancy_words(2)
        'survives the loss of any 2 members'
    """
    if k < 0:
        return "not stable"
    if k == 0:
        return "a single member loss can leave a mechanism"
    return "survives the loss of any one member" if k == 1 else f"survives the loss of any {k} members"


#: What the robustness statistics assume, said next to their numbers (docs/robustness.md).
ROBUSTNESS_LIMITS = (
    "Stability only: first-order, pin-jointed, ties taut; no member strength, loads or sway. "
    "Members go missing one at a time at random, independently of the loads and of each other "
    "(uniformly, or weighted by each kind's loss likelihood); nobody replaces them."
)


def addition_words(addition: Addition) -> str:
    """What one more member would lock, in words.

    Example:
        >>> from bracegrid.model import Diagonal, Member, MemberKind
        >>> addition_words(Addition(Member(3, 5, MemberKind.TIE, Diagonal.RISING), 3, 21.5))
        'tie r3c5:rising locks 3 loose parts (cost 21.50)'
    """
    parts = "1 loose part" if addition.parts_locked == 1 else f"{addition.parts_locked} loose parts"
    return f"{addition.member.kind.value} {addition.member.label} locks {parts} (cost {addition.cost:.2f})"


def _way(dx: float, dy: float) -> str:
    """A node move in words: the larger component first (right/left, up/down); nodes are named
    pPqQ (horizontal grid line P, vertical grid line Q)."""
    horizontal = "right" if dx > 0 else "left"
    vertical = "up" if dy > 0 else "down"
    if abs(dx) >= 2 * abs(dy):
        return horizontal
    if abs(dy) >= 2 * abs(dx):
        return vertical
    return f"{horizontal} and {vertical}" if abs(dx) >= abs(dy) else f"{vertical} and {horizontal}"


def _bay_list(labels: Sequence[str], *, limit: int = 8) -> str:
    shown = ", ".join(labels[:limit])
    return shown + (f" and {len(labels) - limit} more" if len(labels) > limit else "")


def flex_words(flex: Flex) -> str:
    """A mechanism of a general frame in words: which bays rack which way, which nodes move and where.

    Example:
        >>> from bracegrid.analysis.verdict import BayRack, NodeMove
        >>> f = Flex((NodeMove(1, 0, 1.0, 0.0), NodeMove(1, 1, 1.0, 0.1)), (BayRack(1, 1, Racking.CLOCKWISE),), True)
        >>> flex_words(f)
        'mechanism: bay r1c1 racks clockwise (top sways right); 2 nodes move, furthest node p1q1 (moving right)'
    """
    parts: list[str] = []
    for sense, words in ((Racking.CLOCKWISE, "top sways right"), (Racking.ANTICLOCKWISE, "top sways left")):
        labels = [f"r{b.row}c{b.col}" for b in flex.bays if b.racking is sense]
        if labels:
            noun = "bay" if len(labels) == 1 else "bays"
            verb = "racks" if len(labels) == 1 else "rack"
            parts.append(f"{noun} {_bay_list(labels)} {verb} {sense.value} ({words})")
    if not parts:
        parts.append("no bay changes shape: part of the frame turns or slides about a node or a line")
    if flex.moves:
        top = max(flex.moves, key=lambda m: m.dx * m.dx + m.dy * m.dy)
        count = len(flex.moves)
        nodes = f"{count} node{'s' if count != 1 else ''}"
        parts.append(f"{nodes} move, furthest node p{top.p}q{top.q} (moving {_way(top.dx, top.dy)})")
    return "mechanism: " + "; ".join(parts)
