"""Bay rectangles and the bays openings block (src/bracegrid/model/geometry.py).

References for the expected values: bay corners and overlap areas by hand (rectangles on the
grid lines); the random cases are checked against an independent computation in this file:
every bay's rectangle is rebuilt from the widths and heights with ``shapely.geometry.box`` and
its overlap area with the opening is measured by shapely, over *all* bays (no bisection), then
compared with the rule stated in ``Frame.opening_overlap`` (blocked iff the overlap area is
positive and greater than the threshold times the bay area).
"""

from __future__ import annotations

import itertools
import random

import pytest
from shapely.geometry import Polygon, box

from bracegrid.model import Frame, Opening, bay_box, bays_blocked_by, blocked_bays, opening_polygon


def _rect(name: str, x0: int, y0: int, x1: int, y1: int) -> Opening:
    return Opening(name, ((x0, y0), (x1, y0), (x1, y1), (x0, y1)))


def test_bay_box_corners() -> None:
    # Hand: columns 3000 and 2000 wide, rows 1500 and 2500 high; bay (2, 2) spans x 3000-5000, y 1500-4000.
    f = Frame("f", (3000, 2000), (1500, 2500))
    assert bay_box(f, 1, 1).bounds == (0.0, 0.0, 3000.0, 1500.0)
    assert bay_box(f, 1, 2).bounds == (3000.0, 0.0, 5000.0, 1500.0)
    assert bay_box(f, 2, 1).bounds == (0.0, 1500.0, 3000.0, 4000.0)
    assert bay_box(f, 2, 2).bounds == (3000.0, 1500.0, 5000.0, 4000.0)
    assert bay_box(f, 2, 2).area == 2000 * 2500


def test_opening_polygon_keeps_the_corners() -> None:
    door = _rect("door", 100, 0, 900, 2100)
    poly = opening_polygon(door)
    assert poly.area == 800 * 2100  # hand: 0.8 m x 2.1 m
    assert poly.bounds == (100.0, 0.0, 900.0, 2100.0)


def test_door_blocks_the_bays_it_crosses() -> None:
    # Hand: x 3200-4000 lies in column 2 (3000-6000); y 0-2100 crosses row 1 (0-2000) and row 2 (2000-4000).
    f = Frame("f", (3000, 3000), (2000, 2000))
    door = _rect("door", 3200, 0, 4000, 2100)
    assert bays_blocked_by(f, door) == frozenset({(1, 2), (2, 2)})


def test_touching_edges_do_not_block() -> None:
    # An opening exactly filling bay (1, 1) shares an edge with (1, 2) and (2, 1) and a corner with (2, 2):
    # the shared boundary has zero area, so only (1, 1) is blocked.
    f = Frame("f", (3000, 3000), (2000, 2000))
    assert bays_blocked_by(f, _rect("fill", 0, 0, 3000, 2000)) == frozenset({(1, 1)})
    # An opening starting exactly on the grid line x = 3000 stays out of column 1.
    assert bays_blocked_by(f, _rect("right", 3000, 500, 3500, 1500)) == frozenset({(1, 2)})
    # An opening ending exactly on the grid line y = 2000 stays out of row 2.
    assert bays_blocked_by(f, _rect("low", 500, 1000, 2500, 2000)) == frozenset({(1, 1)})
    # A triangle touching bay (2, 2) only at the corner (3000, 2000).
    tri = Opening("tri", ((1000, 500), (3000, 2000), (1000, 2000)))
    assert bays_blocked_by(f, tri) == frozenset({(1, 1)})


def test_overlap_threshold() -> None:
    # One bay 1000 x 1000 (area 1e6). Openings cover x 0-400 (40 %), 0-500 (50 %), 0-600 (60 %).
    base = Frame("f", (1000,), (1000,), opening_overlap=0.5)
    forty, half, sixty = _rect("a", 0, 0, 400, 1000), _rect("b", 0, 0, 500, 1000), _rect("c", 0, 0, 600, 1000)
    assert bays_blocked_by(base, forty) == frozenset()  # 40 % < 50 %
    assert bays_blocked_by(base, half) == frozenset()  # 50 % is not greater than 50 %
    assert bays_blocked_by(base, sixty) == frozenset({(1, 1)})  # 60 % > 50 %
    # Threshold 0 (the default): any positive area blocks, even a 1 mm x 1 mm corner.
    zero = Frame("f", (1000,), (1000,))
    assert bays_blocked_by(zero, _rect("tiny", 0, 0, 1, 1)) == frozenset({(1, 1)})
    assert bays_blocked_by(zero, forty) == frozenset({(1, 1)})


def test_threshold_is_per_bay_area() -> None:
    # Columns 1000 and 3000 wide, one row 1000 high. The opening x 500-2000 covers 500/1000 = 50 % of bay 1
    # and 1000/3000 = 33 % of bay 2: with threshold 0.4 only bay 1 is blocked.
    f = Frame("f", (1000, 3000), (1000,), opening_overlap=0.4)
    assert bays_blocked_by(f, _rect("o", 500, 0, 2000, 1000)) == frozenset({(1, 1)})


def test_blocked_bays_is_listed_or_opening_blocked() -> None:
    f = Frame(
        "f",
        (3000, 3000, 3000),
        (2000, 2000),
        blocked=frozenset({(2, 3), (1, 1)}),
        openings=(_rect("door", 3200, 0, 4000, 2100), _rect("vent", 6100, 2100, 6500, 2500)),
    )
    # Hand: door blocks (1, 2) and (2, 2); vent (x 6100-6500, y 2100-2500) blocks (2, 3), already listed.
    assert bays_blocked_by(f, f.openings[0]) == frozenset({(1, 2), (2, 2)})
    assert bays_blocked_by(f, f.openings[1]) == frozenset({(2, 3)})
    assert blocked_bays(f) == frozenset({(1, 1), (2, 3), (1, 2), (2, 2)})
    assert blocked_bays(Frame("f", (3000,), (2000,))) == frozenset()


def _random_opening(rng: random.Random, xs: list[int], ys: list[int]) -> Opening:
    """A rectangle or triangle inside the frame, corners often on grid lines (to test touching)."""

    def coord(lines: list[int]) -> int:
        return rng.choice(lines) if rng.random() < 0.4 else rng.randint(0, lines[-1])

    if rng.random() < 0.5:
        x0, x1 = sorted((coord(xs), coord(xs)))
        y0, y1 = sorted((coord(ys), coord(ys)))
        x1, y1 = max(x1, x0 + 1), max(y1, y0 + 1)
        return _rect("r", x0, y0, x1, y1)
    while True:
        pts = tuple((coord(xs), coord(ys)) for _ in range(3))
        if Polygon(pts).area > 0:
            return Opening("t", pts)


@pytest.mark.parametrize("seed", range(40))
def test_agrees_with_shapely_over_every_bay(seed: int) -> None:
    rng = random.Random(seed)
    widths = [rng.choice([500, 1000, 1300, 2500, 3000]) for _ in range(rng.randint(1, 5))]
    heights = [rng.choice([500, 1500, 2000, 2700]) for _ in range(rng.randint(1, 5))]
    overlap = rng.choice([0.0, 0.0, 0.1, 0.25, 0.5, 0.9])
    frame = Frame("f", tuple(widths), tuple(heights), opening_overlap=overlap)
    xs = list(itertools.accumulate(widths, initial=0))
    ys = list(itertools.accumulate(heights, initial=0))
    opening = _random_opening(rng, xs, ys)
    poly = Polygon(opening.polygon)
    expected = set()
    for row, col in itertools.product(range(1, len(heights) + 1), range(1, len(widths) + 1)):
        cell = box(xs[col - 1], ys[row - 1], xs[col], ys[row])
        area = cell.intersection(poly).area
        if area > 0 and area > overlap * cell.area:
            expected.add((row, col))
    assert bays_blocked_by(frame, opening) == frozenset(expected)
    listed = frozenset({(1, 1)})
    with_list = Frame("f", tuple(widths), tuple(heights), blocked=listed, openings=(opening,), opening_overlap=overlap)
    assert blocked_bays(with_list) == listed | frozenset(expected)
