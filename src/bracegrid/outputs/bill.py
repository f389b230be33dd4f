"""The bill of materials: every diagonal member with its cut length and price, and the CSV.

The cut length is the node-to-node length of the bay diagonal (centre line of
the grid), ``hypot(width, height)``; end allowances for couplers, plates or
strap tails depend on the product and are left to the fitter. Prices come
from the project's :class:`~bracegrid.model.CostCatalogue`.
"""

from __future__ import annotations

import csv
import io
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from bracegrid.model import Diagonal, Frame, Member, MemberKind, Project, Racking


@dataclass(frozen=True, slots=True)
class BomLine:
    """One member on the bill.

    Attributes:
        frame: Frame name.
        member: The member.
        cut_length_mm: Node-to-node diagonal length in mm.
        cost: Price of the member from the cost catalogue.
    """

    frame: str
    member: Member
    cut_length_mm: float
    cost: float


@dataclass(frozen=True, slots=True)
class BomTotals:
    """Totals over a set of bill lines.

    Attributes:
        braces: Number of rigid braces.
        ties: Number of ties.
        existing: Members already in place.
        proposed: Members proposed (to be supplied and fitted).
        brace_length_mm: Total cut length of the braces.
        tie_length_mm: Total cut length of the ties.
        cost: Price of every member listed.
        proposed_cost: Price of the proposed members only.
    """

    braces: int
    ties: int
    existing: int
    proposed: int
    brace_length_mm: float
    tie_length_mm: float
    cost: float
    proposed_cost: float

    @property
    def members(self) -> int:
        """Number of members."""
        return self.braces + self.ties

    @property
    def length_mm(self) -> float:
        """Total diagonal length of every member."""
        return self.brace_length_mm + self.tie_length_mm


@dataclass(frozen=True, slots=True)
class CutGroup:
    """Members of one frame that share kind, status and cut length (one cutting-list row).

    Attributes:
        kind: Brace or tie.
        existing: Whether these members are already in place.
        cut_length_mm: Their common cut length, rounded to the millimetre.
        count: How many.
        cost: Their total price.
    """

    kind: MemberKind
    existing: bool
    cut_length_mm: int
    count: int
    cost: float


@dataclass(frozen=True, slots=True)
class FrameBom:
    """The bill of one frame.

    Attributes:
        frame: Frame name.
        lines: One line per member, ordered by bay then diagonal.
        groups: Cutting list grouped by kind, status and cut length.
        totals: Totals of the frame.
    """

    frame: str
    lines: tuple[BomLine, ...]
    groups: tuple[CutGroup, ...]
    totals: BomTotals


@dataclass(frozen=True, slots=True)
class Bom:
    """The bill of materials of a project (or of the frames chosen).

    Attributes:
        project: Project name.
        frames: One bill per frame, in project order.
        totals: Totals over every frame.
    """

    project: str
    frames: tuple[FrameBom, ...]
    totals: BomTotals


def sum_lines(lines: Iterable[BomLine]) -> BomTotals:
    """Totals over bill lines.

    Example:
        >>> sum_lines([]).members
        0
    """
    items = tuple(lines)
    braces = [x for x in items if x.member.kind is MemberKind.BRACE]
    ties = [x for x in items if x.member.kind is MemberKind.TIE]
    return BomTotals(
        braces=len(braces),
        ties=len(ties),
        existing=sum(1 for x in items if x.member.existing),
        proposed=sum(1 for x in items if not x.member.existing),
        brace_length_mm=float(sum(x.cut_length_mm for x in braces)),
        tie_length_mm=float(sum(x.cut_length_mm for x in ties)),
        cost=float(sum(x.cost for x in items)),
        proposed_cost=float(sum(x.cost for x in items if not x.member.existing)),
    )


def _groups(lines: Sequence[BomLine]) -> tuple[CutGroup, ...]:
    acc: dict[tuple[MemberKind, bool, int], tuple[int, float]] = {}
    for x in lines:
        key = (x.member.kind, x.member.existing, round(x.cut_length_mm))
        count, cost = acc.get(key, (0, 0.0))
        acc[key] = (count + 1, cost + x.cost)
    order = sorted(acc, key=lambda k: (k[0] is not MemberKind.BRACE, k[1], k[2]))
    return tuple(CutGroup(k[0], k[1], k[2], acc[k][0], acc[k][1]) for k in order)


def frame_bom(frame: Frame, project: Project) -> FrameBom:
    """The bill of one frame, priced with the project's catalogue.

    Args:
        frame: The frame and its members.
        project: Gives the cost catalogue.

    Returns:
        Lines, cutting list and totals.

    Example:
        >>> from bracegrid.model import Diagonal, Frame, Member, MemberKind, Project, Racking
        >>> f = Frame("f", (3000,), (4000,), members=(Member(1, 1, MemberKind.BRACE, Diagonal.RISING),))
        >>> b = frame_bom(f, Project("p", (f,)))
        >>> b.lines[0].cut_length_mm, b.totals.cost
        (5000.0, 65.0)
    """
    members = sorted(frame.members, key=lambda m: m.sort_key)
    lines = []
    for m in members:
        length = frame.diagonal_length_mm(m.row, m.col)
        lines.append(BomLine(frame.name, m, length, project.costs.member_cost(m.kind, length)))
    return FrameBom(frame=frame.name, lines=tuple(lines), groups=_groups(lines), totals=sum_lines(lines))


def build_bom(project: Project, *, frames: Sequence[Frame] | None = None) -> Bom:
    """The bill of materials of a project.

    Args:
        project: The project (its cost catalogue prices every member).
        frames: Only these frames (default: every frame of the project).

    Returns:
        Per-frame bills and the totals over them.

    Example:
        >>> build_bom(Project("p", (Frame("f", (3000,), (2000,)),))).totals.members
        0
    """
    chosen = project.frames if frames is None else tuple(frames)
    bills = tuple(frame_bom(f, project) for f in chosen)
    return Bom(project=project.name, frames=bills, totals=sum_lines(x for b in bills for x in b.lines))


#: Columns of the CSV bill, in order.
CSV_COLUMNS: tuple[str, ...] = (
    "frame",
    "row",
    "col",
    "kind",
    "diagonal",
    "status",
    "resists",
    "cut_length_mm",
    "cost",
)


def resists(member: Member) -> Racking:
    """Which racking sense of its row a member resists.

    A brace resists both; a rising tie resists clockwise racking (the row's top
    swaying right), a falling tie anticlockwise.

    Example:
        >>> resists(Member(1, 1, MemberKind.TIE, Diagonal.RISING))
        <Racking.CLOCKWISE: 'clockwise'>
    """
    if member.kind is MemberKind.BRACE:
        return Racking.BOTH
    return Racking.CLOCKWISE if member.diagonal is Diagonal.RISING else Racking.ANTICLOCKWISE


def render_bom_csv(bom: Bom) -> str:
    """The bill as CSV: one row per member, then a subtotal per frame and a total.

    Subtotal rows have ``row`` empty and ``kind`` set to ``subtotal`` (or
    ``total``); their ``cut_length_mm`` is the summed length.

    Example:
        >>> render_bom_csv(build_bom(Project("p", (Frame("f", (3000,), (2000,)),)))).splitlines()[0]
        'frame,row,col,kind,diagonal,status,resists,cut_length_mm,cost'
    """
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(CSV_COLUMNS)

    def total_row(label: str, name: str, t: BomTotals) -> list[str]:
        status = f"{t.existing} existing / {t.proposed} proposed"
        counts = f"{t.braces} braces / {t.ties} ties"
        return [name, "", "", label, counts, status, "", f"{t.length_mm:.0f}", f"{t.cost:.2f}"]

    for fb in bom.frames:
        for x in fb.lines:
            m = x.member
            writer.writerow(
                [
                    fb.frame,
                    m.row,
                    m.col,
                    m.kind.value,
                    m.diagonal.value,
                    "existing" if m.existing else "proposed",
                    resists(m).value,
                    f"{x.cut_length_mm:.0f}",
                    f"{x.cost:.2f}",
                ]
            )
        writer.writerow(total_row("subtotal", fb.frame, fb.totals))
    writer.writerow(total_row("total", "", bom.totals))
    return buffer.getvalue()
