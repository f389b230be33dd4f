"""The annealing search for elastically adequate layouts (optimize/annealing.py).

References: stability by the directed-cycle criterion (Baglivo & Graver 1983) through
``bracegrid.analysis.is_stable``; the elastic verdict by the product's tension-only analysis, and
the plastic one by the independent LP of tests/validation/test_exhaustive_strength.py (an
elastic force set within capacity is an admissible one, so a layout that passes the elastic check
must pass that LP: the lower-bound theorem of plasticity).

The frame: a 6 x 6 plan grid of 3 m bays held by wall lines on its two sides, 3 kN along each
inner vertical line (invented). Each end column's shear is 7.5 kN by statics (half of 5 x 3 kN),
and every tie that takes it from the wall line has only one ledger of 6 kN beside its end on the
wall (the walls hold along y only), so a layout with one tie each way in the end columns fails:
the 12-tie cycle below is stable and fails the elastic check on such a ledger (7.5 / 6 = 1.25; its
inner ledgers fare worse, 10.5 kN where two rows' pulls add).
"""

from __future__ import annotations

import math

import pytest

from bracegrid.analysis import is_stable
from bracegrid.mechanics import analyse_frame
from bracegrid.model import (
    CostCatalogue,
    CostRate,
    Diagonal,
    Edge,
    Frame,
    GridStrength,
    LoadCase,
    Member,
    MemberKind,
    MemberStrength,
    StrengthCatalogue,
)
from bracegrid.optimize.annealing import Annealed, anneal
from bracegrid.optimize.bays import BayTable, bay_table
from bracegrid.optimize.benders import _judge, _stable_at, candidates_of, unit_cost
from bracegrid.optimize.capacity import Candidate
from tests.validation.test_exhaustive_strength import independent_plastic_ok

N = 6
STRENGTH = StrengthCatalogue(
    brace=MemberStrength(tension_kn=12.0, compression_kn=9.0, ea_kn=110000.0),
    tie=MemberStrength(tension_kn=12.0, ea_kn=10000.0),
    grid=GridStrength(ea_kn=110000.0, standard_kn=40.0, ledger_kn=6.0),
)
COSTS = CostCatalogue(
    brace=CostRate(per_piece=18.0, per_metre=6.5, labour_per_piece=4.0),
    tie=CostRate(per_piece=7.0, per_metre=2.0, labour_per_piece=3.0),
)
FRAME = Frame(
    "plan", (3000,) * N, (3000,) * N, held_edges=frozenset({Edge.LEFT, Edge.RIGHT}),
    loads=(LoadCase("even", (0.0,) * (N + 1), vertical_kn=(0.0, *([3.0] * (N - 1)), 0.0), reverse=True),),
)  # fmt: skip
#: Columns in the order one directed cycle of ties visits them (rows 1..6 in turn).
ORDER = (1, 6, 2, 5, 3, 4)


def _cycle() -> list[Member]:
    out = []
    for k, col in enumerate(ORDER):
        out.append(Member(k + 1, col, MemberKind.TIE, Diagonal.RISING))
        out.append(Member((k + 1) % N + 1, col, MemberKind.TIE, Diagonal.FALLING))
    return out


def _run(seed: int, evaluations: int, *, loose: bool = False) -> tuple[Annealed | None, list[Candidate], BayTable]:
    """Anneal from the cycle (``loose``: with its first tie taken out, a mechanism)."""
    table = bay_table(FRAME, COSTS, (), FRAME.allow)
    cands = candidates_of(FRAME, table, FRAME.allow)
    want = {(m.row, m.col, m.diagonal) for m in _cycle()[1:] if loose} | {
        (m.row, m.col, m.diagonal) for m in _cycle() if not loose
    }
    start = [(c.row, c.col, c.diagonal) in want and c.kind is MemberKind.TIE for c in cands]
    got = anneal(
        cands,
        [unit_cost(table, c) for c in cands],
        start,
        holds=lambda x: loose or _stable_at(FRAME, table, cands, x, 0),
        judge=_judge(FRAME, STRENGTH, cands),
        deadline=math.inf,
        seed=seed,
        max_evaluations=evaluations,
    )
    return got, cands, table


def test_the_start_is_stable_and_fails_the_elastic_check_by_the_wall_ledger() -> None:
    cycle = _cycle()
    assert is_stable(FRAME, cycle)
    forces = analyse_frame(FRAME, STRENGTH, members=cycle)
    assert not forces.ok
    push = forces.cases[0]
    by = {m.label: m.force_kn for m in push.members}
    # hand statics: the end column's 7.5 kN shear in its one rising tie (45 degrees: 7.5 sqrt 2),
    # whose 7.5 kN along the wall's bottom node goes into the one ledger there (compression)
    assert by["tie r1c1:rising"] == pytest.approx(7.5 * math.sqrt(2.0), rel=1e-6)
    assert by["ledger p0 c1"] == pytest.approx(-7.5, rel=1e-6)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_annealing_finds_an_adequate_layout_and_every_answer_passes_both_checks(seed: int) -> None:
    got, cands, table = _run(seed, 400)
    assert got is not None
    members = [c.member for c, on in zip(cands, got.chosen, strict=True) if on]
    assert got.cost == sum(unit_cost(table, c) for c, on in zip(cands, got.chosen, strict=True) if on)
    assert is_stable(FRAME, members)
    assert analyse_frame(FRAME, STRENGTH, members=members).ok
    assert independent_plastic_ok(FRAME, STRENGTH, members)
    assert got.evaluations <= 400


def test_the_same_seed_gives_the_same_answer_when_evaluations_set_the_schedule() -> None:
    assert _run(5, 150)[0] == _run(5, 150)[0]


def test_a_start_that_is_a_mechanism_gives_nothing() -> None:
    assert _run(0, 50, loose=True)[0] is None
