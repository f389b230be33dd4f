"""Benchmark: member forces (direct stiffness, tension-only ties) on large frames.

Prints a table: layout, members, degrees of freedom, seconds for each load case (the framework
and its free motions built once per layout, excluded; shown apart as "prepare s"), Newton steps
per case, and the peak resident memory of the process that ran it (each row in a fresh process).

Targets (issue 11): 100 x 100 bays (about 20,000 degrees of freedom) with X-ties in every bay, with a
random mixed layout and with a sparse minimal layout, two load cases each: under 3 s per case; a
30 x 15 scaffold face with four load cases: under 0.3 s for all four. The machine is shared, so
the times are pessimistic.
Run: python benchmarks/bench_forces.py [--size 100]
"""

from __future__ import annotations

import argparse
import dataclasses
import resource
import time
from concurrent.futures import ProcessPoolExecutor

import numpy as np

from bracegrid.mechanics import analyse_frame, prepare_layout
from bracegrid.model import (
    Diagonal,
    Frame,
    GridStrength,
    LoadCase,
    Member,
    MemberKind,
    MemberStrength,
    StrengthCatalogue,
    Supports,
)

#: Invented stiffness values (kN): a steel tube grid, tube braces, straps.
STRENGTH = StrengthCatalogue(
    brace=MemberStrength(ea_kn=110000.0), tie=MemberStrength(ea_kn=10000.0), grid=GridStrength(ea_kn=110000.0)
)
B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING


def x_ties(rows: int, cols: int) -> tuple[Member, ...]:
    return tuple(Member(i, j, T, d) for i in range(1, rows + 1) for j in range(1, cols + 1) for d in (R, F))


def mixed(rows: int, cols: int, seed: int = 1) -> tuple[Member, ...]:
    """Random braces and ties (40 % of diagonals, a third braces), each lift made stable on a base."""
    rng = np.random.default_rng(seed)
    out = []
    for i in range(1, rows + 1):
        row = [Member(i, j, B if rng.random() < 1 / 3 else T, d) for j in range(1, cols + 1) for d in (R, F)
               if rng.random() < 0.4]  # fmt: skip
        up = any(m.kind is B or m.diagonal is R for m in row)
        down = any(m.kind is B or m.diagonal is F for m in row)
        if not (up and down):
            spare = {(m.col, m.diagonal) for m in row}
            j = next(j for j in range(1, cols + 1) if (j, R) not in spare)
            row.append(Member(i, j, B, R))
        out.extend(row)
    return tuple(out)


def minimal(rows: int, cols: int, seed: int = 2) -> tuple[Member, ...]:
    """One brace per lift in a random bay: the fewest members a pinned base needs (determinate)."""
    rng = np.random.default_rng(seed)
    return tuple(
        Member(i, int(rng.integers(1, cols + 1)), B, R if rng.random() < 0.5 else F) for i in range(1, rows + 1)
    )


def cases(rows: int, *, four: bool) -> tuple[LoadCase, ...]:
    """Two cases (uniform and triangular wind), or four (those two, each also reversed)."""
    uniform = LoadCase("uniform", (0.0, *([1.0] * rows)), reverse=four)
    triangle = LoadCase("triangle", (0.0, *(2.0 * p / rows for p in range(1, rows + 1))), reverse=four)
    return (uniform, triangle)


@dataclasses.dataclass(frozen=True)
class Row:
    name: str
    bays: str
    members: int
    dofs: int
    prepare: float
    cases: int
    total: float
    steps: tuple[int, ...]
    peak_mb: float


def run(job: tuple[str, int, int, bool]) -> Row:
    name, rows, cols, four = job
    layout = {"X-ties": x_ties, "random mixed": mixed, "sparse minimal": minimal}[name](rows, cols)
    frame = Frame(name, (2500,) * cols, (2000,) * rows, supports=Supports.BASE, members=layout,
                  loads=cases(rows, four=four))  # fmt: skip
    t0 = time.perf_counter()
    prepare_layout(frame, STRENGTH)
    prepare = time.perf_counter() - t0
    t0 = time.perf_counter()
    result = analyse_frame(frame, STRENGTH)  # prepares again, then solves every case
    total = time.perf_counter() - t0 - prepare
    if result.mechanisms:
        msg = f"{name}: a case found a mechanism"
        raise SystemExit(msg)
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # Linux: kB
    return Row(name, f"{cols}x{rows}", len(layout), 2 * rows * (cols + 1), prepare, len(result.cases), total,
               tuple(c.steps for c in result.cases), peak)  # fmt: skip


def main() -> None:
    parser = argparse.ArgumentParser(description=(__doc__ or "").splitlines()[0])
    parser.add_argument("--size", type=int, default=100, help="bays each way of the large frames (default 100)")
    args = parser.parse_args()
    n = args.size
    jobs = [("X-ties", n, n, False), ("random mixed", n, n, False), ("sparse minimal", n, n, False),
            ("X-ties", 15, 30, True)]  # fmt: skip
    head = ("layout", "bays", "members", "dofs", "prepare s", "cases", "s per case", "all cases s", "Newton steps",
            "peak MB")  # fmt: skip
    print(f"{head[0]:<16}{head[1]:>9}{head[2]:>9}{head[3]:>8}{head[4]:>11}{head[5]:>7}{head[6]:>12}{head[7]:>13}"
          f"  {head[8]:<16}{head[9]:>8}")  # fmt: skip
    for job in jobs:
        with ProcessPoolExecutor(max_workers=1) as pool:  # a fresh process per row: its own peak memory
            r = pool.submit(run, job).result()
        steps = ",".join(str(s) for s in r.steps)
        print(f"{r.name:<16}{r.bays:>9}{r.members:>9}{r.dofs:>8}{r.prepare:>11.3f}{r.cases:>7}"
              f"{r.total / r.cases:>12.3f}{r.total:>13.3f}  {steps:<16}{r.peak_mb:>8.0f}")  # fmt: skip
    print("targets: 100x100 under 3 s per case; the 30x15 face, four cases, under 0.3 s in all; shared machine: "
          "times are pessimistic")  # fmt: skip


if __name__ == "__main__":
    main()
