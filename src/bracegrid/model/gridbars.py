"""Which grid bars, bays and nodes a general frame has: outlines (absent bays) and missing bar segments.

A frame's grid bar segments are its ledgers (horizontal line p = 0..R, spanning column j = 1..C)
and standards (vertical line q = 0..C, spanning row i = 1..R). A segment belongs to the frame when
at least one of the two bays it borders is present (inside the outline) and it is not listed as
missing. A node exists when a present segment ends at it. A complete frame has every segment.
"""

from __future__ import annotations

from bracegrid.model.frame import Frame, GridBar
from bracegrid.model.kinds import GridBarKind


def bay_present(frame: Frame, row: int, col: int) -> bool:
    """True when bay (row, col) lies on the grid and inside the outline.

    Example:
        >>> bay_present(Frame("f", (1000, 1000), (1000,), absent=frozenset({(1, 2)})), 1, 2)
        False
    """
    return 1 <= row <= frame.rows and 1 <= col <= frame.cols and (row, col) not in frame.absent


def all_grid_bars(frame: Frame) -> tuple[GridBar, ...]:
    """Every grid bar segment of the full rectangle, ledgers first (line, span order), then standards."""
    ledgers = [GridBar(GridBarKind.LEDGER, p, j) for p in range(frame.rows + 1) for j in range(1, frame.cols + 1)]
    standards = [GridBar(GridBarKind.STANDARD, q, i) for q in range(frame.cols + 1) for i in range(1, frame.rows + 1)]
    return (*ledgers, *standards)


def on_grid(frame: Frame, bar: GridBar) -> bool:
    """True when the segment lies on the frame's rectangle (line and span in range)."""
    if bar.kind is GridBarKind.LEDGER:
        return 0 <= bar.line <= frame.rows and 1 <= bar.span <= frame.cols
    return 0 <= bar.line <= frame.cols and 1 <= bar.span <= frame.rows


def outline_bar(frame: Frame, bar: GridBar) -> bool:
    """True when the segment is on the grid and borders at least one present bay.

    Example:
        >>> f = Frame("f", (1000, 1000), (1000,), absent=frozenset({(1, 2)}))
        >>> outline_bar(f, GridBar(GridBarKind.LEDGER, 0, 2)), outline_bar(f, GridBar(GridBarKind.STANDARD, 1, 1))
        (False, True)
    """
    return on_grid(frame, bar) and any(bay_present(frame, r, c) for r, c in bar.bays())


def present_grid_bars(frame: Frame) -> tuple[GridBar, ...]:
    """The grid bar segments the frame has, in :func:`all_grid_bars` order.

    Example:
        >>> f = Frame("f", (1000,), (1000,), missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 1)}))
        >>> [b.label for b in present_grid_bars(f)]
        ['ledger0c1', 'standard0r1', 'standard1r1']
    """
    if frame.is_complete:
        return all_grid_bars(frame)
    return tuple(b for b in all_grid_bars(frame) if b not in frame.missing and outline_bar(frame, b))


def present_nodes(frame: Frame) -> frozenset[tuple[int, int]]:
    """Every node (p, q) that a present grid bar ends at.

    Example:
        >>> len(present_nodes(Frame("f", (1000, 1000), (1000,), absent=frozenset({(1, 2)}))))
        4
    """
    return frozenset(end for bar in present_grid_bars(frame) for end in bar.ends())


def bay_corners(row: int, col: int) -> tuple[tuple[int, int], ...]:
    """The four corner nodes (p, q) of bay (row, col): bottom-left, bottom-right, top-left, top-right."""
    return ((row - 1, col - 1), (row - 1, col), (row, col - 1), (row, col))


def bays_without_corners(frame: Frame) -> frozenset[tuple[int, int]]:
    """Present bays with at least one corner node gone (no grid bar reaches it): no member may go there."""
    nodes = present_nodes(frame)
    return frozenset(
        (r, c)
        for r in range(1, frame.rows + 1)
        for c in range(1, frame.cols + 1)
        if bay_present(frame, r, c) and any(n not in nodes for n in bay_corners(r, c))
    )


def closed_bays(frame: Frame) -> frozenset[tuple[int, int]]:
    """Bays that cannot take a member because of the frame's shape: absent ones and those missing a corner."""
    if frame.is_complete:
        return frozenset()
    return frame.absent | bays_without_corners(frame)
