"""Benchmark: time the stability check on large frames with dense random layouts.

Prints a table: bays, members, seconds (best of three) for the verdict (strong components,
loose parts and critical members), and peak Python memory. File parsing and
building the Member tuples are excluded, as the target asks.

Target (issue 2): a 1000 x 1000 frame checked in under 1 s on a 2-core machine.
Run: python benchmarks/bench_check.py [--sizes 100 300 1000] [--density 0.5]
"""

from __future__ import annotations

import argparse
import time
import tracemalloc

import numpy as np

from bracegrid.analysis import check_layout, find_critical_members
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports

KINDS = (MemberKind.BRACE, MemberKind.TIE)
DIAGS = (Diagonal.RISING, Diagonal.FALLING)


def dense_layout(n: int, density: float, seed: int) -> tuple[Member, ...]:
    rng = np.random.default_rng(seed)
    mask = rng.random((n, n, 2)) < density
    kinds = rng.random((n, n, 2)) < 0.3
    rows, cols, diag = np.nonzero(mask)
    brace = kinds[rows, cols, diag]
    return tuple(
        Member(int(r) + 1, int(c) + 1, KINDS[0] if b else KINDS[1], DIAGS[d])
        for r, c, d, b in zip(rows, cols, diag, brace, strict=True)
    )


def minimal_layout(n: int) -> tuple[Member, ...]:
    """A spanning tree of braces (every member critical): worst case for critical members."""
    first_row = [Member(1, j, MemberKind.BRACE, Diagonal.RISING) for j in range(1, n + 1)]
    first_col = [Member(i, 1, MemberKind.BRACE, Diagonal.RISING) for i in range(2, n + 1)]
    return tuple(first_row + first_col)


def measure(frame: Frame, members: tuple[Member, ...]) -> tuple[float, float, bool, int]:
    """Best of three timed runs, then one run under tracemalloc for the peak (it slows Python down)."""
    seconds = float("inf")
    for _ in range(3):
        t0 = time.perf_counter()
        verdict = check_layout(frame, members)
        seconds = min(seconds, time.perf_counter() - t0)
    tracemalloc.start()
    check_layout(frame, members)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return seconds, peak / 2**20, verdict.stable, len(verdict.critical_members)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", type=int, nargs="+", default=[100, 300, 1000])
    parser.add_argument("--density", type=float, default=0.5)
    args = parser.parse_args()
    header = f"{'case':<28}{'bays':>10}{'members':>10}{'seconds':>10}{'peak MiB':>10}{'stable':>8}{'critical':>10}"
    print(header)
    print("-" * len(header))
    for n in args.sizes:
        for supports in (Supports.FREE, Supports.BASE):
            frame = Frame("bench", (2500,) * n, (2000,) * n, supports=supports)
            members = dense_layout(n, args.density, seed=n)
            s, mem, ok, crit = measure(frame, members)
            case = f"dense {n}x{n} {supports.value}"
            print(f"{case:<28}{n * n:>10}{len(members):>10}{s:>10.3f}{mem:>10.1f}{ok!s:>8}{crit:>10}")
        frame = Frame("bench", (2500,) * n, (2000,) * n)
        members = minimal_layout(n)
        s, mem, ok, crit = measure(frame, members)
        print(
            f"{f'spanning tree {n}x{n} free':<28}{n * n:>10}{len(members):>10}{s:>10.3f}{mem:>10.1f}{ok!s:>8}{crit:>10}"
        )
    # Critical members alone on a minimal layout (issue 4 target: 1000 x 1000 in under 2 s).
    n = max(args.sizes)
    frame = Frame("bench", (2500,) * n, (2000,) * n)
    t0 = time.perf_counter()
    crit = find_critical_members(frame, minimal_layout(n))
    print(f"\ncritical members of a {n}x{n} spanning-tree layout: {len(crit)} in {time.perf_counter() - t0:.3f} s")


if __name__ == "__main__":
    main()
