"""The bound probe: an exact search for a stable layout costing at most a given bound.

Reference: exhaustive enumeration of every diagonal assignment
(``tests/validation/test_exhaustive_optimize.exhaustive_minimum``, own bitmask
reachability) on tiny random frames, and the closed forms of complete uniform
frames (Bolker & Crapo 1979; Baglivo & Graver 1983; mixed formula derived in
docs/optimizer.md). At the true minimum the probe must find a layout of exactly
that cost that violates no directed cut; one unit below it must report "none".
"""

from __future__ import annotations

import dataclasses
import time

import pytest

from bracegrid.model import CostCatalogue, CostRate, Frame, MemberKind, Supports
from bracegrid.optimize.bays import bay_table
from bracegrid.optimize.cutloop import solve_with_cuts
from bracegrid.optimize.cutmodel import CutModel, ProbeOutcome
from bracegrid.optimize.patterns import closed_form_cost
from bracegrid.optimize.separation import violated_cuts
from bracegrid.optimize.warmstart import constructive
from tests.validation.test_exhaustive_optimize import _random_case, exhaustive_minimum


def _free_case(seed: int) -> tuple[Frame, CostCatalogue]:
    """The tiny random case of the exhaustive tests, free-standing and with nothing kept."""
    frame, costs = _random_case(seed)
    return dataclasses.replace(frame, members=(), supports=Supports.FREE), costs


@pytest.mark.parametrize("seed", range(24))
def test_probe_at_exhaustive_minimum(seed: int) -> None:
    """Exhaustive enumeration: FOUND at the minimum, NONE one unit below."""
    frame, costs = _free_case(seed)
    best = exhaustive_minimum(frame, costs, frame.allow, 10**12)
    if best is None:
        return  # no stable layout at all
    table = bay_table(frame, costs, (), frame.allow)
    start = constructive(table)
    assert start is not None
    cm = CutModel(table, k=0, row_sizes=frame.heights, col_sizes=frame.widths)
    outcome, found = cm.probe(best, start, workers=1, seed=0, seconds=20)
    assert outcome is ProbeOutcome.FOUND
    assert found is not None
    assert found.cost(table) == best
    assert violated_cuts(table, found, 0) == []
    if best > 0:
        outcome, found = cm.probe(best - 1, start, workers=1, seed=0, seconds=20)
        assert (outcome, found) == (ProbeOutcome.NONE, None)


@pytest.mark.parametrize(("rows", "cols", "a", "b"), [(3, 4, 10, 6), (4, 6, 10, 7), (5, 5, 10, 4)])
def test_loop_with_probe_reaches_closed_form(rows: int, cols: int, a: int, b: int) -> None:
    """Closed form of complete uniform frames (derived in docs/optimizer.md): probe from the first round."""
    frame = Frame(f"{rows}x{cols}", (2500,) * cols, (2000,) * rows)
    costs = CostCatalogue(brace=CostRate(a, 0.0), tie=CostRate(b, 0.0))
    table = bay_table(frame, costs, (), frozenset(MemberKind))
    result = solve_with_cuts(
        table, k=0, row_sizes=frame.heights, col_sizes=frame.widths, incumbent=constructive(table),
        improve=lambda x: constructive(table, x), deadline=time.monotonic() + 30, workers=1, seed=0,
        probe_after=0.0,
    )  # fmt: skip
    assert result.proven
    assert result.additions is not None
    assert result.additions.cost(table) == closed_form_cost(rows, cols, a * 10_000, b * 10_000)
    assert violated_cuts(table, result.additions, 0) == []
