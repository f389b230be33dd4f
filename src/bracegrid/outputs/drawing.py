"""The drawing: marked-up DXF sheets of frames with grid, members, markers, dimensions, bill and title block.

One sheet holds the chosen frames side by side on a common ground line, with
the legend, the bill of materials and the title block along the bottom. The
model space is in millimetres (``$INSUNITS`` = 4) at true size; annotation is
sized in paper millimetres times the sheet scale. Layers, symbols and the
bill's columns are documented in docs/drawings.md.

Every frame is re-checked with :func:`bracegrid.mechanics.check_frame_any` before
it is drawn: the verdict, loose parts and critical members on the sheet come
from that check, never from the caller.
"""

from __future__ import annotations

import io
from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date
from pathlib import Path
from typing import TYPE_CHECKING

from shapely.geometry import Point

from bracegrid._version import __version__
from bracegrid.analysis import CAUTION, Flex, Verdict
from bracegrid.errors import ExportError
from bracegrid.io import write_bytes_atomic
from bracegrid.mechanics import check_frame_any
from bracegrid.model import (
    Diagonal,
    Frame,
    Member,
    MemberKind,
    Opening,
    Project,
    Racking,
    Supports,
    bay_box,
    bays_blocked_by,
    blocked_bays,
    opening_polygon,
    present_grid_bars,
)
from bracegrid.outputs.bill import Bom, build_bom
from bracegrid.outputs.layers import Layer, member_layer
from bracegrid.outputs.markers import MarkerKind, place_markers
from bracegrid.outputs.sheet import (
    ABSENT_RGB,
    GAP,
    H_SMALL,
    H_TITLE,
    FrameBox,
    Margins,
    Pen,
    SheetPlan,
    add_hatch,
    bill_size,
    draw_bill,
    draw_legend,
    draw_title,
    legend_size,
    plan_sheet,
    title_size,
)
from bracegrid.outputs.symbols import (
    BAY_TAG_BLOCK,
    BAY_TAG_HEIGHT,
    BAY_TAG_WIDTH,
    CRITICAL_BLOCK,
    DIM_STYLE,
    SUPPORT_BLOCK,
    TIE_ACW_BLOCK,
    TIE_CW_BLOCK,
    setup_document,
    text_width,
)
from bracegrid.outputs.terms import BLOCKED_LABEL, supports_words
from bracegrid.units import DXF_INSUNITS, format_length_m

if TYPE_CHECKING:
    from ezdxf.document import Drawing
    from ezdxf.layouts.layout import Modelspace

#: DXF version written: R2013 (AC1027).
DXF_VERSION = "R2013"
#: Unit of the model space: millimetres.
DXF_UNIT = "mm"

# Annotation offsets from the frame outline, paper mm.
_ROW_TAG_X = -(2.5 + BAY_TAG_WIDTH / 2)
_CHAIN_X = -(5.0 + BAY_TAG_WIDTH + 4.0)
_OVERALL_X = _CHAIN_X - 7.0
_SUPPORT_DROP = 5.0
#: Opening outlines are set in from the opening's edge by this much, paper mm.
_OUTLINE_INSET = 0.8


@dataclass(frozen=True, slots=True)
class FrameSheet:
    """What one frame's drawing shows, decided before anything is drawn.

    Attributes:
        frame: The frame.
        verdict: Its stability check.
        blocked: Bays where no member may go (listed and opening-blocked).
    """

    frame: Frame
    verdict: Verdict
    blocked: frozenset[tuple[int, int]]


def plan_frame(frame: Frame) -> FrameSheet:
    """Check a frame and collect what its drawing shows.

    Example:
        >>> plan_frame(Frame("f", (3000,), (2000,))).verdict.stable
        False
    """
    return FrameSheet(frame=frame, verdict=check_frame_any(frame), blocked=blocked_bays(frame))


def deflected_shape(frame: Frame, flex: Flex) -> list[tuple[tuple[float, float], tuple[float, float]]]:
    """Every present grid bar and member of a general frame that its mechanism moves, moved and exaggerated.

    The largest node move is drawn as a quarter of the smallest bay side (a first-order flex has
    no size of its own: only its shape and sense mean something).
    """
    xs, ys = frame.x_lines(), frame.y_lines()
    amp = 0.25 * min(min(frame.widths), min(frame.heights))
    move = {(m.p, m.q): (m.dx, m.dy) for m in flex.moves}

    def spot(p: int, q: int) -> tuple[float, float]:
        dx, dy = move.get((p, q), (0.0, 0.0))
        return (xs[q] + amp * dx, ys[p] + amp * dy)

    pairs = [bar.ends() for bar in present_grid_bars(frame)]
    for m in frame.members:
        if m.diagonal is Diagonal.RISING:
            pairs.append(((m.row - 1, m.col - 1), (m.row, m.col)))
        else:
            pairs.append(((m.row, m.col - 1), (m.row - 1, m.col)))
    # only what moves: a bar that stays put is already drawn as itself
    return [(spot(*a), spot(*b)) for a, b in pairs if a in move or b in move]


def part_tag(index: int) -> str:
    """Tag of the ``index``-th loose part: M for mechanism (not L, which reads as a lift).

    Example:
        >>> part_tag(2)
        'M2'
    """
    return f"M{index}"


def part_label(index: int, racking: Racking) -> str:
    """Tag of a loose part with the way it can still rack.

    Example:
        >>> part_label(1, Racking.CLOCKWISE)
        'M1 clockwise only'
    """
    words = {Racking.BOTH: "both ways", Racking.CLOCKWISE: "clockwise only"}
    return f"{part_tag(index)} {words.get(racking, 'anticlockwise only')}"


def _column_part_notes(verdict: Verdict) -> list[str]:
    """Explanations of loose parts made of columns only (tagged above the frame)."""
    notes = []
    for k, part in enumerate(verdict.loose_parts, start=1):
        if not part.rows:
            cols = ", ".join(f"C{c}" for c in part.columns)
            notes.append(f"{part_label(k, part.racking)} ({cols})")
    return notes


def _bottom_zone(frame: Frame) -> tuple[float, float, float]:
    """y of the column tags, width chain and overall chain below the frame, paper mm."""
    drop = _SUPPORT_DROP if frame.supports is Supports.BASE else 0.0
    tag = -(drop + 2.0 + BAY_TAG_HEIGHT / 2)
    chain = tag - BAY_TAG_HEIGHT / 2 - 5.0
    return tag, chain, chain - 7.0


def _margins(fs: FrameSheet, heading_width: float) -> Margins:
    """Annotation room; ``heading_width`` is what the frame outline plus right margin must cover."""
    parts = fs.verdict.loose_parts
    tags = [part_label(k, p.racking) for k, p in enumerate(parts, start=1)] + _column_part_notes(fs.verdict)
    right = 4.0 + max((text_width(t, H_SMALL) for t in tags), default=0.0) if tags else 3.0
    column_only = any(not p.rows for p in parts)
    _, _, overall = _bottom_zone(fs.frame)
    top = 16.0 + (4.0 if column_only else 0.0)
    notes = len(_column_part_notes(fs.verdict))
    bottom = max(-overall + 4.0, 3.0 + 3.5 * notes + 2.0)
    return Margins(left=-_OVERALL_X + 4.0, right=right, bottom=bottom, top=top, min_width=heading_width)


def _box(fs: FrameSheet) -> FrameBox:
    f = fs.frame
    size, state = _heading(fs)
    heading = max(text_width(f.name.upper(), H_TITLE), text_width(size, H_SMALL), text_width(state, H_SMALL))
    return FrameBox(f.width_mm, f.height_mm, float(min(*f.widths, *f.heights)), _margins(fs, heading + 2.0))


def member_endpoints(frame: Frame, m: Member) -> tuple[tuple[float, float], tuple[float, float]]:
    """Start and end of a member as drawn, frame mm (rising: bottom-left first; falling: top-left first).

    Example:
        >>> member_endpoints(Frame("f", (3000,), (2000,)), Member(1, 1, MemberKind.TIE, Diagonal.FALLING))
        ((0, 2000), (3000, 0))
    """
    xs, ys = frame.x_lines(), frame.y_lines()
    x0, x1, y0, y1 = xs[m.col - 1], xs[m.col], ys[m.row - 1], ys[m.row]
    if m.diagonal is Diagonal.RISING:
        return (x0, y0), (x1, y1)
    return (x0, y1), (x1, y0)


_MARKER_BLOCKS = {
    MarkerKind.RESISTS_CLOCKWISE: (TIE_CW_BLOCK, Layer.TIE_SENSE),
    MarkerKind.RESISTS_ANTICLOCKWISE: (TIE_ACW_BLOCK, Layer.TIE_SENSE),
    MarkerKind.CRITICAL: (CRITICAL_BLOCK, Layer.CRITICAL),
}


def label_spot(
    frame: Frame,
    opening: Opening,
    *,
    width_mm: float,
    height_mm: float,
    taken: frozenset[tuple[int, int]] = frozenset(),
) -> tuple[float, float]:
    """Where an opening's name goes: the centre of a bay it blocks, clear of grid lines.

    The bay nearest the opening's centre whose part inside the opening holds the label
    (``width_mm`` x ``height_mm``, mask included) and that carries no other label; failing
    that, the opening's widest bay; failing that, a point inside the opening.

    Example:
        >>> from bracegrid.model import Frame, Opening
        >>> hoist = Opening("hoist", ((3000, 0), (6000, 0), (6000, 8000), (3000, 8000)))
        >>> label_spot(Frame("f", (3000,) * 3, (2000,) * 4), hoist, width_mm=1500, height_mm=500)
        (4500.0, 3000.0)
    """
    polygon = opening_polygon(opening)
    centre = polygon.centroid
    bays = sorted(bays_blocked_by(frame, opening) - taken)
    fitting, widest = [], []
    for r, c in bays:
        inside = bay_box(frame, r, c).intersection(polygon)
        if inside.is_empty:
            continue
        x0, y0, x1, y1 = inside.bounds
        spot = inside.centroid
        away = spot.distance(centre)
        widest.append((-(x1 - x0), away, (spot.x, spot.y)))
        if x1 - x0 >= width_mm and y1 - y0 >= height_mm:
            fitting.append((away, (spot.x, spot.y)))
    if fitting:
        return min(fitting)[1]
    if widest:
        return min(widest)[2]
    point = polygon.representative_point()
    return (point.x, point.y)


def _draw_frame(msp: Modelspace, fs: FrameSheet, origin: tuple[float, float], scale: float) -> None:
    """One frame, drawn bottom layer first so nothing hides a label, an outline or a marker.

    Order: loose-part shading, blocked-bay hatching, grid lines, bars, opening outlines (set in
    from the edge, so one lying on a grid line still shows), members, markers (the diamond's
    mask hides its member line), supports, then labels on masks, tags, dimensions, heading.
    """
    f, v = fs.frame, fs.verdict
    ox, oy = origin
    pen = Pen(msp, scale, origin)
    xs, ys = f.x_lines(), f.y_lines()
    w, h = float(f.width_mm), float(f.height_mm)

    def at(x: float, y: float) -> tuple[float, float]:
        return (ox + x, oy + y)

    # loose parts first so everything else draws over the shading
    for part in v.loose_parts:
        for r in part.rows:
            add_hatch(msp, [at(0, ys[r - 1]), at(w, ys[r - 1]), at(w, ys[r]), at(0, ys[r])], Layer.LOOSE,
                      scale=scale, pattern=False)  # fmt: skip
        for c in part.columns:
            add_hatch(msp, [at(xs[c - 1], 0), at(xs[c], 0), at(xs[c], h), at(xs[c - 1], h)], Layer.LOOSE,
                      scale=scale, pattern=False)  # fmt: skip
    for r, c in sorted(f.absent):
        add_hatch(msp, [at(xs[c - 1], ys[r - 1]), at(xs[c], ys[r - 1]), at(xs[c], ys[r]), at(xs[c - 1], ys[r])],
                  Layer.ABSENT, scale=scale, pattern=False, rgb=ABSENT_RGB)  # fmt: skip
    for r, c in sorted(fs.blocked - f.absent):
        add_hatch(msp, [at(xs[c - 1], ys[r - 1]), at(xs[c], ys[r - 1]), at(xs[c], ys[r]), at(xs[c - 1], ys[r])],
                  Layer.OPENING_PATT, scale=scale, pattern=True)  # fmt: skip
    # grid lines (extended into the margins) and the bars
    ext = 2.0 * scale
    for x in xs:
        msp.add_line(at(x, -ext), at(x, h + ext), dxfattribs={"layer": Layer.GRID.layer_name})
    for y in ys:
        msp.add_line(at(-ext, y), at(w + ext, y), dxfattribs={"layer": Layer.GRID.layer_name})
    if f.is_complete:
        for x in xs:
            msp.add_line(at(x, 0), at(x, h), dxfattribs={"layer": Layer.FRAME.layer_name})
        for y in ys:
            msp.add_line(at(0, y), at(w, y), dxfattribs={"layer": Layer.FRAME.layer_name})
    else:
        for bar in present_grid_bars(f):
            (p0, q0), (p1, q1) = bar.ends()
            msp.add_line(at(xs[q0], ys[p0]), at(xs[q1], ys[p1]), dxfattribs={"layer": Layer.FRAME.layer_name})
        for bar in sorted(f.missing):
            (p0, q0), (p1, q1) = bar.ends()
            msp.add_line(at(xs[q0], ys[p0]), at(xs[q1], ys[p1]), dxfattribs={"layer": Layer.FRAME_OMIT.layer_name})
    # opening outlines above the bars, set in from the edge
    for opening in f.openings:
        pts = outline_points(opening, inset_mm=_OUTLINE_INSET * scale)
        msp.add_lwpolyline([at(x, y) for x, y in pts], close=True, dxfattribs={"layer": Layer.OPENING.layer_name})
    # members, then every marker (so no member line crosses a marker drawn before it)
    for m in sorted(f.members, key=lambda m: m.sort_key):
        a, b = member_endpoints(f, m)
        layer = member_layer(brace=m.kind is MemberKind.BRACE, existing=m.existing)
        msp.add_line(at(*a), at(*b), dxfattribs={"layer": layer.layer_name})
    if v.flex is not None:
        for a, b in deflected_shape(f, v.flex):
            msp.add_line(at(*a), at(*b), dxfattribs={"layer": Layer.FLEX.layer_name})
    for marker in place_markers(f, v.critical_members, scale=scale).markers:
        name, layer = _MARKER_BLOCKS[marker.kind]
        pen.block(name, marker.x, marker.y, layer, size=marker.size)
    # supports
    if f.supports is Supports.BASE:
        msp.add_line(at(-3.0 * scale, 0), at(w + 3.0 * scale, 0), dxfattribs={"layer": Layer.SUPPORT.layer_name})
        for x in xs:
            pen.block(SUPPORT_BLOCK, x / scale, 0.0, Layer.SUPPORT_SYMBOL)
    # labels on masks, above everything they sit on
    listed = frozenset(f.blocked)
    for r, c in sorted(listed):
        _label_box(pen, BLOCKED_LABEL, (xs[c - 1] + xs[c]) / 2 / scale, (ys[r - 1] + ys[r]) / 2 / scale)
    taken = set(listed)
    for opening in f.openings:
        lw, lh = label_box_size(opening.name)
        lx, ly = label_spot(f, opening, width_mm=lw * scale, height_mm=lh * scale, taken=frozenset(taken))
        taken |= {bay for bay in bays_blocked_by(f, opening) if bay_box(f, *bay).contains(Point(lx, ly))}
        _label_box(pen, opening.name, lx / scale, ly / scale)
    # loose-part tags
    for k, part in enumerate(v.loose_parts, start=1):
        if part.rows:
            r = part.rows[0]
            pen.text(part_label(k, part.racking), w / scale + 2.0, (ys[r - 1] + ys[r]) / 2 / scale, height=H_SMALL,
                     layer=Layer.LOOSE, align="MIDDLE_LEFT")  # fmt: skip
        else:
            c = part.columns[0]
            pen.text(part_tag(k), (xs[c - 1] + xs[c]) / 2 / scale, h / scale + 1.5, height=H_SMALL, layer=Layer.LOOSE,
                     align="BOTTOM_CENTER")  # fmt: skip
    # column-only parts are explained in the right margin below the frame
    for line, text in enumerate(_column_part_notes(v)):
        pen.text(text, w / scale + 2.0, -3.0 - line * 3.5, height=H_SMALL, layer=Layer.LOOSE, align="MIDDLE_LEFT")
    # row and column tags of the bays
    tag_y, chain_y, overall_y = _bottom_zone(f)
    for r in range(1, f.rows + 1):
        cy = (ys[r - 1] + ys[r]) / 2 / scale
        pen.block(BAY_TAG_BLOCK, _ROW_TAG_X, cy, Layer.GRID_LABEL)
        pen.text(f"R{r}", _ROW_TAG_X, cy, height=H_SMALL, layer=Layer.GRID_LABEL, align="MIDDLE_CENTER")
    for c in range(1, f.cols + 1):
        cx = (xs[c - 1] + xs[c]) / 2 / scale
        pen.block(BAY_TAG_BLOCK, cx, tag_y, Layer.GRID_LABEL)
        pen.text(f"C{c}", cx, tag_y, height=H_SMALL, layer=Layer.GRID_LABEL, align="MIDDLE_CENTER")
    # dimension chains: defining points just outside the tags, so extension lines stay short
    dim_layer = {"layer": Layer.GRID_DIMS.layer_name}
    foot = (tag_y - BAY_TAG_HEIGHT / 2 - 1.0) * scale
    for c in range(1, f.cols + 1):
        msp.add_linear_dim(base=at(xs[c - 1], chain_y * scale), p1=at(xs[c - 1], foot), p2=at(xs[c], foot),
                           dimstyle=DIM_STYLE, dxfattribs=dim_layer).render()  # fmt: skip
    if f.cols > 1:
        msp.add_linear_dim(base=at(0, overall_y * scale), p1=at(0, foot), p2=at(w, foot),
                           dimstyle=DIM_STYLE, dxfattribs=dim_layer).render()  # fmt: skip
    side = (_ROW_TAG_X - BAY_TAG_WIDTH / 2 - 1.0) * scale
    for r in range(1, f.rows + 1):
        msp.add_linear_dim(base=at(_CHAIN_X * scale, ys[r - 1]), p1=at(side, ys[r - 1]), p2=at(side, ys[r]),
                           angle=90, dimstyle=DIM_STYLE, dxfattribs=dim_layer).render()  # fmt: skip
    if f.rows > 1:
        msp.add_linear_dim(base=at(_OVERALL_X * scale, 0), p1=at(side, 0), p2=at(side, h),
                           angle=90, dimstyle=DIM_STYLE, dxfattribs=dim_layer).render()  # fmt: skip
    # title, size and verdict above the frame
    top = h / scale + (5.5 if any(not p.rows for p in v.loose_parts) else 2.0)
    size, state = _heading(fs)
    pen.text(state, 0.0, top + 1.0, height=H_SMALL, layer=Layer.TEXT)
    pen.text(size, 0.0, top + 4.5, height=H_SMALL, layer=Layer.TEXT)
    pen.text(f.name.upper(), 0.0, top + 8.5, height=H_TITLE, layer=Layer.TEXT)


def outline_points(opening: Opening, *, inset_mm: float) -> list[tuple[float, float]]:
    """An opening's outline set in from its edge by ``inset_mm`` (frame mm), so it never lies on a grid line.

    Falls back to the outline itself when the opening is too thin to set in.

    Example:
        >>> from bracegrid.model import Opening
        >>> outline_points(Opening("door", ((0, 0), (1000, 0), (1000, 2000), (0, 2000))), inset_mm=100)[:2]
        [(100.0, 100.0), (100.0, 1900.0)]
    """
    polygon = opening_polygon(opening)
    inner = polygon.buffer(-inset_mm, join_style="mitre") if polygon.is_valid else polygon
    if inner.is_empty or inner.geom_type != "Polygon":
        inner = polygon
    coords = [(float(x), float(y)) for x, y in inner.exterior.coords[:-1]]
    first = min(range(len(coords)), key=lambda i: (coords[i][1], coords[i][0]))  # lowest, leftmost corner first
    return coords[first:] + coords[:first]


def _heading(fs: FrameSheet) -> tuple[str, str]:
    """The size line and the verdict line written above a frame."""
    f, v = fs.frame, fs.verdict
    if v.stable:
        crit = len(v.critical_members)
        state = f"STABLE; {crit} critical member{'s' if crit != 1 else ''}"
    else:
        state = f"NOT STABLE: {v.racking_modes} racking mode{'s' if v.racking_modes != 1 else ''} left"
    size = f"{f.cols} x {f.rows} bays, {format_length_m(f.width_mm)} x {format_length_m(f.height_mm)}, "
    return size + supports_words(f.supports), state


def label_box_size(text: str) -> tuple[float, float]:
    """Width and height of a label with its mask, paper mm."""
    return text_width(text, H_SMALL) + 1.6, H_SMALL + 1.6


def _label_box(pen: Pen, text: str, x: float, y: float) -> None:
    """A centred label on a wipeout mask so the hatching and grid lines do not run through it."""
    half_w, half_h = (d / 2 for d in label_box_size(text))
    corners = [pen.at(x - half_w, y - half_h), pen.at(x + half_w, y + half_h)]
    mask = pen.msp.add_wipeout(corners)
    mask.dxf.layer = Layer.OPENING_LABEL.layer_name
    pen.text(text, x, y, height=H_SMALL, layer=Layer.OPENING_LABEL, align="MIDDLE_CENTER")


@dataclass(frozen=True, slots=True)
class DrawnSheet:
    """A finished drawing and how it was laid out.

    Attributes:
        doc: The ezdxf document.
        plan: Sheet size, scale and frame origins.
        frames: What each frame shows (verdicts included).
        bom: The bill of materials on the sheet.
    """

    doc: Drawing
    plan: SheetPlan
    frames: tuple[FrameSheet, ...]
    bom: Bom


def build_drawing(project: Project, *, frames: Sequence[Frame] | None = None, when: date | None = None) -> DrawnSheet:
    """Draw frames of a project side by side on one sheet.

    Args:
        project: The project (name, cost catalogue).
        frames: The frames to draw (default: every frame of the project).
        when: Date for the title block (default: today).

    Returns:
        The document with the plan, the verdicts and the bill.

    Example:
        >>> sheet = build_drawing(Project("p", (Frame("f", (3000,), (2000,)),)))
        >>> sheet.doc.header["$INSUNITS"], sheet.plan.sheet
        (4, 'A3')
    """
    from ezdxf.filemanagement import new

    chosen = tuple(project.frames if frames is None else frames)
    sheets = tuple(plan_frame(f) for f in chosen)
    bom = build_bom(project, frames=chosen)
    general = any(not f.is_complete for f in chosen)
    legend, bill, title = legend_size(general=general), bill_size(bom), title_size()
    band = (legend[0] + bill[0] + title[0] + 2 * GAP, max(legend[1], bill[1], title[1]))
    plan = plan_sheet([_box(s) for s in sheets], band)
    scale = plan.scale

    doc = new(DXF_VERSION, units=DXF_INSUNITS[DXF_UNIT])
    doc.header["$MEASUREMENT"] = 1
    doc.header["$LWDISPLAY"] = 1
    setup_document(doc, scale=scale)
    msp = doc.modelspace()
    for fs, origin in zip(sheets, plan.origins, strict=True):
        _draw_frame(msp, fs, origin, scale)
    pen = Pen(msp, scale)
    paper_w, paper_h = plan.paper
    pen.rect(5.0, 5.0, paper_w - 10.0, paper_h - 10.0, Layer.TITLE)
    bx, by = plan.band
    room = paper_w - 2 * bx
    draw_legend(pen, bx, by, general=general)
    title_x = bx + room - title[0]
    bill_x = bx + legend[0] + (title_x - bx - legend[0] - bill[0]) / 2
    draw_bill(pen, bom, bill_x, by)
    draw_title(
        pen,
        title_x,
        by,
        project=project.name,
        frames=[f.name for f in chosen],
        when=when or date.today(),
        version=__version__,
        caution=CAUTION,
        sheet=plan.sheet,
        scale=scale,
    )
    doc.header["$EXTMIN"] = (0.0, 0.0, 0.0)
    doc.header["$EXTMAX"] = (paper_w * scale, paper_h * scale, 0.0)
    return DrawnSheet(doc=doc, plan=plan, frames=sheets, bom=bom)


def dxf_bytes(doc: Drawing) -> bytes:
    """The document as DXF bytes (UTF-8, as R2007+ requires)."""
    stream = io.StringIO()
    doc.write(stream)
    return stream.getvalue().encode("utf-8")


def write_dxf(doc: Drawing, path: str | Path) -> Path:
    """Write a DXF atomically: the file appears whole or not at all.

    Raises:
        ExportError: If it cannot be written.
    """
    try:
        data = dxf_bytes(doc)
    except Exception as exc:
        msg = f"cannot serialise the drawing for {path}: {exc}"
        raise ExportError(msg) from exc
    return write_bytes_atomic(path, data)
