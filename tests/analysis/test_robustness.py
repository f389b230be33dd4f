"""Robustness statistics (analysis/robustness.py) against brute force on small frames.

References: the definitions themselves, evaluated by exhaustive enumeration with Python's
``fractions`` (every loss set for uniform losses; every loss order, each with its successive-
sampling probability, for weighted ones) and the one-at-a-time stability check; removal is
monotone (Bolker and Crapo 1979; Baglivo and Graver 1983: fewer arcs never make a digraph more
strongly connected).
"""

from __future__ import annotations

import dataclasses
import itertools
import math
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from bracegrid.analysis import (
    RobustnessOptions,
    find_critical_members,
    is_stable,
    losses_to_mechanism,
    robustness_of,
    stable_without,
)
from bracegrid.analysis import robustness as engine
from bracegrid.errors import InputError
from bracegrid.model import Diagonal, Frame, LossLikelihood, Member, MemberKind, Supports
from tests.strategies import frames_with_layouts

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING

#: A 2 x 3 free frame: braces and ties, stable, some members critical (invented for tests).
MIXED = Frame(
    "mixed 2x3",
    (3000, 3000, 3000),
    (2000, 2000),
    members=(
        Member(1, 1, B, R), Member(1, 2, T, R), Member(1, 2, T, F), Member(2, 2, B, F),
        Member(2, 3, T, R), Member(2, 3, T, F), Member(1, 3, B, R), Member(2, 1, T, F),
    ),
)  # fmt: skip


def _curve_by_sets(frame: Frame, k_max: int) -> list[Fraction]:
    """P(stable after k uniform losses) from every k-subset (the definition)."""
    ms = frame.members
    out = []
    for k in range(1, k_max + 1):
        good = sum(
            is_stable(frame, [m for i, m in enumerate(ms) if i not in gone])
            for gone in itertools.combinations(range(len(ms)), k)
        )
        out.append(Fraction(good, math.comb(len(ms), k)))
    return out


def _curve_by_orders(frame: Frame, likelihood: LossLikelihood, k_max: int) -> list[Fraction]:
    """P(stable after k weighted losses) over every loss order with its exact probability."""
    ms = frame.members
    w = [Fraction(likelihood.weight(m.kind)) for m in ms]
    losable = [i for i in range(len(ms)) if w[i] > 0]
    out = [Fraction(0)] * k_max
    for order in itertools.permutations(losable):
        prob, left = Fraction(1), sum(w[i] for i in losable)
        for i in order[:k_max]:
            prob *= w[i] / left
            left -= w[i]
        gone: set[int] = set()
        for k, i in enumerate(order[:k_max], start=1):
            gone.add(i)
            if is_stable(frame, [m for j, m in enumerate(ms) if j not in gone]):
                out[k - 1] += prob / math.factorial(len(losable) - k_max)
    return out


def test_exact_curve_equals_every_subset() -> None:
    r = robustness_of(MIXED, options=RobustnessOptions(max_lost=8))
    assert all(p.exact for p in r.curve)
    assert [p.p_stable for p in r.curve] == [float(v) for v in _curve_by_sets(MIXED, 8)]
    assert r.samples == 0  # every value enumerated: no Monte Carlo at all
    assert r.expected_losses is not None
    assert r.expected_losses.exact
    assert r.expected_losses.value == pytest.approx(1 + sum(float(v) for v in _curve_by_sets(MIXED, 8)), abs=1e-12)


def test_weighted_exact_curve_equals_every_order() -> None:
    frame = dataclasses.replace(MIXED, members=MIXED.members[:6])
    assert is_stable(frame)
    likelihood = LossLikelihood(brace=1.0, tie=3.0)
    r = robustness_of(frame, likelihood=likelihood, options=RobustnessOptions(max_lost=6))
    want = _curve_by_orders(frame, likelihood, 6)
    assert all(p.exact for p in r.curve)
    assert [p.p_stable for p in r.curve] == pytest.approx([float(v) for v in want], abs=1e-12)


def test_a_kind_never_lost() -> None:
    # Ties never go; the braces alone do not hold the frame, the ties alone do.
    ties = tuple(Member(1, j, T, d) for j in (1, 2) for d in Diagonal)
    frame = Frame("f", (3000, 3000), (2000,), supports=Supports.BASE, members=(Member(1, 1, B, R), *ties))
    r = robustness_of(frame, likelihood=LossLikelihood(tie=0.0))
    assert r.losable == 1
    assert r.expected_losses is None  # never gets a mechanism
    assert [(p.lost, p.p_stable, p.exact) for p in r.curve] == [(1, 1.0, True)]


def test_unstable_frame_has_a_flat_curve() -> None:
    chain = Frame("chain", (3000, 3000), (2000, 2000), members=(Member(1, 1, T, R), Member(1, 2, T, F)))
    r = robustness_of(chain)
    assert not r.stable
    assert r.ranking == ()
    assert [p.p_stable for p in r.curve] == [0.0, 0.0]
    assert r.expected_losses is not None
    assert (r.expected_losses.value, r.expected_losses.exact) == (0.0, True)


def test_max_lost_is_capped_at_the_members_that_can_go() -> None:
    r = robustness_of(MIXED, options=RobustnessOptions(max_lost=50))
    assert [p.lost for p in r.curve] == list(range(1, len(MIXED.members) + 1))


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(frame=frames_with_layouts(max_rows=3, max_cols=3), seed=st.integers(0, 2**31))
def test_losses_to_mechanism_equals_removing_one_by_one(frame: Frame, seed: int) -> None:
    ms = frame.members
    rng = np.random.default_rng(seed)
    orders = np.array([rng.permutation(len(ms)) for _ in range(5)]).reshape(5, len(ms))
    got = losses_to_mechanism(frame, ms, orders).tolist()
    for order, t in zip(orders.tolist(), got, strict=True):
        want = 0 if not is_stable(frame, ms) else None
        for k in range(1, len(ms) + 1):
            if want is not None:
                break
            gone = set(order[:k])
            if not is_stable(frame, [m for i, m in enumerate(ms) if i not in gone]):
                want = k
        assert t == want


def test_losses_to_mechanism_rejects_a_bad_order() -> None:
    with pytest.raises(InputError, match="once each"):
        losses_to_mechanism(MIXED, MIXED.members, np.zeros((1, len(MIXED.members)), dtype=np.int64))


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(frame=frames_with_layouts(max_rows=4, max_cols=4), seed=st.integers(0, 2**31))
def test_stable_without_equals_the_one_by_one_check(frame: Frame, seed: int) -> None:
    ms = frame.members
    lost = np.random.default_rng(seed).random((20, len(ms))) < 0.3
    got = stable_without(frame, ms, lost).tolist()
    assert got == [is_stable(frame, [m for m, x in zip(ms, row, strict=True) if not x]) for row in lost]


def test_same_seed_same_numbers_other_seed_other_numbers() -> None:
    opts = RobustnessOptions(samples=3000, seed=7, exact_limit=0)
    a = robustness_of(MIXED, options=opts)
    b = robustness_of(MIXED, options=opts)
    c = robustness_of(MIXED, options=dataclasses.replace(opts, seed=8))
    assert a == b
    assert [p.p_stable for p in a.curve] != [p.p_stable for p in c.curve]


def test_results_do_not_depend_on_the_worker_count(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(engine, "_POOL_WORK", 0)  # force the process pool even for this small job
    opts = RobustnessOptions(samples=3000, seed=11, exact_limit=0, rank_members=False)
    one = robustness_of(MIXED, options=opts)
    two = robustness_of(MIXED, options=dataclasses.replace(opts, workers=2))
    assert one == two
    assert not one.curve[1].exact


def test_ranking_matches_the_exact_curves_without_each_member() -> None:
    # Each member's entry estimates mean_k P_k(layout) - P_k(layout without it); the exact value of
    # both curves comes from enumeration. The estimate must lie within 4 standard errors of it (the
    # 95% half-width is 1.96 of them): false-alarm rate about 6e-5 per member, 5e-4 for the eight.
    # Fixed seed, so the run itself is deterministic.
    r = robustness_of(MIXED, options=RobustnessOptions(max_lost=8, samples=4000, seed=2))
    exact = [p.p_stable for p in r.curve]
    critical = set(find_critical_members(MIXED))
    assert [d.critical for d in r.ranking] == [d.member in critical for d in r.ranking]
    assert [d.critical for d in r.ranking] == sorted((d.critical for d in r.ranking), reverse=True)
    for d in r.ranking:
        rest = tuple(m for m in MIXED.members if m is not d.member)
        if d.member in critical:
            without = [0.0] * len(exact)
        else:
            curve = robustness_of(dataclasses.replace(MIXED, members=rest), options=RobustnessOptions(max_lost=8))
            without = [p.p_stable for p in curve.curve] + [0.0] * (len(exact) - len(curve.curve))
        truth = sum(a - b for a, b in zip(exact, without, strict=True)) / len(exact)
        standard_error = (d.high - d.low) / (2 * 1.96)
        assert abs(d.drop - truth) <= 4 * standard_error + 1e-12
        assert d.drop >= 0
    drops = [d.drop for d in r.ranking]
    assert drops == sorted(drops, reverse=True)


def test_options_are_checked() -> None:
    with pytest.raises(InputError) as info:
        robustness_of(MIXED, options=RobustnessOptions(max_lost=0, samples=0, workers=0))
    text = str(info.value)
    assert "max_lost 0" in text
    assert "samples 0" in text
    assert "workers 0" in text


def test_independent_losses_bounds() -> None:
    with pytest.raises(InputError, match="keep_probability"):
        engine.estimate_kept_stable(MIXED, MIXED.members, keep_probability=1.5, samples=10)
    all_kept = engine.estimate_kept_stable(MIXED, MIXED.members, keep_probability=1.0, samples=50)
    none_kept = engine.estimate_kept_stable(MIXED, MIXED.members, keep_probability=0.0, samples=50)
    assert (all_kept.p_stable, none_kept.p_stable) == (1.0, 0.0)


@pytest.mark.parametrize(("x", "n"), [(0, 10), (1, 10), (5, 10), (10, 10), (3, 400), (397, 400), (12345, 20000)])
def test_clopper_pearson_closed_form_equals_scipys_root_finding(x: int, n: int) -> None:
    from scipy import stats

    ci = stats.binomtest(x, n).proportion_ci(confidence_level=0.95, method="exact")
    assert engine.clopper_pearson(x, n) == pytest.approx((ci.low, ci.high), abs=1e-9)
