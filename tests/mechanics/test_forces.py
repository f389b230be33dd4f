"""Properties of the member-force analysis that hold for every frame, layout and load.

Each is a law of statics or elasticity, checked on the numbers the product reports, with the
equilibrium equations written out independently in tests/forcemethod.py:

* equilibrium: the reported forces and reactions balance the loads at every node (residual below
  1e-9 of the load) and overall (forces and moment);
* Maxwell-Betti reciprocity on tie-free (linear) layouts (J. C. Maxwell, Phil. Mag. 27 (1864) 294;
  E. Betti, Il Nuovo Cimento 7 (1872) 5);
* positive homogeneity: doubling every load doubles every force (tie-free: linearity; with ties the
  potential scales too, so it holds there as well);
* tension-only: no tie is ever in compression, every slack tie shortens or keeps its length;
* a mechanism is reported, never solved.
"""

from __future__ import annotations

import dataclasses
import random

import numpy as np
import pytest

from bracegrid.errors import InputError
from bracegrid.mechanics import BarKind, CaseOutcome, MechanismKind, analyse_frame
from bracegrid.model import Diagonal, Edge, Frame, LoadCase, Member, MemberKind, StrengthCatalogue, Supports
from tests.forcemethod import force_model, line_loads
from tests.mechanics.cases import EA, GRID_EA, STIFF, random_frame

T, B = MemberKind.TIE, MemberKind.BRACE
R, F = Diagonal.RISING, Diagonal.FALLING


def _nodal(frame: Frame, case: LoadCase) -> np.ndarray:
    loads = line_loads(frame, case.horizontal_kn, case.vertical_kn)
    loads -= line_loads(frame, (), case.gravity_kn)
    for p, q, fx, fy in case.point_kn:
        n = p * (frame.cols + 1) + q
        loads[2 * n] += fx
        loads[2 * n + 1] += fy
    return loads


def _frames(seed: int, count: int, **kw: object) -> list[Frame]:
    rng = random.Random(seed)
    return [random_frame(rng, max_rows=6, max_cols=6, **kw) for _ in range(count)]  # type: ignore[arg-type]


@pytest.mark.parametrize("frame", _frames(1, 60), ids=lambda f: f"{f.rows}x{f.cols}")
def test_forces_balance_the_loads_at_every_node_and_overall(frame: Frame) -> None:
    case = analyse_frame(frame, STIFF).cases[0]
    if case.is_mechanism:
        assert case.members == ()
        assert case.reactions == ()
        return
    model = force_model(frame, frame.members, grid_ea=GRID_EA, ea=EA)
    loads = _nodal(frame, frame.loads[0])
    got = {m.key: m.force_kn for m in case.members}
    forces = np.array([got[k] for k in model.keys])
    total = float(np.abs(loads).sum())
    if len(model.free):
        assert np.abs(model.equilibrium @ forces - loads[model.free]).max() <= 1e-9 * total
    assert case.residual_kn <= 1e-9 * total
    # overall: reactions balance the loads, forces and moment about the origin
    xs, ys = frame.x_lines(), frame.y_lines()
    fx = sum(r.fx_kn for r in case.reactions) + loads[0::2].sum()
    fy = sum(r.fy_kn for r in case.reactions) + loads[1::2].sum()
    moment = sum(xs[r.q] * r.fy_kn - ys[r.p] * r.fx_kn for r in case.reactions)
    for p in range(frame.rows + 1):
        for q in range(frame.cols + 1):
            n = p * (frame.cols + 1) + q
            moment += xs[q] * loads[2 * n + 1] - ys[p] * loads[2 * n]
    assert abs(fx) <= 1e-9 * total
    assert abs(fy) <= 1e-9 * total
    assert abs(moment) <= 1e-9 * total * (frame.width_mm + frame.height_mm)


@pytest.mark.parametrize("frame", _frames(2, 60, kinds=(T,), density=0.6), ids=lambda f: f"{f.rows}x{f.cols}")
def test_no_tie_pushes_and_every_slack_tie_shortens(frame: Frame) -> None:
    case = analyse_frame(frame, STIFF).cases[0]
    if case.is_mechanism:
        return
    u = np.array(case.node_displacement_mm).reshape(-1, 2)
    xs, ys = frame.x_lines(), frame.y_lines()
    largest = float(np.abs(u).max()) or 1.0
    for m in case.members:
        if m.kind is not BarKind.TIE:
            continue
        assert m.force_kn >= 0.0
        i, j = m.row or 0, m.col or 0
        if m.diagonal is R:
            a, b = (i - 1) * (frame.cols + 1) + j - 1, i * (frame.cols + 1) + j
            e = np.array([xs[j] - xs[j - 1], ys[i] - ys[i - 1]], dtype=float)
        else:
            a, b = i * (frame.cols + 1) + j - 1, (i - 1) * (frame.cols + 1) + j
            e = np.array([xs[j] - xs[j - 1], ys[i - 1] - ys[i]], dtype=float)
        stretch = float((u[b] - u[a]) @ (e / np.linalg.norm(e)))
        if m.slack:
            assert stretch <= 1e-9 * largest
        else:
            assert stretch > 0.0


@pytest.mark.parametrize("seed", range(10))
def test_maxwell_betti_reciprocity_on_tie_free_layouts(seed: int) -> None:
    rng = random.Random(seed)
    frame = random_frame(rng, max_rows=5, max_cols=5, kinds=(B,), density=0.5, supports="base")
    a = (rng.randint(1, frame.rows), rng.randint(0, frame.cols), rng.randint(0, 1))
    b = (rng.randint(1, frame.rows), rng.randint(0, frame.cols), rng.randint(0, 1))

    def unit(at: tuple[int, int, int], name: str) -> LoadCase:
        p, q, axis = at
        return LoadCase(name, (0.0,) * (frame.rows + 1), point_kn=((p, q, float(axis == 0), float(axis == 1)),))

    frame = dataclasses.replace(frame, loads=(unit(a, "a"), unit(b, "b")))
    case_a, case_b = analyse_frame(frame, STIFF).cases
    if case_a.is_mechanism:
        assert case_b.is_mechanism or case_b.outcome is CaseOutcome.SOLVED
        return

    def dof(at: tuple[int, int, int]) -> int:
        p, q, axis = at
        return 2 * (p * (frame.cols + 1) + q) + axis

    u_ab = case_a.node_displacement_mm[dof(b)]  # at b, from the unit load at a
    u_ba = case_b.node_displacement_mm[dof(a)]
    assert u_ab == pytest.approx(u_ba, rel=1e-9, abs=1e-12 * max(abs(u_ab), abs(u_ba), 1e-30))


@pytest.mark.parametrize("kinds", [(B,), (T,), (B, T)], ids=["braces", "ties", "mixed"])
def test_doubling_every_load_doubles_every_force(kinds: tuple[MemberKind, ...]) -> None:
    for frame in _frames(3, 15, kinds=kinds):
        case = frame.loads[0]
        double = LoadCase(
            "double",
            tuple(2 * v for v in case.horizontal_kn),
            tuple(2 * v for v in case.vertical_kn),
            point_kn=tuple((p, q, 2 * x, 2 * y) for p, q, x, y in case.point_kn),
        )
        one, two = analyse_frame(dataclasses.replace(frame, loads=(case, double)), STIFF).cases
        assert one.outcome is two.outcome
        if one.is_mechanism:
            continue
        scale = max(abs(m.force_kn) for m in one.members) or 1.0
        for m1, m2 in zip(one.members, two.members, strict=True):
            assert m2.force_kn == pytest.approx(2 * m1.force_kn, abs=1e-9 * scale)


def test_a_mechanism_is_reported_never_solved() -> None:
    # One rising tie per lift: the load to the right is held (the ties stretch), to the left it
    # racks the frame the way no member resists.
    frame = Frame(
        "one sense",
        (2000, 2000),
        (2000, 2000),
        supports=Supports.BASE,
        members=(Member(1, 1, T, R), Member(2, 2, T, R)),
        loads=(LoadCase("w", (0.0, 1.0, 1.0), reverse=True),),
    )
    plus, minus = analyse_frame(frame, STIFF).cases
    assert plus.outcome is CaseOutcome.SOLVED
    assert plus.ok
    assert minus.is_mechanism
    assert minus.members == ()
    assert minus.mechanism is not None
    assert minus.mechanism.kind is MechanismKind.DRIVEN
    assert {i for i, _ in minus.mechanism.rows} == {1, 2}
    assert "anticlockwise (tops sway left)" in minus.mechanism.words[0]


def test_a_part_held_by_no_member_is_a_mechanism_whatever_the_load() -> None:
    # Row 2 has no diagonal: it racks freely both ways, even under a load that gives it no shear.
    frame = Frame(
        "bare lift",
        (2000,),
        (2000, 2000),
        supports=Supports.BASE,
        members=(Member(1, 1, B, R),),
        loads=(LoadCase("low", (0.0, 1.0, 0.0)),),
    )
    case = analyse_frame(frame, STIFF).cases[0]
    assert case.is_mechanism
    assert case.mechanism is not None
    assert case.mechanism.kind is MechanismKind.FREE_PART
    assert case.mechanism.rows == ((2, case.mechanism.rows[0][1]),)


def test_held_side_edges_carry_loads_along_them_and_report_a_slide_across() -> None:
    # A plan grid held on its two side edges only (walls along y): loads along y span between them
    # (the free slide along x is not driven, and is pinned at a datum); loads along x slide it.
    braces = tuple(Member(i, j, B, R) for i in (1, 2) for j in (1, 2, 3))
    grid = Frame(
        "plan",
        (4000, 4000, 4000),
        (5000, 5000),
        held_edges=frozenset({Edge.LEFT, Edge.RIGHT}),
        members=braces,
        loads=(
            LoadCase("along y", (0.0,) * 3, point_kn=((2, 1, 0.0, -6.0), (2, 2, 0.0, -6.0))),
            LoadCase("along x", (0.0, 0.0, 3.0)),
        ),
    )
    along_y, along_x = analyse_frame(grid, STIFF).cases
    assert along_y.outcome is CaseOutcome.SOLVED
    assert sum(r.fy_kn for r in along_y.reactions) == pytest.approx(12.0, rel=1e-9)
    assert along_x.is_mechanism
    assert along_x.mechanism is not None
    assert along_x.mechanism.slides == ("x",)


def test_missing_stiffness_is_an_error_naming_the_field() -> None:
    frame = Frame(
        "f", (2000,), (2000,), supports=Supports.BASE, members=(Member(1, 1, T, R),), loads=(LoadCase("w", (0.0, 1.0)),)
    )
    with pytest.raises(InputError, match=r"\[costs.tie\].ea_kn"):
        analyse_frame(frame, dataclasses.replace(STIFF, tie=dataclasses.replace(STIFF.tie, ea_kn=None)))
    with pytest.raises(InputError, match="no load case 'gust'"):
        analyse_frame(frame, STIFF, cases=["gust"])


def test_capacities_give_utilisation_and_a_missing_one_gives_none() -> None:
    frame = Frame(
        "bay",
        (3000,),
        (4000,),
        supports=Supports.BASE,
        members=(Member(1, 1, T, R), Member(1, 1, T, F)),
        loads=(LoadCase("push", (0.0, 6.0)),),
    )
    strength = dataclasses.replace(STIFF, tie=dataclasses.replace(STIFF.tie, tension_kn=8.0))
    case = analyse_frame(frame, strength).cases[0]
    tie = next(m for m in case.members if m.kind is BarKind.TIE and m.diagonal is R)
    assert tie.force_kn == pytest.approx(10.0, rel=1e-9)
    assert tie.utilisation == pytest.approx(1.25, rel=1e-9)
    assert tie.over
    assert not case.ok
    assert all(m.utilisation is None for m in case.members if m.kind.is_grid)
    assert analyse_frame(frame, StrengthCatalogue(tie=strength.tie, grid=STIFF.grid)).cases[0].max_utilisation == 1.25
