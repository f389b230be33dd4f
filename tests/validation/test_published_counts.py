"""Published counts of rigid bracings, checked by exhaustive enumeration.

References:
* E. D. Bolker and H. Crapo, "Bracing rectangular frameworks. I", SIAM J. Appl.
  Math. 36(3):473-490 (1979), doi:10.1137/0136036: a set of braces makes an
  R x C frame rigid iff it connects the bipartite row/column graph, so the
  minimum is R + C - 1 braces and the minimum layouts are spanning trees.
* W. Scoins, "The number of trees with nodes of alternate parity", Proc.
  Cambridge Philos. Soc. 58:12-16 (1962), doi:10.1017/S0305004100036173: the
  complete bipartite graph K(R, C) has R^(C-1) * C^(R-1) spanning trees.
* OEIS A227322, "Number of rigid bracings of an n x n grid" (connected spanning
  subgraphs of K(n, n)): 1, 5, 205, 36317 for n = 1..4.
* J. A. Baglivo and J. E. Graver, *Incidence and Symmetry in Design and
  Architecture*, Cambridge University Press (1983), ch. 10: tension-only ties
  brace the frame iff the row/column digraph is strongly connected; at least
  2 * max(R, C) ties are needed and that many suffice.
"""

from __future__ import annotations

import itertools
from collections.abc import Iterator

import networkx as nx
import pytest

from bracegrid.analysis import frame_digraph, is_stable
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports

B, T = MemberKind.BRACE, MemberKind.TIE


def _frame(rows: int, cols: int, supports: Supports = Supports.FREE) -> Frame:
    return Frame("enum", (2500,) * cols, (2000,) * rows, supports=supports)


def _bays(rows: int, cols: int) -> list[tuple[int, int]]:
    return [(i, j) for i in range(1, rows + 1) for j in range(1, cols + 1)]


@pytest.mark.parametrize(
    ("rows", "cols", "trees"),
    [(2, 2, 4), (2, 3, 12), (3, 3, 81), (2, 4, 32)],  # R^(C-1) * C^(R-1), Scoins 1962
)
def test_minimum_rigid_brace_layouts_are_spanning_trees(rows: int, cols: int, trees: int) -> None:
    f = _frame(rows, cols)
    bays = _bays(rows, cols)
    need = rows + cols - 1  # Bolker & Crapo 1979
    assert not any(
        is_stable(f, [Member(i, j, B, Diagonal.RISING) for i, j in combo])
        for combo in itertools.combinations(bays, need - 1)
    )
    rigid = sum(
        is_stable(f, [Member(i, j, B, Diagonal.RISING) for i, j in combo])
        for combo in itertools.combinations(bays, need)
    )
    assert rigid == trees


@pytest.mark.parametrize(("n", "count"), [(1, 1), (2, 5), (3, 205)])  # OEIS A227322
def test_rigid_brace_subsets_match_oeis_a227322(n: int, count: int) -> None:
    f = _frame(n, n)
    bays = _bays(n, n)
    rigid = 0
    for mask in range(1 << len(bays)):
        layout = [Member(i, j, B, Diagonal.RISING) for k, (i, j) in enumerate(bays) if mask >> k & 1]
        rigid += is_stable(f, layout)
    assert rigid == count


def test_rigid_brace_subsets_4x4_match_oeis_a227322() -> None:
    # 2^16 subsets (OEIS A227322: 36317), counted on the networkx form of the same
    # digraph for speed, with the array check compared on every 16th subset.
    f = _frame(4, 4)
    bays = _bays(4, 4)
    rigid = 0
    for mask in range(1 << 16):
        layout = [Member(i, j, B, Diagonal.RISING) for k, (i, j) in enumerate(bays) if mask >> k & 1]
        verdict = nx.is_strongly_connected(frame_digraph(f, layout))
        if mask % 16 == 0:
            assert is_stable(f, layout) == verdict
        rigid += verdict
    assert rigid == 36317


def _tie_layouts(rows: int, cols: int, count: int) -> Iterator[tuple[Member, ...]]:
    slots = [(i, j, d) for i, j in _bays(rows, cols) for d in Diagonal]
    for combo in itertools.combinations(slots, count):
        yield tuple(Member(i, j, T, d) for i, j, d in combo)


@pytest.mark.parametrize(("rows", "cols"), [(1, 1), (1, 2), (2, 2), (2, 3), (1, 3), (3, 2)])
def test_minimum_ties_is_twice_the_larger_side(rows: int, cols: int) -> None:
    f = _frame(rows, cols)
    need = 2 * max(rows, cols)  # Baglivo & Graver 1983
    assert not any(is_stable(f, lay) for lay in _tie_layouts(rows, cols, need - 1))
    assert any(is_stable(f, lay) for lay in _tie_layouts(rows, cols, need))


@pytest.mark.parametrize(("rows", "cols"), [(2, 2), (3, 2)])
def test_pinned_base_needs_r_braces_or_2r_ties(rows: int, cols: int) -> None:
    # THEORY: with every bottom node pinned, rows decouple: R braces or 2R ties.
    f = _frame(rows, cols, Supports.BASE)
    bays = _bays(rows, cols)
    braces = [tuple(Member(i, j, B, Diagonal.RISING) for i, j in c) for c in itertools.combinations(bays, rows)]
    assert any(is_stable(f, lay) for lay in braces)
    fewer = [tuple(Member(i, j, B, Diagonal.RISING) for i, j in c) for c in itertools.combinations(bays, rows - 1)]
    assert not any(is_stable(f, lay) for lay in fewer)
    assert not any(is_stable(f, lay) for lay in _tie_layouts(rows, cols, 2 * rows - 1))
    assert any(is_stable(f, lay) for lay in _tie_layouts(rows, cols, 2 * rows))
