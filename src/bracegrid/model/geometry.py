"""Geometry (shapely): bay rectangles, opening polygons and the bays openings block."""

from __future__ import annotations

from bisect import bisect_left, bisect_right

from shapely.geometry import Polygon, box

from bracegrid.model.frame import Frame, Opening
from bracegrid.model.gridbars import closed_bays


def bay_box(frame: Frame, row: int, col: int) -> Polygon:
    """Rectangle of bay (row, col), 1-based, in frame millimetres.

    Example:
        >>> from bracegrid.model import Frame
        >>> bay_box(Frame("f", (3000, 2000), (1500,)), 1, 2).bounds
        (3000.0, 0.0, 5000.0, 1500.0)
    """
    xs, ys = frame.x_lines(), frame.y_lines()
    return box(xs[col - 1], ys[row - 1], xs[col], ys[row])


def opening_polygon(opening: Opening) -> Polygon:
    """The opening as a shapely polygon (may be invalid; see loading)."""
    return Polygon(opening.polygon)


def bays_blocked_by(frame: Frame, opening: Opening) -> frozenset[tuple[int, int]]:
    """Bays whose overlap with the opening exceeds the frame's threshold.

    A bay is blocked when the overlap area is greater than
    ``frame.opening_overlap`` times the bay area (so with the default 0, any
    positive area blocks; touching along an edge does not).

    Example:
        >>> from bracegrid.model import Frame, Opening
        >>> f = Frame("f", (3000, 3000), (2000, 2000))
        >>> door = Opening("door", ((3200, 0), (4000, 0), (4000, 2100), (3200, 2100)))
        >>> sorted(bays_blocked_by(f, door))
        [(1, 2), (2, 2)]
    """
    poly = opening_polygon(opening)
    xs, ys = frame.x_lines(), frame.y_lines()
    minx, miny, maxx, maxy = poly.bounds
    c0 = max(1, bisect_right(xs, minx))
    c1 = min(frame.cols, bisect_left(xs, maxx))
    r0 = max(1, bisect_right(ys, miny))
    r1 = min(frame.rows, bisect_left(ys, maxy))
    hit: set[tuple[int, int]] = set()
    for row in range(r0, r1 + 1):
        for col in range(c0, c1 + 1):
            cell = bay_box(frame, row, col)
            area = cell.intersection(poly).area
            if area > 0 and area > frame.opening_overlap * cell.area:
                hit.add((row, col))
    return frozenset(hit)


def blocked_bays(frame: Frame) -> frozenset[tuple[int, int]]:
    """Every bay where no member may go: listed ones, those openings block, and those outside the outline
    or missing a corner node (:func:`bracegrid.model.gridbars.closed_bays`).

    Example:
        >>> from bracegrid.model import Frame
        >>> sorted(blocked_bays(Frame("f", (3000,), (2000,), blocked=frozenset({(1, 1)}))))
        [(1, 1)]
    """
    out = set(frame.blocked) | closed_bays(frame)
    for opening in frame.openings:
        out |= bays_blocked_by(frame, opening)
    return frozenset(out)
