"""Member forces against hand statics.

References: equilibrium of joints and the method of sections for pin-jointed frames, as in any
structural analysis text (e.g. R. C. Hibbeler, *Structural Analysis*, Pearson, ch. 3, "Analysis of
statically determinate trusses"). Where a layout is statically determinate the forces follow from
equilibrium alone, whatever the stiffness, so the product (a stiffness method) must match them to
1e-9 relative; tests/forcemethod.py writes the equilibrium equations out independently and
:func:`statics_forces` solves them as a square dense system.
"""

from __future__ import annotations

import dataclasses
import math
import random

import numpy as np
import pytest

from bracegrid.mechanics import BarKind, analyse_frame
from bracegrid.model import (
    Diagonal,
    Frame,
    GridStrength,
    LoadCase,
    Member,
    MemberKind,
    MemberStrength,
    StrengthCatalogue,
    Supports,
)
from tests.forcemethod import force_model, line_loads, statics_forces
from tests.mechanics.cases import EA, GRID_EA, STIFF

T, B = MemberKind.TIE, MemberKind.BRACE
R, F = Diagonal.RISING, Diagonal.FALLING
REL = 1e-9


def _diagonals(case, kind: BarKind) -> dict[tuple[int, int, str], float]:  # type: ignore[no-untyped-def]
    return {(m.row, m.col, m.diagonal.value): m.force_kn for m in case.members if m.kind is kind}


@pytest.mark.parametrize(("width", "height", "push"), [(3000, 4000, 6.0), (1300, 2000, 2.5), (2500, 2000, 1.0)])
def test_one_bay_pushed_at_the_top(width: int, height: int, push: float) -> None:
    # Pinned base, one bay, an X of ties, push V to the right along the top: the rising tie carries
    # V L / w (its horizontal component balances V), the falling tie is slack. Determinate once
    # the falling tie is slack: 4 free dofs, 4 bars (top ledger, two standards, the taut tie).
    frame = Frame(
        "bay",
        (width,),
        (height,),
        supports=Supports.BASE,
        members=(Member(1, 1, T, R), Member(1, 1, T, F)),
        loads=(LoadCase("push", (0.0, push), reverse=True),),
    )
    plus, minus = analyse_frame(frame, STIFF).cases
    length = math.hypot(width, height)
    assert _diagonals(plus, BarKind.TIE)[(1, 1, "rising")] == pytest.approx(push * length / width, rel=REL)
    assert _diagonals(plus, BarKind.TIE)[(1, 1, "falling")] == 0.0
    assert _diagonals(minus, BarKind.TIE)[(1, 1, "falling")] == pytest.approx(push * length / width, rel=REL)
    assert _diagonals(minus, BarKind.TIE)[(1, 1, "rising")] == 0.0


@pytest.mark.parametrize("bay", [1, 2, 3, 4])
def test_one_x_of_ties_carries_the_shear_whatever_its_bay(bay: int) -> None:
    # One lift on a pinned base with unequal bays and one X of ties in bay j: the taut tie carries
    # V / cos(theta) = V L / w_j, wherever the X sits (the ledgers bring the shear to it).
    widths = (3000, 1800, 2500, 1300)
    frame = Frame(
        "lift",
        widths,
        (2000,),
        supports=Supports.BASE,
        members=(Member(1, bay, T, R), Member(1, bay, T, F)),
        loads=(LoadCase("w", (0.0, 4.0)),),
    )
    case = analyse_frame(frame, STIFF).cases[0]
    theta = math.atan2(2000, widths[bay - 1])
    assert _diagonals(case, BarKind.TIE)[(1, bay, "rising")] == pytest.approx(4.0 / math.cos(theta), rel=REL)


def test_standards_of_the_braced_bay_carry_the_overturning() -> None:
    # Four lifts, one braced bay (X of ties in column 2 of 3), loads on every line to the right.
    # Cutting row i just above its bottom line and taking moments about the bottom-left node of the
    # braced bay (the taut rising tie and the left standard pass through it): the right standard
    # carries N = -M_i / w (compression), M_i = sum_{p >= i} H_p (y_p - y_{i-1}); every standard
    # outside the braced bay carries nothing (no vertical load reaches it).
    heights, widths = (2000, 2000, 1500, 2500), (2500, 1800, 2500)
    loads = (0.0, 1.2, 0.8, 1.5, 0.6)
    members = tuple(Member(i, 2, T, d) for i in range(1, 5) for d in Diagonal)
    frame = Frame("tower", widths, heights, supports=Supports.BASE, members=members, loads=(LoadCase("w", loads),))
    case = analyse_frame(frame, STIFF).cases[0]
    ys = frame.y_lines()
    standards = {(m.line, m.row): m.force_kn for m in case.members if m.kind is BarKind.STANDARD}
    for i in range(1, 5):
        moment = sum(loads[p] * (ys[p] - ys[i - 1]) for p in range(i, 5))
        assert standards[(2, i)] == pytest.approx(-moment / widths[1], rel=REL)
        shear = sum(loads[i:])
        assert standards[(1, i)] == pytest.approx(moment / widths[1] - shear * heights[i - 1] / widths[1], rel=REL)
        assert abs(standards[(0, i)]) < 1e-9
        assert abs(standards[(3, i)]) < 1e-9


def test_base_reactions_take_the_overturning_as_uplift() -> None:
    # Same idea at the base: the braced bay's left base node is pulled up (uplift) by M_1 / w less
    # the tie's pull; the two base reactions of the bay are equal and opposite with no vertical load.
    frame = Frame(
        "tower",
        (2000,),
        (2000, 2000),
        supports=Supports.BASE,
        members=tuple(Member(i, 1, T, d) for i in (1, 2) for d in Diagonal),
        loads=(LoadCase("w", (0.0, 1.0, 1.0)),),
    )
    case = analyse_frame(frame, dataclasses.replace(STIFF, grid=GridStrength(ea_kn=GRID_EA, uplift_kn=1.0))).cases[0]
    left, right = sorted(case.reactions, key=lambda r: r.q)
    moment = 1.0 * 2000 + 1.0 * 4000
    assert right.fy_kn == pytest.approx(moment / 2000, rel=REL)
    assert left.fy_kn == pytest.approx(-moment / 2000, rel=REL)
    assert left.uplift_kn == pytest.approx(3.0, rel=REL)
    assert left.uplift_over
    assert left.fx_kn + right.fx_kn == pytest.approx(-2.0, rel=REL)


def _spanning_tree_layout(rng: random.Random, rows: int, cols: int) -> tuple[Member, ...]:
    """One brace per row (pinned base): the row/column/ground digraph then is a spanning tree."""
    return tuple(Member(i, rng.randint(1, cols), B, rng.choice(list(Diagonal))) for i in range(1, rows + 1))


@pytest.mark.parametrize("seed", range(12))
def test_determinate_layout_matches_statics_alone(seed: int) -> None:
    rng = random.Random(seed)
    rows, cols = rng.randint(1, 6), rng.randint(1, 6)
    widths = tuple(rng.choice([1300, 1800, 2500, 3000]) for _ in range(cols))
    heights = tuple(rng.choice([1500, 2000, 2700]) for _ in range(rows))
    horizontal = (0.0, *(rng.uniform(-3, 3) for _ in range(rows)))
    gravity = tuple(rng.uniform(0, 5) for _ in range(cols + 1))
    members = _spanning_tree_layout(rng, rows, cols)
    frame = Frame(
        "tree",
        widths,
        heights,
        supports=Supports.BASE,
        members=members,
        loads=(LoadCase("w", horizontal, gravity_kn=gravity),),
    )
    # stiffness values far apart on purpose: a determinate layout's forces must not depend on them
    strength = StrengthCatalogue(
        brace=MemberStrength(ea_kn=rng.uniform(1e3, 1e5)),
        tie=MemberStrength(ea_kn=1e4),
        grid=GridStrength(ea_kn=rng.uniform(1e4, 1e6)),
    )
    case = analyse_frame(frame, strength).cases[0]
    model = force_model(frame, members, grid_ea=GRID_EA, ea=EA)
    loads = line_loads(frame, horizontal) - line_loads(frame, (), gravity)  # weight acts downwards
    # the ledgers of the base line join two pinned nodes: no elongation, no force
    base_ledgers = [k for k, key in enumerate(model.keys) if key[0] == "ledger" and key[1] == 0]
    expected = statics_forces(model, loads, drop=base_ledgers)
    got = {m.key: m.force_kn for m in case.members}
    mine = np.array([got[k] for k in model.keys])
    scale = float(np.abs(expected).max())
    assert np.abs(mine - expected).max() <= REL * scale


def test_sign_convention_push_right_rising_diagonal_in_tension() -> None:
    # Pinned base, one bay, push the top to the right: the rising diagonal lengthens (tension),
    # the falling one shortens (a brace in compression, a tie slack). A global sign flip of every
    # arc leaves strong connectivity unchanged, so only a force test can pin this down.
    push = (LoadCase("right", (0.0, 5.0)),)
    rising = analyse_frame(
        Frame("b", (2000,), (2000,), supports=Supports.BASE, members=(Member(1, 1, B, R),), loads=push), STIFF
    ).cases[0]
    falling = analyse_frame(
        Frame("b", (2000,), (2000,), supports=Supports.BASE, members=(Member(1, 1, B, F),), loads=push), STIFF
    ).cases[0]
    assert _diagonals(rising, BarKind.BRACE)[(1, 1, "rising")] == pytest.approx(5.0 * math.sqrt(2), rel=REL)
    assert _diagonals(falling, BarKind.BRACE)[(1, 1, "falling")] == pytest.approx(-5.0 * math.sqrt(2), rel=REL)
    assert rising.sway_mm[1] > 0
    assert rising.drift[0] > 0
