"""The sheet: frames laid out on one sheet, and the sheet's legend, bill table and title block.

Everything is placed in paper millimetres and multiplied by the drawing scale
when written, so the model space holds the frames at true size (millimetres)
and the annotation prints at a fixed size on the chosen sheet.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date
from enum import Enum
from typing import TYPE_CHECKING, Any

from bracegrid.model import MemberKind
from bracegrid.outputs.bill import Bom, BomTotals
from bracegrid.outputs.layers import Layer, member_layer
from bracegrid.outputs.safetext import visible_text
from bracegrid.outputs.symbols import (
    BAY_TAG_BLOCK,
    BLOCKED_PATTERN,
    CRITICAL_BLOCK,
    SUPPORT_BLOCK,
    TEXT_STYLE,
    TIE_ACW_BLOCK,
    TIE_CW_BLOCK,
    blocked_pattern,
    text_width,
)
from bracegrid.outputs.terms import (
    BLOCKED_LABEL,
    COST,
    COUNT,
    CUT_EACH,
    LENGTH,
    MEMBER,
    STATUS,
    counts_words,
    money_text,
)
from bracegrid.units import metres_text

if TYPE_CHECKING:
    from ezdxf.layouts.layout import Modelspace

#: ISO 216 landscape sheets, paper mm, smallest first.
SHEETS: tuple[tuple[str, float, float], ...] = (
    ("A3", 420.0, 297.0),
    ("A2", 594.0, 420.0),
    ("A1", 841.0, 594.0),
    ("A0", 1189.0, 841.0),
)
#: Drawing scales tried, most detailed first (1:N).
SCALES: tuple[int, ...] = (20, 25, 50, 75, 100, 125, 150, 200, 250, 500, 1000, 2000)
#: Sheet margin and gaps, paper mm.
MARGIN = 10.0
GAP = 8.0
#: Smallest printed bay side (paper mm) for labels and markers to fit inside.
MIN_BAY = 10.0

#: Text heights, paper mm.
H_TITLE = 4.0
H_LABEL = 2.5
H_SMALL = 2.0


@dataclass(frozen=True, slots=True)
class Margins:
    """Room a frame's annotation needs around its outline, paper mm."""

    left: float
    right: float
    bottom: float
    top: float
    min_width: float = 0.0
    """Least width from the outline's left edge to the block's right edge (headings)."""


@dataclass(frozen=True, slots=True)
class FrameBox:
    """A frame's true size (mm) and the annotation room around it (paper mm)."""

    width_mm: float
    height_mm: float
    min_bay_mm: float
    margins: Margins


@dataclass(frozen=True, slots=True)
class SheetPlan:
    """Where everything goes.

    Attributes:
        sheet: Sheet name (A3 ...).
        paper: Sheet width and height, paper mm.
        scale: Model mm per paper mm (100 means 1:100).
        origins: Bottom-left corner of each frame outline, model mm.
        band: Bottom-left corner of the band with legend, bill and title block, paper mm.
    """

    sheet: str
    paper: tuple[float, float]
    scale: int
    origins: tuple[tuple[float, float], ...]
    band: tuple[float, float]


def _block_width(b: FrameBox, scale: float) -> float:
    """Paper width of a frame with its annotation, from the outline's left edge."""
    return max(b.width_mm / scale + b.margins.right, b.margins.min_width)


def _frames_extent(boxes: Sequence[FrameBox], scale: float) -> tuple[float, float]:
    width = sum(b.margins.left + _block_width(b, scale) for b in boxes) + GAP * (len(boxes) - 1)
    # One common ground line: the tallest frame above it and the deepest bottom margin below it,
    # which need not belong to the same frame.
    height = max(b.margins.top + b.height_mm / scale for b in boxes) + max(b.margins.bottom for b in boxes)
    return width, height


def plan_sheet(boxes: Sequence[FrameBox], band: tuple[float, float]) -> SheetPlan:
    """Choose the smallest sheet and most detailed scale on which everything fits.

    Frames sit side by side on a common ground line at the top of the sheet;
    the band (legend, bill of materials, title block) runs along the bottom.

    Args:
        boxes: The frames to place, left to right.
        band: Width and height of the bottom band, paper mm.

    Returns:
        The plan. Where no usual scale prints the smallest bay ``MIN_BAY`` wide (bays under
        200 mm), the smallest sheet and most detailed scale on which everything fits. If nothing
        fits even on A0 at 1:2000 the scale grows until it does.

    Example:
        >>> box = FrameBox(12000, 8000, 2000, Margins(30, 5, 30, 15))
        >>> p = plan_sheet([box], (300, 60))
        >>> p.sheet, p.scale
        ('A3', 50)
    """

    def fits(paper: tuple[float, float], scale: float) -> bool:
        width, height = _frames_extent(boxes, scale)
        room_w, room_h = paper[0] - 2 * MARGIN, paper[1] - 2 * MARGIN
        return width <= room_w and band[0] <= room_w and height + GAP + band[1] <= room_h

    smallest_bay = min(b.min_bay_mm for b in boxes)
    readable = any(smallest_bay / scale >= MIN_BAY for scale in SCALES)
    choice: tuple[str, tuple[float, float], int] | None = next(
        (
            (name, (w, h), scale)
            for name, w, h in SHEETS
            for scale in SCALES
            if (smallest_bay / scale >= MIN_BAY or not readable) and fits((w, h), scale)
        ),
        None,
    )
    if choice is None:
        name, w, h = SHEETS[-1]
        scale = SCALES[-1]
        while not fits((w, h), scale) and scale < 10**7:
            scale *= 2
        choice = (name, (w, h), scale)
    name, paper, scale = choice
    frames_w, frames_h = _frames_extent(boxes, scale)
    x = MARGIN + (paper[0] - 2 * MARGIN - frames_w) / 2
    # centre the row of frames in the room above the band
    above = MARGIN + band[1] + GAP
    spare = paper[1] - MARGIN - above - frames_h
    top = paper[1] - MARGIN - spare / 2
    ground = top - max(b.margins.top + b.height_mm / scale for b in boxes)
    origins = []
    for b in boxes:
        x += b.margins.left
        origins.append((x * scale, ground * scale))
        x += _block_width(b, scale) + GAP
    return SheetPlan(name, paper, scale, tuple(origins), (MARGIN, MARGIN))


class Pen:
    """Writes entities at paper-mm positions (offset and scaled into model space)."""

    def __init__(self, msp: Modelspace, scale: float, origin: tuple[float, float] = (0.0, 0.0)) -> None:
        self.msp = msp
        self.scale = scale
        self.origin = origin

    def at(self, x: float, y: float) -> tuple[float, float]:
        """Model point of a paper point."""
        return (self.origin[0] + x * self.scale, self.origin[1] + y * self.scale)

    def text(
        self,
        text: str,
        x: float,
        y: float,
        *,
        height: float,
        layer: Layer,
        align: str = "LEFT",
        rotation: float = 0.0,
        color: int = 256,
    ) -> None:
        """A one-line TEXT entity (control characters in names escaped: :mod:`bracegrid.outputs.safetext`)."""
        from ezdxf.enums import TextEntityAlignment

        entity = self.msp.add_text(
            visible_text(text),
            height=height * self.scale,
            rotation=rotation,
            dxfattribs={"layer": layer.layer_name, "style": TEXT_STYLE, "color": color},
        )
        entity.set_placement(self.at(x, y), align=TextEntityAlignment[align])

    def line(self, a: tuple[float, float], b: tuple[float, float], layer: Layer, **attribs: Any) -> None:
        """A LINE between two paper points."""
        self.msp.add_line(self.at(*a), self.at(*b), dxfattribs={"layer": layer.layer_name, **attribs})

    def rect(self, x: float, y: float, w: float, h: float, layer: Layer, **attribs: Any) -> None:
        """A closed rectangle outline."""
        pts = [self.at(x, y), self.at(x + w, y), self.at(x + w, y + h), self.at(x, y + h)]
        self.msp.add_lwpolyline(pts, close=True, dxfattribs={"layer": layer.layer_name, **attribs})

    def block(self, name: str, x: float, y: float, layer: Layer, *, size: float = 1.0, **attribs: Any) -> None:
        """Insert a paper-size block, ``size`` times its drawn size."""
        factor = self.scale * size
        self.msp.add_blockref(
            name,
            self.at(x, y),
            dxfattribs={"layer": layer.layer_name, "xscale": factor, "yscale": factor, **attribs},
        )


# --------------------------------------------------------------------------- legend

#: Fill of absent bays: a light grey, so they read as "not part of the frame" beside the pale
#: orange of loose parts.
ABSENT_RGB = (228, 228, 228)

#: Height of a legend row, paper mm, by sample (marker samples need more room than line samples).
_LEGEND_ROW = 4.2
_LEGEND_TALL = {"cw": 6.0, "acw": 6.0, "crit": 6.0, "support": 5.6, "bay": 5.6, "blocked": 5.0, "opening": 5.0}
#: Width of the sample column, paper mm.
_SAMPLE_W = 16.0
_LEGEND_ROWS: tuple[tuple[str, str], ...] = (
    ("brace-new", "rigid brace, proposed (heavy, solid)"),
    ("brace-old", "rigid brace, existing (light, solid)"),
    ("tie-new", "tension-only tie, proposed (heavy, dashed)"),
    ("tie-old", "tension-only tie, existing (light, dashed)"),
    ("bar", "frame bar: standard or ledger"),
    ("grid", "grid line (member centre line)"),
    ("cw", "rising tie: resists clockwise racking (top sways right)"),
    ("acw", "falling tie: resists anticlockwise racking (top sways left)"),
    ("crit", "critical member: its loss leaves a mechanism"),
    ("blocked", "blocked bay, listed in the project file (label)"),
    ("hatched", "bay blocked by an opening: no member may go there"),
    ("opening", "opening: outline set just inside its edge, named"),
    ("loose", "loose part: can still rack (shaded rows, columns)"),
    ("tag", "M1 = loose part (mechanism) 1 and the way it racks"),
    ("support", "pinned support on the ground line"),
    ("bay", "bay tags: R = row of bays (R1 at the bottom), C = column"),
)
#: Rows added when a sheet holds a general frame (missing grid bars, an outline).
_GENERAL_ROWS: tuple[tuple[str, str], ...] = (
    ("omitted", "grid bar left out (missing ledger or standard)"),
    ("absent", "absent bay: outside the frame's outline"),
    ("flex", "mechanism: exaggerated deflected shape (not to scale)"),
)


def legend_rows(*, general: bool = False) -> tuple[tuple[str, str, float], ...]:
    """The legend's rows: key, words and row height (paper mm), top to bottom.

    Example:
        >>> [key for key, _, _ in legend_rows()][:3]
        ['brace-new', 'brace-old', 'tie-new']
    """
    rows = _LEGEND_ROWS + (_GENERAL_ROWS if general else ())
    return tuple((key, words, _LEGEND_TALL.get(key, _LEGEND_ROW)) for key, words in rows)


def legend_size(*, general: bool = False) -> tuple[float, float]:
    """Width and height of the legend, paper mm (``general``: with the rows of general frames)."""
    rows = legend_rows(general=general)
    width = 3.0 + _SAMPLE_W + 3.0 + max(text_width(words, H_SMALL) for _, words, _ in rows) + 3.0
    return (width, 9.0 + sum(step for _, _, step in rows))


def draw_legend(pen: Pen, x: float, y: float, *, general: bool = False) -> None:
    """The legend with its bottom-left corner at paper (x, y).

    Samples sit on the legend layer with the look of the layer they explain, so the
    drawing layers hold only what is drawn on the frames. Each sample stays inside its
    own row (tests check that no two samples overlap).
    """
    w, h = legend_size(general=general)
    lay = Layer.LEGEND
    pen.rect(x, y, w, h, lay)
    pen.text("LEGEND", x + 2, y + h - 4.5, height=H_LABEL, layer=lay)
    cy = y + h - 7.0
    x0, x1 = x + 3, x + 3 + _SAMPLE_W
    mid = (x0 + x1) / 2
    for key, words, step in legend_rows(general=general):
        cy -= step / 2
        top, bottom = cy + step / 2 - 0.5, cy - step / 2 + 0.5
        if key in {"brace-new", "brace-old", "tie-new", "tie-old"}:
            layer = member_layer(brace=key.startswith("brace"), existing=key.endswith("old"))
            pen.line((x0, cy), (x1, cy), lay, **_look(layer))
        elif key == "bar":
            pen.line((x0, cy), (x1, cy), lay, **_look(Layer.FRAME))
        elif key == "omitted":
            pen.line((x0, cy), (x1, cy), lay, **_look(Layer.FRAME_OMIT))
        elif key == "absent":
            pts = [(x0, bottom), (x1, bottom), (x1, top), (x0, top)]
            add_hatch(pen.msp, [pen.at(*p) for p in pts], Layer.LEGEND, scale=pen.scale, pattern=False,
                      color=Layer.ABSENT.spec.color, rgb=ABSENT_RGB)  # fmt: skip
        elif key == "flex":
            pen.line((x0, bottom + 0.3), (mid, top - 0.3), lay, **_look(Layer.FLEX))
            pen.line((mid, top - 0.3), (x1, bottom + 0.3), lay, **_look(Layer.FLEX))
        elif key == "grid":
            pen.line((x0, cy), (x1, cy), lay, **_look(Layer.GRID))
        elif key in {"cw", "acw", "crit"}:
            # the curl of a rising tie on a rising line, of a falling tie on a falling line
            slope = -1.0 if key == "acw" else 1.0
            rise = (top - bottom) / 2 - 0.2
            pen.line((x0 + 2, cy - slope * rise), (x1 - 2, cy + slope * rise), lay,
                     **_look(member_layer(brace=key == "crit", existing=False)))  # fmt: skip
            block = {"cw": TIE_CW_BLOCK, "acw": TIE_ACW_BLOCK, "crit": CRITICAL_BLOCK}[key]
            pen.block(block, mid, cy, lay, **_look(Layer.CRITICAL if key == "crit" else Layer.TIE_SENSE))
        elif key == "blocked":
            _hatch_rect(pen, x0, bottom, x1 - x0, top - bottom, Layer.OPENING_PATT, pattern=True)
            half = text_width(BLOCKED_LABEL, H_SMALL) / 2 + 0.6
            mask = pen.msp.add_wipeout([pen.at(mid - half, bottom + 0.3), pen.at(mid + half, top - 0.3)])
            mask.dxf.layer = lay.layer_name
            pen.text(BLOCKED_LABEL, mid, cy, height=H_SMALL, layer=lay, align="MIDDLE_CENTER")
        elif key == "hatched":
            _hatch_rect(pen, x0, bottom, x1 - x0, top - bottom, Layer.OPENING_PATT, pattern=True)
        elif key == "opening":
            pen.rect(x0, bottom, x1 - x0, top - bottom, lay, **_look(Layer.OPENING))
        elif key == "loose":
            _hatch_rect(pen, x0, bottom, x1 - x0, top - bottom, Layer.LOOSE, pattern=False)
        elif key == "tag":
            pen.text("M1", mid, cy, height=H_SMALL, layer=lay, align="MIDDLE_CENTER", color=Layer.LOOSE.spec.color)
        elif key == "support":
            pen.line((x0, cy + 1.6), (x1, cy + 1.6), lay, **_look(Layer.SUPPORT))
            pen.block(SUPPORT_BLOCK, mid, cy + 1.6, lay, **_look(Layer.SUPPORT_SYMBOL))
        else:  # bay tag
            pen.block(BAY_TAG_BLOCK, mid, cy, lay, **_look(Layer.GRID_LABEL))
            pen.text("R1", mid, cy, height=H_SMALL, layer=lay, align="MIDDLE_CENTER")
        pen.text(words, x1 + 3, cy, height=H_SMALL, layer=lay, align="MIDDLE_LEFT")
        cy -= step / 2


def _look(layer: Layer) -> dict[str, Any]:
    """Colour, linetype and lineweight of a layer, as entity overrides."""
    spec = layer.spec
    return {"color": spec.color, "linetype": spec.linetype, "lineweight": spec.lineweight}


def _hatch_rect(pen: Pen, x: float, y: float, w: float, h: float, look: Layer, *, pattern: bool) -> None:
    """A legend sample of a hatch: on the legend layer, coloured like ``look``."""
    pts = [pen.at(x, y), pen.at(x + w, y), pen.at(x + w, y + h), pen.at(x, y + h)]
    add_hatch(pen.msp, pts, Layer.LEGEND, scale=pen.scale, pattern=pattern, color=look.spec.color)


def add_hatch(
    msp: Modelspace,
    points: Sequence[tuple[float, float]],
    layer: Layer,
    *,
    scale: float,
    pattern: bool,
    color: int = 256,
    rgb: tuple[int, int, int] = (255, 226, 190),
) -> None:
    """A hatch over a polygon (model points): our 45-degree blocked-bay pattern, or a pale fill
    (``rgb``: pale orange for loose parts, :data:`ABSENT_RGB` for absent bays)."""
    hatch = msp.add_hatch(color=color, dxfattribs={"layer": layer.layer_name})
    if pattern:
        # pattern type 2 (custom): the definition travels inside the hatch, named as ours
        hatch.set_pattern_fill(BLOCKED_PATTERN, color=color, pattern_type=2, definition=blocked_pattern(scale))
    else:
        hatch.rgb = rgb  # light: prints as a pale grey in black and white
    hatch.paths.add_polyline_path(points, is_closed=True)


# --------------------------------------------------------------------------- bill table

#: The sheet's bill columns: name, width (paper mm), alignment.
_COLS: tuple[tuple[str, float, str], ...] = (
    ("frame", 30.0, "LEFT"),
    (MEMBER, 13.0, "LEFT"),
    (STATUS, 19.0, "LEFT"),
    (COUNT, 9.0, "RIGHT"),
    (CUT_EACH, 21.0, "RIGHT"),
    (LENGTH, 18.0, "RIGHT"),
    (COST, 19.0, "RIGHT"),
)
_ROW = 3.7


class BillRowKind(Enum):
    """What a printed bill row is."""

    HEAD = "head"
    ITEM = "item"
    FRAME_TOTAL = "frame total"
    TOTAL = "total"
    PROPOSED = "of which proposed"


@dataclass(frozen=True, slots=True)
class BillRow:
    """One printed row of the sheet's bill.

    Attributes:
        kind: Head, item or a total.
        cells: The texts of the seven columns; ``None`` merges a cell into the one on its left.
    """

    kind: BillRowKind
    cells: tuple[str | None, ...]


def bill_rows(bom: Bom) -> list[BillRow]:
    """The sheet's bill, row by row, as printed (the header row first).

    Items group members by kind, status and cut length; each frame total, the total and the
    proposed-only total are sums of the item rows above them, in whole mm and cents.

    Example:
        >>> from bracegrid.model import Frame, Project
        >>> from bracegrid.outputs.bill import build_bom
        >>> [r.kind.value for r in bill_rows(build_bom(Project("p", (Frame("f", (3000,), (2000,)),))))]
        ['head', 'item', 'total', 'of which proposed']
    """
    rows = [BillRow(BillRowKind.HEAD, tuple(c[0] for c in _COLS))]

    def totals(kind: BillRowKind, label: str, t: BomTotals) -> BillRow:
        return BillRow(kind, (label, counts_words(t.braces, t.ties), None, str(t.members), "",
                              metres_text(t.length_mm), money_text(t.cost_cents)))  # fmt: skip

    for fb in bom.frames:
        first = True
        for g in fb.groups:
            rows.append(
                BillRow(
                    BillRowKind.ITEM,
                    (
                        fb.frame if first else "",
                        g.kind.value,
                        "existing" if g.existing else "proposed",
                        str(g.count),
                        str(g.cut_length_mm),
                        metres_text(g.length_mm),
                        money_text(g.cost_cents),
                    ),
                )
            )
            first = False
        if first:
            rows.append(BillRow(BillRowKind.ITEM, (fb.frame, "none", "", "0", "", metres_text(0), money_text(0))))
        if len(bom.frames) > 1:
            rows.append(totals(BillRowKind.FRAME_TOTAL, "  frame total", fb.totals))
    t = bom.totals
    rows.append(totals(BillRowKind.TOTAL, "TOTAL", t))
    proposed = ("of which proposed", counts_words(*_proposed_kinds(bom)), None, str(t.proposed), "", "")
    rows.append(BillRow(BillRowKind.PROPOSED, (*proposed, money_text(t.proposed_cost_cents))))
    return rows


def _proposed_kinds(bom: Bom) -> tuple[int, int]:
    braces = sum(
        1 for fb in bom.frames for x in fb.lines if not x.member.existing and x.member.kind is MemberKind.BRACE
    )
    return braces, bom.totals.proposed - braces


def _fit(text: str, width: float) -> str:
    if text_width(text, H_SMALL) <= width - 1.0:
        return text
    while text and text_width(text + "…", H_SMALL) > width - 1.0:
        text = text[:-1]
    return text + "…"


def bill_size(bom: Bom) -> tuple[float, float]:
    """Width and height of the bill table, paper mm."""
    return (sum(c[1] for c in _COLS), 8.0 + _ROW * len(bill_rows(bom)))


def draw_bill(pen: Pen, bom: Bom, x: float, y: float) -> None:
    """The bill-of-materials table with its bottom-left corner at paper (x, y)."""
    w, h = bill_size(bom)
    lay = Layer.SCHEDULE
    pen.rect(x, y, w, h, lay)
    pen.text("BILL OF MATERIALS  (cut = node-to-node diagonal)", x + 2, y + h - 4.5, height=H_LABEL, layer=lay)
    top = y + h - 8.0
    pen.line((x, top), (x + w, top), lay)
    for k, row in enumerate(bill_rows(bom)):
        base = top - (k + 1) * _ROW
        cx = x
        cells = list(row.cells)
        for i, (_, cw, align) in enumerate(_COLS):
            cell = cells[i]
            if cell is not None:
                span = cw
                for j in range(i + 1, len(_COLS)):
                    if cells[j] is not None:
                        break
                    span += _COLS[j][1]
                tx = cx + 1.0 if align == "LEFT" else cx + cw - 1.0
                if cell:
                    pen.text(_fit(cell, span), tx, base + 0.8, height=H_SMALL, layer=lay, align=f"BOTTOM_{align}")
            cx += cw
        if row.kind is not BillRowKind.ITEM:
            pen.line((x, base + _ROW), (x + w, base + _ROW), lay)


# --------------------------------------------------------------------------- title block

TITLE_WIDTH = 120.0


def title_size() -> tuple[float, float]:
    """Width and height of the title block, paper mm."""
    return (TITLE_WIDTH, 44.0)


def draw_title(
    pen: Pen,
    x: float,
    y: float,
    *,
    project: str,
    frames: Sequence[str],
    when: date,
    version: str,
    caution: str,
    sheet: str,
    scale: int,
) -> None:
    """The title block with its bottom-left corner at paper (x, y)."""
    w, h = title_size()
    lay = Layer.TITLE
    pen.rect(x, y, w, h, lay)
    row = y + h - 7.0
    pen.text(_fit_width(project, w - 4, H_TITLE), x + 2, row, height=H_TITLE, layer=lay)
    pen.line((x, row - 2.5), (x + w, row - 2.5), lay)
    shown = ", ".join(frames)
    lines = [
        _fit_width(f"Frames: {shown}", w - 4, H_SMALL),
        f"Date: {when.isoformat()}    Scale 1:{scale} on {sheet}    Lengths in mm",
        f"Drawn by bracegrid {version}; symbols as in the legend",
    ]
    for k, line in enumerate(lines):
        pen.text(line, x + 2, row - 7.0 - k * 4.0, height=H_SMALL, layer=lay)
    cut = row - 7.0 - len(lines) * 4.0 + 1.5
    pen.line((x, cut), (x + w, cut), lay)
    caution_mtext(pen, "CAUTION: " + caution, x + 2, cut - 2.0, width=w - 4)


def _fit_width(text: str, width: float, height: float) -> str:
    if text_width(text, height) <= width:
        return text
    while text and text_width(text + "…", height) > width:
        text = text[:-1]
    return text + "…"


def caution_mtext(pen: Pen, text: str, x: float, y: float, *, width: float) -> None:
    """The caution as word-wrapped MTEXT hanging from paper (x, y)."""
    from ezdxf.enums import MTextEntityAlignment

    mtext = pen.msp.add_mtext(
        visible_text(text),
        dxfattribs={
            "layer": Layer.TITLE.layer_name,
            "style": TEXT_STYLE,
            "char_height": H_SMALL * pen.scale,
            "width": width * pen.scale,
        },
    )
    mtext.set_location(pen.at(x, y), attachment_point=MTextEntityAlignment.TOP_LEFT)
