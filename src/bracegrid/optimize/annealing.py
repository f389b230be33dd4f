"""Simulated annealing on the elastic check: cheaper layouts that pass it (a heuristic; it proves nothing).

The cut loop proves bounds with the plastic model and meets the elastic check only layout by
layout. Where the plastic model's layouts keep failing the elastic check (a plan grid held on two
edges: each column's shear gathers on its one or two ties and the ledgers between them take it, where
the plastic model would spread it), the loop may end with no elastically adequate layout at all.
This search then moves one member at a time under the elastic analysis itself (Kirkpatrick, Gelatt
& Vecchi, Science 220 (1983) 671): a move drops a member, shifts one to a free diagonal of its own
or a neighbouring bay, or adds one; a move that keeps the layout stable and within the rules is
taken when it lowers

    cost + OVERLOAD_PRICE x (mean member cost) x (largest elastic utilisation - 1, if over)

or, with the Metropolis probability, when it raises it; the temperature falls linearly over the
time (or the evaluations) allowed. The answer is the cheapest layout met that passes the elastic
check; the caller re-checks it. Measured on the 20 x 20 plan grid of ``benchmarks/bench_strength.py``
(2026-12-02): from a plastic-only layout of 56 ties (elastic utilisation 1.22) to an adequate one
of 74 ties in about 400 evaluations.
"""

from __future__ import annotations

import math
import random
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass

from bracegrid.model import Diagonal
from bracegrid.optimize.capacity import Candidate

#: Price of one unit of elastic overload, in mean member costs: high enough that an overloaded
#: layout never scores below an adequate one a few members dearer (the measured runs above
#: passed through overloads of 0.1 to 0.3 on the way down; 100 makes 0.01 worth one member).
OVERLOAD_PRICE = 100.0
#: Temperature at the start and at the end, in mean member costs (at the start a move that adds two
#: members is taken about one time in three; at the end almost never).
START_TEMPERATURE = 2.0
END_TEMPERATURE = 0.05
#: Shares of the moves (drop a member, shift one to a neighbouring diagonal; the rest add one) while
#: the layout passes the elastic check, and while it is over: an overloaded layout mostly needs a
#: member more near its overload, an adequate one fewer members (measured on the 20 x 20 plan grid
#: of the benchmark: with one fixed share of 0.25 / 0.5 some 24 s runs from a heavily overloaded
#: start met no adequate layout at all).
SHARES_OK = (0.4, 0.5)
SHARES_OVER = (0.1, 0.4)

#: Share of the added members drawn near an overloaded bar, when the layout has one (the rest
#: anywhere): overloads are local, and a member far from one rarely helps it.
HOT_SHARE = 0.7


@dataclass(frozen=True, slots=True)
class Verdict:
    """The elastic check of one layout, as the search needs it.

    Attributes:
        worst: Largest utilisation over the cases (base uplift over its limit counted as one).
        ok: The layout passes the elastic check.
        hot: Bays (row, column) beside the bars over their capacity.
    """

    worst: float
    ok: bool
    hot: tuple[tuple[int, int], ...] = ()


#: The elastic verdict of a layout; None for a mechanism or a solve that failed its residual check.
Judge = Callable[[Sequence[bool]], Verdict | None]


@dataclass(frozen=True, slots=True)
class Annealed:
    """The cheapest elastically adequate layout the search met.

    Attributes:
        chosen: One flag per candidate.
        cost: Its cost in cost units.
        evaluations: Elastic analyses run.
    """

    chosen: tuple[bool, ...]
    cost: int
    evaluations: int


def anneal(
    cands: Sequence[Candidate],
    costs: Sequence[int],
    start: Sequence[bool],
    *,
    holds: Callable[[Sequence[bool]], bool],
    judge: Judge,
    deadline: float,
    seed: int,
    max_evaluations: int | None = None,
) -> Annealed | None:
    """Search from ``start`` (a layout that ``holds``) for cheaper layouts that pass the elastic check.

    ``holds`` says whether a layout is stable at the redundancy asked and meets the rules; ``judge``
    runs the elastic analysis. The run ends at ``deadline`` (``time.monotonic``) or after
    ``max_evaluations``; with an infinite deadline the schedule follows the evaluations alone, so a
    run is the same on any machine. None when no adequate layout was met.
    """
    rng = random.Random(seed)
    free = [k for k, c in enumerate(cands) if not c.kept]
    if not free:
        return None
    unit = sum(costs[k] for k in free) / len(free)
    near: dict[tuple[int, int], list[int]] = {}
    for k in free:
        c = cands[k]
        for dr in (-1, 0, 1):
            for dc in (-1, 0, 1):
                near.setdefault((c.row + dr, c.col + dc), []).append(k)
    began = time.monotonic()
    budget = deadline - began

    def price(chosen: Sequence[bool]) -> int:
        return sum(costs[k] for k in free if chosen[k])

    def score(cost: int, verdict: Verdict) -> float:
        return cost + (0.0 if verdict.ok else OVERLOAD_PRICE * unit * max(verdict.worst - 1.0, 1e-3))

    cur = list(start)
    slots = {(c.row, c.col, c.diagonal) for c, on in zip(cands, cur, strict=True) if on}
    verdict = judge(cur)
    evaluations = 1
    if verdict is None:
        return None
    cost = price(cur)
    now = score(cost, verdict)
    best = (tuple(cur), cost) if verdict.ok else None
    hot, ok = verdict.hot, verdict.ok
    while True:
        if max_evaluations is not None and evaluations >= max_evaluations:
            break
        clock = time.monotonic()
        if clock >= deadline:
            break
        share = (clock - began) / budget if math.isfinite(budget) and budget > 0 else 0.0
        if max_evaluations is not None:
            share = max(share, evaluations / max_evaluations)
        temperature = unit * (START_TEMPERATURE + (END_TEMPERATURE - START_TEMPERATURE) * min(share, 1.0))
        trial = _move(rng, cands, free, near, cur, slots, hot, SHARES_OK if ok else SHARES_OVER)
        if trial is None or not holds(trial):
            continue
        got = judge(trial)
        evaluations += 1
        if got is None:
            continue
        trial_cost = price(trial)
        then = score(trial_cost, got)
        if then <= now or rng.random() < math.exp((now - then) / temperature):
            cur, now, hot, ok = trial, then, got.hot, got.ok
            slots = {(c.row, c.col, c.diagonal) for c, on in zip(cands, cur, strict=True) if on}
            if got.ok and (best is None or trial_cost < best[1]):
                best = (tuple(cur), trial_cost)
    if best is None:
        return None
    return Annealed(best[0], best[1], evaluations)


def _move(
    rng: random.Random,
    cands: Sequence[Candidate],
    free: Sequence[int],
    near: dict[tuple[int, int], list[int]],
    cur: Sequence[bool],
    slots: set[tuple[int, int, Diagonal]],
    hot: Sequence[tuple[int, int]],
    shares: tuple[float, float],
) -> list[bool] | None:
    """One random neighbour of a layout (None when the move drawn has nothing to act on)."""
    on = [k for k in free if cur[k]]
    trial = list(cur)
    pick = rng.random()
    drop, shift = shares
    if pick < drop + shift and on:
        k = rng.choice(on)
        trial[k] = False
        if pick < drop:
            return trial
        c = cands[k]
        left = slots - {(c.row, c.col, c.diagonal)}
        options = [n for n in near.get((c.row, c.col), []) if n != k and
                   (cands[n].row, cands[n].col, cands[n].diagonal) not in left]  # fmt: skip
        if not options:
            return None
        trial[rng.choice(options)] = True
        return trial
    pool = near.get(rng.choice(hot), []) if hot and rng.random() < HOT_SHARE else free
    options = [n for n in pool if not cur[n] and (cands[n].row, cands[n].col, cands[n].diagonal) not in slots]
    if not options:
        return None
    trial[rng.choice(options)] = True
    return trial
