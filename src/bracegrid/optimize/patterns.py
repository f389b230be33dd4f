"""The closed-form layouts of a complete frame and their cost (docs/optimizer.md gives the argument).

On a complete R x C frame with uniform prices, brace a and tie b, r = min(R, C), c = max(R, C):
braces only cost (r + c - 1) a, ties only 2 c b, and both together
min((r + c - 1) a, 2 r b + (c - r) a, 2 c b), each reached by one of the layouts here.
"""

from __future__ import annotations

from enum import Enum

import numpy as np

from bracegrid.optimize.bays import Additions


def closed_form_cost(rows: int, cols: int, brace: int | None, tie: int | None) -> int:
    """Minimum cost of a complete free frame with uniform costs (None = kind not allowed).

    ``r = min(R, C)``, ``c = max(R, C)``: braces only ``(r+c-1)a``, ties only
    ``2cb``, both ``min((r+c-1)a, 2rb + (c-r)a, 2cb)``.

    Example:
        >>> closed_form_cost(4, 6, 10, 7)  # min(90, 56 + 20, 84)
        76
    """
    r, c = min(rows, cols), max(rows, cols)
    options = []
    if brace is not None:
        options.append((r + c - 1) * brace)
    if tie is not None:
        options.append(2 * c * tie)
    if brace is not None and tie is not None:
        options.append(2 * r * tie + (c - r) * brace)
    return min(options)


class PatternKind(Enum):
    """The closed-form layouts of a complete frame."""

    TREE = "tree"
    """R + C - 1 braces: a spanning tree of the row/column graph."""
    CYCLE = "cycle"
    """2 max(R, C) ties in one directed cycle through every node."""
    MIXED = "mixed"
    """2 min(R, C) ties in a cycle over the short side and as many long-side nodes, braces for the rest."""

    @property
    def words(self) -> str:
        """Name used in reports."""
        return _PATTERN_WORDS[self]


_PATTERN_WORDS = {
    PatternKind.TREE: "spanning tree of braces",
    PatternKind.CYCLE: "one cycle of ties",
    PatternKind.MIXED: "tie cycle plus braces",
}


def pattern(r_count: int, c_count: int, kind: PatternKind) -> Additions:
    """The closed-form layouts of a complete R x C frame.

    Args:
        r_count: Rows.
        c_count: Columns.
        kind: Which of the three layouts (see :class:`PatternKind`).

    Returns:
        The members as additions.

    Example:
        >>> a = pattern(2, 3, PatternKind.MIXED)
        >>> int(a.braces.sum()), int(a.rising.sum() + a.falling.sum())
        (1, 4)
    """
    r, c = min(r_count, c_count), max(r_count, c_count)
    # Work as if rows are the short side; transpose at the end when R > C.
    braces = np.zeros((r, c), dtype=np.int64)
    rising = np.zeros((r, c), dtype=np.int64)
    falling = np.zeros((r, c), dtype=np.int64)
    if kind is PatternKind.TREE:
        braces[0, :] = 1
        braces[1:, 0] = 1
    elif kind is PatternKind.CYCLE:
        # One directed cycle col j -> row (j mod r) -> col j+1, through every column.
        for j in range(c):
            falling[j % r, j] = 1
            rising[j % r, (j + 1) % c] = 1
    else:
        # Tie cycle over the r short-side nodes and r long-side nodes, braces for the rest.
        for j in range(r):
            falling[j, j] = 1
            rising[j, (j + 1) % r] = 1
        braces[0, r:] = 1
    if r_count > c_count:
        # Transposing swaps rows and columns, which reverses every tie's arc
        # (row->col becomes col->row): a rising tie becomes a falling one.
        braces, rising, falling = braces.T.copy(), falling.T.copy(), rising.T.copy()
    return Additions(braces, rising, falling)
