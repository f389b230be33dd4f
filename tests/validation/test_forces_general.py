"""Member forces on general frames (missing grid bars, absent bays) against independent references.

* Hand statics: a two-bay, one-lift frame on a pinned base with the top ledger of bay 2 missing,
  a rising brace in each bay. It is statically determinate (three free nodes, six bars), so its
  forces follow from joint equilibrium alone (worked below, beside the test).
* Random rigid general frames: the product's forces satisfy equilibrium at every unsupported node
  of the bar framework written out here without ``bracegrid.mechanics`` (the frame's existing bars
  from tests/physics_general.py, true coordinates), the reactions balance the loads (forces and
  moment), and the forces agree with the force method (complementary energy minimised by cvxpy /
  Clarabel, tests/forcemethod.py) on that independent framework. Rigidity of each random frame is
  decided by the independent reference of tests/physics_general.py (numpy SVD, scipy linprog).
* A frame the exact check finds not rigid reports every case as a mechanism, with no numbers.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from bracegrid.errors import InputError
from bracegrid.mechanics import CaseOutcome, MechanismKind, analyse_frame
from bracegrid.model import (
    Diagonal,
    Edge,
    Frame,
    GridBar,
    GridBarKind,
    GridStrength,
    LoadCase,
    Member,
    MemberKind,
    MemberStrength,
    StrengthCatalogue,
    Supports,
)
from tests.forcemethod import ForceModel, complementary_energy_forces
from tests.physics_general import _segments, general_physically_rigid

B, T = MemberKind.BRACE, MemberKind.TIE
EA = {B: 9.0e4, T: 4.0e4}
GRID_EA = 3.0e5
STIFF = StrengthCatalogue(brace=MemberStrength(ea_kn=EA[B]), tie=MemberStrength(ea_kn=EA[T]),
                          grid=GridStrength(ea_kn=GRID_EA))  # fmt: skip
#: Equilibrium is promised to 1e-9 of the total load (docs/forces.md); agreement with the force
#: method to 1e-6 of the largest force (Clarabel to 1e-12 gaps), as for complete grids.
EQ_REL, REL = 1e-9, 1e-6


def _hand_frame() -> Frame:
    return Frame(
        "hand", (3000, 3000), (4000,), supports=Supports.BASE,
        missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 2)}),
        members=(Member(1, 1, B, Diagonal.RISING), Member(1, 2, B, Diagonal.RISING)),
        loads=(LoadCase("push", (0.0, 6.0)),),
    )  # fmt: skip


def test_hand_case_brace_forces_by_joint_equilibrium() -> None:
    # Loads: 6 kN on the top line over nodes (1,0), (1,1), (1,2); both spans count (their end
    # nodes exist; the missing ledger still borders its bay), so 1.5, 3.0, 1.5 kN.
    # Braces are 3 x 4 m: length 5 m, direction (0.6, 0.8).
    # A tension t pulls a node towards the bar's far end.
    # Node (1,2): standard q2 and brace r1c2 only. x: 1.5 - 0.6 T2 = 0 -> T2 = 2.5 kN;
    #   y: -0.8 T2 - S2 = 0 -> S2 = -2.0 kN (compression).
    # Node (1,0): ledger p1c1 and standard q0. x: 1.5 + L = 0 -> L = -1.5 kN; y: -S0 = 0 -> S0 = 0.
    # Node (1,1): x: 3.0 - L - 0.6 T1 = 0 -> T1 = 7.5 kN; y: -0.8 T1 - S1 = 0 -> S1 = -6.0 kN.
    # Reactions: sum of fx = -6, sum of fy = 0, moment about (0,0): 6 kN x 4 m balanced.
    result = analyse_frame(_hand_frame(), STIFF)
    (case,) = result.cases
    assert case.outcome is CaseOutcome.SOLVED
    got = {m.label: m.force_kn for m in case.members}
    assert "ledger p1 c2" not in got  # the missing ledger is no bar of the framework
    expected = {
        "brace r1c1:rising": 7.5, "brace r1c2:rising": 2.5, "ledger p1 c1": -1.5,
        "standard q0 r1": 0.0, "standard q1 r1": -6.0, "standard q2 r1": -2.0,
    }  # fmt: skip
    for label, value in expected.items():
        assert got[label] == pytest.approx(value, abs=1e-9)
    assert sum(r.fx_kn for r in case.reactions) == pytest.approx(-6.0, abs=1e-9)
    assert sum(r.fy_kn for r in case.reactions) == pytest.approx(0.0, abs=1e-9)
    moment = sum(r.fy_kn * (3.0 * r.q) for r in case.reactions)  # reactions at y = 0
    assert moment - 6.0 * 4.0 == pytest.approx(0.0, abs=1e-9)  # load 6 kN at y = 4 m turns clockwise


def test_hand_case_without_the_second_brace_is_a_mechanism_with_words() -> None:
    frame = dataclasses.replace(_hand_frame(), members=(Member(1, 1, B, Diagonal.RISING),))
    (case,) = analyse_frame(frame, STIFF).cases
    assert case.outcome is CaseOutcome.MECHANISM
    assert case.members == ()
    assert case.reactions == ()
    assert case.mechanism is not None
    assert case.mechanism.kind is MechanismKind.FREE_PART
    assert case.mechanism.words[0].startswith("the exact check finds a mechanism")
    assert "r1c2" in case.mechanism.words[0]  # the unbraced bay racks


# --------------------------------------------------------------------------- independent framework


def _loads(frame: Frame, case: LoadCase, nodes: set[tuple[int, int]]) -> np.ndarray:
    """Nodal loads written out again from the general tributary rule of docs/general-frames.md."""
    cols = frame.cols
    f = np.zeros(2 * (frame.rows + 1) * (cols + 1))
    for p, load in enumerate(case.horizontal_kn):
        if not load:
            continue
        spans = [w if (p, j - 1) in nodes and (p, j) in nodes else 0 for j, w in enumerate(frame.widths, 1)]
        share = np.array([(([0, *spans][q]) + ([*spans, 0][q])) / 2 for q in range(cols + 1)], dtype=float)
        if not share.any():  # no span with both ends: the line's lone node takes it all
            share = np.array([float((p, q) in nodes) for q in range(cols + 1)])
        f[[2 * (p * (cols + 1) + q) for q in range(cols + 1)]] += load * share / share.sum()
    for p, q, fx, fy in case.point_kn:
        f[2 * (p * (cols + 1) + q)] += fx
        f[2 * (p * (cols + 1) + q) + 1] += fy
    return f


def _model(frame: Frame) -> tuple[ForceModel, set[tuple[int, int]], np.ndarray]:
    segs = _segments(frame)
    nodes = {n for s in segs for n in s}
    cols = frame.cols
    xs = np.array(frame.x_lines(), dtype=float) / 1000.0
    ys = np.array(frame.y_lines(), dtype=float) / 1000.0

    def node(pq: tuple[int, int]) -> int:
        return pq[0] * (cols + 1) + pq[1]

    bars: list[tuple[tuple[str, int, int, int, str], tuple[int, int], tuple[int, int], float, bool]] = []
    for a, b in segs:
        if a[0] == b[0]:  # ledger on line p spanning column b[1]
            bars.append((("ledger", a[0], 0, b[1], ""), a, b, GRID_EA, False))
        else:
            bars.append((("standard", a[1], b[0], 0, ""), a, b, GRID_EA, False))
    for m in frame.members:
        ends = ((m.row - 1, m.col - 1), (m.row, m.col)) if m.diagonal is Diagonal.RISING else (
            (m.row, m.col - 1), (m.row - 1, m.col))  # fmt: skip
        bars.append(((m.kind.value, 0, m.row, m.col, m.diagonal.value), *ends, EA[m.kind], m.kind is T))
    n_dof = 2 * (frame.rows + 1) * (cols + 1)
    a_full = np.zeros((n_dof, len(bars)))
    lengths = np.zeros(len(bars))
    for k, (_, a, b, _, _) in enumerate(bars):
        d = np.array([xs[b[1]] - xs[a[1]], ys[b[0]] - ys[a[0]]])
        lengths[k] = float(np.hypot(*d))
        e = d / lengths[k]
        a_full[2 * node(a) : 2 * node(a) + 2, k] = e
        a_full[2 * node(b) : 2 * node(b) + 2, k] = -e
    fixed = np.ones(n_dof, dtype=bool)
    for p, q in nodes:
        base = frame.supports is Supports.BASE and p == 0
        fixed[2 * node((p, q))] = base or (Edge.BOTTOM in frame.held_edges and p == 0) or (
            Edge.TOP in frame.held_edges and p == frame.rows)  # fmt: skip
        fixed[2 * node((p, q)) + 1] = base or (Edge.LEFT in frame.held_edges and q == 0) or (
            Edge.RIGHT in frame.held_edges and q == cols)  # fmt: skip
    free = np.flatnonzero(~fixed)
    model = ForceModel(
        keys=[b[0] for b in bars], lengths=lengths, ea=np.array([b[3] for b in bars]),
        tie=np.array([b[4] for b in bars]), equilibrium=-a_full[free], free=free,
    )  # fmt: skip
    coords = np.array([[xs[q], ys[p]] for p in range(frame.rows + 1) for q in range(cols + 1)])
    return model, nodes, coords


def _random_rigid_general(rng: np.random.Generator) -> Frame | None:
    rows, cols = (int(v) for v in rng.integers(1, 4, 2))
    frame = Frame(
        "g",
        tuple(int(v) for v in rng.integers(10, 40, cols) * 100),
        tuple(int(v) for v in rng.integers(10, 30, rows) * 100),
        supports=Supports.BASE if rng.random() < 0.7 else Supports.FREE,
    )
    if frame.supports is Supports.FREE:
        frame = dataclasses.replace(frame, held_edges=frozenset({Edge.LEFT, Edge.RIGHT, Edge.BOTTOM}))
    bays = [(i, j) for i in range(1, rows + 1) for j in range(1, cols + 1)]
    absent = frozenset(b for b in bays if rng.random() < 0.2)
    if len(absent) == len(bays):
        return None
    grid = [GridBar(GridBarKind.LEDGER, p, j) for p in range(rows + 1) for j in range(1, cols + 1)]
    grid += [GridBar(GridBarKind.STANDARD, q, i) for q in range(cols + 1) for i in range(1, rows + 1)]
    missing = frozenset(g for g in grid if rng.random() < 0.12)
    frame = dataclasses.replace(frame, absent=absent, missing=missing)
    if frame.is_complete:
        return None
    try:
        nodes = {n for s in _segments(frame) for n in s}
    except ValueError:
        return None
    members = []
    for i, j in bays:
        if (i, j) in absent or any(c not in nodes for c in ((i - 1, j - 1), (i - 1, j), (i, j - 1), (i, j))):
            continue
        d = Diagonal.RISING if rng.random() < 0.5 else Diagonal.FALLING
        members.append(Member(i, j, B if rng.random() < 0.7 else T, d))
        if rng.random() < 0.5:
            other = Diagonal.FALLING if d is Diagonal.RISING else Diagonal.RISING
            members.append(Member(i, j, T, other))
    # keep only frames the independent reference calls rigid, and whose top line is loadable
    if not members or not general_physically_rigid(frame, members):
        return None
    top = max(p for p, _ in nodes)
    loose = sorted(n for n in nodes if n[0] > 0 or frame.supports is not Supports.BASE)
    points = tuple(
        (p, q, float(rng.uniform(-5, 5)), float(rng.uniform(-5, 5)))
        for p, q in (loose[int(k)] for k in rng.integers(0, len(loose), 3))
    ) if loose else ()  # fmt: skip
    horizontal = tuple(8.0 if p == top else 0.0 for p in range(frame.rows + 1))
    case = LoadCase("mixed", horizontal, point_kn=points)
    return dataclasses.replace(frame, members=tuple(members), loads=(case,))


def test_random_rigid_general_frames_balance_and_match_the_force_method() -> None:
    rng = np.random.default_rng(130)
    checked = 0
    while checked < 40:
        frame = _random_rigid_general(rng)
        if frame is None:
            continue
        model, nodes, coords = _model(frame)
        if np.linalg.matrix_rank(model.equilibrium) < len(model.free):
            continue  # the supports leave a rigid-body motion: not every load can be carried
        (case,) = analyse_frame(frame, STIFF).cases
        assert case.outcome is CaseOutcome.SOLVED, (frame, case.mechanism)
        loads = _loads(frame, frame.loads[0], nodes)
        index = {k: n for n, k in enumerate(model.keys)}
        assert sorted(m.key for m in case.members) == sorted(model.keys)  # exactly the bars that exist
        t = np.zeros(len(model.keys))
        for m in case.members:
            t[index[m.key]] = m.force_kn
        total = float(np.abs(loads).sum())
        # equilibrium at every unsupported degree of freedom of the independent framework
        assert np.abs(model.equilibrium @ t - loads[model.free]).max() <= EQ_REL * total + 1e-12
        # global equilibrium: reactions and loads, forces and moment about the origin
        fx = sum(r.fx_kn for r in case.reactions) + loads[0::2].sum()
        fy = sum(r.fy_kn for r in case.reactions) + loads[1::2].sum()
        cols = frame.cols + 1
        moment = sum(
            coords[r.p * cols + r.q, 0] * r.fy_kn - coords[r.p * cols + r.q, 1] * r.fx_kn for r in case.reactions
        ) + float(coords[:, 0] @ loads[1::2] - coords[:, 1] @ loads[0::2])
        assert abs(fx) <= EQ_REL * total
        assert abs(fy) <= EQ_REL * total
        assert abs(moment) <= EQ_REL * total * float(coords.max())
        assert all((r.p, r.q) in nodes for r in case.reactions)  # no reaction at a node that is not there
        reference = complementary_energy_forces(model, loads)
        assert reference is not None
        scale = max(float(np.abs(reference).max()), 1e-9)
        assert np.abs(t - reference).max() <= REL * scale, frame
        checked += 1


def test_point_load_outside_the_outline_is_an_input_error() -> None:
    frame = Frame(
        "l", (3000, 3000), (3000, 3000), supports=Supports.BASE, absent=frozenset({(2, 2)}),
        members=(Member(1, 1, B, Diagonal.RISING), Member(1, 2, B, Diagonal.RISING), Member(2, 1, B, Diagonal.RISING)),
        loads=(LoadCase("corner", (0.0, 0.0, 0.0), point_kn=((2, 2, 1.0, 0.0),)),),
    )  # fmt: skip
    with pytest.raises(InputError, match="p2q2"):
        analyse_frame(frame, STIFF)


def test_free_general_frame_solves_a_balanced_load_and_refuses_a_driving_one() -> None:
    # 6 nodes, 12 - 3 = 9 degrees of freedom beyond rigid-body motions, 9 bars (the X in bay 2
    # replaces the missing ledger): rigid with no support at all, so a self-balanced load is carried
    # (the bottom ledgers alone, 2 kN each) and a net push moves the whole frame along x.
    frame = Frame(
        "free", (3000, 3000), (4000,), missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 2)}),
        members=(Member(1, 1, B, Diagonal.RISING), Member(1, 2, B, Diagonal.RISING), Member(1, 2, B, Diagonal.FALLING)),
        loads=(
            LoadCase("pull apart", (0.0, 0.0), point_kn=((0, 0, -2.0, 0.0), (0, 2, 2.0, 0.0))),
            LoadCase("push", (0.0, 6.0)),
        ),
    )  # fmt: skip
    pull, push = analyse_frame(frame, STIFF).cases
    assert pull.outcome is CaseOutcome.SOLVED
    got = {m.label: m.force_kn for m in pull.members}
    assert got["ledger p0 c1"] == pytest.approx(2.0, abs=1e-9)
    assert got["ledger p0 c2"] == pytest.approx(2.0, abs=1e-9)
    assert all(abs(r.fx_kn) <= 1e-9 and abs(r.fy_kn) <= 1e-9 for r in pull.reactions)  # datums carry nothing
    assert push.outcome is CaseOutcome.MECHANISM
    assert push.mechanism is not None
    assert push.mechanism.slides == ("x",)
