"""The drawing: marked-up DXF sheets of frames with grid, members, markers, dimensions, bill and title block.

One sheet holds the chosen frames side by side on a common ground line, with
the legend, the bill of materials and the title block along the bottom. The
model space is in millimetres (``$INSUNITS`` = 4) at true size; annotation is
sized in paper millimetres times the sheet scale. Layers, symbols and the
bill's columns are documented in docs/drawings.md.

Every frame is re-checked with :func:`bracegrid.analysis.check_frame` before
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

from bracegrid._version import __version__
from bracegrid.analysis import CAUTION, Verdict, check_frame
from bracegrid.errors import ExportError
from bracegrid.io import write_bytes_atomic
from bracegrid.model import (
    Diagonal,
    Frame,
    Member,
    MemberKind,
    Project,
    Racking,
    Supports,
    blocked_bays,
    opening_polygon,
)
from bracegrid.outputs.bill import Bom, build_bom
from bracegrid.outputs.layers import Layer, member_layer
from bracegrid.outputs.sheet import (
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
    BUBBLE_BLOCK,
    BUBBLE_RADIUS,
    CRITICAL_BLOCK,
    DIM_STYLE,
    SUPPORT_BLOCK,
    TIE_ACW_BLOCK,
    TIE_CW_BLOCK,
    setup_document,
    text_width,
)
from bracegrid.units import DXF_INSUNITS, format_length_m

if TYPE_CHECKING:
    from ezdxf.document import Drawing
    from ezdxf.layouts.layout import Modelspace

#: DXF version written: R2013 (AC1027).
DXF_VERSION = "R2013"
#: Unit of the model space: millimetres.
DXF_UNIT = "mm"

# Annotation offsets from the frame outline, paper mm.
_ROW_BUBBLE_X = -(2.5 + BUBBLE_RADIUS)
_CHAIN_X = -(5.0 + 2 * BUBBLE_RADIUS + 4.0)
_OVERALL_X = _CHAIN_X - 7.0
_SUPPORT_DROP = 5.0
_SENSE_AT = 0.28  # fraction along a tie from its lower end
_CRITICAL_AT = 0.72


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
    return FrameSheet(frame=frame, verdict=check_frame(frame), blocked=blocked_bays(frame))


def _part_tag(index: int, racking: Racking) -> str:
    words = {Racking.BOTH: "both ways", Racking.CLOCKWISE: "clockwise only"}
    return f"L{index} {words.get(racking, 'anticlockwise only')}"


def _column_part_notes(verdict: Verdict) -> list[str]:
    """Explanations of loose parts made of columns only (tagged above the frame)."""
    notes = []
    for k, part in enumerate(verdict.loose_parts, start=1):
        if not part.rows:
            cols = ", ".join(f"C{c}" for c in part.columns)
            notes.append(f"{_part_tag(k, part.racking)} ({cols})")
    return notes


def _bottom_zone(frame: Frame) -> tuple[float, float, float]:
    """y of the column bubbles, width chain and overall chain below the frame, paper mm."""
    drop = _SUPPORT_DROP if frame.supports is Supports.BASE else 0.0
    bubble = -(drop + 2.5 + BUBBLE_RADIUS)
    chain = bubble - BUBBLE_RADIUS - 5.0
    return bubble, chain, chain - 7.0


def _margins(fs: FrameSheet, heading_width: float) -> Margins:
    """Annotation room; ``heading_width`` is what the frame outline plus right margin must cover."""
    parts = fs.verdict.loose_parts
    tags = [_part_tag(k, p.racking) for k, p in enumerate(parts, start=1)] + _column_part_notes(fs.verdict)
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


def _member_ends(frame: Frame, m: Member) -> tuple[tuple[float, float], tuple[float, float]]:
    """Lower and upper end of a member, frame mm."""
    xs, ys = frame.x_lines(), frame.y_lines()
    x0, x1, y0, y1 = xs[m.col - 1], xs[m.col], ys[m.row - 1], ys[m.row]
    if m.diagonal is Diagonal.RISING:
        return (x0, y0), (x1, y1)
    return (x1, y0), (x0, y1)  # falling: lower end at bottom-right


def _along(a: tuple[float, float], b: tuple[float, float], t: float) -> tuple[float, float]:
    return (a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]))


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


def _draw_frame(msp: Modelspace, fs: FrameSheet, origin: tuple[float, float], scale: float) -> None:
    f, v = fs.frame, fs.verdict
    ox, oy = origin
    pen = Pen(msp, scale, origin)
    xs, ys = f.x_lines(), f.y_lines()
    w, h = float(f.width_mm), float(f.height_mm)

    def at(x: float, y: float) -> tuple[float, float]:
        return (ox + x, oy + y)

    # loose parts first so everything else draws over the shading
    for k, part in enumerate(v.loose_parts, start=1):
        for r in part.rows:
            add_hatch(msp, [at(0, ys[r - 1]), at(w, ys[r - 1]), at(w, ys[r]), at(0, ys[r])], Layer.LOOSE,
                      scale=scale, pattern=False)  # fmt: skip
        for c in part.columns:
            add_hatch(msp, [at(xs[c - 1], 0), at(xs[c], 0), at(xs[c], h), at(xs[c - 1], h)], Layer.LOOSE,
                      scale=scale, pattern=False)  # fmt: skip
        tag = _part_tag(k, part.racking)
        if part.rows:
            r = part.rows[0]
            pen.text(tag, w / scale + 2.0, (ys[r - 1] + ys[r]) / 2 / scale, height=H_SMALL, layer=Layer.LOOSE,
                     align="MIDDLE_LEFT")  # fmt: skip
        else:
            c = part.columns[0]
            pen.text(f"L{k}", (xs[c - 1] + xs[c]) / 2 / scale, h / scale + 1.5, height=H_SMALL, layer=Layer.LOOSE,
                     align="BOTTOM_CENTER")  # fmt: skip
    # column-only parts are explained in the right margin below the frame
    for line, text in enumerate(_column_part_notes(v)):
        pen.text(text, w / scale + 2.0, -3.0 - line * 3.5, height=H_SMALL, layer=Layer.LOOSE, align="MIDDLE_LEFT")
    # blocked bays and openings
    listed = f.blocked
    for r, c in sorted(fs.blocked):
        add_hatch(msp, [at(xs[c - 1], ys[r - 1]), at(xs[c], ys[r - 1]), at(xs[c], ys[r]), at(xs[c - 1], ys[r])],
                  Layer.OPENING_PATT, scale=scale, pattern=True)  # fmt: skip
    for r, c in sorted(listed):
        _label_box(pen, "blocked", (xs[c - 1] + xs[c]) / 2 / scale, (ys[r - 1] + ys[r]) / 2 / scale)
    for opening in f.openings:
        pts = [at(x, y) for x, y in opening.polygon]
        msp.add_lwpolyline(pts, close=True, dxfattribs={"layer": Layer.OPENING.layer_name})
        spot = opening_polygon(opening).representative_point()
        _label_box(pen, opening.name, spot.x / scale, spot.y / scale)
    # grid lines (extended into the margins) and the bars
    ext = 2.0 * scale
    for x in xs:
        msp.add_line(at(x, -ext), at(x, h + ext), dxfattribs={"layer": Layer.GRID.layer_name})
    for y in ys:
        msp.add_line(at(-ext, y), at(w + ext, y), dxfattribs={"layer": Layer.GRID.layer_name})
    for x in xs:
        msp.add_line(at(x, 0), at(x, h), dxfattribs={"layer": Layer.FRAME.layer_name})
    for y in ys:
        msp.add_line(at(0, y), at(w, y), dxfattribs={"layer": Layer.FRAME.layer_name})
    # members and their markers
    critical = {(m.row, m.col, m.diagonal) for m in v.critical_members}
    for m in sorted(f.members, key=lambda m: m.sort_key):
        a, b = member_endpoints(f, m)
        layer = member_layer(brace=m.kind is MemberKind.BRACE, existing=m.existing)
        msp.add_line(at(*a), at(*b), dxfattribs={"layer": layer.layer_name})
        lo, hi = _member_ends(f, m)
        if m.kind is MemberKind.TIE:
            px, py = _along(lo, hi, _SENSE_AT)
            name = TIE_CW_BLOCK if m.diagonal is Diagonal.RISING else TIE_ACW_BLOCK
            pen.block(name, px / scale, py / scale, Layer.TIE_SENSE)
        if (m.row, m.col, m.diagonal) in critical:
            px, py = _along(lo, hi, _CRITICAL_AT)
            pen.block(CRITICAL_BLOCK, px / scale, py / scale, Layer.CRITICAL)
    # supports
    if f.supports is Supports.BASE:
        msp.add_line(at(-3.0 * scale, 0), at(w + 3.0 * scale, 0), dxfattribs={"layer": Layer.SUPPORT.layer_name})
        for x in xs:
            pen.block(SUPPORT_BLOCK, x / scale, 0.0, Layer.SUPPORT_SYMBOL)
    # row and column labels
    bubble_y, chain_y, overall_y = _bottom_zone(f)
    for r in range(1, f.rows + 1):
        cy = (ys[r - 1] + ys[r]) / 2 / scale
        pen.block(BUBBLE_BLOCK, _ROW_BUBBLE_X, cy, Layer.GRID_LABEL)
        pen.text(f"R{r}", _ROW_BUBBLE_X, cy, height=H_SMALL, layer=Layer.GRID_LABEL, align="MIDDLE_CENTER")
    for c in range(1, f.cols + 1):
        cx = (xs[c - 1] + xs[c]) / 2 / scale
        pen.block(BUBBLE_BLOCK, cx, bubble_y, Layer.GRID_LABEL)
        pen.text(f"C{c}", cx, bubble_y, height=H_SMALL, layer=Layer.GRID_LABEL, align="MIDDLE_CENTER")
    # dimension chains: defining points just outside the bubbles, so extension lines stay short
    dim_layer = {"layer": Layer.GRID_DIMS.layer_name}
    foot = (bubble_y - BUBBLE_RADIUS - 1.0) * scale
    for c in range(1, f.cols + 1):
        msp.add_linear_dim(base=at(xs[c - 1], chain_y * scale), p1=at(xs[c - 1], foot), p2=at(xs[c], foot),
                           dimstyle=DIM_STYLE, dxfattribs=dim_layer).render()  # fmt: skip
    if f.cols > 1:
        msp.add_linear_dim(base=at(0, overall_y * scale), p1=at(0, foot), p2=at(w, foot),
                           dimstyle=DIM_STYLE, dxfattribs=dim_layer).render()  # fmt: skip
    side = (_ROW_BUBBLE_X - BUBBLE_RADIUS - 1.0) * scale
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


def _heading(fs: FrameSheet) -> tuple[str, str]:
    """The size line and the verdict line written above a frame."""
    f, v = fs.frame, fs.verdict
    if v.stable:
        crit = len(v.critical_members)
        state = f"STABLE; {crit} critical member{'s' if crit != 1 else ''}"
    else:
        state = f"NOT STABLE: {v.racking_modes} racking mode{'s' if v.racking_modes != 1 else ''} left"
    held = "pinned base" if f.supports is Supports.BASE else "free-standing"
    size = f"{f.cols} x {f.rows} bays, {format_length_m(f.width_mm)} x {format_length_m(f.height_mm)}, {held}"
    return size, state


def _label_box(pen: Pen, text: str, x: float, y: float) -> None:
    """A centred label on a wipeout mask so the hatching does not run through it."""
    half_w = text_width(text, H_SMALL) / 2 + 0.8
    half_h = H_SMALL / 2 + 0.8
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
    legend, bill, title = legend_size(), bill_size(bom), title_size()
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
    draw_legend(pen, bx, by)
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
