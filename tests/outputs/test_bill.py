"""Bill of materials: totals against an independent numpy computation.

Reference: cut lengths recomputed here with ``np.hypot`` of the input width
and height of every member's bay, and prices with the cost formula written out
with numpy arrays (per piece + labour + per metre x length, times
1 + contingency / 100), independently of ``Frame.diagonal_length_mm`` and
``CostCatalogue.member_cost``.
"""

from __future__ import annotations

import csv
import io
from dataclasses import replace

import numpy as np
import pytest

from bracegrid.model import CostCatalogue, CostRate, Diagonal, Frame, Member, MemberKind, Project, Racking
from bracegrid.outputs.bill import build_bom, render_bom_csv, resists
from tests.drawing_cases import braced_quayside


def _reference(project: Project) -> tuple[float, float, float]:
    """Total length, total cost and proposed cost, by numpy."""
    lengths, costs, proposed = [], [], []
    for f in project.frames:
        if not f.members:
            continue
        w = np.array([f.widths[m.col - 1] for m in f.members], dtype=float)
        h = np.array([f.heights[m.row - 1] for m in f.members], dtype=float)
        length = np.hypot(w, h)
        brace = np.array([m.kind is MemberKind.BRACE for m in f.members])
        c = project.costs
        piece = np.where(brace, c.brace.per_piece + c.brace.labour_per_piece, c.tie.per_piece + c.tie.labour_per_piece)
        metre = np.where(brace, c.brace.per_metre, c.tie.per_metre)
        cost = (piece + metre * length / 1000.0) * (1.0 + c.contingency_pct / 100.0)
        lengths.append(length)
        costs.append(cost)
        proposed.append(cost[np.array([not m.existing for m in f.members])])
    return (
        float(np.sum(np.concatenate(lengths))),
        float(np.sum(np.concatenate(costs))),
        float(np.sum(np.concatenate(proposed))),
    )


@pytest.fixture(params=[0.0, 12.5])
def project(request: pytest.FixtureRequest) -> Project:
    p = braced_quayside()
    return replace(p, costs=replace(p.costs, contingency_pct=request.param))


def test_totals_equal_numpy_reference(project: Project) -> None:
    bom = build_bom(project)
    length, cost, proposed = _reference(project)
    assert bom.totals.length_mm == pytest.approx(length, rel=1e-12)
    assert bom.totals.cost == pytest.approx(cost, rel=1e-12)
    assert bom.totals.proposed_cost == pytest.approx(proposed, rel=1e-12)
    members = [m for f in project.frames for m in f.members]
    assert bom.totals.members == len(members)
    assert bom.totals.braces == sum(1 for m in members if m.kind is MemberKind.BRACE)
    assert bom.totals.proposed == sum(1 for m in members if not m.existing)


def test_frame_totals_add_up_to_the_project_total(project: Project) -> None:
    bom = build_bom(project)
    assert sum(fb.totals.length_mm for fb in bom.frames) == pytest.approx(bom.totals.length_mm)
    assert sum(fb.totals.cost for fb in bom.frames) == pytest.approx(bom.totals.cost)
    for fb in bom.frames:
        assert sum(g.count for g in fb.groups) == fb.totals.members
        assert sum(g.cost for g in fb.groups) == pytest.approx(fb.totals.cost)


def test_three_four_five_bay() -> None:
    # Worked example: a 3000 x 4000 mm bay has a 5000 mm diagonal (3-4-5 triangle).
    costs = CostCatalogue(brace=CostRate(10.0, 2.0, 1.0), tie=CostRate(4.0, 1.0), contingency_pct=10.0)
    m = Member(1, 1, MemberKind.BRACE, Diagonal.FALLING, existing=False)
    f = Frame("f", (3000,), (4000,), members=(m,))
    bom = build_bom(Project("p", (f,), costs=costs))
    assert bom.frames[0].lines[0].cut_length_mm == 5000.0
    assert bom.totals.cost == pytest.approx((10.0 + 1.0 + 2.0 * 5.0) * 1.1)


def test_csv_round_trip(project: Project) -> None:
    bom = build_bom(project)
    rows = list(csv.DictReader(io.StringIO(render_bom_csv(bom))))
    members = [r for r in rows if r["kind"] in {"brace", "tie"}]
    assert len(members) == bom.totals.members
    assert sum(float(r["cost"]) for r in members) == pytest.approx(bom.totals.cost, abs=0.01 * len(members))
    total = rows[-1]
    assert total["kind"] == "total"
    assert float(total["cut_length_mm"]) == pytest.approx(bom.totals.length_mm, abs=1.0)
    assert [r["frame"] for r in rows if r["kind"] == "subtotal"] == [f.name for f in project.frames]
    for r in members:
        assert r["resists"] == ("both" if r["kind"] == "brace" else
                                "clockwise" if r["diagonal"] == "rising" else "anticlockwise")  # fmt: skip


def test_resists_follows_the_theory() -> None:
    # THEORY: a rising tie gives row_i <= col_j (resists clockwise racking of the row), a falling tie the other.
    assert resists(Member(1, 1, MemberKind.TIE, Diagonal.RISING)) is Racking.CLOCKWISE
    assert resists(Member(1, 1, MemberKind.TIE, Diagonal.FALLING)) is Racking.ANTICLOCKWISE
    assert resists(Member(1, 1, MemberKind.BRACE, Diagonal.FALLING)) is Racking.BOTH
