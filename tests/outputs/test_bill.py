"""Bill of materials: the one rounding rule, and every printed total equal to the sum of its printed rows.

Reference: the documented rule (docs/drawings.md, "Bill of materials") written out
again independently: cut length = ``numpy.hypot`` of the bay's input width and
height rounded to the millimetre (a root of a whole number is never exactly
x.5, so no tie-breaking is involved), price = per piece + labour + per metre x
cut length, times 1 + contingency / 100, computed in exact fractions from the
rates as written and rounded half up to the cent. The sums are then checked on
what is *printed*: the sheet's table cells, the members CSV against the totals
CSV, and the HTML table, parsed back from their text.
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import replace
from decimal import Decimal
from fractions import Fraction
from html.parser import HTMLParser

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings

from bracegrid.io import load_project
from bracegrid.model import CostCatalogue, CostRate, Diagonal, Frame, Member, MemberKind, Project, Racking
from bracegrid.optimize import SolveOptions, optimize_project
from bracegrid.outputs.bill import build_bom, render_bom_csv, render_bom_totals_csv, resists
from bracegrid.outputs.htmlreport import bom_table
from bracegrid.outputs.sheet import BillRowKind, bill_rows
from tests.drawing_cases import QUAYSIDE, braced_quayside
from tests.strategies import priced_projects


def _reference(project: Project) -> list[tuple[str, Member, int, int]]:
    """(frame, member, cut mm, price cents) of every member by the documented rule, computed independently."""
    out = []
    c = project.costs
    for f in project.frames:
        for m in f.members:
            cut = int(np.rint(np.hypot(float(f.widths[m.col - 1]), float(f.heights[m.row - 1]))))
            rate = c.brace if m.kind is MemberKind.BRACE else c.tie
            exact = (
                (Fraction(repr(rate.per_piece)) + Fraction(repr(rate.labour_per_piece)))
                + Fraction(repr(rate.per_metre)) * Fraction(cut, 1000)
            ) * (1 + Fraction(repr(c.contingency_pct)) / 100)
            out.append((f.name, m, cut, math.floor(exact * 100 + Fraction(1, 2))))
    return out


@pytest.fixture(params=[0.0, 12.5])
def project(request: pytest.FixtureRequest) -> Project:
    p = braced_quayside()
    return replace(p, costs=replace(p.costs, contingency_pct=request.param))


def test_bill_follows_the_documented_rule(project: Project) -> None:
    bom = build_bom(project)
    ref = _reference(project)
    lines = {(x.frame, x.member): (x.cut_length_mm, x.cost_cents) for fb in bom.frames for x in fb.lines}
    assert lines == {(name, m): (cut, price) for name, m, cut, price in ref}
    assert bom.totals.cost_cents == sum(r[3] for r in ref)
    assert bom.totals.length_mm == sum(r[2] for r in ref)
    assert bom.totals.proposed_cost_cents == sum(r[3] for r in ref if not r[1].existing)
    members = [m for f in project.frames for m in f.members]
    assert bom.totals.members == len(members)
    assert bom.totals.braces == sum(1 for m in members if m.kind is MemberKind.BRACE)
    assert bom.totals.proposed == sum(1 for m in members if not m.existing)


def test_three_four_five_bay() -> None:
    # Worked example: a 3000 x 4000 mm bay has a 5000 mm diagonal (3-4-5 triangle);
    # (10 + 1 + 2 x 5) x 1.1 = 23.10 exactly.
    costs = CostCatalogue(brace=CostRate(10.0, 2.0, 1.0), tie=CostRate(4.0, 1.0), contingency_pct=10.0)
    m = Member(1, 1, MemberKind.BRACE, Diagonal.FALLING, existing=False)
    f = Frame("f", (3000,), (4000,), members=(m,))
    bom = build_bom(Project("p", (f,), costs=costs))
    assert bom.frames[0].lines[0].cut_length_mm == 5000
    assert bom.totals.cost_cents == 2310


def test_half_cent_rounds_up() -> None:
    # 0.125 per piece and nothing else: 12.5 cents, half up -> 13 (banker's rounding would give 12).
    costs = CostCatalogue(brace=CostRate(0.125, 0.0), tie=CostRate(0.0, 0.0))
    f = Frame("f", (3000,), (4000,), members=(Member(1, 1, MemberKind.BRACE, Diagonal.RISING),))
    assert build_bom(Project("p", (f,), costs=costs)).totals.cost_cents == 13


def _cents(text: str) -> int:
    return int(Decimal(text.replace(",", "")) * 100)


def _mm(text: str) -> int:
    return int(Decimal(text) * 1000)


def _check_sheet_rows(bom_project: Project) -> None:
    """The sheet's printed table: each total row equals the sum of the printed item rows it covers."""
    bom = build_bom(bom_project)
    rows = bill_rows(bom)
    items: list[list[str | None]] = []
    everything: list[list[str | None]] = []
    proposed_cents = 0
    for row in rows[1:]:
        cells = list(row.cells)
        if row.kind is BillRowKind.ITEM:
            items.append(cells)
            everything.append(cells)
            if cells[2] == "proposed":
                proposed_cents += _cents(str(cells[6]))
        elif row.kind in {BillRowKind.FRAME_TOTAL, BillRowKind.TOTAL}:
            covered = items if row.kind is BillRowKind.FRAME_TOTAL else everything
            assert int(str(cells[3])) == sum(int(str(c[3])) for c in covered)
            assert _mm(str(cells[5])) == sum(_mm(str(c[5])) for c in covered)
            assert _cents(str(cells[6])) == sum(_cents(str(c[6])) for c in covered)
            for c in covered:  # each item row: count x cut each = its length, to the millimetre
                if c[4]:
                    assert int(str(c[3])) * int(str(c[4])) == _mm(str(c[5]))
            items = []
        else:
            assert row.kind is BillRowKind.PROPOSED
            assert _cents(str(cells[6])) == proposed_cents


def _check_csv(bom_project: Project) -> None:
    """Members CSV summed column by column equals the totals CSV, frame by frame and overall."""
    bom = build_bom(bom_project)
    members = list(csv.DictReader(io.StringIO(render_bom_csv(bom))))
    totals = list(csv.DictReader(io.StringIO(render_bom_totals_csv(bom))))
    assert {r["kind"] for r in members} <= {"brace", "tie"}  # item rows only: a column sum is a total
    for t in totals:
        mine = members if t["scope"] == "all" else [r for r in members if r["frame"] == t["frame"]]
        assert int(t["members"]) == len(mine)
        assert int(t["braces"]) == sum(1 for r in mine if r["kind"] == "brace")
        assert int(t["cut_length_mm"]) == sum(int(r["cut_length_mm"]) for r in mine)
        assert _cents(t["cost"]) == sum(_cents(r["cost"]) for r in mine)
        assert _cents(t["proposed_cost"]) == sum(_cents(r["cost"]) for r in mine if r["status"] == "proposed")
    assert [t["scope"] for t in totals] == ["frame"] * len(bom.frames) + ["all"]


class _Cells(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.rows: list[list[str]] = []
        self._cell: list[str] | None = None

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        if tag == "tr":
            self.rows.append([])
        elif tag in {"td", "th"}:
            self._cell = []

    def handle_endtag(self, tag: str) -> None:
        if tag in {"td", "th"} and self._cell is not None:
            self.rows[-1].append("".join(self._cell).strip())
            self._cell = None

    def handle_data(self, data: str) -> None:
        if self._cell is not None:
            self._cell.append(data)


def _check_html(bom_project: Project) -> None:
    """The report's bill table: the total row equals the sum of the item rows above it."""
    for fb in build_bom(bom_project).frames:
        parser = _Cells()
        parser.feed(bom_table(fb))
        head, *items, total = parser.rows
        assert head == ["member", "status", "no.", "cut each mm", "length m", "cost"]
        assert int(total[1]) == sum(int(r[2]) for r in items)
        assert _mm(total[3]) == sum(_mm(r[4]) for r in items)
        assert _cents(total[4]) == sum(_cents(r[5]) for r in items)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(priced_projects())
def test_every_printed_total_is_the_sum_of_its_rows(project: Project) -> None:
    # Property (issue 10): on random frames, layouts, statuses and prices, every total on the sheet,
    # in the CSV files and in the HTML table equals the sum of the printed rows, to the cent and mm;
    # and the whole agrees with the independent reference.
    _check_sheet_rows(project)
    _check_csv(project)
    _check_html(project)
    assert build_bom(project).totals.cost_cents == sum(r[3] for r in _reference(project))


def test_issue_10_demo_bill_adds_up() -> None:
    # Regression (issue 10): the optimized demo's west end frame printed rows of 38.16 m / 236.32 and
    # a subtotal of 38.17 m / 236.33; the grand total 484.48 against rows summing to 484.44.
    # By hand: 16 ties of hypot(1300, 2000) = 2385 mm at 7 + 3 + 2 x 2.385 = 14.77 -> 236.32.
    project = load_project(QUAYSIDE)
    solved = optimize_project(project, options=SolveOptions(time_limit=10, workers=1)).project
    rows = bill_rows(build_bom(solved))
    west = [r.cells for r in rows if r.kind is BillRowKind.ITEM and r.cells[0] == "west end frame"]
    assert west == [("west end frame", "tie", "proposed", "16", "2385", "38.160", "236.32")]
    totals = [r.cells for r in rows if r.kind is BillRowKind.FRAME_TOTAL]
    assert totals[1][5:] == ("38.160", "236.32")
    _check_sheet_rows(solved)
    _check_csv(solved)
    _check_html(solved)


def test_csv_columns_hold_one_kind_of_value(project: Project) -> None:
    bom = build_bom(project)
    for r in csv.DictReader(io.StringIO(render_bom_csv(bom))):
        assert int(r["row"]) >= 1
        assert int(r["col"]) >= 1
        assert r["kind"] in {"brace", "tie"}
        assert r["diagonal"] in {"rising", "falling"}
        assert r["status"] in {"existing", "proposed"}
        assert int(r["cut_length_mm"]) > 0
        Decimal(r["cost"])
        assert r["resists"] == ("both" if r["kind"] == "brace" else
                                "clockwise" if r["diagonal"] == "rising" else "anticlockwise")  # fmt: skip
    for t in csv.DictReader(io.StringIO(render_bom_totals_csv(bom))):
        assert t["scope"] in {"frame", "all"}
        for key in ("braces", "ties", "existing", "proposed", "members", "cut_length_mm"):
            int(t[key])


def test_resists_follows_the_theory() -> None:
    # THEORY: a rising tie gives row_i <= col_j (resists clockwise racking of the row), a falling tie the other.
    assert resists(Member(1, 1, MemberKind.TIE, Diagonal.RISING)) is Racking.CLOCKWISE
    assert resists(Member(1, 1, MemberKind.TIE, Diagonal.FALLING)) is Racking.ANTICLOCKWISE
    assert resists(Member(1, 1, MemberKind.BRACE, Diagonal.FALLING)) is Racking.BOTH
