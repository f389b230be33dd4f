"""The row/column digraph (src/bracegrid/analysis/digraph.py): numbering, arc rules, counts and searches.

References:
* the arc rules are the table of /work/shared/THEORY.md ("What a diagonal does"): a brace in bay
  (i, j) gives row_i -> col_j and col_j -> row_i, a rising tie row_i -> col_j only, a falling tie
  col_j -> row_i only; a pinned base joins a ground node both ways to every column;
* expected arcs of the small cases are written out by hand; the random cases are compared with a
  reference built in this file from that table with ``collections.Counter``;
* strong components and maximum flows are checked against networkx
  (``strongly_connected_components``, ``maximum_flow_value``), an independent implementation.
"""

from __future__ import annotations

import random
from collections import Counter

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings

from bracegrid.analysis.digraph import (
    bay_arc_counts,
    bay_arcs,
    bay_nodes,
    build_arcs,
    flow_cuts,
    frame_digraph,
    gives_down,
    gives_up,
    leaving_bays,
    member_arrays,
    member_bay_counts,
    node_count,
    node_name,
    node_sides,
    split_labels,
    split_nodes,
    strong_components,
)
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports
from tests.strategies import frames_with_layouts

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING


def _reference_arcs(frame: Frame, members: list[Member] | tuple[Member, ...]) -> Counter[tuple[int, int]]:
    """Arc multiplicities straight from the THEORY.md table (rows 0..R-1, columns R.., ground last)."""
    arcs: Counter[tuple[int, int]] = Counter()
    for m in members:
        row, col = m.row - 1, frame.rows + m.col - 1
        if m.kind is B or m.diagonal is R:
            arcs[row, col] += 1
        if m.kind is B or m.diagonal is F:
            arcs[col, row] += 1
    if frame.supports is Supports.BASE:
        ground = frame.rows + frame.cols
        for j in range(frame.cols):
            arcs[ground, frame.rows + j] += 2  # never lost: counted twice by design
            arcs[frame.rows + j, ground] += 2
    return arcs


def _as_counter(src: np.ndarray, dst: np.ndarray, mult: np.ndarray) -> Counter[tuple[int, int]]:
    out: Counter[tuple[int, int]] = Counter()
    for u, v, k in zip(src.tolist(), dst.tolist(), mult.tolist(), strict=True):
        out[u, v] += k
    return out


# --------------------------------------------------------------------------- numbering


def test_node_count() -> None:
    # Hand: R + C nodes, plus one ground node on a pinned base.
    assert node_count(Frame("f", (1000,) * 3, (1000,) * 2)) == 5
    assert node_count(Frame("f", (1000,) * 3, (1000,) * 2, supports=Supports.BASE)) == 6


def test_node_names() -> None:
    f = Frame("f", (1000,) * 3, (1000,) * 2, supports=Supports.BASE)
    names = [node_name(f, n) for n in range(node_count(f))]
    assert names == [("row", 1), ("row", 2), ("col", 1), ("col", 2), ("col", 3), ("ground", 0)]


def test_bay_nodes_and_splits() -> None:
    assert bay_nodes(4, 0, 2) == (0, 6)  # row 1 -> node 0; column 3 -> 4 + 3 - 1
    assert bay_nodes(2, 1, 0) == (1, 2)
    rows, cols = split_labels(2, np.array([5, 6, 7, 8]))
    assert rows.tolist() == [5, 6]
    assert cols.tolist() == [7, 8]
    # Nodes 0 (row 1), 3 (col 2), 5 (= R + C, the ground) -> the ground is left out.
    assert split_nodes(2, 3, [5, 3, 0]) == ((1,), (2,))
    assert split_nodes(2, 3, []) == ((), ())
    in_row, in_col = node_sides(2, 3, [1, 2, 4, 5])
    assert in_row.tolist() == [False, True]
    assert in_col.tolist() == [True, False, True]


# --------------------------------------------------------------------------- arc rules


@pytest.mark.parametrize(
    ("kind", "diagonal", "up", "down"),
    [(B, R, True, True), (B, F, True, True), (T, R, True, False), (T, F, False, True)],
)
def test_arc_rules(kind: MemberKind, diagonal: Diagonal, up: bool, down: bool) -> None:
    # THEORY.md table: brace both ways; rising tie row -> col ("up"); falling tie col -> row ("down").
    assert gives_up(kind, diagonal) is up
    assert gives_down(kind, diagonal) is down
    f = Frame("f", (1000, 1000), (1000, 1000))
    arcs = build_arcs(f, [Member(2, 1, kind, diagonal)])
    pairs = set(zip(arcs.src.tolist(), arcs.dst.tolist(), strict=True))
    # Bay (2, 1): row node 1, column node 2.
    assert pairs == ({(1, 2)} if up else set()) | ({(2, 1)} if down else set())
    assert arcs.braces == (1 if kind is B else 0)


def test_member_arrays() -> None:
    members = [Member(2, 3, B, F), Member(1, 1, T, R), Member(4, 2, T, F)]
    rows, cols, brace, rising = member_arrays(members)
    assert rows.tolist() == [2, 1, 4]
    assert cols.tolist() == [3, 1, 2]
    assert brace.tolist() == [True, False, False]
    assert rising.tolist() == [False, True, False]
    empty = member_arrays([])
    assert [len(a) for a in empty] == [0, 0, 0, 0]


def test_build_arcs_merges_members_with_multiplicities() -> None:
    # 2 x 3 free frame: nodes rows 0-1, columns 2-4.
    f = Frame("f", (1000,) * 3, (1000,) * 2)
    members = [
        Member(1, 1, B, R),  # 0 -> 2 and 2 -> 0
        Member(1, 1, B, F),  # again: 0 -> 2 and 2 -> 0
        Member(2, 3, T, R),  # 1 -> 4
        Member(2, 3, B, F),  # 1 -> 4 and 4 -> 1
        Member(1, 2, T, F),  # 3 -> 0
    ]
    arcs = build_arcs(f, members)
    assert arcs.nodes == 5
    got = _as_counter(arcs.src, arcs.dst, arcs.multiplicity)
    assert got == Counter({(0, 2): 2, (2, 0): 2, (1, 4): 2, (4, 1): 1, (3, 0): 1})
    assert arcs.braces == 3
    assert np.all(np.diff(arcs.keys) > 0)  # distinct and sorted
    # member_keys: column 0 the row -> col key, column 1 the col -> row key (key = tail * nodes + head).
    assert arcs.member_keys.tolist() == [[2, 10], [2, 10], [9, -1], [9, 21], [-1, 15]]


def test_pinned_base_adds_ground_arcs_both_ways() -> None:
    f = Frame("f", (1000,) * 3, (1000,) * 2, supports=Supports.BASE)
    arcs = build_arcs(f, [])
    ground = 5
    got = _as_counter(arcs.src, arcs.dst, arcs.multiplicity)
    # Hand: ground <-> columns 2, 3, 4, each counted twice (never lost); nothing touches the rows.
    assert got == Counter({(ground, c): 2 for c in (2, 3, 4)} | {(c, ground): 2 for c in (2, 3, 4)})
    with_tie = build_arcs(f, [Member(1, 2, T, R)])
    assert _as_counter(with_tie.src, with_tie.dst, with_tie.multiplicity) == got + Counter({(0, 3): 1})


def test_both_counting_paths_agree() -> None:
    # build_arcs counts keys with bincount on dense graphs and with np.unique on sparse ones; a 40 x 40
    # frame with a handful of members takes the sparse path (80^2 nodes^2 > 4 * keys + 1024).
    rng = random.Random(7)
    for rows, cols, count in ((2, 2, 6), (40, 40, 5), (40, 40, 300), (1, 60, 3)):
        f = Frame("f", (1000,) * cols, (1000,) * rows)
        members = [
            Member(rng.randint(1, rows), rng.randint(1, cols), rng.choice([B, T]), rng.choice([R, F]))
            for _ in range(count)
        ]
        arcs = build_arcs(f, members)
        assert _as_counter(arcs.src, arcs.dst, arcs.multiplicity) == _reference_arcs(f, members)


@settings(max_examples=80, deadline=None)
@given(frames_with_layouts(max_rows=5, max_cols=5))
def test_all_arc_routes_agree_on_random_layouts(frame: Frame) -> None:
    members = frame.members
    arcs = build_arcs(frame, members)
    expected = _reference_arcs(frame, members)
    assert _as_counter(arcs.src, arcs.dst, arcs.multiplicity) == expected
    member_only = Counter({k: v for k, v in expected.items() if frame.rows + frame.cols not in k})
    # Per-bay counts from the members ...
    up, down = member_bay_counts(members, frame.rows, frame.cols)
    assert _as_counter(*bay_arcs(up, down)) == member_only
    # ... and from per-bay counts of braces, rising ties and falling ties.
    braces = np.zeros((frame.rows, frame.cols), dtype=np.int64)
    rising = np.zeros_like(braces)
    falling = np.zeros_like(braces)
    for m in members:
        target = braces if m.kind is B else (rising if m.diagonal is R else falling)
        target[m.row - 1, m.col - 1] += 1
    up2, down2 = bay_arc_counts(braces, rising, falling)
    assert np.array_equal(up2, up)
    assert np.array_equal(down2, down)
    # The networkx view has the same distinct arcs, with readable names.
    g = frame_digraph(frame)
    assert set(g.edges()) == {(node_name(frame, u), node_name(frame, v)) for u, v in expected}


def test_bay_arcs_example() -> None:
    # Hand: up[0, 0] = 1 gives 0 -> 1 once; down[0, 0] = 2 gives 1 -> 0 twice (R = 1, so column 1 is node 1).
    src, dst, mult = bay_arcs(np.array([[1, 0]]), np.array([[2, 0]]))
    assert (src.tolist(), dst.tolist(), mult.tolist()) == ([0, 1], [1, 0], [1, 2])


@pytest.mark.parametrize("seed", range(20))
def test_leaving_bays_counts_the_arcs_leaving_a_set(seed: int) -> None:
    rng = random.Random(seed)
    rows, cols = rng.randint(1, 5), rng.randint(1, 5)
    f = Frame("f", (1000,) * cols, (1000,) * rows)
    members = [
        Member(i, j, rng.choice([B, T]), d)
        for i in range(1, rows + 1)
        for j in range(1, cols + 1)
        for d in (R, F)
        if rng.random() < 0.4
    ]
    s = frozenset(n for n in range(rows + cols) if rng.random() < 0.5)
    up_mask, down_mask = leaving_bays(rows, cols, s)
    for i in range(rows):
        for j in range(cols):
            assert up_mask[i, j] == (i in s and rows + j not in s)
            assert down_mask[i, j] == (rows + j in s and i not in s)
    up, down = member_bay_counts(members, rows, cols)
    leaving = sum(k for (u, v), k in _reference_arcs(f, members).items() if u in s and v not in s)
    assert int(up[up_mask].sum() + down[down_mask].sum()) == leaving


def _random_digraph(rng: random.Random, n: int, p: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    pairs = [(u, v) for u in range(n) for v in range(n) if u != v and rng.random() < p]
    src = np.array([u for u, _ in pairs], dtype=np.int64)
    dst = np.array([v for _, v in pairs], dtype=np.int64)
    cap = np.array([rng.randint(1, 4) for _ in pairs], dtype=np.int64)
    return src, dst, cap


@pytest.mark.parametrize("seed", range(30))
def test_strong_components_match_networkx(seed: int) -> None:
    rng = random.Random(seed)
    n = rng.randint(1, 12)
    src, dst, _ = _random_digraph(rng, n, rng.choice([0.05, 0.15, 0.3]))
    count, labels = strong_components(n, src, dst)
    g: nx.DiGraph = nx.DiGraph()
    g.add_nodes_from(range(n))
    g.add_edges_from(zip(src.tolist(), dst.tolist(), strict=True))
    reference = {frozenset(c) for c in nx.strongly_connected_components(g)}
    assert count == len(reference)
    ours = {frozenset(np.flatnonzero(labels == k).tolist()) for k in set(labels.tolist())}
    assert ours == reference


def test_strong_components_example() -> None:
    count, labels = strong_components(3, np.array([0, 1]), np.array([1, 0]))
    assert count == 2
    assert labels[0] == labels[1] != labels[2]


@pytest.mark.parametrize("seed", range(25))
def test_flow_cuts_match_networkx(seed: int) -> None:
    rng = random.Random(1000 + seed)
    n = rng.randint(2, 9)
    src, dst, cap = _random_digraph(rng, n, rng.choice([0.2, 0.4, 0.7]))
    g: nx.DiGraph = nx.DiGraph()
    g.add_nodes_from(range(n))
    for u, v, c in zip(src.tolist(), dst.tolist(), cap.tolist(), strict=True):
        g.add_edge(u, v, capacity=c)
    cuts = list(flow_cuts(n, src, dst, cap))
    # One forward flow (0 -> v) and one reverse flow (v -> 0) for every v = 1 .. n - 1, in that order.
    assert len(cuts) == 2 * (n - 1)
    arcs = list(zip(src.tolist(), dst.tolist(), cap.tolist(), strict=True))
    for k, cut in enumerate(cuts):
        v = k // 2 + 1
        assert cut.reverse == (k % 2 == 1)
        source, sink = (v, 0) if cut.reverse else (0, v)
        assert cut.value == nx.maximum_flow_value(g, source, sink)  # networkx: independent max-flow
        s = cut.leaving_set(n)
        assert source in s
        assert sink not in s
        # The set really has `value` capacity on the arcs leaving it (max-flow min-cut).
        assert sum(c for u, w, c in arcs if u in s and w not in s) == cut.value


def test_flow_cuts_are_lazy() -> None:
    src, dst, cap = np.array([0, 1]), np.array([1, 0]), np.array([1, 1])
    first = next(flow_cuts(2, src, dst, cap))
    assert (first.value, first.reverse) == (1, False)
