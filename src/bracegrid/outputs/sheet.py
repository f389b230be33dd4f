"""The sheet: frames laid out on one sheet, and the sheet's legend, bill table and title block.

Everything is placed in paper millimetres and multiplied by the drawing scale
when written, so the model space holds the frames at true size (millimetres)
and the annotation prints at a fixed size on the chosen sheet.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date
from typing import TYPE_CHECKING, Any

from bracegrid.outputs.bill import Bom, BomTotals
from bracegrid.outputs.layers import Layer, member_layer
from bracegrid.outputs.symbols import (
    BUBBLE_BLOCK,
    CRITICAL_BLOCK,
    SUPPORT_BLOCK,
    TEXT_STYLE,
    TIE_ACW_BLOCK,
    TIE_CW_BLOCK,
    text_width,
)
from bracegrid.units import format_length_m

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
    height = max(b.margins.top + b.height_mm / scale + b.margins.bottom for b in boxes)
    return width, height


def plan_sheet(boxes: Sequence[FrameBox], band: tuple[float, float]) -> SheetPlan:
    """Choose the smallest sheet and most detailed scale on which everything fits.

    Frames sit side by side on a common ground line at the top of the sheet;
    the band (legend, bill of materials, title block) runs along the bottom.

    Args:
        boxes: The frames to place, left to right.
        band: Width and height of the bottom band, paper mm.

    Returns:
        The plan. If nothing fits even on A0 at 1:2000 the scale grows until it does.

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
    choice: tuple[str, tuple[float, float], int] | None = None
    for name, w, h in SHEETS:
        for scale in SCALES:
            if smallest_bay / scale >= MIN_BAY and fits((w, h), scale):
                choice = (name, (w, h), scale)
                break
        if choice:
            break
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
        self, text: str, x: float, y: float, *, height: float, layer: Layer, align: str = "LEFT", rotation: float = 0.0
    ) -> None:
        """A one-line TEXT entity."""
        from ezdxf.enums import TextEntityAlignment

        entity = self.msp.add_text(
            text,
            height=height * self.scale,
            rotation=rotation,
            dxfattribs={"layer": layer.layer_name, "style": TEXT_STYLE},
        )
        entity.set_placement(self.at(x, y), align=TextEntityAlignment[align])

    def line(self, a: tuple[float, float], b: tuple[float, float], layer: Layer, **attribs: Any) -> None:
        """A LINE between two paper points."""
        self.msp.add_line(self.at(*a), self.at(*b), dxfattribs={"layer": layer.layer_name, **attribs})

    def rect(self, x: float, y: float, w: float, h: float, layer: Layer, **attribs: Any) -> None:
        """A closed rectangle outline."""
        pts = [self.at(x, y), self.at(x + w, y), self.at(x + w, y + h), self.at(x, y + h)]
        self.msp.add_lwpolyline(pts, close=True, dxfattribs={"layer": layer.layer_name, **attribs})

    def block(self, name: str, x: float, y: float, layer: Layer, **attribs: Any) -> None:
        """Insert a paper-size block."""
        self.msp.add_blockref(
            name,
            self.at(x, y),
            dxfattribs={"layer": layer.layer_name, "xscale": self.scale, "yscale": self.scale, **attribs},
        )


# --------------------------------------------------------------------------- legend

_LEGEND_ROW = 4.2
#: Rows needing more height than the others (support symbol, grid bubble).
_LEGEND_TALL = {"support": 5.2, "bubble": 7.2}
_LEGEND_ROWS: tuple[tuple[str, str], ...] = (
    ("brace-new", "rigid brace, proposed (heavy, solid)"),
    ("brace-old", "rigid brace, existing (light, solid)"),
    ("tie-new", "tension-only tie, proposed (heavy, dashed)"),
    ("tie-old", "tension-only tie, existing (light, dashed)"),
    ("cw", "tie resists clockwise racking (row top sways right)"),
    ("acw", "tie resists anticlockwise racking (row top sways left)"),
    ("crit", "critical member: its loss leaves a mechanism"),
    ("blocked", "blocked bay: no member may go there"),
    ("opening", "opening outline, named"),
    ("loose", "loose part: can still rack (tag gives the sense)"),
    ("support", "pinned support on the ground line"),
    ("bubble", "R = row (R1 at the bottom), C = column (C1 at the left)"),
    ("grid", "grid line (member centre line)"),
)


def legend_size() -> tuple[float, float]:
    """Width and height of the legend, paper mm."""
    rows = sum(_LEGEND_TALL.get(key, _LEGEND_ROW) for key, _ in _LEGEND_ROWS)
    return (96.0, 9.0 + rows)


def draw_legend(pen: Pen, x: float, y: float) -> None:
    """The legend with its bottom-left corner at paper (x, y)."""
    w, h = legend_size()
    lay = Layer.LEGEND
    pen.rect(x, y, w, h, lay)
    pen.text("LEGEND", x + 2, y + h - 4.5, height=H_LABEL, layer=lay)
    cy = y + h - 7.0
    for key, words in _LEGEND_ROWS:
        step = _LEGEND_TALL.get(key, _LEGEND_ROW)
        cy -= step / 2
        x0, x1 = x + 3, x + 15
        # Samples sit on the legend layer with the look of the layer they explain,
        # so the drawing layers hold only what is drawn on the frames.
        if key in {"brace-new", "brace-old", "tie-new", "tie-old"}:
            layer = member_layer(brace=key.startswith("brace"), existing=key.endswith("old"))
            pen.line((x0, cy), (x1, cy), lay, **_look(layer))
        elif key in {"cw", "acw"}:
            pen.line((x0, cy - 1.6), (x1, cy + 1.6), lay, **_look(member_layer(brace=False, existing=False)))
            pen.block(TIE_CW_BLOCK if key == "cw" else TIE_ACW_BLOCK, (x0 + x1) / 2, cy, lay, **_look(Layer.TIE_SENSE))
        elif key == "crit":
            pen.line((x0, cy - 1.6), (x1, cy + 1.6), lay, **_look(member_layer(brace=True, existing=False)))
            pen.block(CRITICAL_BLOCK, (x0 + x1) / 2, cy, lay, **_look(Layer.CRITICAL))
        elif key == "blocked":
            _hatch_rect(pen, x0, cy - 1.8, x1 - x0, 3.6, Layer.OPENING_PATT, pattern=True)
        elif key == "opening":
            pen.rect(x0, cy - 1.8, x1 - x0, 3.6, lay, **_look(Layer.OPENING))
        elif key == "loose":
            _hatch_rect(pen, x0, cy - 1.8, x1 - x0, 3.6, Layer.LOOSE, pattern=False)
        elif key == "support":
            pen.line((x0, cy + 2.0), (x1, cy + 2.0), lay, **_look(Layer.SUPPORT))
            pen.block(SUPPORT_BLOCK, (x0 + x1) / 2, cy + 2.0, lay, **_look(Layer.SUPPORT_SYMBOL))
        elif key == "bubble":
            pen.block(BUBBLE_BLOCK, (x0 + x1) / 2, cy, lay, **_look(Layer.GRID_LABEL))
            pen.text("R1", (x0 + x1) / 2, cy, height=H_SMALL, layer=lay, align="MIDDLE_CENTER")
        else:
            pen.line((x0, cy), (x1, cy), lay, **_look(Layer.GRID))
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
) -> None:
    """A hatch over a polygon (model points): 45-degree lines, or a pale fill."""
    if pattern:
        hatch = msp.add_hatch(color=color, dxfattribs={"layer": layer.layer_name})
        hatch.set_pattern_fill("ANSI31", scale=0.55 * scale, color=color)
    else:
        hatch = msp.add_hatch(color=color, dxfattribs={"layer": layer.layer_name})
        hatch.rgb = (255, 226, 190)  # light: prints as a pale grey in black and white
    hatch.paths.add_polyline_path(points, is_closed=True)


# --------------------------------------------------------------------------- bill table

_COLS: tuple[tuple[str, float, str], ...] = (
    ("frame", 30.0, "LEFT"),
    ("member", 15.0, "LEFT"),
    ("status", 17.0, "LEFT"),
    ("no.", 8.0, "RIGHT"),
    ("cut each", 16.0, "RIGHT"),
    ("length", 17.0, "RIGHT"),
    ("cost", 17.0, "RIGHT"),
)
_ROW = 3.7


def _bill_rows(bom: Bom) -> list[tuple[list[str], bool]]:
    rows: list[tuple[list[str], bool]] = []

    def totals(label: str, t: BomTotals) -> list[str]:
        counts = f"{t.braces}B {t.ties}T"
        return [label, counts, f"{t.proposed} new", str(t.members), "", format_length_m(t.length_mm), f"{t.cost:,.2f}"]

    for fb in bom.frames:
        first = True
        for g in fb.groups:
            name = fb.frame if first else ""
            first = False
            rows.append(
                (
                    [
                        name,
                        g.kind.value,
                        "existing" if g.existing else "proposed",
                        str(g.count),
                        f"{g.cut_length_mm} mm",
                        format_length_m(g.count * g.cut_length_mm),
                        f"{g.cost:,.2f}",
                    ],
                    False,
                )
            )
        if first:
            rows.append(([fb.frame, "none", "", "0", "", "", ""], False))
        if len(bom.frames) > 1:
            rows.append((totals("  frame total", fb.totals), True))
    rows.append((totals("TOTAL", bom.totals), True))
    t = bom.totals
    rows.append((["of which proposed", "", "", str(t.proposed), "", "", f"{t.proposed_cost:,.2f}"], True))
    return rows


def _fit(text: str, width: float) -> str:
    if text_width(text, H_SMALL) <= width - 1.0:
        return text
    while text and text_width(text + "…", H_SMALL) > width - 1.0:
        text = text[:-1]
    return text + "…"


def bill_size(bom: Bom) -> tuple[float, float]:
    """Width and height of the bill table, paper mm."""
    return (sum(c[1] for c in _COLS), 8.0 + _ROW * (len(_bill_rows(bom)) + 1))


def draw_bill(pen: Pen, bom: Bom, x: float, y: float) -> None:
    """The bill-of-materials table with its bottom-left corner at paper (x, y)."""
    w, h = bill_size(bom)
    lay = Layer.SCHEDULE
    pen.rect(x, y, w, h, lay)
    pen.text("BILL OF MATERIALS  (cut = node-to-node diagonal)", x + 2, y + h - 4.5, height=H_LABEL, layer=lay)
    top = y + h - 8.0
    pen.line((x, top), (x + w, top), lay)
    rows = [([c[0] for c in _COLS], True), *_bill_rows(bom)]
    for k, (cells, strong) in enumerate(rows):
        base = top - (k + 1) * _ROW
        cx = x
        for (_, cw, align), cell in zip(_COLS, cells, strict=True):
            tx = cx + 1.0 if align == "LEFT" else cx + cw - 1.0
            pen.text(_fit(cell, cw), tx, base + 1.0, height=H_SMALL, layer=lay, align=f"BOTTOM_{align}")
            cx += cw
        if k == 0 or strong:
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
        f"Drawn by bracegrid {version}; layers, symbols and columns: docs/drawings.md",
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
        text,
        dxfattribs={
            "layer": Layer.TITLE.layer_name,
            "style": TEXT_STYLE,
            "char_height": H_SMALL * pen.scale,
            "width": width * pen.scale,
        },
    )
    mtext.set_location(pen.at(x, y), attachment_point=MTextEntityAlignment.TOP_LEFT)
