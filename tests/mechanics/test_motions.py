"""Free motions and driven mechanisms in racking coordinates agree with the bar framework itself.

Reference: tests/physics.py's rigidity matrix of the real bar framework (numpy), with supports as
fixed degrees of freedom; the null space dimension by SVD (scipy.linalg.null_space), and a
mechanism the load drives by an LP on the nodal displacements (scipy.optimize.linprog): maximise
the load's work subject to every bar and brace keeping its length and no tie lengthening, in a box.
The product works on R + C + 2 racking coordinates and the digraph's arcs instead.
"""

from __future__ import annotations

import random

import numpy as np
import pytest
from scipy.linalg import null_space
from scipy.optimize import linprog

from bracegrid.mechanics import driven_motion, free_motions, nodal_loads
from bracegrid.mechanics.framework import support_dofs
from bracegrid.mechanics.motions import work_coefficients
from bracegrid.model import Frame, MemberKind
from tests.mechanics.cases import random_frame
from tests.physics import rigidity_rows


def _free(frame: Frame) -> np.ndarray:
    keep = np.ones(2 * (frame.rows + 1) * (frame.cols + 1), dtype=bool)
    keep[[s.dof for s in support_dofs(frame)]] = False
    return keep


def _bars_and_ties(frame: Frame) -> tuple[np.ndarray, np.ndarray]:
    eq, ties, _ = rigidity_rows(frame, frame.members)
    keep = _free(frame)
    return eq[:, keep], ties[:, keep]


@pytest.mark.parametrize("seed", range(40))
def test_free_motions_count_equals_the_null_space_of_all_members_as_bars(seed: int) -> None:
    frame = random_frame(random.Random(seed), max_rows=4, max_cols=4, density=random.Random(seed).choice([0.1, 0.3]))
    eq, ties = _bars_and_ties(frame)
    everything = np.vstack([eq, ties]) if len(ties) else eq
    dim = null_space(everything, rcond=1e-10).shape[1] if everything.shape[1] else 0
    assert free_motions(frame, frame.members).count == dim


@pytest.mark.parametrize("seed", range(60))
def test_driven_motion_agrees_with_an_lp_on_the_bar_framework(seed: int) -> None:
    rng = random.Random(100 + seed)
    frame = random_frame(
        rng,
        max_rows=4,
        max_cols=4,
        kinds=(MemberKind.TIE, MemberKind.TIE, MemberKind.BRACE),
        density=rng.choice([0.15, 0.3]),
    )
    loads = nodal_loads(frame, frame.loads[0])
    ours = driven_motion(frame, frame.members, work_coefficients(frame, loads))
    eq, ties = _bars_and_ties(frame)
    f = loads[_free(frame)]
    if not len(f):
        assert ours is None
        return
    # v in a box; bars keep length; ties do not lengthen (a row . v is the rate of change of length^2 / 2)
    scale = float(np.abs(f).sum())
    res = linprog(
        -f / scale,
        A_ub=ties if len(ties) else None,
        b_ub=np.zeros(len(ties)) if len(ties) else None,
        A_eq=eq,
        b_eq=np.zeros(len(eq)),
        bounds=[(-1, 1)] * len(f),
        method="highs",
    )
    assert res.status == 0
    driven = -res.fun > 1e-6
    assert (ours is not None) == driven
