"""The bill of materials: every diagonal member with its cut length and price, the totals, and the CSV files.

One rounding rule (docs/drawings.md, "Bill of materials"): a member's cut length
is its node-to-node bay diagonal to the nearest whole millimetre
(:meth:`~bracegrid.model.Frame.cut_length_mm`), and its price is worked out from
that cut length and rounded half up to the cent once
(:meth:`~bracegrid.model.CostCatalogue.member_price_cents`). Every row, subtotal
and total is an integer sum of those millimetres and cents, so each total equals
the sum of the rows printed above it, to the millimetre and the cent, on the
sheet, in the CSV, in the HTML report and in ``--json``.

End allowances for couplers, plates or strap tails depend on the product and
are left to the fitter.
"""

from __future__ import annotations

import csv
import io
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from bracegrid.model import Diagonal, Frame, Member, MemberKind, Project, Racking
from bracegrid.outputs.terms import money_text


@dataclass(frozen=True, slots=True)
class BomLine:
    """One member on the bill.

    Attributes:
        frame: Frame name.
        member: The member.
        cut_length_mm: Node-to-node diagonal length, whole mm.
        cost_cents: Price of the member, whole cents.
    """

    frame: str
    member: Member
    cut_length_mm: int
    cost_cents: int

    @property
    def cost(self) -> float:
        """Price in money units."""
        return self.cost_cents / 100


@dataclass(frozen=True, slots=True)
class BomTotals:
    """Totals over a set of bill lines (sums of whole millimetres and whole cents).

    Attributes:
        braces: Number of rigid braces.
        ties: Number of ties.
        existing: Members already in place.
        proposed: Members proposed (to be supplied and fitted).
        brace_length_mm: Total cut length of the braces.
        tie_length_mm: Total cut length of the ties.
        cost_cents: Price of every member listed.
        proposed_cost_cents: Price of the proposed members only.
    """

    braces: int
    ties: int
    existing: int
    proposed: int
    brace_length_mm: int
    tie_length_mm: int
    cost_cents: int
    proposed_cost_cents: int

    @property
    def members(self) -> int:
        """Number of members."""
        return self.braces + self.ties

    @property
    def length_mm(self) -> int:
        """Total cut length of every member."""
        return self.brace_length_mm + self.tie_length_mm

    @property
    def cost(self) -> float:
        """Price of every member, money units."""
        return self.cost_cents / 100

    @property
    def proposed_cost(self) -> float:
        """Price of the proposed members, money units."""
        return self.proposed_cost_cents / 100


@dataclass(frozen=True, slots=True)
class CutGroup:
    """Members of one frame that share kind, status and cut length (one cutting-list row).

    Attributes:
        kind: Brace or tie.
        existing: Whether these members are already in place.
        cut_length_mm: Their common cut length, whole mm.
        count: How many.
        cost_cents: Their total price (the sum of their prices), whole cents.
    """

    kind: MemberKind
    existing: bool
    cut_length_mm: int
    count: int
    cost_cents: int

    @property
    def length_mm(self) -> int:
        """Total cut length of the row: count x cut length, exact."""
        return self.count * self.cut_length_mm

    @property
    def cost(self) -> float:
        """Price of the row, money units."""
        return self.cost_cents / 100


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
        brace_length_mm=sum(x.cut_length_mm for x in braces),
        tie_length_mm=sum(x.cut_length_mm for x in ties),
        cost_cents=sum(x.cost_cents for x in items),
        proposed_cost_cents=sum(x.cost_cents for x in items if not x.member.existing),
    )


def sum_totals(parts: Iterable[BomTotals]) -> BomTotals:
    """Totals over totals (a project from its frames).

    Example:
        >>> sum_totals([]).cost_cents
        0
    """
    items = tuple(parts)
    return BomTotals(
        braces=sum(t.braces for t in items),
        ties=sum(t.ties for t in items),
        existing=sum(t.existing for t in items),
        proposed=sum(t.proposed for t in items),
        brace_length_mm=sum(t.brace_length_mm for t in items),
        tie_length_mm=sum(t.tie_length_mm for t in items),
        cost_cents=sum(t.cost_cents for t in items),
        proposed_cost_cents=sum(t.proposed_cost_cents for t in items),
    )


def _groups(lines: Sequence[BomLine]) -> tuple[CutGroup, ...]:
    acc: dict[tuple[MemberKind, bool, int], tuple[int, int]] = {}
    for x in lines:
        key = (x.member.kind, x.member.existing, x.cut_length_mm)
        count, cost = acc.get(key, (0, 0))
        acc[key] = (count + 1, cost + x.cost_cents)
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
        (5000, 65.0)
    """
    members = sorted(frame.members, key=lambda m: m.sort_key)
    lines = []
    for m in members:
        cut = frame.cut_length_mm(m.row, m.col)
        lines.append(BomLine(frame.name, m, cut, project.costs.member_price_cents(m.kind, cut)))
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
    return Bom(project=project.name, frames=bills, totals=sum_totals(b.totals for b in bills))


#: Columns of the members CSV (``<stem>-bom.csv``), one row per member and nothing else.
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

#: Columns of the totals CSV (``<stem>-bom-totals.csv``).
TOTALS_COLUMNS: tuple[str, ...] = (
    "scope",
    "frame",
    "braces",
    "ties",
    "existing",
    "proposed",
    "members",
    "cut_length_mm",
    "cost",
    "proposed_cost",
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
    """The bill as CSV: one row per member, no summary rows (a column sum is the total).

    Example:
        >>> render_bom_csv(build_bom(Project("p", (Frame("f", (3000,), (2000,)),)))).splitlines()[0]
        'frame,row,col,kind,diagonal,status,resists,cut_length_mm,cost'
    """
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(CSV_COLUMNS)
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
                    x.cut_length_mm,
                    money_text(x.cost_cents).replace(",", ""),
                ]
            )
    return buffer.getvalue()


def render_bom_totals_csv(bom: Bom) -> str:
    """The bill's totals as CSV: one row per frame (``scope`` = ``frame``), then ``scope`` = ``all``.

    Every column holds one kind of value (counts, whole mm, money); the ``all`` row is the
    sum of the ``frame`` rows and of the members CSV.

    Example:
        >>> render_bom_totals_csv(build_bom(Project("p", (Frame("f", (3000,), (2000,)),)))).splitlines()[-1]
        'all,,0,0,0,0,0,0,0.00,0.00'
    """
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(TOTALS_COLUMNS)

    def row(scope: str, name: str, t: BomTotals) -> list[object]:
        return [
            scope, name, t.braces, t.ties, t.existing, t.proposed, t.members, t.length_mm,
            money_text(t.cost_cents).replace(",", ""), money_text(t.proposed_cost_cents).replace(",", ""),
        ]  # fmt: skip

    for fb in bom.frames:
        writer.writerow(row("frame", fb.frame, fb.totals))
    writer.writerow(row("all", "", bom.totals))
    return buffer.getvalue()
