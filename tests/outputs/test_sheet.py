"""Sheet planning and sizes (src/bracegrid/outputs/sheet.py): plan_sheet, legend_size, bill_size, title_size.

References: ISO 216 sheet sizes (A3 420 x 297 ... A0 1189 x 841 mm, landscape); the layout rule of
plan_sheet's docstring and docs/drawings.md (frames side by side on one ground line above a bottom
band; smallest sheet first, then the most detailed scale on which everything fits and the smallest
bay prints at least MIN_BAY = 10 mm). The named cases are worked by hand in the comments; the random
cases are checked against a fit test written in this file from that rule, and every plan is checked
geometrically (each frame block inside the paper less the margins, above the band, not overlapping).
"""

from __future__ import annotations

import random

import pytest

from bracegrid.model import Diagonal, Frame, Member, MemberKind, Project
from bracegrid.outputs.bill import build_bom
from bracegrid.outputs.sheet import (
    GAP,
    MARGIN,
    MIN_BAY,
    SCALES,
    SHEETS,
    FrameBox,
    Margins,
    SheetPlan,
    bill_size,
    legend_rows,
    legend_size,
    plan_sheet,
    title_size,
)
from bracegrid.outputs.symbols import text_width

EPS = 1e-6
NONE = Margins(0.0, 0.0, 0.0, 0.0)


def test_sheet_table_is_iso_216_landscape() -> None:
    assert SHEETS == (("A3", 420.0, 297.0), ("A2", 594.0, 420.0), ("A1", 841.0, 594.0), ("A0", 1189.0, 841.0))
    assert list(SCALES) == sorted(SCALES)  # most detailed first


def _block_width(b: FrameBox, scale: float) -> float:
    return max(b.width_mm / scale + b.margins.right, b.margins.min_width)


def _fits(boxes: list[FrameBox], band: tuple[float, float], paper: tuple[float, float], scale: float) -> bool:
    """The docstring's rule: frames side by side (GAP apart) on one ground line above the band, inside the margins."""
    width = sum(b.margins.left + _block_width(b, scale) for b in boxes) + GAP * (len(boxes) - 1)
    height = max(b.margins.top + b.height_mm / scale for b in boxes) + max(b.margins.bottom for b in boxes)
    room_w, room_h = paper[0] - 2 * MARGIN, paper[1] - 2 * MARGIN
    return width <= room_w and band[0] <= room_w and height + GAP + band[1] <= room_h


def _check_geometry(plan: SheetPlan, boxes: list[FrameBox], band: tuple[float, float]) -> None:
    paper_w, paper_h = plan.paper
    assert plan.band == (MARGIN, MARGIN)
    assert band[0] <= paper_w - 2 * MARGIN + EPS
    floor = MARGIN + band[1] + GAP  # frames stand above the band
    previous_right = None
    ground = None
    for box, (ox, oy) in zip(boxes, plan.origins, strict=True):
        x, y = ox / plan.scale, oy / plan.scale  # outline's bottom-left corner, paper mm
        left = x - box.margins.left
        right = x + _block_width(box, plan.scale)
        bottom = y - box.margins.bottom
        top = y + box.height_mm / plan.scale + box.margins.top
        assert left >= MARGIN - EPS
        assert right <= paper_w - MARGIN + EPS
        assert bottom >= floor - EPS
        assert top <= paper_h - MARGIN + EPS
        if previous_right is not None:
            assert left >= previous_right + GAP - EPS  # side by side, GAP apart
        previous_right = right
        ground = y if ground is None else ground
        assert y == pytest.approx(ground)  # one common ground line


def test_docstring_case() -> None:
    # Hand, A3 (room 400 x 277): at 1:50 the 12 x 8 m frame is 240 x 160; width 30 + 240 + 5 = 275 <= 400,
    # height 15 + 160 + 30 = 205, + 8 + 60 = 273 <= 277; smallest bay 2000 / 50 = 40 mm >= 10.
    # At 1:25 it is 480 wide > 400 (and 1:20 wider still): 1:50 is the most detailed that fits.
    boxes = [FrameBox(12000, 8000, 2000, Margins(30, 5, 30, 15))]
    plan = plan_sheet(boxes, (300, 60))
    assert (plan.sheet, plan.paper, plan.scale) == ("A3", (420.0, 297.0), 50)
    _check_geometry(plan, boxes, (300, 60))


def test_long_frame_goes_to_a2() -> None:
    # Hand: 50 m long, bays 1 m: the bay rule allows 1:100 at most (1000 / 100 = 10 mm). At 1:100 the frame
    # is 500 mm long: > 400 (A3 room), <= 574 (A2 room). A2 at 1:100.
    boxes = [FrameBox(50000, 2000, 1000, NONE)]
    plan = plan_sheet(boxes, (100, 30))
    assert (plan.sheet, plan.scale) == ("A2", 100)
    _check_geometry(plan, boxes, (100, 30))


def test_tall_frame_picks_a_coarser_scale_on_a3() -> None:
    # Hand, A3 room height 277: 30 m high needs 30000 / s + 8 + 30 <= 277, s >= 125.5: 1:125 gives 240 + 38 = 278
    # (too tall), 1:150 gives 200 + 38 = 238. Bay 2000 / 150 = 13.3 mm >= 10.
    boxes = [FrameBox(3000, 30000, 2000, NONE)]
    plan = plan_sheet(boxes, (100, 30))
    assert (plan.sheet, plan.scale) == ("A3", 150)
    _check_geometry(plan, boxes, (100, 30))


def test_wide_band_needs_a_bigger_sheet() -> None:
    # A 450 mm band does not fit the A3 room (400) but fits A2 (574); the small frame then goes 1:20.
    boxes = [FrameBox(2000, 2000, 1000, NONE)]
    assert (plan_sheet(boxes, (390, 30)).sheet, plan_sheet(boxes, (390, 30)).scale) == ("A3", 20)
    assert (plan_sheet(boxes, (450, 30)).sheet, plan_sheet(boxes, (450, 30)).scale) == ("A2", 20)


def test_heading_width_counts() -> None:
    # A 1 m frame at 1:20 is 50 mm wide, but a 405 mm heading does not fit the A3 room of 400 mm.
    fits = [FrameBox(1000, 1000, 1000, Margins(0, 0, 0, 0, min_width=395))]
    too_wide = [FrameBox(1000, 1000, 1000, Margins(0, 0, 0, 0, min_width=405))]
    assert (plan_sheet(fits, (10, 10)).sheet, plan_sheet(fits, (10, 10)).scale) == ("A3", 20)
    assert (plan_sheet(too_wide, (10, 10)).sheet, plan_sheet(too_wide, (10, 10)).scale) == ("A2", 20)


def test_frames_stand_side_by_side() -> None:
    # Hand: three 8 m frames at 1:50 are 160 mm each: 3 x 160 + 2 x 8 = 496 > 400 (A3); at 1:75, 106.7 each:
    # 320 + 16 = 336 <= 400. Bays 2000 / 75 = 26.7 mm.
    boxes = [FrameBox(8000, 4000, 2000, NONE)] * 3
    plan = plan_sheet(boxes, (100, 30))
    assert (plan.sheet, plan.scale) == ("A3", 75)
    _check_geometry(plan, boxes, (100, 30))


def test_nothing_fits_at_1_2000_so_the_scale_grows() -> None:
    # Hand: 5 km long on A0 (room 1169): 1:2000 gives 2500 mm, 1:4000 1250 mm, 1:8000 625 mm: doubling stops
    # at 1:8000. (The 5 m bays fail the 10 mm rule above 1:500, where nothing fits, so no usual scale works.)
    boxes = [FrameBox(5_000_000, 1000, 5000, NONE)]
    plan = plan_sheet(boxes, (10, 10))
    assert (plan.sheet, plan.scale) == ("A0", 8000)
    _check_geometry(plan, boxes, (10, 10))


def test_small_bays_still_get_the_smallest_sheet() -> None:
    # A 1 m x 1 m frame with a 150 mm bay: 150 / 20 = 7.5 mm < 10 at every usual scale. The frame itself
    # (50 x 50 mm at 1:20) fits A3 easily; the docstring's "smallest sheet and most detailed scale on which
    # everything fits" then means A3 at 1:20.
    plan = plan_sheet([FrameBox(1000, 1000, 150, NONE)], (100, 30))
    assert (plan.sheet, plan.scale) == ("A3", 20)


def test_frames_with_different_bottom_margins_stay_above_the_band() -> None:
    # Hand, A3 room height 277: the tall frame sets the ground line 16000 / s above it, the short one needs
    # 40 mm below it: 16000 / s + 40 + 8 + 30 <= 277 gives s >= 80.4, so 1:100. At 1:75 (what the extent
    # formula allows: max(213.3, 26.7 + 40) + 38 = 251.3 <= 277) the ground line lands at 60.8 mm and the
    # short frame's margin reaches down to 20.8 mm, 19 mm into the band (whose top is at 10 + 30 = 40 mm).
    boxes = [FrameBox(2000, 16000, 1000, NONE), FrameBox(2000, 2000, 1000, Margins(0, 0, 40, 0))]
    plan = plan_sheet(boxes, (100, 30))
    _check_geometry(plan, boxes, (100, 30))
    assert (plan.sheet, plan.scale) == ("A3", 100)


@pytest.mark.parametrize("seed", range(40))
def test_random_plans_are_the_first_fit(seed: int) -> None:
    rng = random.Random(seed)
    boxes = [
        FrameBox(
            rng.choice([2000, 8000, 30000, 60000]),
            rng.choice([2000, 6000, 16000, 30000]),
            rng.choice([500, 1000, 2500]),
            Margins(rng.uniform(0, 40), rng.uniform(0, 20), rng.uniform(0, 40), rng.uniform(0, 25), rng.uniform(0, 80)),
        )
        for _ in range(rng.randint(1, 3))
    ]
    band = (rng.uniform(100, 420), rng.uniform(30, 80))
    plan = plan_sheet(boxes, band)
    _check_geometry(plan, boxes, band)
    smallest_bay = min(b.min_bay_mm for b in boxes)
    readable = any(smallest_bay / scale >= MIN_BAY for scale in SCALES)
    candidates = [
        (name, scale)
        for name, w, h in SHEETS
        for scale in SCALES
        if (smallest_bay / scale >= MIN_BAY or not readable) and _fits(boxes, band, (w, h), scale)
    ]
    if candidates:
        assert (plan.sheet, plan.scale) == candidates[0]  # smallest sheet, then most detailed scale
    else:
        assert plan.sheet == "A0"
        assert plan.scale >= SCALES[-1]


def test_legend_and_title_sizes() -> None:
    # Hand: 16 rows; 9 at 4.2 mm, the three marker rows (curls, diamond) 6.0, support and bay tag 5.6,
    # the blocked-bay and opening samples 5.0, plus the 9 mm head: 9 + 37.8 + 18 + 11.2 + 10 = 86.0.
    # Width: 3 + 16 (samples) + 3 + the longest line of words + 3.
    w, h = legend_size()
    assert h == pytest.approx(9 + 9 * 4.2 + 3 * 6.0 + 2 * 5.6 + 2 * 5.0)
    longest = max(text_width(words, 2.0) for _, words, _ in legend_rows())
    assert w == pytest.approx(25.0 + longest)
    assert title_size() == (120.0, 44.0)


def _bom_height(groups: int, frames: int = 1) -> float:
    """Hand: 8 mm head + 3.7 mm per row: header, groups, per-frame totals (several frames), TOTAL, proposed."""
    rows = 1 + groups + (frames if frames > 1 else 0) + 2
    return 8.0 + 3.7 * rows


def test_bill_size() -> None:
    b, t = MemberKind.BRACE, MemberKind.TIE
    r, f = Diagonal.RISING, Diagonal.FALLING
    one_group = Frame("a", (3000, 3000), (4000,), members=(Member(1, 1, b, r), Member(1, 2, b, f)))
    two_groups = Frame("b", (3000, 3000), (4000,), members=(Member(1, 1, b, r), Member(1, 2, t, f, existing=False)))
    empty = Frame("c", (3000,), (4000,))
    width = 30 + 13 + 19 + 9 + 21 + 18 + 19  # the seven columns, hand sum = 129 mm
    for frames, groups in (([one_group], 1), ([two_groups], 2), ([empty], 1)):  # an empty frame shows "none"
        size = bill_size(build_bom(Project("p", tuple(frames))))
        assert size[0] == width
        assert size[1] == pytest.approx(_bom_height(groups))
    both = bill_size(build_bom(Project("p", (one_group, two_groups))))
    assert both[1] == pytest.approx(_bom_height(3, frames=2))
    assert both[1] > bill_size(build_bom(Project("p", (one_group,))))[1] > 0
