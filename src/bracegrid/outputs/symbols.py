"""Symbols: text and dimension styles, linetypes and blocks shared by every bracegrid drawing.

Blocks are drawn in paper millimetres around their insertion point and
inserted with the sheet's scale factor, so a symbol keeps its printed size
whatever the drawing scale. All shapes here are our own design.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from bracegrid.outputs.layers import Layer

if TYPE_CHECKING:
    from ezdxf.document import Drawing

#: Text style of every label (the font is found by name by DXF readers).
TEXT_STYLE = "BG_TEXT"
TEXT_FONT = "DejaVuSans.ttf"
#: Dimension style of the dimension chains.
DIM_STYLE = "BG_DIM"

#: Block names.
SUPPORT_BLOCK = "BG_SUPPORT_PIN"
TIE_CW_BLOCK = "BG_TIE_RESISTS_CW"
TIE_ACW_BLOCK = "BG_TIE_RESISTS_ACW"
CRITICAL_BLOCK = "BG_CRITICAL"
BUBBLE_BLOCK = "BG_GRID_BUBBLE"

#: Radius of a grid bubble, paper mm.
BUBBLE_RADIUS = 3.2
#: Radius of the tie-sense curl, paper mm.
SENSE_RADIUS = 1.9

# Linetype patterns in paper mm: positive dash, negative gap, 0 dot.
_LINETYPES: dict[str, tuple[str, tuple[float, ...]]] = {
    "BG_TIE": ("tie: dashes", (3.0, -1.2)),
    "BG_CHAIN": ("grid: long dash, short dash", (8.0, -1.2, 1.0, -1.2)),
    "BG_EDGE": ("opening edge: short dashes", (1.5, -1.0)),
}


def _arrow_head(tip: tuple[float, float], direction: float, size: float) -> list[tuple[float, float]]:
    """Triangle of an arrowhead pointing along ``direction`` (radians)."""
    back = direction + math.pi
    left = (tip[0] + size * math.cos(back + 0.38), tip[1] + size * math.sin(back + 0.38))
    right = (tip[0] + size * math.cos(back - 0.38), tip[1] + size * math.sin(back - 0.38))
    return [tip, left, right]


def _sense_block(doc: Drawing, name: str, *, clockwise: bool) -> None:
    """A three-quarter curl with an arrowhead: the racking sense a tie resists."""
    block = doc.blocks.new(name)
    attribs = {"layer": "0", "color": 0, "lineweight": -2}
    r = SENSE_RADIUS
    if clockwise:
        start, end, head_deg = 60.0, 330.0, 60.0  # arc drawn ccw 60->330; travel cw ends at 60
        tangent = math.radians(head_deg) - math.pi / 2
    else:
        start, end, head_deg = 210.0, 120.0, 120.0  # arc 210->120 (through 0); travel ccw ends at 120
        tangent = math.radians(head_deg) + math.pi / 2
    block.add_arc((0, 0), r, start, end, dxfattribs=attribs)
    angle = math.radians(head_deg)
    tip = (r * math.cos(angle) + 0.9 * math.cos(tangent), r * math.sin(angle) + 0.9 * math.sin(tangent))
    a, b, c = _arrow_head(tip, tangent, 1.6)
    block.add_solid([a, b, c], dxfattribs=attribs)


def _support_block(doc: Drawing) -> None:
    """Pin support: a triangle under the node with ground hatching below."""
    block = doc.blocks.new(SUPPORT_BLOCK)
    attribs = {"layer": "0", "color": 0, "lineweight": -2}
    h, half = 3.0, 1.8
    block.add_lwpolyline([(0, 0), (-half, -h), (half, -h)], close=True, dxfattribs=attribs)
    block.add_circle((0, 0), 0.45, dxfattribs=attribs)
    for k in range(5):
        x = -half + 0.2 + k * (2 * half - 0.4) / 4
        block.add_line((x, -h), (x - 0.9, -h - 0.9), dxfattribs=attribs)


def _critical_block(doc: Drawing) -> None:
    """Critical member: a diamond around the member with an exclamation mark."""
    block = doc.blocks.new(CRITICAL_BLOCK)
    attribs = {"layer": "0", "color": 0, "lineweight": -2}
    s = 1.9
    block.add_lwpolyline([(0, s), (s, 0), (0, -s), (-s, 0)], close=True, dxfattribs=attribs)
    block.add_line((0, 1.0), (0, -0.2), dxfattribs=attribs)
    block.add_circle((0, -0.7), 0.15, dxfattribs=attribs)


def _bubble_block(doc: Drawing) -> None:
    """Grid bubble: a circle; the label text is written over it."""
    block = doc.blocks.new(BUBBLE_BLOCK)
    block.add_circle((0, 0), BUBBLE_RADIUS, dxfattribs={"layer": "0", "color": 0, "lineweight": -2})


def setup_document(doc: Drawing, *, scale: float) -> None:
    """Define layers, linetypes, the text and dimension styles, and the blocks.

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
        entry = doc.layers.add(spec.name, color=spec.color, linetype=spec.linetype, lineweight=spec.lineweight)
        entry.description = spec.description
    doc.dimstyles.new(
        DIM_STYLE,
        dxfattribs={
            "dimscale": scale,
            "dimtxt": 2.0,
            "dimtxsty": TEXT_STYLE,
            "dimtsz": 1.0,  # oblique ticks instead of arrows
            "dimasz": 1.0,
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
    _support_block(doc)
    _sense_block(doc, TIE_CW_BLOCK, clockwise=True)
    _sense_block(doc, TIE_ACW_BLOCK, clockwise=False)
    _critical_block(doc)
    _bubble_block(doc)


def text_width(text: str, height: float) -> float:
    """Printed width of a one-line label in the drawing's font (same units as ``height``).

    Example:
        >>> 0 < text_width("C12", 2.0) < 10
        True
    """
    from ezdxf.fonts import fonts

    return float(fonts.make_font(TEXT_FONT, height).text_width(text))
