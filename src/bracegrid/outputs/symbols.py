"""Symbols: text and dimension styles, linetypes, the blocked-bay hatch pattern and blocks of every sheet.

Blocks are drawn in paper millimetres around their insertion point and
inserted with the sheet's scale factor (times a marker size factor where
markers shrink to fit narrow bays), so a symbol keeps its printed size
whatever the drawing scale. All shapes and names here are our own design;
the document's only dimension style is ours and the header points at it.
"""

from __future__ import annotations

import math
from functools import cache
from typing import TYPE_CHECKING, Any

from bracegrid.outputs.layers import Layer

if TYPE_CHECKING:
    from ezdxf.document import Drawing
    from ezdxf.fonts.fonts import AbstractFont

#: Text style of every label (the font is found by name by DXF readers).
TEXT_STYLE = "BG_TEXT"
TEXT_FONT = "DejaVuSans.ttf"
#: Dimension style of the dimension chains (the only one in the document).
DIM_STYLE = "BG_DIM"

#: Block names.
SUPPORT_BLOCK = "BG_SUPPORT_PIN"
TIE_CW_BLOCK = "BG_TIE_RESISTS_CW"
TIE_ACW_BLOCK = "BG_TIE_RESISTS_ACW"
CRITICAL_BLOCK = "BG_CRITICAL"
BAY_TAG_BLOCK = "BG_BAY_TAG"
TICK_BLOCK = "BG_DIM_TICK"

#: Hatch pattern of blocked bays: one family of 45-degree lines, defined in every hatch.
BLOCKED_PATTERN = "BG_BLOCKED"
#: Spacing of the blocked-bay hatch lines, paper mm.
BLOCKED_SPACING = 1.75

#: Bay tag (row and column labels): a flat hexagon, pointed at both ends, paper mm.
BAY_TAG_WIDTH = 8.4
BAY_TAG_HEIGHT = 4.4

#: Tie-sense curl: radius of the arc and length of the arrowhead, paper mm (full size).
SENSE_RADIUS = 1.5
_SENSE_HEAD = 1.2
#: Critical-member diamond: centre to corner, paper mm (full size).
CRITICAL_HALF = 1.9

# Linetype patterns in paper mm: positive dash, negative gap, 0 dot.
_LINETYPES: dict[str, tuple[str, tuple[float, ...]]] = {
    "BG_TIE": ("tie: dashes", (3.0, -1.2)),
    "BG_CHAIN": ("grid: long dash, short dash", (6.0, -1.2, 1.0, -1.2)),
    "BG_EDGE": ("opening edge: short dashes", (1.5, -0.8)),
    "BG_OMIT": ("omitted grid bar: dots and short dashes", (0.8, -0.8, 0.0, -0.8)),
}

_BLOCK_ATTRIBS: dict[str, Any] = {"layer": "0", "color": 0, "lineweight": -2}


def _arrow_head(tip: tuple[float, float], direction: float, size: float) -> list[tuple[float, float]]:
    """Triangle of an arrowhead pointing along ``direction`` (radians)."""
    back = direction + math.pi
    left = (tip[0] + size * math.cos(back + 0.42), tip[1] + size * math.sin(back + 0.42))
    right = (tip[0] + size * math.cos(back - 0.42), tip[1] + size * math.sin(back - 0.42))
    return [tip, left, right]


def sense_shape(*, clockwise: bool) -> tuple[tuple[float, float, float], list[tuple[float, float]]]:
    """The tie-sense curl at full size: the arc (start and end angle in degrees, radius) and the arrowhead.

    A three-quarter arc around the tie; the arrowhead sits at the end of travel,
    clockwise for a rising tie, anticlockwise for a falling one.
    """
    r = SENSE_RADIUS
    if clockwise:
        start, end, head_deg = 60.0, 330.0, 60.0  # arc drawn ccw 60->330; travel cw ends at 60
        tangent = math.radians(head_deg) - math.pi / 2
    else:
        start, end, head_deg = 210.0, 120.0, 120.0  # arc 210->120 (through 0); travel ccw ends at 120
        tangent = math.radians(head_deg) + math.pi / 2
    angle = math.radians(head_deg)
    tip = (r * math.cos(angle) + 0.7 * math.cos(tangent), r * math.sin(angle) + 0.7 * math.sin(tangent))
    return (start, end, r), _arrow_head(tip, tangent, _SENSE_HEAD)


def sense_reach() -> float:
    """Distance from the centre of a full-size tie-sense curl to its farthest point, paper mm.

    Example:
        >>> 1.5 <= sense_reach() < 2.5
        True
    """
    _, head = sense_shape(clockwise=True)
    return max(SENSE_RADIUS, *(math.hypot(x, y) for x, y in head))


def _sense_block(doc: Drawing, name: str, *, clockwise: bool) -> None:
    """A three-quarter curl with an arrowhead: the racking sense a tie resists."""
    block = doc.blocks.new(name)
    (start, end, r), head = sense_shape(clockwise=clockwise)
    block.add_arc((0, 0), r, start, end, dxfattribs=_BLOCK_ATTRIBS)
    block.add_solid(head, dxfattribs=_BLOCK_ATTRIBS)


def _support_block(doc: Drawing) -> None:
    """Pin support: a triangle under the node with ground hatching below."""
    block = doc.blocks.new(SUPPORT_BLOCK)
    h, half = 3.0, 1.8
    block.add_lwpolyline([(0, 0), (-half, -h), (half, -h)], close=True, dxfattribs=_BLOCK_ATTRIBS)
    block.add_circle((0, 0), 0.45, dxfattribs=_BLOCK_ATTRIBS)
    for k in range(5):
        x = -half + 0.2 + k * (2 * half - 0.4) / 4
        block.add_line((x, -h), (x - 0.9, -h - 0.9), dxfattribs=_BLOCK_ATTRIBS)


def critical_diamond() -> list[tuple[float, float]]:
    """Corners of the full-size critical-member diamond, paper mm around its centre."""
    s = CRITICAL_HALF
    return [(0.0, s), (s, 0.0), (0.0, -s), (-s, 0.0)]


def _critical_block(doc: Drawing) -> None:
    """Critical member: a diamond on the member with an exclamation mark.

    A wipeout the shape of the diamond comes first, so the member line (drawn
    before every marker) and anything under it stop at the diamond's edge and
    never cross the exclamation mark.
    """
    block = doc.blocks.new(CRITICAL_BLOCK)
    corners = critical_diamond()
    block.add_wipeout(corners, dxfattribs={"layer": "0", "color": 0})
    block.add_lwpolyline(corners, close=True, dxfattribs=_BLOCK_ATTRIBS)
    block.add_line((0, 1.05), (0, -0.25), dxfattribs=_BLOCK_ATTRIBS)
    block.add_circle((0, -0.75), 0.16, dxfattribs=_BLOCK_ATTRIBS)


def bay_tag_outline() -> list[tuple[float, float]]:
    """Corners of the bay tag (a flat hexagon, pointed at the ends), paper mm around its centre."""
    half_w, half_h = BAY_TAG_WIDTH / 2, BAY_TAG_HEIGHT / 2
    point = half_w - half_h * 0.8
    return [(-half_w, 0.0), (-point, half_h), (point, half_h), (half_w, 0.0), (point, -half_h), (-point, -half_h)]


def _bay_tag_block(doc: Drawing) -> None:
    """Bay tag of a row or column of bays; the label text (R1, C1) is written over it."""
    block = doc.blocks.new(BAY_TAG_BLOCK)
    block.add_lwpolyline(bay_tag_outline(), close=True, dxfattribs=_BLOCK_ATTRIBS)


def _tick_block(doc: Drawing) -> None:
    """Dimension tick: a short oblique stroke through the end of the dimension line (size 1 = 1 mm)."""
    block = doc.blocks.new(TICK_BLOCK)
    block.add_line((-0.5, -0.5), (0.5, 0.5), dxfattribs=_BLOCK_ATTRIBS)


def blocked_pattern(scale: float) -> list[list[Any]]:
    """Definition of the blocked-bay pattern for a sheet scale: 45-degree lines, model units.

    One definition line ``[angle, base point, offset to the next line, dashes]``; the offset
    is perpendicular to the lines, :data:`BLOCKED_SPACING` paper mm long.
    """
    step = BLOCKED_SPACING * scale / math.sqrt(2.0)
    return [[45.0, (0.0, 0.0), (-step, step), []]]


def setup_document(doc: Drawing, *, scale: float) -> None:
    """Define layers, linetypes, the text and dimension styles, and the blocks.

    Layer descriptions are not written into the DXF (they would need an
    application id of another program's layer tools); docs/drawings.md and the
    legend say what each layer holds.

    Args:
        doc: A new, empty document.
        scale: Model millimetres per paper millimetre (100 for a 1:100 sheet).
    """
    for name, (description, pattern) in _LINETYPES.items():
        total = sum(abs(p) for p in pattern) * scale
        doc.linetypes.add(name, [total, *(p * scale for p in pattern)], description=description)
    doc.styles.add(TEXT_STYLE, font=TEXT_FONT)
    for layer in Layer:
        spec = layer.spec
        doc.layers.add(spec.name, color=spec.color, linetype=spec.linetype, lineweight=spec.lineweight)
    _support_block(doc)
    _sense_block(doc, TIE_CW_BLOCK, clockwise=True)
    _sense_block(doc, TIE_ACW_BLOCK, clockwise=False)
    _critical_block(doc)
    _bay_tag_block(doc)
    _tick_block(doc)
    style = doc.dimstyles.new(
        DIM_STYLE,
        dxfattribs={
            "dimscale": scale,
            "dimtxt": 2.0,
            "dimtxsty": TEXT_STYLE,
            "dimasz": 1.2,
            "dimexo": 1.0,
            "dimexe": 1.0,
            "dimdle": 0.0,
            "dimgap": 0.6,
            "dimtad": 1,
            "dimtih": 0,
            "dimtoh": 0,
            "dimdec": 0,
            "dimzin": 8,
            "dimlunit": 2,
            "dimlfac": 1.0,
            "dimclrd": 256,
            "dimclre": 256,
            "dimclrt": 256,
        },
    )
    style.set_arrows(blk=TICK_BLOCK)  # our own tick block at both ends (sets DIMTSZ to 0)
    for other in [s.dxf.name for s in doc.dimstyles if s.dxf.name != DIM_STYLE]:
        doc.dimstyles.remove(other)
    doc.header["$DIMSTYLE"] = DIM_STYLE


@cache
def _font(height: float) -> AbstractFont:
    """The drawing's font at a text height (fonts are immutable; cached for speed)."""
    from ezdxf.fonts import fonts

    return fonts.make_font(TEXT_FONT, height)


def text_width(text: str, height: float) -> float:
    """Printed width of a one-line label in the drawing's font (same units as ``height``).

    Example:
        >>> 0 < text_width("C12", 2.0) < 10
        True
    """
    return float(_font(height).text_width(text))
