"""The force sheet: a frame under its load cases, members coloured by utilisation, on its own layers.

One panel per load case and sense (two per sheet: a case and its reverse), side by side on a common ground line:
every bar coloured by its utilisation (a colour bar in the band explains it), over-capacity bars
drawn heavy and marked, force labels in kN where they fit, support reactions as arrows with their
values, and the deflected shape with its exaggeration factor printed in the panel heading. A case
that finds a mechanism shows the parts that move instead of forces. The band along the bottom holds
the colour bar and symbol key, the notes (model limits, mechanisms) and the title block with the
caution. Reuses the sheet planning, title block and symbols of the stability drawings; every
layer here is our own (docs/forces.md lists them).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date
from enum import Enum
from typing import TYPE_CHECKING, Any

from bracegrid._version import __version__
from bracegrid.analysis import CAUTION
from bracegrid.mechanics import MODEL_LIMITS, BarKind, CaseForces, FrameForces, MemberForce, Reaction
from bracegrid.model import Diagonal, Frame, Project, Supports, present_grid_bars, present_nodes
from bracegrid.outputs.forcetext import drift_text, util_text
from bracegrid.outputs.layers import Field, Layer, LayerSpec
from bracegrid.outputs.ramp import OVER_RGB, UNRATED_RGB, utilisation_rgb
from bracegrid.outputs.safetext import visible_text
from bracegrid.outputs.sheet import (
    GAP,
    H_LABEL,
    H_SMALL,
    FrameBox,
    Margins,
    Pen,
    SheetPlan,
    draw_title,
    plan_sheet,
    title_size,
)
from bracegrid.outputs.symbols import (
    BAY_TAG_BLOCK,
    BAY_TAG_WIDTH,
    SUPPORT_BLOCK,
    TEXT_STYLE,
    setup_document,
    text_width,
)
from bracegrid.units import DXF_INSUNITS

if TYPE_CHECKING:
    from ezdxf.document import Drawing
    from ezdxf.layouts.layout import Modelspace

#: Load-case panels on one sheet; more cases go on further sheets.
PANELS_PER_SHEET = 2
#: Height of force labels, paper mm.
H_FORCE = 1.6
#: Block of the over-capacity marker.
OVER_BLOCK = "BG_FORCE_OVER"


#: Which codes of the force layers' names are ours (the guideline edition is named in docs/drawings.md).
_OURS = frozenset(Field)
_OURS_MAJOR = frozenset({Field.MAJOR})


class ForceLayer(Enum):
    """The layers of the force sheet (all ours; docs/forces.md)."""

    MEMBER = LayerSpec("S-FORC-MEMB", 7, "Continuous", 50, "bars coloured by utilisation (true colour)", _OURS)
    SLACK = LayerSpec("S-FORC-SLCK", 8, "BG_TIE", 18, "slack ties: no force in this case", _OURS)
    OVER = LayerSpec(
        "S-FORC-OVER", 1, "Continuous", 50, "over-capacity markers and base uplift beyond its limit", _OURS
    )
    LABEL = LayerSpec("S-FORC-IDEN", 7, "Continuous", 18, "force labels, kN, tension +", _OURS_MAJOR)
    REACTION = LayerSpec("S-FORC-REAC", 5, "Continuous", 35, "support reactions: arrows and values, kN", _OURS)
    DEFLECTED = LayerSpec("S-FORC-DEFL", 6, "BG_EDGE", 18, "deflected shape, displacements exaggerated", _OURS)
    MECHANISM = LayerSpec("S-FORC-MECH", 30, "Continuous", 13, "parts a load case moves as a mechanism", _OURS)
    SCALE = LayerSpec("S-FORC-CBAR", 7, "Continuous", 18, "utilisation colour bar and symbol key", _OURS)
    NOTE = LayerSpec("S-FORC-NOTE", 7, "Continuous", 25, "case headings, notes and model limits", _OURS)

    @property
    def layer_name(self) -> str:
        """The name written to the DXF."""
        return self.value.name


# --------------------------------------------------------------------------- colours


def nice_factor(target: float) -> float:
    """The largest of 1, 2, 5 x 10^k not above ``target`` (the deflected shape's exaggeration).

    Example:
        >>> nice_factor(374.0), nice_factor(0.3)
        (200.0, 0.2)
    """
    if target <= 0:
        return 1.0
    k = math.floor(math.log10(target))
    for step in (5.0, 2.0, 1.0):
        if step * 10.0**k <= target:
            return step * 10.0**k
    return 10.0**k


# --------------------------------------------------------------------------- geometry


def bar_ends(frame: Frame, m: MemberForce) -> tuple[tuple[float, float], tuple[float, float]]:
    """End points of a bar in frame mm (diagonals: rising from bottom-left, falling from top-left).

    Example:
        >>> from bracegrid.mechanics import BarKind, MemberForce
        >>> bar_ends(Frame("f", (3000,), (2000,)), MemberForce(BarKind.LEDGER, 1, None, 1, None, 0.0, None, None))
        ((0.0, 2000.0), (3000.0, 2000.0))
    """
    xs, ys = frame.x_lines(), frame.y_lines()
    if m.kind is BarKind.LEDGER:
        p, j = m.line or 0, m.col or 0
        return (float(xs[j - 1]), float(ys[p])), (float(xs[j]), float(ys[p]))
    if m.kind is BarKind.STANDARD:
        q, i = m.line or 0, m.row or 0
        return (float(xs[q]), float(ys[i - 1])), (float(xs[q]), float(ys[i]))
    i, j = m.row or 0, m.col or 0
    if m.diagonal is Diagonal.RISING:
        return (float(xs[j - 1]), float(ys[i - 1])), (float(xs[j]), float(ys[i]))
    return (float(xs[j - 1]), float(ys[i])), (float(xs[j]), float(ys[i - 1]))


def exaggeration(frame: Frame, cases: Sequence[CaseForces]) -> float:
    """Factor that shows the largest displacement of the cases as about a fifth of the smallest bay."""
    largest = max((abs(v) for c in cases for v in c.node_displacement_mm), default=0.0)
    if largest == 0.0:
        return 1.0
    return nice_factor(0.2 * min(*frame.widths, *frame.heights) / largest)


def _force_text(value: float) -> str:
    return f"{value:+.0f}" if abs(value) >= 100 else f"{value:+.1f}"


# --------------------------------------------------------------------------- drawing helpers


class _Ink:
    """Entities on the force sheet's own layers, at paper positions relative to a model origin."""

    def __init__(self, msp: Modelspace, scale: float, origin: tuple[float, float]) -> None:
        self.msp = msp
        self.scale = scale
        self.origin = origin

    def at(self, x: float, y: float) -> tuple[float, float]:
        return (self.origin[0] + x * self.scale, self.origin[1] + y * self.scale)

    def model(self, x: float, y: float) -> tuple[float, float]:
        return (self.origin[0] + x, self.origin[1] + y)

    def line(self, a: tuple[float, float], b: tuple[float, float], layer: ForceLayer, **attribs: Any) -> Any:
        rgb = attribs.pop("rgb", None)
        entity = self.msp.add_line(a, b, dxfattribs={"layer": layer.layer_name, **attribs})
        if rgb is not None:
            entity.rgb = rgb
        return entity

    def text(
        self,
        text: str,
        x: float,
        y: float,
        *,
        height: float,
        layer: ForceLayer,
        align: str = "LEFT",
        rotation: float = 0.0,
        model: bool = False,
        mask: bool = False,
        rgb: tuple[int, int, int] | None = None,
    ) -> None:
        from ezdxf.enums import TextEntityAlignment

        text = visible_text(text)  # names may hold control characters (bracegrid.outputs.safetext)
        point = (self.origin[0] + x, self.origin[1] + y) if model else self.at(x, y)
        if mask:
            half_w = (text_width(text, height) / 2 + 0.4) * self.scale
            half_h = (height / 2 + 0.35) * self.scale
            angle = math.radians(rotation)
            cos, sin = math.cos(angle), math.sin(angle)
            corners = [(-half_w, -half_h), (half_w, -half_h), (half_w, half_h), (-half_w, half_h)]
            pts = [(point[0] + cx * cos - cy * sin, point[1] + cx * sin + cy * cos) for cx, cy in corners]
            wipe = self.msp.add_wipeout(pts)
            wipe.dxf.layer = layer.layer_name
        entity = self.msp.add_text(
            text,
            height=height * self.scale,
            rotation=rotation,
            dxfattribs={"layer": layer.layer_name, "style": TEXT_STYLE},
        )
        if rgb is not None:
            entity.rgb = rgb
        entity.set_placement(point, align=TextEntityAlignment[align])

    def arrow(
        self, tip: tuple[float, float], direction: float, length: float, layer: ForceLayer, **attribs: Any
    ) -> None:
        """An arrow of ``length`` paper mm ending at the model point ``tip``, pointing along ``direction``."""
        back = direction + math.pi
        tail = (tip[0] + length * self.scale * math.cos(back), tip[1] + length * self.scale * math.sin(back))
        self.line(tail, tip, layer, **attribs)
        size = 1.3 * self.scale
        left = (tip[0] + size * math.cos(back + 0.4), tip[1] + size * math.sin(back + 0.4))
        right = (tip[0] + size * math.cos(back - 0.4), tip[1] + size * math.sin(back - 0.4))
        solid = self.msp.add_solid([tip, left, right], dxfattribs={"layer": layer.layer_name, **attribs})
        del solid

    def block(self, name: str, point: tuple[float, float], layer: ForceLayer, **attribs: Any) -> None:
        """Insert a paper-size block at a model point."""
        self.msp.add_blockref(
            name, point, dxfattribs={"layer": layer.layer_name, "xscale": self.scale, "yscale": self.scale, **attribs}
        )

    def fill(self, pts: Sequence[tuple[float, float]], layer: ForceLayer, rgb: tuple[int, int, int]) -> None:
        hatch = self.msp.add_hatch(dxfattribs={"layer": layer.layer_name})
        hatch.rgb = rgb
        hatch.paths.add_polyline_path(list(pts), is_closed=True)


def _over_block(doc: Drawing) -> None:
    """Over-capacity marker (ours): a ring with an exclamation mark, in paper mm."""
    block = doc.blocks.new(OVER_BLOCK)
    attribs = {"layer": "0", "color": 0, "lineweight": -2}
    block.add_circle((0, 0), 2.1, dxfattribs=attribs)
    block.add_circle((0, 0), 1.7, dxfattribs=attribs)
    block.add_line((0, 1.1), (0, -0.2), dxfattribs=attribs)
    block.add_circle((0, -0.7), 0.15, dxfattribs=attribs)


# --------------------------------------------------------------------------- panels

_LEFT = 12.0  # row bubbles
_TOP = 17.0  # three heading lines
_BOTTOM_BASE = 30.0  # support symbols, reaction arrows and values, column bubbles
_BOTTOM_FREE = 22.0
_SIDE_HELD = 16.0


def _panel_box(frame: Frame, heading: float) -> FrameBox:
    held = frame.held_edges
    bottom = _BOTTOM_BASE if frame.supports is Supports.BASE else _BOTTOM_FREE
    right = _SIDE_HELD if any(e.value == "right" for e in held) else 6.0
    left = _LEFT + (_SIDE_HELD if any(e.value == "left" for e in held) else 0.0)
    top = _TOP + (8.0 if any(e.value == "top" for e in held) else 0.0)
    return FrameBox(
        frame.width_mm,
        frame.height_mm,
        float(min(*frame.widths, *frame.heights)),
        Margins(left=left, right=right, bottom=bottom, top=top, min_width=heading),
    )


def _headings(case: CaseForces, factor: float) -> tuple[str, str, str]:
    if case.is_mechanism:
        shaded = case.mechanism is not None and bool(case.mechanism.rows or case.mechanism.columns)
        return (
            case.title,
            "MECHANISM: no forces (see notes)",
            "the shaded part moves" if shaded else "what moves: see notes",
        )
    g = case.governing
    if g is not None and g.utilisation is not None:
        mark = "  OVER CAPACITY" if case.over_capacity or case.uplift_over else ""
        second = f"max utilisation {util_text(case.max_utilisation)} ({g.label}){mark}"
    else:
        second = f"largest force {_force_text(g.force_kn) if g else '-'} kN ({g.label if g else '-'}); no capacities"
    top = case.sway_mm[-1] if case.sway_mm else 0.0
    third = f"top sway {top:+.2f} mm, max drift {drift_text(case.max_drift)}; deflected shape x {factor:g}"
    return (case.title, second, third)


def _heading_width(frame: Frame, cases: Sequence[CaseForces], factor: float) -> float:
    widths = []
    for c in cases:
        a, b, d = _headings(c, factor)
        widths += [text_width(a, H_LABEL), text_width(b, H_SMALL), text_width(d, H_SMALL)]
    return max(widths, default=0.0) + 2.0


def _colour(m: MemberForce, rated: bool, largest: float) -> tuple[int, int, int]:
    if rated:
        return UNRATED_RGB if m.utilisation is None else utilisation_rgb(m.utilisation)
    return utilisation_rgb(abs(m.force_kn) / largest) if largest > 0 else UNRATED_RGB


def _draw_reaction(ink: _Ink, frame: Frame, r: Reaction, largest: float) -> None:
    xs, ys = frame.x_lines(), frame.y_lines()
    node = ink.model(float(xs[r.q]), float(ys[r.p]))
    s = ink.scale
    over = r.uplift_over
    layer = ForceLayer.OVER if over else ForceLayer.REACTION
    tiny = 1e-6 * max(largest, 1e-12)
    if r.support == "base":
        drop = 4.5  # below the pin symbol
        if abs(r.fy_kn) > tiny:
            up = r.fy_kn > 0
            tip = (node[0], node[1] - (drop if up else drop + 7.0) * s)
            ink.arrow(tip, math.pi / 2 if up else -math.pi / 2, 7.0, layer)
            ink.text(
                _force_text(r.fy_kn),
                (node[0] - ink.origin[0]) / s + 1.0,
                (node[1] - ink.origin[1]) / s - drop - 3.5,
                height=H_FORCE,
                layer=layer,
                align="MIDDLE_LEFT",
            )
        if abs(r.fx_kn) > tiny:
            y = node[1] - (drop + 10.0) * s
            right = r.fx_kn > 0
            tip = (node[0] + (2.5 if right else -2.5) * s, y)
            ink.arrow(tip, 0.0 if right else math.pi, 5.0, ForceLayer.REACTION)
            ink.text(
                _force_text(r.fx_kn),
                (node[0] - ink.origin[0]) / s,
                (y - ink.origin[1]) / s - 2.2,
                height=H_FORCE,
                layer=ForceLayer.REACTION,
                align="MIDDLE_CENTER",
            )
        return
    value = r.fx_kn if r.support in ("bottom", "top") else r.fy_kn
    if abs(value) <= tiny:
        return
    if r.support in ("bottom", "top"):
        out = -1.0 if r.support == "bottom" else 1.0
        y = node[1] + out * 5.0 * s
        positive = value > 0
        tip = (node[0] + (2.5 if positive else -2.5) * s, y)
        ink.arrow(tip, 0.0 if positive else math.pi, 5.0, ForceLayer.REACTION)
        ink.text(
            _force_text(value),
            (node[0] - ink.origin[0]) / s,
            (y - ink.origin[1]) / s + out * 2.2,
            height=H_FORCE,
            layer=ForceLayer.REACTION,
            align="MIDDLE_CENTER",
        )
    else:
        out = -1.0 if r.support == "left" else 1.0
        x = node[0] + out * 5.0 * s
        positive = value > 0
        tip = (x, node[1] + (2.5 if positive else -2.5) * s)
        ink.arrow(tip, math.pi / 2 if positive else -math.pi / 2, 5.0, ForceLayer.REACTION)
        ink.text(
            _force_text(value),
            (x - ink.origin[0]) / s + out * 1.2,
            (node[1] - ink.origin[1]) / s,
            height=H_FORCE,
            layer=ForceLayer.REACTION,
            align="MIDDLE_LEFT" if out > 0 else "MIDDLE_RIGHT",
        )


def _draw_supports(pen: Pen, ink: _Ink, frame: Frame) -> None:
    xs, ys = frame.x_lines(), frame.y_lines()
    s = ink.scale
    w, h = float(frame.width_mm), float(frame.height_mm)
    if frame.supports is Supports.BASE:
        ink.msp.add_line(
            ink.model(-3.0 * s, 0), ink.model(w + 3.0 * s, 0), dxfattribs={"layer": Layer.SUPPORT.layer_name}
        )
        nodes = present_nodes(frame)
        for q, x in enumerate(xs):
            if (0, q) in nodes:  # a general frame is supported only where it has a node
                pen.block(SUPPORT_BLOCK, x / s, 0.0, Layer.SUPPORT_SYMBOL)
    for edge in frame.held_edges:
        # a wall line under the edge: a heavy line just outside it, with short ticks
        off = 1.5 * s
        if edge.value == "bottom":
            a, b, tick = ink.model(0, -off), ink.model(w, -off), (0.0, -1.0)
        elif edge.value == "top":
            a, b, tick = ink.model(0, h + off), ink.model(w, h + off), (0.0, 1.0)
        elif edge.value == "left":
            a, b, tick = ink.model(-off, 0), ink.model(-off, h), (-1.0, 0.0)
        else:
            a, b, tick = ink.model(w + off, 0), ink.model(w + off, h), (1.0, 0.0)
        ink.msp.add_line(a, b, dxfattribs={"layer": Layer.SUPPORT.layer_name})
        points = xs if edge.along_x else ys
        for v in points:
            base = (a[0] + v, a[1]) if edge.along_x else (a[0], a[1] + v)
            ink.msp.add_line(
                base,
                (base[0] + tick[0] * 1.0 * s, base[1] + tick[1] * 1.0 * s),
                dxfattribs={"layer": Layer.SUPPORT_SYMBOL.layer_name},
            )


def _draw_panel(
    msp: Modelspace,
    frame: Frame,
    case: CaseForces,
    origin: tuple[float, float],
    scale: float,
    *,
    factor: float,
    rated: bool,
    largest: float,
) -> None:
    pen = Pen(msp, scale, origin)
    ink = _Ink(msp, scale, origin)
    xs, ys = frame.x_lines(), frame.y_lines()
    w, h = float(frame.width_mm), float(frame.height_mm)
    # mechanism: shade what moves, draw the bare grid
    if case.mechanism is not None:
        for i, _ in case.mechanism.rows:
            ink.fill(
                [ink.model(0, ys[i - 1]), ink.model(w, ys[i - 1]), ink.model(w, ys[i]), ink.model(0, ys[i])],
                ForceLayer.MECHANISM,
                (255, 226, 190),
            )
        for j, _ in case.mechanism.columns:
            ink.fill(
                [ink.model(xs[j - 1], 0), ink.model(xs[j], 0), ink.model(xs[j], h), ink.model(xs[j - 1], h)],
                ForceLayer.MECHANISM,
                (255, 226, 190),
            )
        if frame.is_complete:
            for x in xs:
                msp.add_line(ink.model(x, 0), ink.model(x, h), dxfattribs={"layer": Layer.FRAME.layer_name})
            for y in ys:
                msp.add_line(ink.model(0, y), ink.model(w, y), dxfattribs={"layer": Layer.FRAME.layer_name})
        else:  # only the grid bars the frame has
            for bar in present_grid_bars(frame):
                (p0, q0), (p1, q1) = bar.ends()
                msp.add_line(
                    ink.model(xs[q0], ys[p0]), ink.model(xs[q1], ys[p1]), dxfattribs={"layer": Layer.FRAME.layer_name}
                )
    # deflected shape under the members, so the members stay readable (the grid bars the frame has)
    if case.node_displacement_mm:
        u = case.node_displacement_mm
        cols = frame.cols + 1

        def moved(p: int, q: int) -> tuple[float, float]:
            n = p * cols + q
            return ink.model(xs[q] + factor * u[2 * n], ys[p] + factor * u[2 * n + 1])

        for bar in present_grid_bars(frame):
            start, end = bar.ends()
            ink.line(moved(*start), moved(*end), ForceLayer.DEFLECTED)
    # members, coloured; labels where they fit
    small = 0.005 * largest
    for m in case.members:
        a, b = bar_ends(frame, m)
        pa, pb = ink.model(*a), ink.model(*b)
        if m.slack:
            ink.line(pa, pb, ForceLayer.SLACK)
            continue
        weight = 140 if m.over else (70 if not m.kind.is_grid else 50)
        if abs(m.force_kn) <= small:
            ink.line(pa, pb, ForceLayer.MEMBER, rgb=(170, 170, 170), lineweight=18)
            continue
        ink.line(pa, pb, ForceLayer.MEMBER, rgb=_colour(m, rated, largest), lineweight=weight)
        length = math.hypot(b[0] - a[0], b[1] - a[1]) / scale
        label = _force_text(m.force_kn)
        at = 0.5 if m.kind.is_grid else 0.3
        room = (0.8 if m.kind.is_grid else 0.42) * length
        mid = (a[0] + at * (b[0] - a[0]), a[1] + at * (b[1] - a[1]))
        angle = math.degrees(math.atan2(b[1] - a[1], b[0] - a[0]))
        if angle > 90.0 or angle < -90.0:
            angle += 180.0
        if m.over:
            ring = 0.85 if m.kind.is_grid else 0.7  # clear of the label (mid-length; 30 % on diagonals)
            ink.block(OVER_BLOCK, ink.model(a[0] + ring * (b[0] - a[0]), a[1] + ring * (b[1] - a[1])), ForceLayer.OVER)
        if text_width(label, H_FORCE) + 1.0 <= room:
            ink.text(
                label,
                mid[0],
                mid[1],
                height=H_FORCE,
                layer=ForceLayer.LABEL,
                align="MIDDLE_CENTER",
                rotation=angle,
                model=True,
                mask=True,
            )
    # supports and reactions
    _draw_supports(pen, ink, frame)
    reaction_scale = max((max(abs(r.fx_kn), abs(r.fy_kn)) for r in case.reactions), default=0.0)
    for reaction in case.reactions:
        _draw_reaction(ink, frame, reaction, reaction_scale)
    # row and column labels
    for r in range(1, frame.rows + 1):
        cy = (ys[r - 1] + ys[r]) / 2 / scale
        bx = -(2.5 + BAY_TAG_WIDTH / 2) - (_SIDE_HELD if any(e.value == "left" for e in frame.held_edges) else 0.0)
        pen.block(BAY_TAG_BLOCK, bx, cy, Layer.GRID_LABEL)
        pen.text(f"R{r}", bx, cy, height=H_SMALL, layer=Layer.GRID_LABEL, align="MIDDLE_CENTER")
    bottom = -(_BOTTOM_BASE if frame.supports is Supports.BASE else _BOTTOM_FREE) + 4.5
    for c in range(1, frame.cols + 1):
        cx = (xs[c - 1] + xs[c]) / 2 / scale
        pen.block(BAY_TAG_BLOCK, cx, bottom, Layer.GRID_LABEL)
        pen.text(f"C{c}", cx, bottom, height=H_SMALL, layer=Layer.GRID_LABEL, align="MIDDLE_CENTER")
    # headings
    first, second, third = _headings(case, factor)
    top = h / scale + 2.0 + (8.0 if any(e.value == "top" for e in frame.held_edges) else 0.0)
    ink.text(third, 0.0, top + 1.0, height=H_SMALL, layer=ForceLayer.NOTE)
    over = case.over_capacity or case.uplift_over or case.is_mechanism
    ink.text(second, 0.0, top + 4.5, height=H_SMALL, layer=ForceLayer.NOTE, rgb=OVER_RGB if over else None)
    ink.text(first, 0.0, top + 8.5, height=H_LABEL, layer=ForceLayer.NOTE)


# --------------------------------------------------------------------------- band


_BAR_W, _BAR_H = 100.0, 44.0
_NOTES_W = 150.0


def _draw_scale(ink: _Ink, x: float, y: float, *, rated: bool) -> None:
    lay = ForceLayer.SCALE
    w, h = _BAR_W, _BAR_H
    pts = [ink.at(x, y), ink.at(x + w, y), ink.at(x + w, y + h), ink.at(x, y + h)]
    ink.msp.add_lwpolyline(pts, close=True, dxfattribs={"layer": lay.layer_name})
    title = "UTILISATION = |force| / capacity" if rated else "|FORCE| / LARGEST |FORCE| (no capacities given)"
    ink.text(title, x + 2, y + h - 4.5, height=H_SMALL, layer=lay)
    steps = 20
    bx, by, bw, bh = x + 4, y + h - 13.0, 72.0, 4.0
    for k in range(steps):
        x0 = bx + k * bw / steps
        rgb = utilisation_rgb((k + 0.5) / steps)
        ink.fill(
            [ink.at(x0, by), ink.at(x0 + bw / steps, by), ink.at(x0 + bw / steps, by + bh), ink.at(x0, by + bh)],
            lay,
            rgb,
        )
    for frac in (0.0, 0.5, 0.8, 1.0):
        ink.text(f"{round(100 * frac)}%", bx + frac * bw, by - 2.2, height=H_FORCE, layer=lay, align="MIDDLE_CENTER")
    if rated:
        ox = bx + bw + 7.0
        ink.fill([ink.at(ox, by), ink.at(ox + 8, by), ink.at(ox + 8, by + bh), ink.at(ox, by + bh)], lay, OVER_RGB)
        ink.text("> 100%", ox + 4, by - 2.2, height=H_FORCE, layer=lay, align="MIDDLE_CENTER")
    keys = [
        ("over", "over capacity: heavy line and ring marker"),
        ("slack", "slack tie (no force in this case)"),
        ("grey", "no capacity given (dark) / about no force (light)" if rated else "about no force (light grey)"),
        ("defl", "deflected shape (factor in each panel heading)"),
        ("reac", "support reaction on the frame, kN"),
    ]
    cy = by - 6.5
    for key, words in keys:
        x0, x1 = x + 4, x + 16
        if key == "over":
            ink.line(ink.at(x0, cy), ink.at(x1, cy), lay, lineweight=140, rgb=OVER_RGB)
            ink.block(OVER_BLOCK, ink.at((x0 + x1) / 2, cy), lay, color=1)
        elif key == "slack":
            ink.line(ink.at(x0, cy), ink.at(x1, cy), lay, linetype="BG_TIE", color=8)
        elif key == "grey":
            ink.line(ink.at(x0, cy), ink.at((x0 + x1) / 2, cy), lay, rgb=UNRATED_RGB, lineweight=35)
            ink.line(ink.at((x0 + x1) / 2, cy), ink.at(x1, cy), lay, rgb=(170, 170, 170), lineweight=18)
        elif key == "defl":
            ink.line(ink.at(x0, cy), ink.at(x1, cy), lay, linetype="BG_EDGE", color=6)
        else:
            ink.arrow(ink.at(x1, cy), 0.0, x1 - x0, lay, color=5)
        ink.text(words, x1 + 3, cy, height=H_FORCE, layer=lay, align="MIDDLE_LEFT")
        cy -= 4.2


def _notes(frame: Frame, cases: Sequence[CaseForces], rated: bool) -> str:
    parts = [f"MODEL: {MODEL_LIMITS}", "Forces in kN, tension +, labelled where they fit; reactions act on the frame."]
    if not rated:
        parts.append("No capacities are given in the project: colours show force, not utilisation.")
    for c in cases:
        if c.mechanism is not None:
            parts.append(f"{c.title}: " + " ".join(c.mechanism.words))
    del frame
    return "\\P".join(parts)


def _draw_notes(ink: _Ink, text: str, x: float, y: float) -> None:
    from ezdxf.enums import MTextEntityAlignment

    pts = [ink.at(x, y), ink.at(x + _NOTES_W, y), ink.at(x + _NOTES_W, y + _BAR_H), ink.at(x, y + _BAR_H)]
    ink.msp.add_lwpolyline(pts, close=True, dxfattribs={"layer": ForceLayer.NOTE.layer_name})
    mtext = ink.msp.add_mtext(
        visible_text(text),
        dxfattribs={
            "layer": ForceLayer.NOTE.layer_name,
            "style": TEXT_STYLE,
            "char_height": H_FORCE * ink.scale,
            "width": (_NOTES_W - 4) * ink.scale,
        },
    )
    mtext.set_location(ink.at(x + 2, y + _BAR_H - 2), attachment_point=MTextEntityAlignment.TOP_LEFT)


# --------------------------------------------------------------------------- the sheet


@dataclass(frozen=True, slots=True)
class ForceSheet:
    """A finished force sheet.

    Attributes:
        doc: The ezdxf document.
        plan: Sheet size, scale and panel origins.
        frame: The frame drawn.
        cases: The load cases drawn, one panel each.
        factor: Exaggeration of the deflected shape.
    """

    doc: Drawing
    plan: SheetPlan
    frame: Frame
    cases: tuple[CaseForces, ...]
    factor: float


def build_force_sheet(
    project: Project, frame: Frame, cases: Sequence[CaseForces], *, when: date | None = None
) -> ForceSheet:
    """Draw one frame under some load cases on one sheet, one panel per case.

    Args:
        project: For the title block.
        frame: The frame, with the layout the forces were found for.
        cases: The cases to draw (one panel each; keep to :data:`PANELS_PER_SHEET`).
        when: Title-block date (default: today).

    Returns:
        The sheet.
    """
    from ezdxf.filemanagement import new

    chosen = tuple(cases)
    factor = exaggeration(frame, [c for c in chosen if not c.is_mechanism])
    rated = any(m.utilisation is not None for c in chosen for m in c.members)
    largest = max((abs(m.force_kn) for c in chosen for m in c.members), default=0.0)
    heading = _heading_width(frame, chosen, factor)
    title = title_size()
    band = (_BAR_W + _NOTES_W + title[0] + 2 * GAP, max(_BAR_H, title[1]))
    plan = plan_sheet([_panel_box(frame, heading) for _ in chosen], band)
    scale = plan.scale
    doc = new("R2013", units=DXF_INSUNITS["mm"])
    doc.header["$MEASUREMENT"] = 1
    doc.header["$LWDISPLAY"] = 1
    setup_document(doc, scale=scale)
    for layer in ForceLayer:
        spec = layer.value
        # no layer description in the DXF: it would need another program's application id (docs/drawings.md)
        doc.layers.add(spec.name, color=spec.color, linetype=spec.linetype, lineweight=spec.lineweight)
    _over_block(doc)
    msp = doc.modelspace()
    for case, origin in zip(chosen, plan.origins, strict=True):
        _draw_panel(msp, frame, case, origin, scale, factor=factor, rated=rated, largest=largest)
    pen = Pen(msp, scale)
    ink = _Ink(msp, scale, (0.0, 0.0))
    paper_w, paper_h = plan.paper
    pen.rect(5.0, 5.0, paper_w - 10.0, paper_h - 10.0, Layer.TITLE)
    bx, by = plan.band
    _draw_scale(ink, bx, by, rated=rated)
    title_x = bx + (paper_w - 2 * bx) - title[0]
    notes_x = bx + _BAR_W + (title_x - bx - _BAR_W - _NOTES_W) / 2
    _draw_notes(ink, _notes(frame, chosen, rated), notes_x, by)
    draw_title(
        pen,
        title_x,
        by,
        project=project.name,
        frames=[f"{frame.name} (member forces)"],
        when=when or date.today(),
        version=__version__,
        caution=CAUTION,
        sheet=plan.sheet,
        scale=scale,
    )
    doc.header["$EXTMIN"] = (0.0, 0.0, 0.0)
    doc.header["$EXTMAX"] = (paper_w * scale, paper_h * scale, 0.0)
    return ForceSheet(doc=doc, plan=plan, frame=frame, cases=chosen, factor=factor)


def force_sheets(
    project: Project, frame: Frame, forces: FrameForces, *, when: date | None = None
) -> tuple[ForceSheet, ...]:
    """Every sheet of one frame: its cases in groups of :data:`PANELS_PER_SHEET`."""
    cases = forces.cases
    return tuple(
        build_force_sheet(project, frame, cases[k : k + PANELS_PER_SHEET], when=when)
        for k in range(0, len(cases), PANELS_PER_SHEET)
    )
