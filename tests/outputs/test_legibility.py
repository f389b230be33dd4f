"""Sheets a crew can read (issue 10): nothing hides a label, an outline or a marker; the legend reads right.

Geometry is read back from the written DXF with ezdxf (``virtual_entities`` explodes
each symbol into the lines, arcs and solids a reader draws) and tested with shapely,
independently of the placement code. Pixel checks read the PNG preview with
matplotlib's image reader. Cases: the demo projects (as shipped and as optimized),
the hand-made mixed layout of the demo face, a loose deck, and a frame of 0.9 m bays.
"""

from __future__ import annotations

import io
import itertools
import math
import re
from datetime import date
from pathlib import Path

import ezdxf
import numpy as np
import pytest
from ezdxf.document import Drawing
from matplotlib.image import imread
from shapely.geometry import LineString, MultiLineString, Point, Polygon, box
from shapely.ops import unary_union

from bracegrid.io import load_project
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Opening, Project, Supports
from bracegrid.optimize import SolveOptions, optimize_project
from bracegrid.outputs.drawing import DrawnSheet, build_drawing, dxf_bytes
from bracegrid.outputs.layers import Layer
from bracegrid.outputs.markers import place_markers
from bracegrid.outputs.preview import PreviewFormat, render_preview
from bracegrid.outputs.sheet import legend_rows, legend_size
from bracegrid.outputs.symbols import (
    BLOCKED_PATTERN,
    CRITICAL_BLOCK,
    DIM_STYLE,
    TICK_BLOCK,
    TIE_ACW_BLOCK,
    TIE_CW_BLOCK,
)
from tests.drawing_cases import ORCHARD, QUAYSIDE, ROOT, braced_quayside, loose_deck

WHEN = date(2026, 12, 1)
B, T = MemberKind.BRACE, MemberKind.TIE
RISE, FALL = Diagonal.RISING, Diagonal.FALLING
MEMBER_LAYERS = {Layer.BRACE_EXST, Layer.BRACE_NEWW, Layer.TIE_EXST, Layer.TIE_NEWW}
MARKER_BLOCKS = {TIE_CW_BLOCK, TIE_ACW_BLOCK, CRITICAL_BLOCK}


def narrow_bays() -> Project:
    """A pinned frame of 0.9 m bays (invented): an X of ties per lift, every tie critical, and braces.

    Each lift of a pinned base needs its own pair of senses; one X per lift gives exactly
    that, so every tie is critical (both markers in the same 0.9 m bay), and two braces
    share a lift so neither is critical.
    """
    members = [Member(r, 1 + (r % 3), T, d, existing=False) for r in (1, 2, 3) for d in (RISE, FALL)]
    members += [Member(4, 2, B, RISE), Member(4, 3, B, FALL)]
    frame = Frame("narrow bays", (900,) * 4, (2000,) * 4, supports=Supports.BASE, members=tuple(members))
    free = Frame("narrow free", (900,) * 3, (1800,) * 2,
                 members=(Member(1, 1, T, RISE), Member(1, 1, T, FALL), Member(1, 2, B, RISE), Member(2, 1, B, FALL),
                          Member(1, 3, T, RISE), Member(1, 3, T, FALL)))  # fmt: skip
    return Project("Narrow bays (invented)", (frame, free))


def optimized(path: Path) -> Project:
    return optimize_project(load_project(path), options=SolveOptions(time_limit=10, workers=1)).project


CASES = {
    "quayside": lambda: load_project(QUAYSIDE),
    "quayside-optimized": lambda: optimized(QUAYSIDE),
    "quayside-mixed": braced_quayside,
    "orchard": lambda: load_project(ORCHARD),
    "mill-lane-optimized": lambda: optimized(ROOT / "projects" / "mill-lane-roof.toml"),
    "deck": loose_deck,
    "narrow": narrow_bays,
}


@pytest.fixture(scope="module", params=sorted(CASES))
def drawn(request: pytest.FixtureRequest) -> tuple[DrawnSheet, Drawing]:
    sheet = build_drawing(CASES[request.param](), when=WHEN)
    return sheet, ezdxf.read(io.StringIO(dxf_bytes(sheet.doc).decode("utf-8")))


def _shape(entity: ezdxf.entities.DXFGraphic) -> object:
    """A shapely geometry of one exploded entity (lines as lines, filled shapes as polygons)."""
    kind = entity.dxftype()
    if kind == "LINE":
        return LineString([entity.dxf.start.vec2, entity.dxf.end.vec2])
    if kind in {"ARC", "CIRCLE"}:
        return LineString([p.vec2 for p in entity.flattening(entity.dxf.radius / 50)])
    if kind == "SOLID":
        v = [entity.dxf.vtx0, entity.dxf.vtx1, entity.dxf.vtx3, entity.dxf.vtx2]
        return Polygon([p.vec2 for p in v]).buffer(0)
    if kind == "LWPOLYLINE":
        pts = [p[:2] for p in entity.get_points("xy")]
        return LineString([*pts, pts[0]] if entity.closed else pts)
    if kind == "WIPEOUT":
        return None
    raise AssertionError(kind)


def _half(layer_name: str) -> float:
    """Half the print width of a layer's strokes, paper mm."""
    (layer,) = [x for x in Layer if x.layer_name == layer_name]
    return layer.spec.lineweight / 200


def _marker_shapes(doc: Drawing) -> list[tuple[Point, object, float]]:
    """(insert point, drawn geometry, half stroke width) of every marker on the frames (not the legend)."""
    out = []
    for e in doc.modelspace().query("INSERT"):
        if e.dxf.name in MARKER_BLOCKS and e.dxf.layer != Layer.LEGEND.layer_name:
            parts = [g for g in (_shape(v) for v in e.virtual_entities()) if g is not None]
            out.append((Point(e.dxf.insert.vec2), unary_union(parts), _half(e.dxf.layer)))
    return out


def _lines(doc: Drawing, layers: set[Layer]) -> list[LineString]:
    names = {layer.layer_name for layer in layers}
    return [_shape(e) for e in doc.modelspace().query("LINE") if e.dxf.layer in names]  # type: ignore[misc]


def _weighted_lines(doc: Drawing, layers: set[Layer]) -> list[tuple[LineString, float]]:
    names = {layer.layer_name for layer in layers}
    return [(_shape(e), _half(e.dxf.layer)) for e in doc.modelspace().query("LINE") if e.dxf.layer in names]  # type: ignore[misc]


#: Least white space between two strokes, edge to edge, paper mm: ISO 128-20:1996 gives 0.7 mm as the
#: least space between parallel lines (from memory); 0.01 mm allows for flattening the arcs.
GAP = 0.7 - 0.01


def test_no_two_markers_touch_and_none_touches_another_member_or_a_bar(drawn: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: on a 1.3 m end frame at 1:125 the curls of an X touched each other and the ties, and the
    # critical diamonds crowded (0.43 mm of white between two diamonds). Measured edge to edge: the
    # distance between centre lines less half of each stroke's print width.
    sheet, doc = drawn
    scale = sheet.plan.scale
    markers = _marker_shapes(doc)
    members = _weighted_lines(doc, MEMBER_LAYERS)
    bars = _weighted_lines(doc, {Layer.FRAME})
    for (_, a, ha), (_, b, hb) in itertools.combinations(markers, 2):
        assert a.distance(b) / scale - ha - hb >= GAP
    for at, shape, half in markers:
        own = min(members, key=lambda m: at.distance(m[0]))
        assert at.distance(own[0]) < 1e-6 * scale  # sits on its own member
        for line, line_half in members:
            if line is not own[0]:
                assert shape.distance(line) / scale - half - line_half >= GAP
        for bar, bar_half in bars:
            assert shape.distance(bar) / scale - half - bar_half >= GAP


def test_narrow_bays_keep_their_markers_inside_the_bay() -> None:
    sheet = build_drawing(narrow_bays(), when=WHEN)
    assert sheet.plan.scale == 75  # 0.9 m bays print 12 mm wide
    inserts = [e for e in sheet.doc.modelspace().query("INSERT")
               if e.dxf.name in MARKER_BLOCKS and e.dxf.layer != Layer.LEGEND.layer_name]  # fmt: skip
    ties = sum(1 for fs in sheet.frames for m in fs.frame.members if m.kind is T)
    critical = sum(len(fs.verdict.critical_members) for fs in sheet.frames)
    assert critical >= 6  # every tie of the pinned frame, at least
    assert len(inserts) == ties + critical
    sizes = {round(e.dxf.xscale / sheet.plan.scale, 2) for e in inserts}
    assert all(0.5 <= k <= 1.0 for k in sizes)


def test_markers_shrink_with_the_bay() -> None:
    # An X of critical ties in one 2 m lift at 1:125: the marker size falls as the bay narrows
    # (2.5 m prints 20 mm wide: full size; 1.3 m, 10.4 mm: smaller; 1.0 m, 8 mm: smaller still), never below half.
    ties = (Member(1, 1, T, RISE), Member(1, 1, T, FALL))
    sizes = []
    for width in (2500, 1300, 1000, 900):
        frame = Frame("x", (width,), (2000,), supports=Supports.BASE, members=ties)
        plan = place_markers(frame, ties, scale=125)
        assert plan.fits
        sizes.append(plan.size)
    assert sizes[0] == 1.0
    assert sizes == sorted(sizes, reverse=True)
    assert 0.5 <= sizes[2] < sizes[1] < 1.0


def _texts(doc: Drawing, layer: Layer) -> list[tuple[str, Polygon]]:
    from ezdxf import bbox

    out = []
    for e in doc.modelspace().query("TEXT"):
        if e.dxf.layer == layer.layer_name:
            ext = bbox.extents([e], fast=False)
            out.append((e.dxf.text, box(ext.extmin.x, ext.extmin.y, ext.extmax.x, ext.extmax.y)))
    return out


def test_labels_sit_clear_of_every_line(drawn: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: "goods hoist" and "smoke vent" were struck through by grid lines (mask drawn first,
    # label point on a line). No grid line or bar may cross a label at all, and no line drawn after
    # a label's mask may enter the mask.
    _sheet, doc = drawn
    lines = _lines(doc, {Layer.GRID, Layer.FRAME, *MEMBER_LAYERS})
    for text, shape in _texts(doc, Layer.OPENING_LABEL):
        for line in lines:
            assert not line.intersects(shape), text
    entities = list(doc.modelspace())
    masks = [(i, e) for i, e in enumerate(entities) if e.dxftype() == "WIPEOUT" and e.dxf.layer != "S-ANNO-LEGN"]
    assert len(masks) == len(_texts(doc, Layer.OPENING_LABEL))
    for i, mask in masks:
        corners = [v.vec2 for v in mask.boundary_path_wcs()]
        area = Polygon(corners)
        for later in entities[i + 1 :]:
            if later.dxftype() == "LINE":
                assert not _shape(later).intersects(area)


def test_opening_outlines_stay_visible(drawn: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: outlines on grid lines vanished under the bars. They are set in from the edge
    # (never collinear with a grid line) and drawn after the grid and the bars.
    sheet, doc = drawn
    entities = list(doc.modelspace())
    outlines = [(i, e) for i, e in enumerate(entities) if e.dxf.layer == Layer.OPENING.layer_name]
    assert len(outlines) == sum(len(fs.frame.openings) for fs in sheet.frames)
    names = {Layer.GRID.layer_name, Layer.FRAME.layer_name}
    bars = [(i, _shape(e)) for i, e in enumerate(entities) if e.dxf.layer in names and e.dxftype() == "LINE"]
    grid = MultiLineString([list(g.coords) for _, g in bars])
    for i, e in outlines:
        outline = _shape(e)
        assert outline.intersection(grid).length == pytest.approx(0.0, abs=1e-6)
        assert all(j < i for j, bar in bars if bar.intersects(outline.envelope))  # drawn above the bars


def test_critical_mark_is_not_crossed_by_its_member(drawn: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: the "!" of the critical diamond was crossed by its own member line. The block masks
    # its inside first (a wipeout the shape of the diamond) and every member line comes before
    # every marker, so the mask hides the line under the "!".
    _, doc = drawn
    block = list(doc.blocks[CRITICAL_BLOCK])
    assert block[0].dxftype() == "WIPEOUT"
    diamond = Polygon([v.vec2 for v in block[0].boundary_path_wcs()])
    mark = unary_union([_shape(e) for e in block[1:] if e.dxftype() in {"LINE", "CIRCLE"}])
    assert diamond.contains(mark)
    order = list(doc.modelspace())
    names = {layer.layer_name for layer in MEMBER_LAYERS}
    members = [(i, _shape(e)) for i, e in enumerate(order) if e.dxf.layer in names]
    for i, e in enumerate(order):
        if e.dxftype() == "INSERT" and e.dxf.name == CRITICAL_BLOCK and e.dxf.layer != Layer.LEGEND.layer_name:
            near = Point(e.dxf.insert.vec2).buffer(2.0 * e.dxf.xscale)
            assert all(j < i for j, line in members if line.intersects(near))  # drawn under the mask


def test_critical_mark_reads_clear_in_the_preview() -> None:
    # Pixel check: along the brace, inside the diamond beside the "!", the preview is white (masked).
    brace = Member(1, 1, B, RISE)
    frame = Frame("one", (3000,), (3000,), supports=Supports.BASE, members=(brace,))
    sheet = build_drawing(Project("p", (frame,)), when=WHEN)
    (marker,) = [e for e in sheet.doc.modelspace().query("INSERT") if e.dxf.name == CRITICAL_BLOCK and
                 e.dxf.layer != Layer.LEGEND.layer_name]  # fmt: skip
    dpi = 300
    image = imread(io.BytesIO(render_preview(sheet, PreviewFormat.PNG, dpi=dpi)), format="png")[..., :3]
    scale, px_per_mm = sheet.plan.scale, dpi / 25.4
    height = image.shape[0]
    cx, cy = marker.dxf.insert.x / scale, marker.dxf.insert.y / scale
    size = marker.dxf.xscale / scale
    for t in (-1.2, -0.9, 0.9, 1.2):  # mm along the 45-degree brace, clear of the "!" at the centre
        x, y = cx + t * size / math.sqrt(2), cy + t * size / math.sqrt(2)
        pixel = image[height - round(y * px_per_mm), round(x * px_per_mm)]
        assert pixel.min() > 0.9, (t, pixel)  # white: the red brace is masked inside the diamond


def _legend_box(sheet: DrawnSheet) -> tuple[float, float, float, float]:
    x, y = sheet.plan.band
    w, h = legend_size()
    s = sheet.plan.scale
    return x * s, y * s, (x + w) * s, (y + h) * s


@pytest.fixture(scope="module")
def demo() -> tuple[DrawnSheet, Drawing]:
    sheet = build_drawing(optimized(QUAYSIDE), when=WHEN)
    return sheet, ezdxf.read(io.StringIO(dxf_bytes(sheet.doc).decode("utf-8")))


def _legend_samples(sheet: DrawnSheet, doc: Drawing) -> dict[str, object]:
    """The samples of each legend row (everything on the legend layer left of the row's words)."""
    from ezdxf import bbox

    x0, _y0, x1, _y1 = _legend_box(sheet)
    words = {e.dxf.text: e.dxf.align_point.y for e in doc.modelspace().query("TEXT")
             if e.dxf.layer == Layer.LEGEND.layer_name and e.dxf.halign == 0 and e.dxf.text != "LEGEND"}  # fmt: skip
    text_x = min(e.dxf.align_point.x for e in doc.modelspace().query("TEXT")
                 if e.dxf.layer == Layer.LEGEND.layer_name and e.dxf.text in words)  # fmt: skip
    rows: dict[str, list[object]] = {w: [] for w in words}
    for e in doc.modelspace():
        if e.dxf.layer != Layer.LEGEND.layer_name or (e.dxftype() == "TEXT" and e.dxf.text in words):
            continue
        ext = bbox.extents([e], fast=False)
        if not ext.has_data or ext.extmax.x > text_x or (ext.size.x > 0.9 * (x1 - x0)):
            continue  # the legend frame itself, or not a sample
        centre = (ext.extmin.y + ext.extmax.y) / 2
        row = min(words, key=lambda w: abs(words[w] - centre))
        rows[row].append(box(ext.extmin.x, ext.extmin.y, ext.extmax.x, ext.extmax.y))
    return {w: unary_union(shapes) for w, shapes in rows.items() if shapes}


def test_legend_samples_do_not_overlap(demo: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: two samples overlapped (the curl samples reached into the next rows).
    sheet, doc = demo
    samples = _legend_samples(sheet, doc)
    assert len(samples) == len(legend_rows())
    for (a, sa), (b, sb) in itertools.combinations(samples.items(), 2):
        assert not sa.intersects(sb), (a, b)


def test_legend_curl_samples_sit_on_the_tie_that_carries_them(demo: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: the anticlockwise sample was drawn on a rising tie, though frames show it on falling ties.
    _, doc = demo
    legend = [e for e in doc.modelspace() if e.dxf.layer == Layer.LEGEND.layer_name]
    for block, falls in ((TIE_CW_BLOCK, False), (TIE_ACW_BLOCK, True)):
        (insert,) = [e for e in legend if e.dxftype() == "INSERT" and e.dxf.name == block]
        line = min((e for e in legend if e.dxftype() == "LINE"), key=lambda e: _shape(e).distance(
            Point(insert.dxf.insert.vec2)))  # fmt: skip
        start, end = sorted([line.dxf.start.vec2, line.dxf.end.vec2], key=lambda p: p.x)
        assert (end.y < start.y) is falls


def test_legend_explains_every_symbol_on_the_sheet(demo: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: the frame bars, the "blocked" label and the loose-part tags had no entry.
    _, doc = demo
    words = " ".join(e.dxf.text for e in doc.modelspace().query("TEXT") if e.dxf.layer == Layer.LEGEND.layer_name)
    for needed in ("frame bar", "blocked", "M1", "loose part (mechanism)", "grid line", "opening", "bay tags"):
        assert needed in words


def test_legend_grid_and_opening_samples_are_visible(demo: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: the grid-line and opening samples were barely visible. Read the preview: each sample
    # shows at least a few millimetres of clearly dark ink (pixels darker than mid grey).
    sheet, doc = demo
    dpi = 150
    image = imread(io.BytesIO(render_preview(sheet, PreviewFormat.PNG, dpi=dpi)), format="png")[..., :3]
    grey = image.mean(axis=-1)
    samples = _legend_samples(sheet, doc)
    s, k = sheet.plan.scale, dpi / 25.4
    for row in ("grid line (member centre line)", "opening: outline set just inside its edge, named"):
        x0, y0, x1, y1 = samples[row].bounds
        top, bottom = grey.shape[0] - int(y1 / s * k) - 2, grey.shape[0] - int(y0 / s * k) + 2
        patch = grey[top:bottom, int(x0 / s * k) - 2 : int(x1 / s * k) + 2]
        # at least 3 mm of line darker than 70 % grey (the old grid sample's darkest pixel was 91 %)
        assert np.count_nonzero(patch < 0.7) >= 3 * k, row


def test_dxf_names_and_symbols_are_ours(demo: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: stock names of one CAD package (hatch pattern, dimension style, tick block, a
    # vendor-prefixed application id) are replaced by our own.
    sheet, doc = demo
    text = dxf_bytes(sheet.doc).decode("utf-8")
    for stock in ("ANSI31", "_OBLIQUE", "AcAecLayerStandard", "ISO-25"):
        assert stock not in text
    # the DIMSTYLE table as written (ezdxf adds a default style again when it reads a file)
    (table,) = re.findall(r"\n  0\nTABLE\n  2\nDIMSTYLE\n(.*?)\n  0\nENDTAB", text, flags=re.DOTALL)
    assert re.findall(r"\n  2\n([^\n]+)", table) == [DIM_STYLE]
    assert doc.header["$DIMSTYLE"] == DIM_STYLE
    assert doc.dimstyles.get(DIM_STYLE).dxf.dimblk == TICK_BLOCK
    assert TICK_BLOCK in doc.blocks
    hatches = [h for h in doc.modelspace().query("HATCH") if h.pattern is not None and not h.dxf.solid_fill]
    assert hatches
    for h in hatches:
        assert h.dxf.pattern_name == BLOCKED_PATTERN
        assert h.dxf.pattern_type == 2  # custom: the definition is in the hatch
        assert [round(line.angle) for line in h.pattern.lines] == [45]
    assert not [a.dxf.name for a in doc.appids if a.dxf.name.startswith("AcAec")]


def test_title_block_names_no_source_file(demo: tuple[DrawnSheet, Drawing]) -> None:
    _, doc = demo
    texts = [e.dxf.text for e in doc.modelspace().query("TEXT") if e.dxf.layer == Layer.TITLE.layer_name]
    assert not [t for t in texts if re.search(r"\.md\b|docs/|\.toml\b", t)]


def test_counts_written_out_and_tags_our_own(demo: tuple[DrawnSheet, Drawing]) -> None:
    # Issue 10: "0B 16T" on the bill; loose-part tags L1 (read as "lift 1"); round bay bubbles.
    _, doc = demo
    texts = [e.dxf.text for e in doc.modelspace().query("TEXT")]
    assert not [t for t in texts if re.fullmatch(r"\d+B \d+T", t)]
    assert "0 braces, 32 ties" in texts
    assert not list(doc.modelspace().query("CIRCLE"))
    unstable = build_drawing(load_project(QUAYSIDE), when=WHEN)
    tags = [e.dxf.text for e in unstable.doc.modelspace().query("TEXT") if e.dxf.layer == Layer.LOOSE.layer_name]
    assert tags
    assert all(t.startswith("M") for t in tags)


def test_opening_label_in_a_bay_of_its_own() -> None:
    # The hoist's centre lies on a grid line (y = 8000); its label goes to the centre of a bay.
    hoist = Opening("goods hoist", ((15000, 0), (17500, 0), (17500, 16000), (15000, 16000)))
    project = load_project(QUAYSIDE)
    sheet = build_drawing(project, when=WHEN)
    (text,) = [e for e in sheet.doc.modelspace().query("TEXT") if e.dxf.text == hoist.name]
    _ox, oy = sheet.plan.origins[0]
    y = text.dxf.align_point.y - oy
    assert y % 2000 == pytest.approx(1000)  # mid-height of a 2 m lift
