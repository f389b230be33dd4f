"""Benchmark: robustness statistics (Monte Carlo of random member losses) on 30 x 30 layouts.

Prints a table: layout, members, distinct arcs, samples, processes, wall seconds, samples per
second, the expected losses to a mechanism, and the machine's load average before and after
(the CPU is shared, so the seconds are pessimistic when the load is above the core count).
Enumeration is switched off (``exact_limit=0``) so that every sample is drawn and searched;
k = 1 still comes from the critical members.

Target (issue 15): 10^5 samples on a 30 x 30 layout in under 10 s on a 2-core machine.
Run: python benchmarks/bench_robustness.py [--samples 100000] [--workers 1 2] [--ranking] [--force-pool]
("pool" says whether worker processes ran: only above engine._POOL_WORK, unless --force-pool; the
pool column of a --ranking run counts the curve's samples only.)
"""

from __future__ import annotations

import argparse
import dataclasses
import os
import time

import numpy as np

from bracegrid.analysis import RobustnessOptions, build_arcs, robustness_of
from bracegrid.analysis import robustness as engine
from bracegrid.compare import rule_of_thumb_layout
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports

N = 30


def _cycle_of_ties(n: int) -> tuple[Member, ...]:
    """2n ties closing one directed cycle through every row and column: every member critical."""
    t = MemberKind.TIE
    ms = [Member(i, i, t, Diagonal.RISING) for i in range(1, n + 1)]
    ms += [Member(i + 1, i, t, Diagonal.FALLING) for i in range(1, n)]
    return (*ms, Member(1, n, t, Diagonal.FALLING))


def _dense(n: int, seed: int) -> tuple[Member, ...]:
    rng = np.random.default_rng(seed)
    out = []
    for i in range(1, n + 1):
        for j in range(1, n + 1):
            for d in Diagonal:
                if rng.random() < 0.5:
                    out.append(Member(i, j, MemberKind.BRACE if rng.random() < 0.3 else MemberKind.TIE, d))
    return tuple(out)


def _cases() -> list[tuple[str, Frame]]:
    free = Frame("free", (2500,) * N, (2000,) * N)
    base = dataclasses.replace(free, supports=Supports.BASE)
    return [
        ("rule of thumb, free", dataclasses.replace(free, members=rule_of_thumb_layout(free))),
        ("rule of thumb, pinned base", dataclasses.replace(base, members=rule_of_thumb_layout(base))),
        ("cycle of 60 ties, free", dataclasses.replace(free, members=_cycle_of_ties(N))),
        ("random half-full, free", dataclasses.replace(free, members=_dense(N, 1))),
    ]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--samples", type=int, default=100_000)
    parser.add_argument("--workers", type=int, nargs="+", default=[1, 2])
    parser.add_argument("--ranking", action="store_true", help="time the member ranking too (enumeration on)")
    parser.add_argument("--force-pool", action="store_true", help="start the process pool even for small work")
    args = parser.parse_args()
    if args.force_pool:
        engine._POOL_WORK = 0  # measuring the pool itself
    limit = engine._POOL_WORK
    head = (
        f"{'layout':<28}{'members':>8}{'arcs':>6}{'samples':>9}{'procs':>6}{'seconds':>9}{'samples/s':>11}"
        f"{'E[T]':>9}{'how':>7}{'pool':>6}{'load before':>13}{'load after':>12}"
    )
    print(f"30 x 30 frames; {os.cpu_count()} CPUs")
    print(head)
    print("-" * len(head))
    for name, frame in _cases():
        arcs = build_arcs(frame, frame.members)
        if args.ranking:
            # Enumeration stays on: the ranking is what is timed.
            options = RobustnessOptions(samples=args.samples, seed=1, rank_members=True)
        else:
            options = RobustnessOptions(samples=args.samples, seed=1, exact_limit=0, rank_members=False)
        for workers in args.workers:
            load = os.getloadavg()[0]
            t0 = time.perf_counter()
            r = robustness_of(frame, options=dataclasses.replace(options, workers=workers))
            seconds = time.perf_counter() - t0
            after = os.getloadavg()[0]
            e = r.expected_losses
            expected = "-" if e is None else f"{e.value:.2f}"
            how = "exact" if r.exact else "MC"
            work = r.samples * (len(arcs.src) + len(frame.members))
            pool = "yes" if workers > 1 and work > limit else "no"
            rate = f"{args.samples / seconds:.0f}" if r.samples else "-"
            print(
                f"{name:<28}{len(frame.members):>8}{len(arcs.src):>6}{r.samples:>9}{workers:>6}{seconds:>9.2f}"
                f"{rate:>11}{expected:>9}{how:>7}{pool:>6}{load:>13.2f}{after:>12.2f}"
            )
    print("seconds: wall clock of robustness_of, including process start-up when procs > 1 and the work is large")
    print("how: exact = every value enumerated (no sampling needed: e.g. every member critical), MC = Monte Carlo")


if __name__ == "__main__":
    main()
