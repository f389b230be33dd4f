"""The CP-SAT cut model, its separation and the cut loop (optimize/cutmodel.py, separation.py, cutloop.py).

References:
* a layout survives the loss of any k members iff every node set S has at least k + 1 member
  arcs leaving it (THEORY.md, "Redundancy"; Menger / Edmonds); the arcs leaving a set are counted
  in this file straight from the members with THEORY.md's arc table, not with the module's masks;
* THEORY.md's 2 x 2 example: three ties in a chain leave the frame floppy, a fourth closing the
  directed 4-cycle makes it rigid;
* the optimum of the cut loop is compared with exhaustive enumeration
  (tests/validation/test_exhaustive_optimize.py: exhaustive_minimum, an independent branch and
  bound with its own bitmask strong-connectivity test);
* stability and redundancy of results with bracegrid.analysis (is_stable, redundancy_of).
CP-SAT runs with one worker, a fixed seed and a time limit.
"""

from __future__ import annotations

import random
import time

import pytest

from bracegrid.analysis import is_stable, redundancy_of
from bracegrid.model import CostCatalogue, Diagonal, Frame, Member, MemberKind
from bracegrid.optimize.bays import Additions, AdditionsBuilder, BayTable, bay_table
from bracegrid.optimize.cutloop import LoopReport, solve_with_cuts
from bracegrid.optimize.cutmodel import CutModel, ProbeOutcome
from bracegrid.optimize.separation import cut_short, is_strong, meets, violated_cuts
from bracegrid.optimize.warmstart import constructive
from tests.validation.test_exhaustive_optimize import exhaustive_minimum

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING
BOTH = frozenset(MemberKind)


def _additions(table: BayTable, members: list[Member]) -> Additions:
    add = AdditionsBuilder.empty(table.rows, table.cols)
    for m in members:
        i, j = m.row - 1, m.col - 1
        if m.kind is B:
            add.braces[i, j] += 1
        elif m.diagonal is R:
            add.rising[i, j] += 1
        else:
            add.falling[i, j] += 1
    return add.build()


def _leaving(rows: int, members: list[Member], s: frozenset[int]) -> int:
    """Member arcs leaving S, by THEORY.md's table (row i -> node i - 1, column j -> node R + j - 1)."""
    count = 0
    for m in members:
        row, col = m.row - 1, rows + m.col - 1
        if (m.kind is B or m.diagonal is R) and row in s and col not in s:
            count += 1
        if (m.kind is B or m.diagonal is F) and col in s and row not in s:
            count += 1
    return count


CHAIN = [Member(1, 1, T, R), Member(1, 2, T, F), Member(2, 2, T, R)]  # THEORY.md's floppy 2 x 2
CYCLE = [*CHAIN, Member(2, 1, T, F)]  # ... closed into row1 -> col1 -> row2 -> col2 -> row1


def _table(rows: int, cols: int, allow: frozenset[MemberKind] = BOTH) -> BayTable:
    return bay_table(Frame("f", (3000,) * cols, (2000,) * rows), CostCatalogue(), (), allow)


def test_violated_cuts_of_a_floppy_layout_have_no_leaving_arc() -> None:
    table = _table(2, 2)
    add = _additions(table, CHAIN)
    assert not is_strong(table, add)
    cuts = violated_cuts(table, add, 0)
    assert cuts
    for s in cuts:
        assert 0 < len(s) < 4
        assert _leaving(2, CHAIN, s) == 0
    assert len(set(cuts)) == len(cuts)


def test_violated_cuts_of_a_stable_layout_are_empty() -> None:
    table = _table(2, 2)
    add = _additions(table, CYCLE)
    assert is_strong(table, add)
    assert violated_cuts(table, add, 0) == []


@pytest.mark.parametrize("seed", range(15))
def test_violated_cuts_for_k0_on_random_layouts(seed: int) -> None:
    rng = random.Random(seed)
    rows, cols = rng.randint(1, 4), rng.randint(1, 4)
    table = _table(rows, cols)
    members = [
        Member(i, j, rng.choice([B, T]), d)
        for i in range(1, rows + 1)
        for j in range(1, cols + 1)
        for d in (R, F)
        if rng.random() < 0.3
    ]
    cuts = violated_cuts(table, _additions(table, members), 0)
    frame = Frame("f", (3000,) * cols, (2000,) * rows)
    assert (cuts == []) == is_stable(frame, members)
    for s in cuts:
        assert 0 < len(s) < rows + cols
        assert _leaving(rows, members, s) == 0


def test_violated_cuts_for_k1() -> None:
    # A spanning tree of braces is stable but every brace is a bridge: each returned set has fewer than
    # two member arcs leaving it.
    table = _table(2, 3, frozenset({B}))
    tree = [Member(1, 1, B, R), Member(1, 2, B, R), Member(1, 3, B, R), Member(2, 1, B, R)]
    cuts = violated_cuts(table, _additions(table, tree), 1)
    assert cuts
    for s in cuts:
        assert 0 < len(s) < 5
        assert _leaving(2, tree, s) < 2
    # Hand: a 1 x 1 frame with a brace on each diagonal has two arcs each way: nothing violated for k = 1.
    one = _table(1, 1)
    double = [Member(1, 1, B, R), Member(1, 1, B, F)]
    assert violated_cuts(one, _additions(one, double), 1) == []
    assert violated_cuts(one, _additions(one, double[:1]), 1) != []


@pytest.mark.parametrize("seed", range(15))
def test_meets_and_cut_short_agree_with_counting(seed: int) -> None:
    rng = random.Random(50 + seed)
    rows, cols = rng.randint(1, 3), rng.randint(1, 3)
    table = _table(rows, cols)
    members = [
        Member(i, j, rng.choice([B, T]), d)
        for i in range(1, rows + 1)
        for j in range(1, cols + 1)
        for d in (R, F)
        if rng.random() < 0.6
    ]
    add = _additions(table, members)
    frame = Frame("f", (3000,) * cols, (2000,) * rows)
    for k in (0, 1, 2):
        assert meets(table, add, k) == (redundancy_of(frame, members) >= k)
        for s in violated_cuts(table, add, k):
            assert _leaving(rows, members, s) < k + 1
            assert cut_short(table, add, s, k)
    s = frozenset(n for n in range(rows + cols) if rng.random() < 0.5)
    for k in (0, 1):
        assert cut_short(table, add, s, k) == (_leaving(rows, members, s) < k + 1)


def test_add_cut() -> None:
    table = _table(2, 2)
    cm = CutModel(table, k=0, row_sizes=(2000, 2000), col_sizes=(3000, 3000))
    # The model starts with every single node and every complement of one.
    assert frozenset({0}) in cm.cuts
    assert frozenset({1, 2, 3}) in cm.cuts
    assert cm.add_cut(frozenset({0})) is False  # already there
    assert cm.add_cut(frozenset({0, 2})) is True  # new
    assert cm.add_cut(frozenset({0, 2})) is False  # duplicate
    assert cm.add_cut(frozenset()) is False  # the empty set is no cut
    assert cm.add_cut(frozenset(range(4))) is False  # nor is the whole node set
    assert frozenset({0, 2}) in cm.cuts


def test_probe_outcomes() -> None:
    assert [o.value for o in ProbeOutcome] == ["found", "none", "unknown"]


def _frame_3x3() -> Frame:
    return Frame("f", (3000, 2000, 2500), (2000, 1500, 3000))


@pytest.mark.parametrize("with_incumbent", [True, False])
def test_solve_with_cuts_proves_the_exhaustive_minimum(with_incumbent: bool) -> None:
    frame = _frame_3x3()
    table = bay_table(frame, CostCatalogue(), (), BOTH)
    steps: list[LoopReport] = []
    result = solve_with_cuts(
        table,
        k=0,
        row_sizes=frame.heights,
        col_sizes=frame.widths,
        incumbent=constructive(table) if with_incumbent else None,
        improve=lambda a: constructive(table, a),
        deadline=time.monotonic() + 20,
        workers=1,
        seed=0,
        on_step=steps.append,
    )
    assert result.proven
    assert result.additions is not None
    cost = result.additions.cost(table)
    assert result.bound == cost
    # Reference: enumeration of every layout cheaper than cost + 1 (so it finds the minimum if it is <= cost).
    assert exhaustive_minimum(frame, CostCatalogue(), BOTH, cost + 1) == cost
    assert is_stable(frame, result.additions.members(table))
    assert violated_cuts(table, result.additions, 0) == []
    assert result.iterations >= 1
    assert result.cuts >= 2 * (frame.rows + frame.cols)  # at least the single-node cuts both ways
    assert steps
    assert steps[-1].best == cost


def test_solve_with_cuts_on_a_frame_with_a_blocked_bay() -> None:
    frame = Frame("f", (3000,) * 3, (2000,) * 3, blocked=frozenset({(2, 2)}))
    table = bay_table(frame, CostCatalogue(), (), BOTH)
    result = solve_with_cuts(
        table, k=0, row_sizes=frame.heights, col_sizes=frame.widths, incumbent=constructive(table),
        improve=lambda a: constructive(table, a), deadline=time.monotonic() + 20, workers=1, seed=0,
    )  # fmt: skip
    assert result.proven
    assert result.additions is not None
    cost = result.additions.cost(table)
    assert exhaustive_minimum(frame, CostCatalogue(), BOTH, cost + 1) == cost
    assert int(result.additions.braces[1, 1] + result.additions.rising[1, 1] + result.additions.falling[1, 1]) == 0


def test_probe_finds_the_optimum_and_proves_nothing_cheaper() -> None:
    frame = _frame_3x3()
    table = bay_table(frame, CostCatalogue(), (), BOTH)
    start = constructive(table)
    assert start is not None
    optimum = exhaustive_minimum(frame, CostCatalogue(), BOTH, start.cost(table) + 1)
    assert optimum is not None
    cm = CutModel(table, k=0, row_sizes=frame.heights, col_sizes=frame.widths)
    outcome, found = cm.probe(optimum, start, workers=1, seed=0, seconds=10)
    assert outcome is ProbeOutcome.FOUND
    assert found is not None
    assert found.cost(table) == optimum
    assert is_stable(frame, found.members(table))  # the flow links make every answer stable
    outcome, found = cm.probe(optimum - 1, start, workers=1, seed=0, seconds=10)
    assert outcome is ProbeOutcome.NONE
    assert found is None


def _domain(cm: CutModel, var: object) -> list[int]:
    return list(cm.model.proto.variables[var.index].domain)  # type: ignore[attr-defined]


def test_cut_model_variables() -> None:
    frame = Frame("f", (3000,) * 3, (2000,) * 2, blocked=frozenset({(2, 3)}))
    table = bay_table(frame, CostCatalogue(), (Member(1, 1, T, R),), BOTH)
    for k, brace_domain in ((0, [0, 1]), (1, [0, 2])):
        cm = CutModel(table, k=k, row_sizes=frame.heights, col_sizes=frame.widths)
        open_bays = {(i, j) for i in range(2) for j in range(3)} - {(1, 2)}
        # No variables in the blocked bay; no rising tie where the kept rising tie sits.
        assert set(cm.b) == open_bays
        assert set(cm.tf) == open_bays
        assert set(cm.tr) == open_bays - {(0, 0)}
        # One brace per bay suffices for stability (k = 0); redundancy may need two (THEORY.md).
        assert _domain(cm, cm.b[0, 1]) == brace_domain
        # The bay beside the kept tie has one diagonal left: at most one brace whatever k.
        assert _domain(cm, cm.b[0, 0]) == [0, 1]
        assert _domain(cm, cm.tf[0, 1]) == [0, 1]
