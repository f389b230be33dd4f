"""Robustness statistics: how likely a layout is to stay stable when members go missing at random.

The model (docs/robustness.md): members are taken out one at a time, each next loss falling on
one of the members still in place with probability proportional to its kind's loss likelihood
(:class:`~bracegrid.model.LossLikelihood`; equal values: uniformly at random). For k = 1..K the
curve gives P(stable after k losses); T, the number of losses at which the frame first has a
mechanism, has the expectation reported as the expected losses to a mechanism.

Exact values come from enumeration: k = 1 from the critical members (P = 1 - critical weight /
total weight), further k by enumerating the stable loss sets level by level while there are few
(a set stays stable only if every smaller set inside it does, so each level grows from the last).
Otherwise Monte Carlo: each sample draws a whole loss order (exponential clocks with rates equal
to the likelihoods: the member with the smallest clock goes first, which is successive sampling
in proportion to the likelihoods). Removal is monotone (fewer members never make a frame more
stable), so one order answers every k at once: the frame is stable after the first k losses iff
T > k, and T is found from the order with one widest-path search
(:func:`bracegrid.analysis.digraph.strong_bottleneck`). Proportions get a Clopper-Pearson
interval, means a Student t interval.

Reproducibility: the samples are cut into chunks whose size depends only on the layout; chunk i
draws from the i-th child of ``numpy.random.SeedSequence(seed)``, and the chunks are put back in
order, so a result depends on the seed and not on how many processes shared the work.

References:
    C. J. Clopper and E. S. Pearson, "The use of confidence or fiducial limits illustrated in
    the case of the binomial", Biometrika 26(4), 404-413 (1934), doi:10.1093/biomet/26.4.404.
    P. S. Efraimidis and P. G. Spirakis, "Weighted random sampling with a reservoir",
    Inf. Process. Lett. 97(5), 181-185 (2006), doi:10.1016/j.ipl.2005.11.003 (sorting by
    random keys gives successive sampling in proportion to weights).
"""

from __future__ import annotations

import math
import multiprocessing
from collections.abc import Callable, Sequence
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass
from fractions import Fraction
from multiprocessing.context import BaseContext

import numpy as np
from scipy import stats

from bracegrid.analysis.critical import find_critical_members
from bracegrid.analysis.digraph import (
    ArcSet,
    BoolArray,
    FloatArray,
    IntArray,
    arc_members,
    arc_strong_components,
    batch_strongly_connected,
    build_arcs,
    strong_bottleneck,
)
from bracegrid.analysis.stability import require_complete
from bracegrid.errors import InputError
from bracegrid.model import Frame, LossLikelihood, Member, Project

#: Confidence level of every interval reported.
CONFIDENCE = 0.95

#: Float cells (samples x (arcs + members)) of one chunk's work arrays: 2^21 cells, 16 MiB.
_CHUNK_CELLS = 1 << 21
_MAX_CHUNK = 2048
_MIN_CHUNK = 16

#: Work (samples x (arcs + members)) above which worker processes are started: about 4 s of work on
#: one core (benchmarks/bench_robustness.py), against 1-2 s for a process to start and import
#: numpy, scipy and bracegrid; below it one process is as fast.
_POOL_WORK = 1e8

#: Fewest samples behind each member's entry in the ranking; otherwise the ranking as a whole gets
#: twice the samples of the curve, shared among the members (so it costs about twice the curve).
_MIN_RANKING_SAMPLES = 200

ProgressCallback = Callable[[int, int], None]


@dataclass(frozen=True, slots=True)
class RobustnessOptions:
    """What to compute and how hard to try.

    Attributes:
        max_lost: Largest number of lost members on the curve (capped at the members that can be lost).
        samples: Monte Carlo samples (loss orders) where enumeration is not cheap.
        seed: Seed of the random numbers (same seed, same result, whatever ``workers``).
        workers: Processes to share large runs (1 = this process only).
        exact_limit: Most loss sets enumerated for one value of k; above it, Monte Carlo.
        rank_members: For a stable frame, also rank members by how much the curve drops without them.
    """

    max_lost: int = 10
    samples: int = 20_000
    seed: int = 0
    workers: int = 1
    exact_limit: int = 30_000
    rank_members: bool = True

    def problems(self) -> list[str]:
        """What is wrong with the options, in words (empty when they are usable)."""
        out = []
        if self.max_lost < 1:
            out.append(f"max_lost {self.max_lost}: give at least 1 (members lost)")
        if self.samples < 1:
            out.append(f"samples {self.samples}: give at least 1 Monte Carlo sample")
        if self.workers < 1:
            out.append(f"workers {self.workers}: give at least 1 process")
        if self.exact_limit < 0:
            out.append(f"exact_limit {self.exact_limit}: give 0 or more loss sets")
        return out


@dataclass(frozen=True, slots=True)
class CurvePoint:
    """P(stable after ``lost`` random losses), with its 95% interval.

    Attributes:
        lost: Members lost (k).
        p_stable: Probability that the frame is still free of mechanisms.
        low: Lower end of the interval (equal to ``p_stable`` when exact).
        high: Upper end of the interval.
        exact: True when enumerated, False for a Monte Carlo estimate (Clopper-Pearson interval).
    """

    lost: int
    p_stable: float
    low: float
    high: float
    exact: bool


@dataclass(frozen=True, slots=True)
class Estimate:
    """A number with its 95% interval.

    Attributes:
        value: The value (exact or estimated).
        low: Lower end (equal to ``value`` when exact).
        high: Upper end.
        exact: True when computed exactly.
    """

    value: float
    low: float
    high: float
    exact: bool


@dataclass(frozen=True, slots=True)
class MemberDrop:
    """How much the curve drops when one member is missing from the start.

    Attributes:
        member: The member.
        drop: Mean over k = 1..K of P(stable after k losses) minus the same without the member.
        low: Lower end of its 95% interval (paired Student t over common random losses).
        high: Upper end.
        critical: Its loss alone leaves a mechanism (the curve without it is 0).
    """

    member: Member
    drop: float
    low: float
    high: float
    critical: bool


@dataclass(frozen=True, slots=True)
class Robustness:
    """Robustness statistics of one frame's layout.

    Attributes:
        frame: Frame name.
        members: Members in the layout.
        losable: Members that can be lost (likelihood above 0).
        stable: Whether the layout is stable before any loss.
        curve: P(stable after k losses), k = 1..K.
        expected_losses: Expectation of T, the losses at which the frame first has a mechanism
            (0 if it has one already); None when it never gets one (the members that are never
            lost hold it on their own).
        likelihood: The loss likelihoods used.
        samples: Monte Carlo samples drawn for the curve (0 when every value is exact).
        seed: Seed used.
        ranking: Members by how much the curve drops without them (stable frames; empty otherwise).
        ranking_samples: Samples behind each ranking entry.
    """

    frame: str
    members: int
    losable: int
    stable: bool
    curve: tuple[CurvePoint, ...]
    expected_losses: Estimate | None
    likelihood: LossLikelihood
    samples: int
    seed: int
    ranking: tuple[MemberDrop, ...] = ()
    ranking_samples: int = 0

    @property
    def exact(self) -> bool:
        """True when every value on the curve and the expectation are exact."""
        return all(p.exact for p in self.curve) and (self.expected_losses is None or self.expected_losses.exact)


# --------------------------------------------------------------------------- intervals


def clopper_pearson(successes: int, trials: int) -> tuple[float, float]:
    """The 95% Clopper-Pearson ("exact") interval of a binomial proportion.

    Its ends are beta quantiles, ``Beta(a/2; x, n - x + 1)`` and ``Beta(1 - a/2; x + 1, n - x)``
    (scipy.stats.beta), the closed form of the interval; its coverage is at least 95% for every
    true proportion (Clopper and Pearson 1934). scipy's ``binomtest(...).proportion_ci(method="exact")``
    gives the same ends by root finding (checked in the tests), at about a hundred times the cost.

    Example:
        >>> lo, hi = clopper_pearson(50, 100)
        >>> round(lo, 4), round(hi, 4)
        (0.3983, 0.6017)
    """
    alpha = 1.0 - CONFIDENCE
    low = 0.0 if successes == 0 else float(stats.beta.ppf(alpha / 2, successes, trials - successes + 1))
    high = 1.0 if successes == trials else float(stats.beta.ppf(1 - alpha / 2, successes + 1, trials - successes))
    return low, high


def student_interval(values: FloatArray) -> tuple[float, float, float]:
    """Mean of samples with its 95% Student t interval: (mean, low, high).

    Example:
        >>> [round(v, 3) for v in student_interval(np.array([1.0, 2.0, 3.0, 4.0]))]
        [2.5, 0.446, 4.554]
    """
    n = len(values)
    mean = float(values.mean())
    if n < 2:
        return mean, -math.inf, math.inf
    half = float(stats.t.ppf(0.5 + CONFIDENCE / 2, n - 1)) * float(values.std(ddof=1)) / math.sqrt(n)
    return mean, mean - half, mean + half


# --------------------------------------------------------------------------- the sampling engine


@dataclass(frozen=True, slots=True)
class _Layout:
    """What the workers need: the distinct arcs, the members behind each, each member's likelihood."""

    arcs: ArcSet
    table: IntArray
    weights: FloatArray

    @property
    def never(self) -> BoolArray:
        """Arcs no member gives (never lost)."""
        mask: BoolArray = np.all(self.table < 0, axis=1)
        return mask

    @property
    def chunk(self) -> int:
        """Samples per chunk: fixed by the layout alone (so results do not depend on the workers)."""
        cells = len(self.arcs.src) + len(self.weights) + 1
        return max(_MIN_CHUNK, min(_MAX_CHUNK, _CHUNK_CELLS // cells))


def _layout(frame: Frame, members: Sequence[Member], likelihood: LossLikelihood) -> _Layout:
    arcs = build_arcs(frame, members)
    weights = np.array([likelihood.weight(m.kind) for m in members], dtype=np.float64)
    return _Layout(arcs=arcs, table=arc_members(arcs), weights=weights)


def _deaths(layout: _Layout, clocks: FloatArray) -> FloatArray:
    """When each arc is lost in each sample, shape (arcs, samples): when the last member giving it goes.

    ``clocks`` has shape (members, samples); an arc no member gives is never lost (inf).
    """
    ext = np.concatenate([clocks, np.full((1, clocks.shape[1]), -np.inf)], axis=0)  # row -1: no member
    table = layout.table
    deaths = ext[table[:, 0]]
    for slot in range(1, table.shape[1]):
        np.maximum(deaths, ext[table[:, slot]], out=deaths)
    deaths[layout.never] = np.inf
    return deaths


def _clocks(rng: np.random.Generator, count: int, weights: FloatArray) -> FloatArray:
    """Loss clocks, shape (members, samples): exponential with rate = likelihood (inf: never lost)."""
    # Drawn sample by sample (rows), so a shorter chunk from the same seed repeats the first samples.
    raw = np.ascontiguousarray(rng.standard_exponential((count, len(weights))).T)
    positive = weights > 0
    clocks: FloatArray = np.full_like(raw, np.inf)
    clocks[positive] = raw[positive] / weights[positive][:, None]
    return clocks


@dataclass(frozen=True, slots=True)
class _Job:
    """One chunk of loss orders; ``removed`` is a member taken out before the first loss (-1: none)."""

    layout: _Layout
    seed: np.random.SeedSequence
    count: int
    removed: int


def _losses(layout: _Layout, clocks: FloatArray, *, removed: int = -1) -> IntArray:
    """T per sample from loss clocks (members, samples): members lost up to the first mechanism.

    The frame fails when the clock passes the bottleneck of the arcs' loss times; T counts the
    members (other than ``removed``) whose clocks are not above it. Never fails: losable + 1.
    """
    fail = strong_bottleneck(layout.arcs, _deaths(layout, clocks))
    losses = (clocks <= fail[None, :]).sum(axis=0) - (1 if removed >= 0 else 0)
    losable = int((layout.weights > 0).sum()) - (1 if removed >= 0 and layout.weights[removed] > 0 else 0)
    out: IntArray = np.where(np.isposinf(fail), losable + 1, losses).astype(np.int64)
    return out


def losses_to_mechanism(frame: Frame, members: Sequence[Member], orders: IntArray) -> IntArray:
    """For given loss orders, how many members go before the frame first has a mechanism.

    Args:
        frame: Sizes and supports.
        members: The layout.
        orders: Shape (orders, members): each row lists every member index once, first lost first.

    Returns:
        Shape (orders,): T of each order (0 if the layout is not stable to begin with).

    Raises:
        InputError: If a row is not a permutation of the member indices.

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> t = MemberKind.TIE
        >>> x = [Member(1, 1, t, Diagonal.RISING), Member(1, 1, t, Diagonal.FALLING),
        ...      Member(1, 2, MemberKind.BRACE, Diagonal.RISING)]
        >>> losses_to_mechanism(Frame("f", (3000, 3000), (2000,)), x, np.array([[0, 2, 1], [2, 0, 1]])).tolist()
        [1, 1]
    """
    count = len(members)
    rows = np.asarray(orders, dtype=np.int64)
    if rows.ndim != 2 or rows.shape[1] != count or not (np.sort(rows, axis=1) == np.arange(count)).all():
        msg = f"orders: each row must list the {count} member indices 0..{count - 1} once each"
        raise InputError(msg)
    clocks = np.empty((count, rows.shape[0]))
    clocks[rows.T, np.arange(rows.shape[0])[None, :]] = np.arange(1, count + 1, dtype=np.float64)[:, None]
    return _losses(_layout(frame, members, LossLikelihood()), clocks)


def _run(job: _Job) -> IntArray:
    """T of every sample of a chunk: losses (among the members left) at the first mechanism.

    A frame that never gets a mechanism gets T = losable + 1.
    """
    clocks = _clocks(np.random.default_rng(job.seed), job.count, job.layout.weights)
    if job.removed >= 0:
        clocks[job.removed] = -np.inf
    return _losses(job.layout, clocks, removed=job.removed)


def _execute(jobs: Sequence[_Job], workers: int, on_progress: ProgressCallback | None) -> list[IntArray]:
    """Run the jobs, in a process pool when the work is large; results in job order."""
    work = sum(j.count * (len(j.layout.arcs.src) + len(j.layout.weights)) for j in jobs)
    results: list[IntArray] = []
    if workers > 1 and len(jobs) > 1 and work > _POOL_WORK:
        # forkserver: workers fork from a clean single-threaded server that imported this module once
        # (a plain fork would copy the caller's threads, e.g. a progress display, mid-state).
        # Where there is no forkserver (Windows), spawned workers import the engine themselves.
        context: BaseContext = multiprocessing.get_context("spawn")
        if "forkserver" in multiprocessing.get_all_start_methods():
            server = multiprocessing.get_context("forkserver")
            server.set_forkserver_preload([__name__])
            context = server
        with ProcessPoolExecutor(max_workers=min(workers, len(jobs)), mp_context=context) as pool:
            for result in pool.map(_run, jobs):
                results.append(result)
                if on_progress is not None:
                    on_progress(len(results), len(jobs))
        return results
    for job in jobs:
        results.append(_run(job))
        if on_progress is not None:
            on_progress(len(results), len(jobs))
    return results


def _chunk_seeds(seed: int, chunks: int) -> list[np.random.SeedSequence]:
    seeds: list[np.random.SeedSequence] = np.random.SeedSequence(seed).spawn(chunks)
    return seeds


def _chunk_counts(samples: int, chunk: int) -> list[int]:
    full, rest = divmod(samples, chunk)
    return [chunk] * full + ([rest] if rest else [])


# --------------------------------------------------------------------------- exact enumeration


def stable_without(frame: Frame, members: Sequence[Member], lost: BoolArray) -> BoolArray:
    """Which loss sets leave the layout stable (a batched check, many sets at once).

    Args:
        frame: Sizes and supports.
        members: The layout.
        lost: Shape (sets, members): True where a member is lost in that set.

    Returns:
        Shape (sets,).

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> b = MemberKind.BRACE
        >>> ms = [Member(1, 1, b, Diagonal.RISING), Member(1, 2, b, Diagonal.RISING)]
        >>> stable_without(Frame("f", (3000, 3000), (2000,)), ms, np.array([[False, False], [True, False]])).tolist()
        [True, False]
    """
    return _stable_sets(_layout(frame, members, LossLikelihood()), lost)


def _stable_sets(layout: _Layout, lost: BoolArray) -> BoolArray:
    if lost.shape[0] == 0:
        return np.zeros(0, dtype=bool)
    deaths = _deaths(layout, np.where(lost.T, 0.0, 1.0))
    return batch_strongly_connected(layout.arcs, deaths > 0.5)


@dataclass(frozen=True, slots=True)
class _Exact:
    """Exact P(stable after k losses) for k = 1..len(p); ``exhausted``: no stable set beyond them."""

    p: tuple[Fraction | float, ...]
    exhausted: bool


def _exact_curve(layout: _Layout, critical: BoolArray, *, limit: int) -> _Exact:
    """Enumerate the stable loss sets level by level while each level stays within ``limit`` sets."""
    weights = layout.weights
    losable = np.flatnonzero(weights > 0)
    count = len(losable)
    if count == 0:
        return _Exact((), exhausted=False)
    uniform = bool(np.all(weights[losable] == weights[losable[0]]))
    total = float(weights[losable].sum())
    first = [int(p) for p in np.flatnonzero(~critical[losable])]  # positions into losable
    if uniform:
        p: list[Fraction | float] = [Fraction(len(first), count)]
    else:
        p = [1.0 - float(weights[losable][critical[losable]].sum()) / total]
    level: dict[tuple[int, ...], float] = {(j,): float(weights[losable[j]]) / total for j in first}
    k = 1
    while level and k < count:
        # Uniform: each set grows only by members after its last (every set once); else every extension.
        size = sum(count - 1 - s[-1] for s in level) if uniform else len(level) * (count - k)
        if size > limit:
            return _Exact(tuple(p), exhausted=False)
        grown: dict[tuple[int, ...], float] = {}
        for s, prob in level.items():
            if uniform:
                for j in range(s[-1] + 1, count):
                    grown[(*s, j)] = 0.0
                continue
            gone = float(weights[losable[list(s)]].sum())
            for j in range(count):
                if j in s:
                    continue
                key = tuple(sorted((*s, j)))
                grown[key] = grown.get(key, 0.0) + prob * float(weights[losable[j]]) / (total - gone)
        keys = list(grown)
        lost = np.zeros((len(keys), len(weights)), dtype=bool)
        if keys:
            rows = np.repeat(np.arange(len(keys)), k + 1)
            lost[rows, losable[np.array(keys, dtype=np.int64).ravel()]] = True
        keep = _stable_sets(layout, lost)
        level = {key: grown[key] for key, ok in zip(keys, keep.tolist(), strict=True) if ok}
        k += 1
        if uniform:
            p.append(Fraction(len(level), math.comb(count, k)))
        else:
            p.append(math.fsum(level.values()))
    return _Exact(tuple(p), exhausted=not level)


# --------------------------------------------------------------------------- the statistics


def _exact_point(k: int, value: Fraction | float) -> CurvePoint:
    v = float(value)
    return CurvePoint(lost=k, p_stable=v, low=v, high=v, exact=True)


def _mc_point(k: int, losses: IntArray) -> CurvePoint:
    survived = int((losses > k).sum())
    low, high = clopper_pearson(survived, len(losses))
    return CurvePoint(lost=k, p_stable=survived / len(losses), low=low, high=high, exact=False)


def _flat(
    frame: Frame, members: tuple[Member, ...], likelihood: LossLikelihood, stable: bool, k: int, seed: int
) -> Robustness:
    """An unstable frame (or one whose losses can never break it): every value is known without search."""
    value = 1.0 if stable else 0.0
    curve = tuple(_exact_point(j, value) for j in range(1, k + 1))
    expected = None if stable else Estimate(0.0, 0.0, 0.0, exact=True)
    losable = sum(1 for m in members if likelihood.weight(m.kind) > 0)
    return Robustness(frame.name, len(members), losable, stable, curve, expected, likelihood, 0, seed)


def robustness_of(
    frame: Frame,
    *,
    members: Sequence[Member] | None = None,
    likelihood: LossLikelihood = LossLikelihood(),
    options: RobustnessOptions = RobustnessOptions(),
    on_progress: ProgressCallback | None = None,
) -> Robustness:
    """Probability of staying stable as members go missing at random, and the expected losses to a mechanism.

    Args:
        frame: The frame; its own members are the layout unless ``members`` is given.
        members: The layout to examine.
        likelihood: Relative loss likelihood of each member kind.
        options: Losses on the curve, samples, seed, processes, enumeration limit, ranking.
        on_progress: Called with (chunks done, chunks in all) as Monte Carlo chunks finish.

    Returns:
        The curve for k = 1..K (K = ``max_lost``, at most the members that can be lost), the
        expected losses to the first mechanism, and for a stable frame the member ranking.

    Raises:
        InputError: If the options are unusable.

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> t = MemberKind.TIE
        >>> x = [Member(1, 1, t, d) for d in Diagonal]  # an X of ties in one bay
        >>> r = robustness_of(Frame("f", (3000,), (2000,), members=tuple(x)))
        >>> [(p.lost, p.p_stable, p.exact) for p in r.curve], r.expected_losses.value
        ([(1, 0.0, True), (2, 0.0, True)], 1.0)
    """
    require_complete(frame)
    problems = options.problems()
    if problems:
        raise InputError(problems)
    layout_members = tuple(frame.members if members is None else members)
    layout = _layout(frame, layout_members, likelihood)
    losable = int((layout.weights > 0).sum())
    top = min(options.max_lost, losable)
    count, _ = arc_strong_components(layout.arcs)
    stable = count == 1
    never_lost = [m for m, w in zip(layout_members, layout.weights.tolist(), strict=True) if w == 0]
    holds_alone = stable and arc_strong_components(build_arcs(frame, never_lost))[0] == 1
    if not stable or losable == 0 or holds_alone:
        return _flat(frame, layout_members, likelihood, stable, top, options.seed)
    critical_members = set(map(id, find_critical_members(frame, layout_members)))
    critical = np.array([id(m) in critical_members for m in layout_members], dtype=bool)
    exact = _exact_curve(layout, critical, limit=options.exact_limit)
    chunk = layout.chunk
    main_counts = [] if exact.exhausted else _chunk_counts(options.samples, chunk)
    rank = options.rank_members
    rank_samples = min(options.samples, max(_MIN_RANKING_SAMPLES, 2 * options.samples // len(layout_members)))
    rank_counts = _chunk_counts(rank_samples, chunk) if rank else []
    chunks = max(len(main_counts), len(rank_counts))
    seeds = _chunk_seeds(options.seed, chunks)
    base_counts = main_counts if len(main_counts) >= len(rank_counts) else rank_counts
    jobs = [_Job(layout, seeds[i], n, -1) for i, n in enumerate(base_counts)]
    ranked = [i for i in range(len(layout_members)) if not critical[i]] if rank else []
    jobs += [_Job(layout, seeds[i], n, m) for m in ranked for i, n in enumerate(rank_counts)]
    results = _execute(jobs, options.workers, on_progress)
    base = results[: len(base_counts)]
    curve: list[CurvePoint] = []
    losses = np.concatenate(base[: len(main_counts)]) if main_counts else np.zeros(0, dtype=np.int64)
    for k in range(1, top + 1):
        if k <= len(exact.p):
            curve.append(_exact_point(k, exact.p[k - 1]))
        elif exact.exhausted:
            curve.append(_exact_point(k, 0.0))
        else:
            curve.append(_mc_point(k, losses))
    if exact.exhausted:
        # E[T] = sum over k >= 0 of P(T > k) = 1 + the curve summed to the level with no stable set.
        total = sum(exact.p, Fraction(0)) if all(isinstance(v, Fraction) for v in exact.p) else math.fsum(exact.p)
        value = float(1 + total)
        expected = Estimate(value, value, value, exact=True)
    else:
        mean, low, high = student_interval(losses.astype(np.float64))
        expected = Estimate(mean, max(low, 1.0), min(high, float(losable)), exact=False)
    ranking: list[MemberDrop] = []
    if rank:
        reference = np.concatenate(base[: len(rank_counts)])[:rank_samples]
        kept = np.clip(reference - 1, 0, top)
        removed_results = results[len(base_counts) :]
        per = len(rank_counts)
        by_member = {m: np.concatenate(removed_results[j * per : (j + 1) * per]) for j, m in enumerate(ranked)}
        for i, member in enumerate(layout_members):
            without = by_member.get(i, np.zeros_like(reference))
            diff = (kept - np.clip(without - 1, 0, top)) / top
            mean, low, high = student_interval(diff.astype(np.float64))
            ranking.append(MemberDrop(member, mean, max(low, 0.0), min(high, 1.0), critical=bool(critical[i])))
        ranking.sort(key=lambda d: (-d.drop, not d.critical, d.member.sort_key))
    return Robustness(
        frame=frame.name,
        members=len(layout_members),
        losable=losable,
        stable=True,
        curve=tuple(curve),
        expected_losses=expected,
        likelihood=likelihood,
        samples=len(losses),
        seed=options.seed,
        ranking=tuple(ranking),
        ranking_samples=rank_samples if rank else 0,
    )


def project_robustness(
    project: Project,
    *,
    frames: Sequence[Frame] | None = None,
    options: RobustnessOptions = RobustnessOptions(),
    on_progress: Callable[[str, int, int], None] | None = None,
) -> tuple[Robustness, ...]:
    """Robustness statistics of every frame (or of the frames given), with the project's likelihoods.

    Args:
        project: Gives the frames and ``loss_likelihood``.
        frames: Frames to examine (default: all).
        options: As for :func:`robustness_of`.
        on_progress: Called with (frame name, chunks done, chunks in all).

    Returns:
        One result per frame, in order.
    """
    out = []
    for frame in project.frames if frames is None else frames:

        def step(done: int, total: int, name: str = frame.name) -> None:
            if on_progress is not None:
                on_progress(name, done, total)

        out.append(robustness_of(frame, likelihood=project.loss_likelihood, options=options, on_progress=step))
    return tuple(out)


# --------------------------------------------------------------------------- independent losses


def estimate_kept_stable(
    frame: Frame, members: Sequence[Member], *, keep_probability: float, samples: int, seed: int = 0
) -> CurvePoint:
    """P(stable) when each member is kept independently with ``keep_probability`` (Monte Carlo).

    The other classic loss model: every member missing on its own with probability
    1 - ``keep_probability``, so the number lost is binomial. With a rigid brace in every bay
    and probability 1/2 this is the fraction of brace subsets that are rigid (OEIS A227322).

    Args:
        frame: Sizes and supports.
        members: The full layout.
        keep_probability: Chance that each member is in place, in [0, 1].
        samples: Random layouts drawn.
        seed: Seed of the generator.

    Returns:
        The estimate with its Clopper-Pearson interval (``lost`` holds 0).

    Raises:
        InputError: If the probability or the sample count is out of range.
    """
    problems = []
    if not 0.0 <= keep_probability <= 1.0:
        problems.append(f"keep_probability {keep_probability}: give a probability between 0 and 1")
    if samples < 1:
        problems.append(f"samples {samples}: give at least 1")
    if problems:
        raise InputError(problems)
    layout = _layout(frame, members, LossLikelihood())
    rng = np.random.default_rng(seed)
    stable = 0
    for n in _chunk_counts(samples, layout.chunk):
        lost = rng.random((n, len(members))) >= keep_probability
        stable += int(_stable_sets(layout, lost).sum())
    low, high = clopper_pearson(stable, samples)
    return CurvePoint(lost=0, p_stable=stable / samples, low=low, high=high, exact=False)
