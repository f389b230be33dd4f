"""Robustness statistics against outside references: published counts, exact enumeration, the critical members.

References:
    OEIS A227322, "Number of connected spanning subgraphs of the complete bipartite graph K(n,n)"
    (https://oeis.org/A227322): 1, 5, 205, 36317 for n = 1..4. By Bolker and Crapo (SIAM J. Appl.
    Math. 36(3), 1979, doi:10.1137/0136036) a set of rigid braces, one per chosen bay, makes an
    R x C frame rigid iff its bays form a connected spanning subgraph of K(R, C); so with each bay
    braced with probability 1/2, P(rigid n x n) = A227322(n) / 2^(n^2): 2x2 5/16, 3x3 205/512,
    4x4 36317/65536.
    C. J. Clopper and E. S. Pearson, Biometrika 26(4), 404-413 (1934), doi:10.1093/biomet/26.4.404:
    the interval's coverage is at least 95% for every true proportion, so over independent seeds the
    number of intervals that miss the true value is at most Binomial(seeds, 0.05) in distribution.
    Exact values here come from enumeration of every loss set (or, for the k = 1 check, from the
    critical members found by dominator trees; Italiano, Laura and Santaroni, Theor. Comput. Sci.
    447, 2012, doi:10.1016/j.tcs.2011.11.011).
"""

from __future__ import annotations

import dataclasses
import math

import pytest
from hypothesis import HealthCheck, given, settings
from scipy import stats

from bracegrid.analysis import RobustnessOptions, estimate_kept_stable, find_critical_members, robustness_of
from bracegrid.io import load_project
from bracegrid.model import Diagonal, Frame, LossLikelihood, Member, MemberKind, Supports
from tests.strategies import frames_with_layouts

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING

#: A227322(n) for n = 1..4 (OEIS).
A227322 = {1: 1, 2: 5, 3: 205, 4: 36317}

#: Small stable layouts for the agreement test (invented for tests): braces and ties, free and based.
SMALL = (
    Frame(
        "mixed 2x3", (3000,) * 3, (2000,) * 2,
        members=(Member(1, 1, B, R), Member(1, 2, T, R), Member(1, 2, T, F), Member(2, 2, B, F),
                 Member(2, 3, T, R), Member(2, 3, T, F), Member(1, 3, B, R), Member(2, 1, T, F)),
    ),
    Frame(
        "ties on a base 2x2", (3000,) * 2, (2000,) * 2, supports=Supports.BASE,
        members=tuple(Member(i, j, T, d) for i in (1, 2) for j in (1, 2) for d in Diagonal),
    ),
    Frame("braces 3x3", (3000,) * 3, (2000,) * 3,
          members=tuple(Member(i, j, B, R) for i in (1, 2, 3) for j in (1, 2, 3))),
)  # fmt: skip

SEEDS = 200
SAMPLES = 400
#: Misses allowed out of SEEDS intervals: P(Binomial(200, 0.05) > this) < 1e-4.
ALLOWED = int(stats.binom.ppf(1 - 1e-4, SEEDS, 0.05))


def _brace_everywhere(n: int) -> Frame:
    return Frame(f"{n}x{n}", (3000,) * n, (2000,) * n, members=tuple(Member(i, j, B, R) for i in range(1, n + 1)
                                                                        for j in range(1, n + 1)))  # fmt: skip


@pytest.mark.parametrize("frame", SMALL, ids=lambda f: f.name)
@pytest.mark.parametrize("likelihood", [LossLikelihood(), LossLikelihood(brace=1.0, tie=4.0)], ids=["uniform", "tie4"])
def test_monte_carlo_agrees_with_enumeration_over_many_seeds(frame: Frame, likelihood: LossLikelihood) -> None:
    # Exact curve by enumeration; then SEEDS Monte Carlo runs (fixed seeds 0..199, SAMPLES each,
    # enumeration switched off past k = 1). For each k the number of Clopper-Pearson intervals that
    # miss the exact value must not exceed ALLOWED: false-alarm rate below 1e-4 per (frame, k), under
    # 1e-2 for the whole test. The expectation's Student t interval is asymptotic (CLT, T bounded by
    # the member count), so its misses are held to the same count with a 6% miss rate: rate < 1e-4
    # per frame while coverage is at least 94%.
    top = min(6, len(frame.members))
    exact = robustness_of(frame, likelihood=likelihood, options=RobustnessOptions(max_lost=top, rank_members=False))
    assert all(p.exact for p in exact.curve)
    assert exact.expected_losses is not None
    assert exact.expected_losses.exact
    misses = [0] * top
    mean_misses = 0
    for seed in range(SEEDS):
        opts = RobustnessOptions(max_lost=top, samples=SAMPLES, seed=seed, exact_limit=0, rank_members=False)
        mc = robustness_of(frame, likelihood=likelihood, options=opts)
        assert mc.curve[0] == exact.curve[0]  # k = 1 stays exact (critical members)
        for k, (p, q) in enumerate(zip(mc.curve, exact.curve, strict=True)):
            misses[k] += not p.low <= q.p_stable <= p.high
        e, want = mc.expected_losses, exact.expected_losses.value
        assert e is not None
        assert not e.exact
        mean_misses += not e.low <= want <= e.high
    assert max(misses) <= ALLOWED, misses
    assert mean_misses <= int(stats.binom.ppf(1 - 1e-4, SEEDS, 0.06)), mean_misses


@pytest.mark.parametrize("n", [1, 2, 3, 4])
def test_enumeration_reproduces_a227322_exactly(n: int) -> None:
    # P(rigid) with each bay braced with probability 1/2 = sum over k of P(k bays unbraced) x
    # P(stable after losing k of the n^2 braces). The exact curve gives each count of rigid subsets.
    frame = _brace_everywhere(n)
    bays = n * n
    r = robustness_of(frame, options=RobustnessOptions(max_lost=bays, rank_members=False))
    assert all(p.exact for p in r.curve)
    rigid_subsets = 1 + sum(round(p.p_stable * math.comb(bays, p.lost)) for p in r.curve)  # k = 0: everything kept
    assert rigid_subsets == A227322[n]


@pytest.mark.parametrize("n", [2, 3, 4])
def test_sampled_random_layouts_reproduce_a227322(n: int) -> None:
    # The sampling engine (each brace kept with probability 1/2) against the published count, over
    # 50 fixed seeds of 4000 samples: Clopper-Pearson intervals that miss the published value must
    # not exceed the 1 - 1e-4 quantile of Binomial(50, 0.05) (false-alarm rate below 1e-4 per n).
    frame = _brace_everywhere(n)
    published = A227322[n] / 2 ** (n * n)
    runs = [estimate_kept_stable(frame, frame.members, keep_probability=0.5, samples=4000, seed=s) for s in range(50)]
    misses = sum(not r.low <= published <= r.high for r in runs)
    assert misses <= int(stats.binom.ppf(1 - 1e-4, 50, 0.05)), misses
    pooled = sum(r.p_stable for r in runs) / len(runs)  # 200 000 samples in all: standard error under 0.0012
    assert abs(pooled - published) < 5 * math.sqrt(published * (1 - published) / 200_000)


def _k1_holds(frame: Frame) -> None:
    r = robustness_of(frame, options=RobustnessOptions(max_lost=1, rank_members=False))
    members, critical = len(frame.members), len(find_critical_members(frame))
    assert r.curve[0].exact
    assert r.curve[0].p_stable == (members - critical) / members  # correctly rounded int / int


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])
@given(frame=frames_with_layouts(max_rows=6, max_cols=6))
def test_one_loss_is_one_minus_critical_over_members(frame: Frame) -> None:
    if frame.members and robustness_of(frame, options=RobustnessOptions(max_lost=1, rank_members=False)).stable:
        _k1_holds(frame)


@pytest.mark.parametrize("path", ["projects/orchard-shed.toml"])
def test_one_loss_on_the_demo_frames(path: str) -> None:
    for frame in load_project(path).frames:
        _k1_holds(frame)


def test_one_loss_on_a_large_redundant_frame() -> None:
    # 20 x 20 with an X of ties in every bay of the first row and column and braces on the diagonal.
    members = [Member(1, j, T, d) for j in range(1, 21) for d in Diagonal]
    members += [Member(i, 1, T, d) for i in range(2, 21) for d in Diagonal]
    members += [Member(i, i, B, R) for i in range(2, 21)]
    frame = dataclasses.replace(Frame("big", (2500,) * 20, (2000,) * 20), members=tuple(members))
    _k1_holds(frame)
