"""Optimizer benchmark: time to proven optimum, or the gap at the time limit.

Run: .venv/bin/python benchmarks/bench_optimize.py [--limit 60] [--workers 2] [--quick]
       [--only NAME ...] [--redundancy] [--targets]

Instances (invented, seeded): random bay sizes 1-3 m, costs by length from the
default catalogue (brace 25 + 8/m, tie 9 + 3/m), a cheap-tie catalogue
(brace 40 + 12/m, tie 4 + 1/m) or ties at 0.55 of the default brace price
(13.75 + 4.4/m: a strap against a tube brace), 10% of bays blocked, free or
pinned base; plus a uniform 12 x 8 roof grid (free) with a 2 x 2 opening.
Prints one table row per instance, and the machine's load average before and
after (the machine is shared: timings under load are pessimistic).

``--targets`` runs the rows of the proof targets (docs/optimizer.md) and
prints each target beside the result.
"""

from __future__ import annotations

import argparse
import os
import random
import sys
import time
from dataclasses import dataclass

from bracegrid.model import CostCatalogue, CostRate, Frame, MemberKind, Supports
from bracegrid.optimize import FrameSolution, SolveOptions, SolveStatus, optimize_frame

DEFAULT = CostCatalogue()
CHEAP_TIES = CostCatalogue(brace=CostRate(40.0, 12.0), tie=CostRate(4.0, 1.0))
#: A tie at 0.55 of the default brace's price, per piece and per metre.
TIES_055 = CostCatalogue(brace=CostRate(25.0, 8.0), tie=CostRate(13.75, 4.4))


@dataclass(frozen=True, slots=True)
class Case:
    """One benchmark instance and, for target rows, what it should reach."""

    name: str
    frame: Frame
    costs: CostCatalogue
    k: int
    target_gap: float | None = None  # None: no target; 0.0: proven optimal; else a gap below this (fraction)


def random_frame(rows: int, cols: int, seed: int, *, supports: Supports = Supports.FREE,
                 allow: frozenset[MemberKind] = frozenset(MemberKind), blocked: float = 0.1) -> Frame:  # fmt: skip
    rng = random.Random(seed)
    widths = tuple(rng.randint(10, 30) * 100 for _ in range(cols))
    heights = tuple(rng.randint(10, 30) * 100 for _ in range(rows))
    shut = frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < blocked)
    return Frame(f"{rows}x{cols}", widths, heights, supports=supports, blocked=shut, allow=allow)


def roof_grid() -> Frame:
    opening = frozenset({(4, 5), (4, 6), (5, 5), (5, 6)})
    return Frame("roof 12x8 + 2x2 opening", (2500,) * 12, (2000,) * 8, blocked=opening)


def target_cases() -> list[Case]:
    """The rows with proof targets (each also appears in the full table)."""
    return [
        Case("mixed free 50x50", random_frame(50, 50, 50), DEFAULT, 0, 0.0),
        Case("ties 0.55 free 20x30", random_frame(20, 30, 600), TIES_055, 0, 0.01),
        Case("mixed free 100x100", random_frame(100, 100, 100), DEFAULT, 0, 0.01),
        Case("N-1 mixed free 30x30", random_frame(30, 30, 30), DEFAULT, 1, 0.0),
        Case("N-1 mixed free 40x40", random_frame(40, 40, 40), DEFAULT, 1, 0.02),
    ]


def cases(quick: bool, redundancy: bool) -> list[Case]:
    out: list[Case] = []
    targets = {c.name: c for c in target_cases()}
    if redundancy:
        for n in [10, 20, 30] if quick else [10, 20, 30, 40]:
            name = f"N-1 mixed free {n}x{n}"
            out.append(targets.get(name) or Case(name, random_frame(n, n, n), DEFAULT, 1))
        return out
    for n in [10, 20, 30] if quick else [10, 20, 30, 50, 80, 100]:
        name = f"mixed free {n}x{n}"
        out.append(targets.get(name) or Case(name, random_frame(n, n, n), DEFAULT, 0))
    for r, c in [(10, 20), (20, 30)]:
        out.append(Case(f"cheap ties free {r}x{c}", random_frame(r, c, r * c), CHEAP_TIES, 0))
    out.append(targets["ties 0.55 free 20x30"])
    out.append(Case("uniform roof 12x8 opening", roof_grid(), DEFAULT, 0))
    out.append(Case("uniform roof 12x8 opening, cheap ties", roof_grid(), CHEAP_TIES, 0))
    big = 30 if quick else 100
    out.append(Case(f"braces only free {big}x{big}", random_frame(big, big, 7, allow=frozenset({MemberKind.BRACE})),
                    DEFAULT, 0))  # fmt: skip
    out.append(Case(f"pinned base {big}x{big}", random_frame(big, big, 8, supports=Supports.BASE), DEFAULT, 0))
    out.append(Case(f"pinned base {big}x{big} cheap ties", random_frame(big, big, 9, supports=Supports.BASE),
                    CHEAP_TIES, 0))  # fmt: skip
    return out


def verdict(case: Case, sol: FrameSolution) -> str:
    """The target and whether this run met it."""
    if case.target_gap is None:
        return ""
    if case.target_gap == 0.0:
        return "optimal: " + ("met" if sol.status is SolveStatus.OPTIMAL else "MISSED")
    return f"gap < {100 * case.target_gap:g}%: " + ("met" if sol.gap < case.target_gap else "MISSED")


def load() -> str:
    one, five, fifteen = os.getloadavg()
    return f"load average {one:.2f} {five:.2f} {fifteen:.2f} ({os.cpu_count()} cores)"


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--limit", type=float, default=60.0)
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--seed", type=int, default=0)
    ap.add_argument("--quick", action="store_true", help="small sizes only")
    ap.add_argument("--redundancy", action="store_true", help="N-1 rows")
    ap.add_argument("--targets", action="store_true", help="only the rows with proof targets")
    ap.add_argument("--only", nargs="*", default=None, help="substrings of case names to run")
    args = ap.parse_args(argv)
    print(f"{time.strftime('%Y-%m-%d %H:%M')}  limit {args.limit:g} s, {args.workers} workers, seed {args.seed}; "
          f"{load()}")  # fmt: skip
    head = f"{'case':40} {'status':9} {'cost':>11} {'bound':>11} {'gap %':>7} {'time s':>7}  {'target':22} method"
    print(head)
    print("-" * len(head))
    chosen = target_cases() if args.targets else cases(args.quick, args.redundancy)
    for case in chosen:
        if args.only and not any(s in case.name for s in args.only):
            continue
        t0 = time.monotonic()
        options = SolveOptions(time_limit=args.limit, workers=args.workers, seed=args.seed, redundancy=case.k)
        sol = optimize_frame(case.frame, case.costs, options=options)
        took = time.monotonic() - t0
        print(f"{case.name:40} {sol.status.value:9} {sol.cost:11.2f} {sol.bound:11.2f} {100 * sol.gap:7.2f} "
              f"{took:7.2f}  {verdict(case, sol):22} {sol.method_text}", flush=True)  # fmt: skip
    print(load())
    return 0


if __name__ == "__main__":
    sys.exit(main())
