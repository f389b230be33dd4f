"""Why a request has no layout: diagnosis of infeasible requests in words, before any search."""

from __future__ import annotations

import numpy as np

from bracegrid.analysis import anchor_words, check_layout, describe_part, redundancy_of
from bracegrid.model import Frame, MemberKind, Supports
from bracegrid.optimize.bays import Additions, BayTable


def max_additions(table: BayTable, k: int) -> Additions:
    """Every member that could be added (dominant per bay): the most arcs both ways."""
    slots = table.free_slots
    top = np.minimum(slots, 2 if k > 0 else 1)
    braces = np.where(table.brace_ok, top, 0).astype(np.int64)
    rising = np.where(~table.brace_ok & table.rising_tie_ok, 1, 0).astype(np.int64)
    falling = np.where(~table.brace_ok & table.falling_tie_ok, 1, 0).astype(np.int64)
    return Additions(braces, rising, falling)


def infeasible_reasons(frame: Frame, table: BayTable, allow: frozenset[MemberKind], k: int) -> list[str]:
    """Why no layout exists (empty when one does).

    Puts every allowed member in every free diagonal and checks that; where even that leaves a
    mechanism (or too little redundancy), says which rows or columns are to blame.
    """
    full = max_additions(table, k)
    kept = tuple(frame.members)
    members = kept + full.members(table)
    verdict = check_layout(frame, members)
    if verdict.stable and (k == 0 or redundancy_of(frame, members) >= k):
        return []
    name = frame.name
    reasons: list[str] = []
    open_row = (table.free_slots > 0) | (table.exist_up + table.exist_down > 0)
    for i in range(table.rows):
        if not open_row[i].any():
            reasons.append(
                f"frame {name!r}: row {i + 1} has every bay blocked, so nothing can stop it racking; "
                "unblock a bay in that row"
            )
    if frame.supports is Supports.FREE:
        for j in range(table.cols):
            if not open_row[:, j].any():
                reasons.append(
                    f"frame {name!r}: column {j + 1} has every bay blocked, so nothing ties it to the rest; "
                    "unblock a bay in that column or pin the base"
                )
        if allow == frozenset({MemberKind.TIE}) and min(table.rows, table.cols) == 1 and not verdict.stable:
            line = "row" if table.rows == 1 else "column"
            reasons.append(
                f"frame {name!r}: ties only with supports free on a 1-{line} frame needs both diagonals of "
                f"every bay (an X of ties, or a kept brace): each {'column' if line == 'row' else 'row'} is "
                "held only through its own bay; clear those bays, allow braces or pin the base"
            )
    if not verdict.stable:
        if not reasons:
            anchor = anchor_words(verdict)
            allowed = " and ".join(sorted(kd.value + "s" for kd in allow)) or "no member kinds"
            for part in verdict.loose_parts:
                reasons.append(
                    f"frame {name!r}: even with {allowed} in every free diagonal, {describe_part(part, anchor)}; "
                    "unblock bays or allow more member kinds"
                )
    elif k > 0:
        got = redundancy_of(frame, members)
        reasons.append(
            f"frame {name!r}: redundancy {k} asked, but even with every allowed member in every free diagonal "
            f"the frame survives the loss of only {got} member(s); lower the redundancy, unblock bays or "
            "allow more member kinds"
        )
    return reasons
