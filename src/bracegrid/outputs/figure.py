"""The report figure: one frame and its members drawn as SVG for a web page, with its legend beside it.

Made for the page rather than shrunk from the A3 sheet: bays print at least
:data:`MIN_BAY_PX` pixels (a large frame scrolls inside its box), text is real
SVG text (searchable, selectable), and the symbols are defined once per page
(:func:`symbol_defs`) and placed with ``<use>``. It shows what the sheet shows
on the frame itself: blocked and opening bays, openings, loose parts, members
(braces solid, ties dashed; proposed red, existing blue), the racking sense of
every tie and the critical members, with markers placed by the same rule as on
the sheet (:func:`bracegrid.outputs.markers.place_markers`).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from shapely.geometry import Point

from bracegrid.analysis import Verdict
from bracegrid.model import Diagonal, Frame, MemberKind, Supports, bay_box, bays_blocked_by, blocked_bays
from bracegrid.outputs.drawing import label_spot, outline_points, part_label, part_tag
from bracegrid.outputs.markers import MarkerKind, place_markers
from bracegrid.outputs.safetext import markup_text as _e
from bracegrid.outputs.symbols import bay_tag_outline, critical_diamond, sense_shape
from bracegrid.outputs.terms import BLOCKED_LABEL

#: Pixels per figure unit: markers are sized in figure units as the sheet's are in paper mm.
UNIT_PX = 4.0
#: Smallest bay side on the page, pixels (14 units: markers keep near full size, labels read).
MIN_BAY_PX = 56.0
#: Preferred largest figure width and height, pixels (larger only to keep bays readable).
FIT_WIDTH_PX = 900.0
FIT_HEIGHT_PX = 640.0
#: Largest bay side, pixels (a 1 x 1 frame stays a sensible size).
MAX_BAY_PX = 120.0

_FONT = 'font-family="system-ui,-apple-system,Segoe UI,Helvetica,Arial,sans-serif"'
_COLORS = {"new": "#d92d20", "old": "#1849a9", "sense": "#1d2327", "crit": "#c11574", "opening": "#067647"}
_TAG_W, _TAG_H = 30.0, 15.0


def fmt_px(value: float) -> str:
    """A coordinate with one decimal (pixels), trailing zeros dropped.

    Example:
        >>> fmt_px(12.0), fmt_px(3.14159)
        ('12', '3.1')
    """
    text = f"{value:.1f}"
    return text[:-2] if text.endswith(".0") else text


def _points(pts: Sequence[tuple[float, float]], *, unit: float = 1.0) -> str:
    return " ".join(f"{fmt_px(x * unit)},{fmt_px(-y * unit)}" for x, y in pts)


def symbol_defs() -> str:
    """One hidden SVG holding every symbol and the hatch pattern the page's figures use.

    Example:
        >>> 'id="bg-crit"' in symbol_defs()
        True
    """
    u = UNIT_PX
    parts = []
    for key, clockwise in (("cw", True), ("acw", False)):
        (start, end, r), head = sense_shape(clockwise=clockwise)
        arc = _arc_path(r * u, start, end)
        parts.append(
            f'<symbol id="bg-{key}" overflow="visible"><path d="{arc}" fill="none" stroke="{_COLORS["sense"]}"'
            f' stroke-width="1"/><polygon points="{_points(head, unit=u)}" fill="{_COLORS["sense"]}"/></symbol>'
        )
    diamond = _points(critical_diamond(), unit=u)
    parts.append(
        f'<symbol id="bg-crit" overflow="visible"><polygon points="{diamond}" fill="#fff" stroke="{_COLORS["crit"]}"'
        f' stroke-width="1.2"/><line x1="0" y1="{fmt_px(-1.05 * u)}" x2="0" y2="{fmt_px(0.25 * u)}"'
        f' stroke="{_COLORS["crit"]}"'
        f' stroke-width="1.2"/><circle cx="0" cy="{fmt_px(0.75 * u)}" r="0.8" fill="{_COLORS["crit"]}"/></symbol>'
    )
    parts.append(
        '<pattern id="bg-hatch" patternUnits="userSpaceOnUse" width="6" height="6" patternTransform="rotate(45)">'
        '<line x1="0" y1="0" x2="0" y2="6" stroke="#8a8f94" stroke-width="1"/></pattern>'
    )
    return f'<svg width="0" height="0" style="position:absolute" aria-hidden="true"><defs>{"".join(parts)}</defs></svg>'


def _arc_path(radius: float, start_deg: float, end_deg: float) -> str:
    """An SVG path of a DXF-style arc: anticlockwise (seen with y up) from start to end angle.

    The page's y axis points down, so the angles are mirrored and the arc keeps its look
    with sweep flag 0 (the "negative angle" direction on screen).
    """
    sweep = (end_deg - start_deg) % 360.0
    a0, a1 = math.radians(start_deg), math.radians(end_deg)
    x0, y0 = radius * math.cos(a0), -radius * math.sin(a0)
    x1, y1 = radius * math.cos(a1), -radius * math.sin(a1)
    large = 1 if sweep > 180.0 else 0
    return f"M{fmt_px(x0)},{fmt_px(y0)} A{fmt_px(radius)},{fmt_px(radius)} 0 {large} 0 {fmt_px(x1)},{fmt_px(y1)}"


def bay_scale(frame: Frame) -> float:
    """Pixels per frame millimetre: fit the preferred size, but keep every bay at least :data:`MIN_BAY_PX`."""
    fit = min(FIT_WIDTH_PX / frame.width_mm, FIT_HEIGHT_PX / frame.height_mm)
    smallest = min(*frame.widths, *frame.heights)
    largest = max(*frame.widths, *frame.heights)
    return max(min(fit, MAX_BAY_PX / largest), MIN_BAY_PX / smallest)


def frame_svg(frame: Frame, verdict: Verdict, *, title: str) -> str:
    """The frame with its members as one inline SVG element (uses the symbols of :func:`symbol_defs`).

    Args:
        frame: The frame carrying the layout to show.
        verdict: Its stability check (loose parts, critical members).
        title: Accessible title of the figure.

    Returns:
        ``<svg ...>...</svg>``.

    Example:
        >>> from bracegrid.analysis import check_frame
        >>> f = Frame("f", (3000,), (2000,))
        >>> frame_svg(f, check_frame(f), title="bare").startswith("<svg")
        True
    """
    s = bay_scale(frame)
    xs, ys = frame.x_lines(), frame.y_lines()
    w_px, h_px = frame.width_mm * s, frame.height_mm * s
    tags = {k: part_label(k, p.racking) for k, p in enumerate(verdict.loose_parts, start=1) if p.rows}
    left, bottom, top = _TAG_W + 10.0, _TAG_H + 14.0, 14.0
    right = 8.0 + (7.0 * max(len(t) for t in tags.values()) if tags else 0.0)
    width, height = left + w_px + right, top + h_px + bottom

    def px(x_mm: float, y_mm: float) -> tuple[float, float]:
        return (left + x_mm * s, top + h_px - y_mm * s)

    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{fmt_px(width)}" height="{fmt_px(height)}" '
        f'viewBox="0 0 {fmt_px(width)} {fmt_px(height)}" role="img" {_FONT} font-size="11">'
        f"<title>{_e(title)}</title>"
    ]
    # loose parts, blocked bays
    for part in verdict.loose_parts:
        for r in part.rows:
            x0, y1 = px(0, ys[r])
            out.append(_rect(x0, y1, w_px, (ys[r] - ys[r - 1]) * s, 'fill="#ffe2be"'))
        for c in part.columns:
            x0, y1 = px(xs[c - 1], frame.height_mm)
            out.append(_rect(x0, y1, (xs[c] - xs[c - 1]) * s, h_px, 'fill="#ffe2be"'))
    for r, c in sorted(blocked_bays(frame)):
        x0, y1 = px(xs[c - 1], ys[r])
        out.append(
            f'<rect x="{fmt_px(x0)}" y="{fmt_px(y1)}" width="{fmt_px((xs[c] - xs[c - 1]) * s)}" '
            f'height="{fmt_px((ys[r] - ys[r - 1]) * s)}" fill="url(#bg-hatch)"/>'
        )
    # bars (grid lines coincide with them)
    bars = [f"M{fmt_px(px(x, 0)[0])},{fmt_px(top)}V{fmt_px(top + h_px)}" for x in xs]
    bars += [f"M{fmt_px(left)},{fmt_px(px(0, y)[1])}H{fmt_px(left + w_px)}" for y in ys]
    out.append(f'<path d="{"".join(bars)}" stroke="#1d2327" stroke-width="1" fill="none"/>')
    # openings: outline set in by 2 px, name on a white box in a bay of the opening
    taken = set(frame.blocked)
    for opening in frame.openings:
        pts = [px(x, y) for x, y in outline_points(opening, inset_mm=2.5 / s)]
        out.append(
            f'<polygon points="{" ".join(f"{fmt_px(a)},{fmt_px(b)}" for a, b in pts)}" fill="none" '
            f'stroke="{_COLORS["opening"]}" stroke-width="1.5" stroke-dasharray="4 2"/>'
        )
    # members, then markers
    lines: dict[str, list[str]] = {key: [] for key in ("brace-new", "brace-old", "tie-new", "tie-old")}
    for m in sorted(frame.members, key=lambda m: m.sort_key):
        x0, x1, y0, y1 = xs[m.col - 1], xs[m.col], ys[m.row - 1], ys[m.row]
        a, b = ((x0, y0), (x1, y1)) if m.diagonal is Diagonal.RISING else ((x0, y1), (x1, y0))
        (ax, ay), (bx, by) = px(*a), px(*b)
        key = f"{'brace' if m.kind is MemberKind.BRACE else 'tie'}-{'old' if m.existing else 'new'}"
        lines[key].append(f"M{fmt_px(ax)},{fmt_px(ay)}L{fmt_px(bx)},{fmt_px(by)}")
    looks = {
        "brace-new": f'stroke="{_COLORS["new"]}" stroke-width="2.6"',
        "brace-old": f'stroke="{_COLORS["old"]}" stroke-width="1.6"',
        "tie-new": f'stroke="{_COLORS["new"]}" stroke-width="2" stroke-dasharray="7 3"',
        "tie-old": f'stroke="{_COLORS["old"]}" stroke-width="1.3" stroke-dasharray="7 3"',
    }
    for key, paths in lines.items():
        if paths:
            out.append(f'<path d="{"".join(paths)}" {looks[key]} fill="none"/>')
    unit_mm = UNIT_PX / s  # frame mm per figure unit
    symbol = {MarkerKind.RESISTS_CLOCKWISE: "cw", MarkerKind.RESISTS_ANTICLOCKWISE: "acw", MarkerKind.CRITICAL: "crit"}
    for marker in place_markers(frame, verdict.critical_members, scale=unit_mm).markers:
        cx, cy = px(marker.x * unit_mm, marker.y * unit_mm)
        size = "" if marker.size == 1.0 else f" scale({marker.size:g})"
        out.append(f'<use href="#bg-{symbol[marker.kind]}" transform="translate({fmt_px(cx)},{fmt_px(cy)}){size}"/>')
    # labels on white boxes
    for r, c in sorted(frame.blocked):
        cx, cy = px((xs[c - 1] + xs[c]) / 2, (ys[r - 1] + ys[r]) / 2)
        out.append(_label(BLOCKED_LABEL, cx, cy))
    for opening in frame.openings:
        width_mm, height_mm = (7.0 * len(opening.name) + 6) / s, 16 / s
        x, y = label_spot(frame, opening, width_mm=width_mm, height_mm=height_mm, taken=frozenset(taken))
        taken |= {bay for bay in bays_blocked_by(frame, opening) if bay_box(frame, *bay).contains(Point(x, y))}
        out.append(_label(opening.name, *px(x, y)))
    # supports, loose-part tags, bay tags
    if frame.supports is Supports.BASE:
        base = top + h_px
        ground = f"M{fmt_px(left - 6)},{fmt_px(base)}H{fmt_px(left + w_px + 6)}"
        out.append(f'<path d="{ground}" stroke="#1d2327" stroke-width="2.5"/>')
    for k, part in enumerate(verdict.loose_parts, start=1):
        if part.rows:
            r = part.rows[0]
            _, cy = px(0, (ys[r - 1] + ys[r]) / 2)
            out.append(f'<text x="{fmt_px(left + w_px + 6)}" y="{fmt_px(cy + 4)}" fill="#b54708">{_e(tags[k])}</text>')
        else:
            c = part.columns[0]
            cx, _ = px((xs[c - 1] + xs[c]) / 2, 0)
            out.append(
                f'<text x="{fmt_px(cx)}" y="{fmt_px(top - 3)}" text-anchor="middle" fill="#b54708">{part_tag(k)}</text>'
            )
    tag = _points(bay_tag_outline(), unit=_TAG_W / 8.4)
    for r in range(1, frame.rows + 1):
        _, cy = px(0, (ys[r - 1] + ys[r]) / 2)
        out.append(_tag(f"R{r}", left - _TAG_W / 2 - 5, cy, tag))
    for c in range(1, frame.cols + 1):
        cx, _ = px((xs[c - 1] + xs[c]) / 2, 0)
        out.append(_tag(f"C{c}", cx, top + h_px + 6 + _TAG_H / 2, tag))
    out.append("</svg>")
    return "".join(out)


def _rect(x: float, y: float, w: float, h: float, look: str) -> str:
    return f'<rect x="{fmt_px(x)}" y="{fmt_px(y)}" width="{fmt_px(w)}" height="{fmt_px(h)}" {look}/>'


def _label(text: str, cx: float, cy: float) -> str:
    w = 7.0 * len(text) + 6
    return (
        f'<rect x="{fmt_px(cx - w / 2)}" y="{fmt_px(cy - 8)}" width="{fmt_px(w)}" height="16" fill="#fff"/>'
        f'<text x="{fmt_px(cx)}" y="{fmt_px(cy + 4)}" text-anchor="middle">{_e(text)}</text>'
    )


def _tag(text: str, cx: float, cy: float, outline: str) -> str:
    return (
        f'<polygon transform="translate({fmt_px(cx)},{fmt_px(cy)})" points="{outline}" fill="#fff" stroke="#1d2327"/>'
        f'<text x="{fmt_px(cx)}" y="{fmt_px(cy + 4)}" text-anchor="middle" font-size="10">{_e(text)}</text>'
    )


def _sample(inner: str) -> str:
    return f'<svg width="46" height="22" viewBox="0 0 46 22" aria-hidden="true">{inner}</svg>'


def legend_html() -> str:
    """The legend of the report figures, as an HTML list with small SVG samples.

    Example:
        >>> "critical member" in legend_html()
        True
    """
    rows = [
        (f'<path d="M4,11H42" stroke="{_COLORS["new"]}" stroke-width="2.6"/>', "rigid brace, proposed"),
        (f'<path d="M4,11H42" stroke="{_COLORS["old"]}" stroke-width="1.6"/>', "rigid brace, existing"),
        (f'<path d="M4,11H42" stroke="{_COLORS["new"]}" stroke-width="2" stroke-dasharray="7 3"/>', "tie, proposed"),
        (f'<path d="M4,11H42" stroke="{_COLORS["old"]}" stroke-width="1.3" stroke-dasharray="7 3"/>', "tie, existing"),
        ('<path d="M4,11H42" stroke="#1d2327" stroke-width="1"/>', "frame bar (standard or ledger)"),
        (
            f'<path d="M10,19L36,3" stroke="{_COLORS["new"]}" stroke-width="2" stroke-dasharray="7 3"/>'
            '<use href="#bg-cw" transform="translate(23,11)"/>',
            "rising tie: resists clockwise racking (top sways right)",
        ),
        (
            f'<path d="M10,3L36,19" stroke="{_COLORS["new"]}" stroke-width="2" stroke-dasharray="7 3"/>'
            '<use href="#bg-acw" transform="translate(23,11)"/>',
            "falling tie: resists anticlockwise racking (top sways left)",
        ),
        (
            f'<path d="M10,19L36,3" stroke="{_COLORS["new"]}" stroke-width="2.6"/>'
            '<use href="#bg-crit" transform="translate(23,11)"/>',
            "critical member: its loss leaves a mechanism",
        ),
        (
            '<rect x="4" y="3" width="38" height="16" fill="url(#bg-hatch)"/>',
            "blocked bay (labelled when listed in the file)",
        ),
        (
            f'<rect x="4" y="3" width="38" height="16" fill="none" stroke="{_COLORS["opening"]}" stroke-width="1.5"'
            ' stroke-dasharray="4 2"/>',
            "opening outline, named",
        ),
        ('<rect x="4" y="3" width="38" height="16" fill="#ffe2be"/>', "loose part: can still rack"),
        (
            '<text x="23" y="15" text-anchor="middle" font-size="11" fill="#b54708">M1</text>',
            "loose part (mechanism) 1",
        ),
        ('<path d="M4,11H42" stroke="#1d2327" stroke-width="2.5"/>', "pinned base (ground line)"),
        (
            f'<polygon transform="translate(23,11)" points="{_points(bay_tag_outline(), unit=_TAG_W / 8.4)}" '
            'fill="#fff" stroke="#1d2327"/><text x="23" y="15" text-anchor="middle" font-size="10">R1</text>',
            "bay tags: R = row of bays (R1 at the bottom), C = column (C1 at the left)",
        ),
    ]
    items = "".join(f"<li>{_sample(sample)}<span>{_e(words)}</span></li>" for sample, words in rows)
    return f'<ul class="legend">{items}</ul>'
