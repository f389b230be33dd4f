"""The report's force figure: one frame under one load case, drawn as SVG for the page, with its legend.

Made for the page like :mod:`bracegrid.outputs.figure` (bays at a readable size,
real SVG text), not a force sheet shrunk from A3: every bar coloured by its
utilisation on the force sheet's own colour ramp (:func:`~bracegrid.outputs.ramp.utilisation_rgb`),
over-capacity bars heavy, slack ties grey and dashed, force labels in kN
(tension +) where the bays leave room, and the base reactions under the nodes.
A case that finds a mechanism shades the rows and columns that move.
"""

from __future__ import annotations

import math

from bracegrid.mechanics import BarKind, CaseForces
from bracegrid.model import Frame, Supports
from bracegrid.outputs.figure import bay_scale, fmt_px
from bracegrid.outputs.forcesheet import bar_ends
from bracegrid.outputs.ramp import OVER_RGB, RAMP, UNRATED_RGB, hex_colour, utilisation_rgb
from bracegrid.outputs.safetext import markup_text

_FONT = 'font-family="system-ui,-apple-system,Segoe UI,Helvetica,Arial,sans-serif"'
#: Labels are written where a bay is at least this many pixels wide and high (else they would overlap).
_LABEL_BAY_PX = 48.0
#: Above this many bars, only diagonals and over-capacity bars are labelled (a figure stays readable and small).
_LABEL_ALL_BARS = 400


def _kn(value: float) -> str:
    """A force in kN as labelled: sign always, one decimal below 100 kN, no "-0.0".

    Example:
        >>> _kn(12.345), _kn(-0.04), _kn(-150.2)
        ('+12.3', '0.0', '-150')
    """
    if abs(value) < 0.05:
        return "0.0"
    return f"{value:+.0f}" if abs(value) >= 100 else f"{value:+.1f}"


def force_svg(frame: Frame, case: CaseForces, *, title: str) -> str:
    """The frame's bars under one load case as one inline SVG element.

    Args:
        frame: The frame with the layout the forces were found for.
        case: The load case (solved, or a mechanism).
        title: Accessible title of the figure.

    Returns:
        ``<svg ...>...</svg>``.
    """
    n = fmt_px
    s = bay_scale(frame)
    xs, ys = frame.x_lines(), frame.y_lines()
    w_px, h_px = frame.width_mm * s, frame.height_mm * s
    left, top, bottom, right = 24.0, 14.0, 30.0, 24.0
    width, height = left + w_px + right, top + h_px + bottom

    def px(x: float, y: float) -> tuple[float, float]:
        return (left + x * s, top + h_px - y * s)

    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{n(width)}" height="{n(height)}" '
        f'viewBox="0 0 {n(width)} {n(height)}" role="img" {_FONT} font-size="10">'
        f"<title>{markup_text(title)}</title>"
    ]
    if case.is_mechanism and case.mechanism is not None:
        for r, _ in case.mechanism.rows:
            x0, y1 = px(0, ys[r])
            out.append(f'<rect x="{n(x0)}" y="{n(y1)}" width="{n(w_px)}" height="{n((ys[r] - ys[r - 1]) * s)}" '
                       'fill="#ffe2be"/>')  # fmt: skip
        for c, _ in case.mechanism.columns:
            x0, y1 = px(xs[c - 1], frame.height_mm)
            out.append(f'<rect x="{n(x0)}" y="{n(y1)}" width="{n((xs[c] - xs[c - 1]) * s)}" height="{n(h_px)}" '
                       'fill="#ffe2be"/>')  # fmt: skip
        grid = [f"M{n(px(x, 0)[0])},{n(top)}V{n(top + h_px)}" for x in xs]
        grid += [f"M{n(left)},{n(px(0, y)[1])}H{n(left + w_px)}" for y in ys]
        out.append(f'<path d="{"".join(grid)}" stroke="#1d2327" fill="none"/>')
    rated = any(m.utilisation is not None for m in case.members)
    largest = max((abs(m.force_kn) for m in case.members), default=0.0)
    label_room = min(*frame.widths, *frame.heights) * s >= _LABEL_BAY_PX
    few = len(case.members) <= _LABEL_ALL_BARS
    labels = []
    # Bars of one colour share one path (and slack ties one dashed path): a 12 x 8 face has about 240
    # bars, and one element each made the report's figures several times larger than they need be.
    # Bars over capacity stay one path each, drawn last, on top.
    by_colour: dict[str, list[str]] = {}
    slack: list[str] = []
    over_paths: list[str] = []
    for m in case.members:
        (ax, ay), (bx, by) = (px(*p) for p in bar_ends(frame, m))
        segment = f"M{n(ax)},{n(ay)}L{n(bx)},{n(by)}"
        if m.slack:
            slack.append(segment)
            continue
        if rated:
            rgb = UNRATED_RGB if m.utilisation is None else utilisation_rgb(m.utilisation)
        else:
            rgb = utilisation_rgb(abs(m.force_kn) / largest) if largest > 0 else UNRATED_RGB
        heavy = m.over
        if heavy:
            over_paths.append(f'<path d="{segment}" stroke="{hex_colour(rgb)}" stroke-width="4"/>')
        else:
            by_colour.setdefault(hex_colour(rgb), []).append(segment)
        diagonal = m.kind in {BarKind.BRACE, BarKind.TIE}
        if label_room and (few or diagonal or heavy):
            cx, cy = (ax + bx) / 2, (ay + by) / 2
            if diagonal:  # beside the crossing point, a quarter of the way along
                cx, cy = ax + 0.3 * (bx - ax), ay + 0.3 * (by - ay)
            angle = math.degrees(math.atan2(by - ay, bx - ax))
            if angle > 90 or angle < -90:
                angle += 180
            turn = f"rotate({angle:.0f} {n(cx)} {n(cy)})"
            colour = hex_colour(OVER_RGB) if heavy else "#1d2327"
            labels.append(
                f'<text x="{n(cx)}" y="{n(cy - 3)}" text-anchor="middle" transform="{turn}" fill="{colour}">'
                f"{_kn(m.force_kn)}</text>"
            )
    if slack:
        out.append(f'<path d="{"".join(slack)}" stroke="#9aa0a6" stroke-dasharray="5 3" fill="none"/>')
    if by_colour:
        paths = "".join(f'<path d="{"".join(d)}" stroke="{c}"/>' for c, d in by_colour.items())
        out.append(f'<g stroke-width="2.2" fill="none">{paths}</g>')
    out.extend(over_paths)
    if labels:
        out.append(f'<g paint-order="stroke" stroke="#fff" stroke-width="3">{"".join(labels)}</g>')
    if frame.supports is Supports.BASE:
        base = top + h_px
        out.append(f'<path d="M{n(left - 6)},{n(base)}H{n(left + w_px + 6)}" stroke="#1d2327" stroke-width="2.5"/>')
        if label_room:
            for reaction in case.reactions:
                if reaction.support == "base" and abs(reaction.fy_kn) > 1e-6:
                    x, _ = px(xs[reaction.q], 0)
                    colour = hex_colour(OVER_RGB) if reaction.uplift_over else "#1849a9"
                    out.append(
                        f'<text x="{n(x)}" y="{n(base + 16)}" text-anchor="middle" fill="{colour}">'
                        f"{_kn(reaction.fy_kn)}</text>"
                    )
    out.append("</svg>")
    return "".join(out)


def force_defs() -> str:
    """A hidden SVG with the colour ramp the force legends use (once per page).

    Example:
        >>> 'id="bg-ramp"' in force_defs()
        True
    """
    stops = "".join(f'<stop offset="{v:g}" stop-color="{hex_colour(rgb)}"/>' for v, rgb in RAMP)
    return (
        '<svg width="0" height="0" style="position:absolute" aria-hidden="true"><defs>'
        f'<linearGradient id="bg-ramp">{stops}</linearGradient></defs></svg>'
    )


def force_legend_html(*, rated: bool) -> str:
    """The force figure's legend: the colour ramp, over capacity, slack ties, labels and reactions.

    Example:
        >>> "over capacity" in force_legend_html(rated=True)
        True
    """
    ramp = '<svg width="120" height="14" aria-hidden="true"><rect width="120" height="14" fill="url(#bg-ramp)"/></svg>'
    scale_words = "utilisation 0 to 1 (force / capacity)" if rated else "|force| / largest |force| (no capacities)"

    def sample(inner: str) -> str:
        return f'<svg width="46" height="22" viewBox="0 0 46 22" aria-hidden="true">{inner}</svg>'

    rows = [
        (ramp, f"bar colour: {scale_words}"),
        (sample(f'<path d="M4,11H42" stroke="{hex_colour(OVER_RGB)}" stroke-width="4"/>'), "over capacity (heavy)"),
        (sample(f'<path d="M4,11H42" stroke="{hex_colour(UNRATED_RGB)}" stroke-width="2.2"/>'), "no capacity given"),
        (sample('<path d="M4,11H42" stroke="#9aa0a6" stroke-dasharray="5 3"/>'), "slack tie: no force"),
        (
            sample('<text x="23" y="15" text-anchor="middle" font-size="10">+12.3</text>'),
            "axial force, kN, tension + (where the bays leave room)",
        ),
        (
            sample('<text x="23" y="15" text-anchor="middle" font-size="10" fill="#1849a9">+8.0</text>'),
            "vertical base reaction, kN, up +",
        ),
    ]
    items = "".join(f"<li>{a}<span>{markup_text(b)}</span></li>" for a, b in rows)
    return f'<ul class="legend">{items}</ul>'
