"""Optimizer benchmark: time to proven optimum, or the gap at the time limit.

Run: .venv/bin/python benchmarks/bench_optimize.py [--limit 60] [--workers 2] [--quick]
       [--only NAME ...] [--redundancy]

Instances (invented, seeded): random bay sizes 1-3 m, costs by length from the
default catalogue (brace 25 + 8/m, tie 9 + 3/m) or a cheap-tie catalogue,
10% of bays blocked, free or pinned base; plus a uniform 12 x 8 roof grid
(free) with a 2 x 2 opening. Prints one table row per instance.
"""

from __future__ import annotations

import argparse
import random
import sys
import time

from bracegrid.model import CostCatalogue, CostRate, Frame, MemberKind, Supports
from bracegrid.optimize import SolveOptions, optimize_frame

DEFAULT = CostCatalogue()
CHEAP_TIES = CostCatalogue(brace=CostRate(40.0, 12.0), tie=CostRate(4.0, 1.0))


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


def cases(quick: bool, redundancy: bool) -> list[tuple[str, Frame, CostCatalogue, int]]:
    out: list[tuple[str, Frame, CostCatalogue, int]] = []
    sizes = [10, 20, 30] if quick else [10, 20, 30, 50, 100]
    if redundancy:
        for n in [10, 20, 30]:
            out.append((f"N-1 mixed free {n}x{n}", random_frame(n, n, n), DEFAULT, 1))
        return out
    for n in sizes:
        out.append((f"mixed free {n}x{n}", random_frame(n, n, n), DEFAULT, 0))
    for r, c in [(10, 20), (20, 30)]:
        out.append((f"cheap ties free {r}x{c}", random_frame(r, c, r * c), CHEAP_TIES, 0))
    out.append(("uniform roof 12x8 opening", roof_grid(), DEFAULT, 0))
    out.append(("uniform roof 12x8 opening, cheap ties", roof_grid(), CHEAP_TIES, 0))
    big = 30 if quick else 100
    out.append((f"braces only free {big}x{big}", random_frame(big, big, 7, allow=frozenset({MemberKind.BRACE})),
                DEFAULT, 0))  # fmt: skip
    out.append((f"pinned base {big}x{big}", random_frame(big, big, 8, supports=Supports.BASE), DEFAULT, 0))
    out.append((f"pinned base {big}x{big} cheap ties", random_frame(big, big, 9, supports=Supports.BASE),
                CHEAP_TIES, 0))  # fmt: skip
    return out


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--limit", type=float, default=60.0)
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--quick", action="store_true", help="small sizes only")
    ap.add_argument("--redundancy", action="store_true", help="N-1 rows")
    ap.add_argument("--only", nargs="*", default=None, help="substrings of case names to run")
    args = ap.parse_args(argv)
    head = f"{'case':40} {'status':9} {'cost':>11} {'bound':>11} {'gap %':>7} {'time s':>7}  method"
    print(head)
    print("-" * len(head))
    for name, frame, costs, k in cases(args.quick, args.redundancy):
        if args.only and not any(s in name for s in args.only):
            continue
        t0 = time.monotonic()
        sol = optimize_frame(frame, costs, options=SolveOptions(time_limit=args.limit, workers=args.workers,
                                                               redundancy=k))  # fmt: skip
        took = time.monotonic() - t0
        print(f"{name:40} {sol.status.value:9} {sol.cost:11.2f} {sol.bound:11.2f} {100 * sol.gap:7.2f} "
              f"{took:7.2f}  {sol.method}", flush=True)  # fmt: skip
    return 0


if __name__ == "__main__":
    sys.exit(main())
