"""The batched searches of analysis/digraph.py against one-at-a-time scipy strong components.

References: a digraph is strongly connected iff it has one strong component (scipy's
``connected_components(connection="strong")``, Pearce's algorithm, is the independent reference);
the bottleneck definition is checked by sweeping every threshold; what one added member locks is
checked by adding it and recounting the racking modes.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from bracegrid.analysis import count_racking_modes
from bracegrid.analysis.additions import candidate_additions
from bracegrid.analysis.digraph import (
    arc_members,
    arc_strong_components,
    batch_strongly_connected,
    build_arcs,
    components_merged,
    node_cut_bound,
    strong_bottleneck,
)
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports
from tests.strategies import frames_with_layouts


def _one_by_one(arcs: object, present: np.ndarray) -> list[bool]:
    return [arc_strong_components(arcs, present[:, v])[0] == 1 for v in range(present.shape[1])]  # type: ignore[arg-type]


def _dense(rows: int, cols: int, seed: int, density: float = 0.6) -> Frame:
    rng = np.random.default_rng(seed)
    members = []
    for i in range(1, rows + 1):
        for j in range(1, cols + 1):
            for d in Diagonal:
                if rng.random() < density:
                    kind = MemberKind.BRACE if rng.random() < 0.3 else MemberKind.TIE
                    members.append(Member(i, j, kind, d))
    return Frame("dense", (2500,) * cols, (2000,) * rows, members=tuple(members))


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(frame=frames_with_layouts(max_rows=5, max_cols=5), seed=st.integers(0, 2**31))
def test_batch_check_agrees_with_strong_components(frame: Frame, seed: int) -> None:
    arcs = build_arcs(frame, frame.members)
    rng = np.random.default_rng(seed)
    present = rng.random((len(arcs.src), 40)) < rng.choice([0.3, 0.7, 0.95])
    present[:, 0] = True  # the whole layout as one variant
    assert batch_strongly_connected(arcs, present).tolist() == _one_by_one(arcs, present)


@pytest.mark.parametrize(("rows", "cols"), [(30, 40), (70, 3)])
def test_batch_check_with_more_than_64_nodes(rows: int, cols: int) -> None:
    # Two or more 64-bit words per bitset.
    frame = _dense(rows, cols, seed=rows, density=0.9)
    arcs = build_arcs(frame, frame.members)
    assert arcs.nodes > 64
    rng = np.random.default_rng(1)
    present = rng.random((len(arcs.src), 30)) < np.linspace(0.02, 1.0, 30)[None, :]
    got = batch_strongly_connected(arcs, present).tolist()
    assert got == _one_by_one(arcs, present)
    assert any(got)
    assert not all(got)


def _bottleneck_by_sweep(arcs: object, weight: np.ndarray) -> float:
    """Largest t with the arcs of weight >= t strongly connected, by trying every weight."""
    for t in sorted(set(weight.tolist()), reverse=True):
        if arc_strong_components(arcs, weight >= t)[0] == 1:  # type: ignore[arg-type]
            return float(t)
    return -np.inf


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(frame=frames_with_layouts(max_rows=4, max_cols=4), seed=st.integers(0, 2**31))
def test_bottleneck_equals_a_sweep_over_thresholds(frame: Frame, seed: int) -> None:
    arcs = build_arcs(frame, frame.members)
    rng = np.random.default_rng(seed)
    weight = rng.random((len(arcs.src), 12))
    weight[arcs.multiplicity > 1, :] = np.where(rng.random((int((arcs.multiplicity > 1).sum()), 12)) < 0.5, np.inf, 0.3)
    got = strong_bottleneck(arcs, weight)
    want = [_bottleneck_by_sweep(arcs, weight[:, v]) for v in range(weight.shape[1])]
    assert got.tolist() == want
    assert np.all(got <= node_cut_bound(arcs, weight))


def test_bottleneck_when_the_single_node_bound_is_not_tight() -> None:
    # Two 2x2 blocks of X ties joined through one bay only: cutting that bay's two arcs splits the
    # frame while every node still has arcs both ways, so the Bellman-Ford pass has to run.
    t = MemberKind.TIE
    block = [Member(i, j, t, d) for i in (1, 2) for j in (1, 2) for d in Diagonal]
    block += [Member(i, j, t, d) for i in (3, 4) for j in (3, 4) for d in Diagonal]
    joints = [Member(2, 3, MemberKind.BRACE, Diagonal.RISING)]
    frame = Frame("two blocks", (3000,) * 4, (2000,) * 4)
    layout = block + joints
    arcs = build_arcs(frame, layout)
    table = arc_members(arcs)
    weight = np.ones((len(arcs.src), 3))
    joint_arcs = (table == len(layout) - 1).any(axis=1)
    weight[joint_arcs, 0] = 0.1  # the joint goes first: the split is not at a single node
    weight[~joint_arcs, 1] = 0.2
    got = strong_bottleneck(arcs, weight)
    assert node_cut_bound(arcs, weight)[0] == 1.0
    assert got.tolist() == [_bottleneck_by_sweep(arcs, weight[:, v]) for v in range(3)] == [0.1, 0.2, 1.0]


def test_arc_members_lists_every_member_behind_each_arc() -> None:
    frame = _dense(4, 5, seed=3)
    arcs = build_arcs(frame, frame.members)
    table = arc_members(arcs)
    for a in range(len(arcs.src)):
        want = sorted(m for m in range(len(frame.members)) if arcs.keys[a] in arcs.member_keys[m].tolist())
        assert sorted(x for x in table[a].tolist() if x >= 0) == want


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(frame=frames_with_layouts(max_rows=4, max_cols=5))
def test_components_merged_equals_adding_and_recounting(frame: Frame) -> None:
    before = count_racking_modes(frame, frame.members)
    candidates = candidate_additions(frame)
    got = components_merged(frame, frame.members, candidates).tolist()
    want = [before - count_racking_modes(frame, (*frame.members, c)) for c in candidates]
    assert got == want


def test_components_merged_on_a_pinned_base() -> None:
    # Rows of a pinned base lock to the ground: one brace per row locks exactly that row.
    frame = Frame("base", (3000,) * 3, (2000,) * 3, supports=Supports.BASE)
    candidates = candidate_additions(frame)
    merged = components_merged(frame, (), candidates)
    assert set(merged[[c.kind is MemberKind.BRACE for c in candidates]].tolist()) == {1}
    assert set(merged[[c.kind is MemberKind.TIE for c in candidates]].tolist()) == {0}
