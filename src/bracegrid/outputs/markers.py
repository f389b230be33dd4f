"""Marker placement: where the tie-sense curls and critical-member diamonds sit in each bay, and how big.

Markers sit on their own member: a tie's sense curl near its lower end, a
critical member's diamond near its upper end. In a narrow bay (an X of ties in
a 1.3 m end frame at 1:125 is about 10 mm wide on paper) the full-size
markers would touch each other, the other diagonal and the bars, so each frame
gets one marker size (the largest, in steps, at which every bay of the frame
can place its markers) and each bay the positions along its members nearest
the usual ones at which every marker keeps :data:`MIN_GAP` of white space from
every other marker, from the other diagonal in the bay and from the bay's four
bars, edge to edge (the strokes' print widths counted).

Footprints are circles around the marker centre (the curl's farthest point,
arrowhead included; the diamond's corners), so the test is conservative.
Positions are in paper mm from the frame's bottom-left corner.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass
from enum import Enum

from bracegrid.model import Diagonal, Frame, Member, MemberKind
from bracegrid.outputs.layers import Layer, member_layer
from bracegrid.outputs.symbols import CRITICAL_HALF, sense_reach

#: Least white space between a marker's strokes and any other stroke, paper mm, edge to edge: the
#: least space between parallel lines in ISO 128-20:1996, 0.7 mm (from memory). Stroke widths are
#: the layers' print weights (half of each on either side of its centre line).
MIN_GAP = 0.7
_HALF_SENSE = Layer.TIE_SENSE.spec.lineweight / 200
_HALF_CRITICAL = Layer.CRITICAL.spec.lineweight / 200
_HALF_BAR = Layer.FRAME.spec.lineweight / 200
#: Marker size factors tried, largest first; below the last, markers would not read.
SIZES: tuple[float, ...] = tuple(round(1.0 - 0.05 * k, 2) for k in range(11))
#: Usual positions along a member from its lower end (fractions of its length).
SENSE_AT = 0.28
CRITICAL_AT = 0.72
_SENSE_RANGE = [round(0.08 + 0.015 * k, 3) for k in range(27)]  # 0.08 .. 0.47
_CRITICAL_RANGE = [round(1.0 - t, 3) for t in _SENSE_RANGE]  # 0.92 .. 0.53
#: Footprint radius of a full-size curl (a constant of the symbol).
_SENSE_REACH = sense_reach()


#: Candidate fractions, nearest the usual ones first.
_SENSE_ORDER = tuple(sorted(_SENSE_RANGE, key=lambda t: (abs(t - SENSE_AT), t)))
_CRITICAL_ORDER = tuple(sorted(_CRITICAL_RANGE, key=lambda t: (abs(t - CRITICAL_AT), -t)))
_PAIR_ORDER = tuple(
    sorted(
        ((a, b) for a in _SENSE_RANGE for b in _CRITICAL_RANGE),
        key=lambda p: (abs(p[0] - SENSE_AT) + abs(p[1] - CRITICAL_AT), p),
    )
)
_PAIR_ORDER = tuple(
    sorted(
        ((a, b) for a in _SENSE_RANGE for b in _CRITICAL_RANGE),
        key=lambda p: (abs(p[0] - SENSE_AT) + abs(p[1] - CRITICAL_AT), p),
    )
)


class MarkerKind(Enum):
    """The markers drawn on members."""

    RESISTS_CLOCKWISE = "resists-clockwise"
    """Sense curl of a rising tie (it resists clockwise racking)."""
    RESISTS_ANTICLOCKWISE = "resists-anticlockwise"
    """Sense curl of a falling tie."""
    CRITICAL = "critical"
    """Diamond of a critical member (single point of failure)."""


@dataclass(frozen=True, slots=True)
class Marker:
    """One marker on one member.

    Attributes:
        kind: What it shows.
        member: The member it sits on.
        x: Centre, paper mm right of the frame's left edge.
        y: Centre, paper mm above the frame's bottom edge.
        size: Factor on the symbol's full size.
    """

    kind: MarkerKind
    member: Member
    x: float
    y: float
    size: float

    @property
    def reach(self) -> float:
        """Radius of the marker's footprint, paper mm."""
        return self.size * (CRITICAL_HALF if self.kind is MarkerKind.CRITICAL else _SENSE_REACH)


@dataclass(frozen=True, slots=True)
class MarkerPlan:
    """The markers of one frame.

    Attributes:
        size: The frame's marker size factor.
        fits: False when even the smallest size leaves some marker too close (markers then sit at
            the usual positions at the smallest size).
        markers: Every marker, members in bay order.
    """

    size: float
    fits: bool
    markers: tuple[Marker, ...]


# A bay's configuration: per member, (diagonal, is a tie, is critical, half the member's printed width).
_Config = tuple[tuple[Diagonal, bool, bool, float], ...]
# A marker's footprint: centre x, y, radius, its own diagonal, half its stroke width.
_Circle = tuple[float, float, float, Diagonal, float]


def _ends(diagonal: Diagonal, w: float, h: float) -> tuple[tuple[float, float], tuple[float, float]]:
    """Lower and upper end of a diagonal in a w x h bay."""
    return ((0.0, 0.0), (w, h)) if diagonal is Diagonal.RISING else ((w, 0.0), (0.0, h))


def _at(diagonal: Diagonal, w: float, h: float, t: float) -> tuple[float, float]:
    (x0, y0), (x1, y1) = _ends(diagonal, w, h)
    return (x0 + t * (x1 - x0), y0 + t * (y1 - y0))


def _line_distance(p: tuple[float, float], diagonal: Diagonal, w: float, h: float) -> float:
    (x0, y0), (x1, y1) = _ends(diagonal, w, h)
    return abs((x1 - x0) * (y0 - p[1]) - (x0 - p[0]) * (y1 - y0)) / math.hypot(x1 - x0, y1 - y0)


def _clear(circles: list[_Circle], w: float, h: float, lines: dict[Diagonal, float]) -> bool:
    """Every footprint keeps :data:`MIN_GAP` of white from the bars, the other diagonal and each other."""
    for i, (x, y, r, own, half) in enumerate(circles):
        edge = r + half + MIN_GAP
        if min(x, y, w - x, h - y) < edge + _HALF_BAR:
            return False
        for other, other_half in lines.items():
            if other is not own and _line_distance((x, y), other, w, h) < edge + other_half:
                return False
        for x2, y2, r2, _, half2 in circles[i + 1 :]:
            if math.hypot(x - x2, y - y2) < edge + r2 + half2:
                return False
    return True


def _circles(config: _Config, w: float, h: float, k: float, ts: float | None, tc: float | None) -> list[_Circle]:
    """Footprints of the bay's curls (at ``ts``) and diamonds (at ``tc``); ``None`` leaves that kind out."""
    circles = []
    for diagonal, tie, critical, _ in config:
        if tie and ts is not None:
            x, y = _at(diagonal, w, h, ts)
            circles.append((x, y, k * _SENSE_REACH, diagonal, _HALF_SENSE))
        if critical and tc is not None:
            x, y = _at(diagonal, w, h, tc)
            circles.append((x, y, k * CRITICAL_HALF, diagonal, _HALF_CRITICAL))
    return circles


def _positions(config: _Config, w: float, h: float, k: float) -> tuple[float, float] | None:
    """Fractions (sense, critical) nearest the usual ones at which the bay's markers all keep clear.

    Curls and diamonds are first placed each kind on its own (clear of the bars, the other
    diagonal and markers of their kind); only those positions are then tried together.
    """
    tie = any(c[1] for c in config)
    critical = any(c[2] for c in config)
    lines = {c[0]: c[3] for c in config}
    if not (tie or critical):
        return SENSE_AT, CRITICAL_AT  # no marker in this bay
    reach = min(
        ([k * _SENSE_REACH + _HALF_SENSE] if tie else []) + ([k * CRITICAL_HALF + _HALF_CRITICAL] if critical else [])
    )
    if min(w, h) < 2 * (reach + MIN_GAP + _HALF_BAR):
        return None  # not even one marker fits between two bars
    senses = [t for t in _SENSE_ORDER if _clear(_circles(config, w, h, k, t, None), w, h, lines)] if tie else []
    crits = [t for t in _CRITICAL_ORDER if _clear(_circles(config, w, h, k, None, t), w, h, lines)] if critical else []
    if (tie and not senses) or (critical and not crits):
        return None
    if not (tie and critical):  # one kind only: its nearest clear position
        return (senses[0] if tie else SENSE_AT), (crits[0] if critical else CRITICAL_AT)
    ok_sense, ok_crit = set(senses), set(crits)
    for ts, tc in _PAIR_ORDER:
        if ts in ok_sense and tc in ok_crit and _clear(_circles(config, w, h, k, ts, tc), w, h, lines):
            return ts, tc
    return None


def _largest_size(config: _Config, w: float, h: float) -> float | None:
    """The largest size of :data:`SIZES` at which the bay's markers fit (fitting is monotone in size)."""
    if _positions(config, w, h, SIZES[-1]) is None:
        return None
    lo, hi = len(SIZES) - 1, 0  # SIZES[lo] fits; find the smallest index that fits
    while lo > hi:
        mid = (lo + hi) // 2
        if _positions(config, w, h, SIZES[mid]) is not None:
            lo = mid
        else:
            hi = mid + 1
    return SIZES[lo]


def place_markers(frame: Frame, critical: Iterable[Member], *, scale: float) -> MarkerPlan:
    """Place every tie-sense and critical-member marker of a frame.

    Args:
        frame: The frame and its members.
        critical: Its critical members (matched by bay and diagonal).
        scale: Model mm per paper mm of the sheet (1:100 -> 100).

    Returns:
        One size for the frame and every marker's position.

    Example:
        >>> from bracegrid.model import Frame, Member, MemberKind, Diagonal
        >>> ties = (Member(1, 1, MemberKind.TIE, Diagonal.RISING), Member(1, 1, MemberKind.TIE, Diagonal.FALLING))
        >>> plan = place_markers(Frame("end", (1300,), (2000,), members=ties), ties, scale=125)
        >>> plan.fits, plan.size < 1.0, len(plan.markers)
        (True, True, 4)
    """
    crit = {(m.row, m.col, m.diagonal) for m in critical}
    bays: dict[tuple[int, int], list[Member]] = {}
    for m in sorted(frame.members, key=lambda m: m.sort_key):
        bays.setdefault(m.bay, []).append(m)
    xs, ys = frame.x_lines(), frame.y_lines()

    def config_of(members: list[Member]) -> _Config:
        return tuple(
            (
                m.diagonal,
                m.kind is MemberKind.TIE,
                (m.row, m.col, m.diagonal) in crit,
                member_layer(brace=m.kind is MemberKind.BRACE, existing=m.existing).spec.lineweight / 200,
            )
            for m in members
        )

    shapes: dict[tuple[_Config, float, float], float | None] = {}
    needed = []
    for (r, c), members in bays.items():
        config = config_of(members)
        if not any(tie or cr for _, tie, cr, _ in config):
            continue
        w, h = (xs[c] - xs[c - 1]) / scale, (ys[r] - ys[r - 1]) / scale
        key = (config, w, h)
        if key not in shapes:
            shapes[key] = _largest_size(config, w, h)
        needed.append(shapes[key])
    fits = all(k is not None for k in needed)
    size = min((k for k in needed if k is not None), default=SIZES[0]) if fits else SIZES[-1]
    chosen: dict[tuple[_Config, float, float], tuple[float, float]] = {}
    markers = []
    for (r, c), members in bays.items():
        config = config_of(members)
        w, h = (xs[c] - xs[c - 1]) / scale, (ys[r] - ys[r - 1]) / scale
        key = (config, w, h)
        if key not in chosen:
            chosen[key] = _positions(config, w, h, size) or (SENSE_AT, CRITICAL_AT)
        ts, tc = chosen[key]
        ox, oy = xs[c - 1] / scale, ys[r - 1] / scale
        for m, (_, tie, is_critical, _) in zip(members, config, strict=True):
            if tie:
                x, y = _at(m.diagonal, w, h, ts)
                kind = (
                    MarkerKind.RESISTS_CLOCKWISE if m.diagonal is Diagonal.RISING else MarkerKind.RESISTS_ANTICLOCKWISE
                )
                markers.append(Marker(kind, m, ox + x, oy + y, size))
            if is_critical:
                x, y = _at(m.diagonal, w, h, tc)
                markers.append(Marker(MarkerKind.CRITICAL, m, ox + x, oy + y, size))
    return MarkerPlan(size=size, fits=fits, markers=tuple(markers))
