"""The spreading rules as linear rows over bays, and why a set of rules cannot be met, in words.

Each rule becomes rows of the form "the members (or braced bays) in these bays number at least /
at most N"; kept members count, a blocked bay holds none. :func:`rule_rows` gives the rows the
master model adds; :func:`rule_reasons` finds the rows no layout can meet before any search.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from bracegrid.model import Frame, Member
from bracegrid.optimize.bays import BayTable


@dataclass(frozen=True, slots=True)
class RuleRow:
    """One linear rule over a set of bays.

    Attributes:
        bays: (row, col) pairs, 1-based.
        at_least: Lower limit (None: none).
        at_most: Upper limit (None: none).
        braced_bays: Count braced bays (a bay with at least one member) instead of members.
        reason: The rule and where it applies, in words.
    """

    bays: tuple[tuple[int, int], ...]
    at_least: int | None
    at_most: int | None
    braced_bays: bool
    reason: str


def _span(a: int, b: int) -> str:
    return f"bay {a}" if a == b else f"bays {a}-{b}"


def rule_rows(frame: Frame) -> list[RuleRow]:
    """The frame's spreading rules as rows over bays.

    Example:
        >>> from bracegrid.model import SpreadRules
        >>> rows = rule_rows(Frame("f", (1000,) * 5, (2000,), rules=SpreadRules(max_unbraced_bays=2)))
        >>> [(r.bays[0][1], r.bays[-1][1], r.at_least) for r in rows]
        [(1, 3, 1), (2, 4, 1), (3, 5, 1)]
    """
    rules = frame.rules
    r_count, c_count = frame.rows, frame.cols
    out: list[RuleRow] = []
    for i in range(1, r_count + 1):
        n = rules.max_unbraced_bays
        if n is not None and n < c_count:
            for j in range(1, c_count - n + 1):
                bays = tuple((i, b) for b in range(j, j + n + 1))
                what = f"max_unbraced_bays = {n}: lift {i}, {_span(j, j + n)} need a diagonal"
                out.append(RuleRow(bays, 1, None, False, what))
        e = rules.end_bay_within
        if e is not None:
            left = tuple((i, b) for b in range(1, e + 1))
            right = tuple((i, b) for b in range(c_count - e + 1, c_count + 1))
            out.append(RuleRow(left, 1, None, False, f"end_bay_within = {e}: lift {i}, {_span(1, e)}"))
            if right != left:
                what = f"end_bay_within = {e}: lift {i}, {_span(c_count - e + 1, c_count)}"
                out.append(RuleRow(right, 1, None, False, what))
        m = rules.min_braced_bays
        if m is not None:
            bays = tuple((i, b) for b in range(1, c_count + 1))
            out.append(RuleRow(bays, m, None, True, f"min_braced_bays = {m}: lift {i}"))
    cap = rules.max_members_per_column
    if cap is not None:
        for j in range(1, c_count + 1):
            bays = tuple((i, j) for i in range(1, r_count + 1))
            out.append(RuleRow(bays, None, cap, False, f"max_members_per_column = {cap}: column {j}"))
    return out


def rule_reasons(frame: Frame, table: BayTable, rows: list[RuleRow]) -> list[str]:
    """Rules no layout can meet, each in words with what to change (empty: none found).

    A bay can hold its kept members plus one new member on each diagonal still free for an
    allowed kind.

    Example:
        >>> from bracegrid.model import CostCatalogue, MemberKind, SpreadRules
        >>> from bracegrid.optimize.bays import bay_table
        >>> f = Frame("f", (1000,) * 4, (2000,), blocked=frozenset({(1, 2), (1, 3)}),
        ...           rules=SpreadRules(max_unbraced_bays=1))
        >>> rule_reasons(f, bay_table(f, CostCatalogue(), (), frozenset(MemberKind)), rule_rows(f))[0][:60]
        'max_unbraced_bays = 1: lift 1, bays 2-3 need a diagonal, but'
    """
    out: list[str] = []
    kept_in: dict[tuple[int, int], int] = {}
    for m in frame.members:
        kept_in[m.bay] = kept_in.get(m.bay, 0) + 1
    for row in rows:
        kept = 0
        room = 0
        usable = 0
        for r, c in row.bays:
            i, j = r - 1, c - 1
            has = kept_in.get((r, c), 0)
            free = (int(table.rising_free[i, j]) + int(table.falling_free[i, j])) if (
                table.tie_ok or table.brace_ok[i, j]) else 0  # fmt: skip
            kept += has
            room += free
            usable += int(has > 0 or free > 0)
        if row.at_least is not None:
            most = usable if row.braced_bays else kept + room
            if most < row.at_least:
                what = "braced bays" if row.braced_bays else "members"
                out.append(
                    f"{row.reason}, but only {most} {what} fit there (blocked bays hold none); "
                    "relax the rule or clear a bay"
                )
        if row.at_most is not None and kept > row.at_most:
            out.append(f"{row.reason}, but {kept} members are kept there already; raise the limit")
    rules = frame.rules
    e, cap = rules.end_bay_within, rules.max_members_per_column
    if e is not None and cap is not None and e * cap < frame.rows:
        out.append(
            f"end_bay_within = {e} needs a member in the first {e} bay(s) of each of the {frame.rows} lifts, "
            f"but max_members_per_column = {cap} allows at most {e * cap} there; raise one of them"
        )
    return out


def meets_rules(kept: Sequence[Member], added: Sequence[Member], rows: Sequence[RuleRow]) -> bool:
    """Whether a layout (kept plus added members) meets every rule row."""
    layout = [*kept, *added]
    for row in rows:
        bays = set(row.bays)
        inside = [m.bay for m in layout if m.bay in bays]
        count = len(set(inside)) if row.braced_bays else len(inside)
        if (row.at_least is not None and count < row.at_least) or (row.at_most is not None and count > row.at_most):
            return False
    return True
