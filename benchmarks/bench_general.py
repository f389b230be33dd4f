"""Benchmark: the exact check of general frames and the optimizer on a face with omitted ledgers.

Prints a table. Targets (issue 13): exact check of a 100 x 100 frame with 1% of its grid bar
segments missing and a dense random layout under 5 s; 30 x 30 under 0.5 s; optimizer on a 12 x 8
scaffold face (pinned base) with two ledgers omitted proven optimal under 30 s.

Run: .venv/bin/python benchmarks/bench_general.py [--repeat 3]
"""

from __future__ import annotations

import argparse
import time

import numpy as np

from bracegrid.mechanics import check_any, exact_rigidity
from bracegrid.model import (
    CostCatalogue,
    Diagonal,
    Frame,
    GridBar,
    GridBarKind,
    Member,
    MemberKind,
    Supports,
    all_grid_bars,
    closed_bays,
)
from bracegrid.optimize import SolveOptions, optimize_frame


def general_frame(n: int, seed: int, *, share: float = 0.01, density: float = 0.5) -> tuple[Frame, list[Member]]:
    """An n x n free frame of 3 m x 2 m bays, ``share`` of its grid bar segments missing, and a random
    layout: each free diagonal holds a member with probability ``density``, half braces, half ties."""
    rng = np.random.default_rng(seed)
    frame = Frame("bench", (3000,) * n, (2000,) * n)
    bars = all_grid_bars(frame)
    gone = {bars[k] for k in rng.choice(len(bars), size=round(share * len(bars)), replace=False)}
    frame = Frame("bench", (3000,) * n, (2000,) * n, missing=frozenset(gone))
    closed = closed_bays(frame)
    members = [
        Member(i, j, MemberKind.BRACE if rng.random() < 0.5 else MemberKind.TIE, d)
        for i in range(1, n + 1)
        for j in range(1, n + 1)
        for d in Diagonal
        if (i, j) not in closed and rng.random() < density
    ]
    return frame, members


def _time_check(n: int, repeat: int) -> tuple[float, str, int, int]:
    best = float("inf")
    verdict = ""
    frame, members = general_frame(n, seed=n)
    for _ in range(repeat):
        t0 = time.perf_counter()
        result = exact_rigidity(frame, members)
        best = min(best, time.perf_counter() - t0)
        verdict = "rigid" if result.rigid else f"mechanism ({result.flexes} bar flexes)"
        verdict += ", prime certified" if result.prime_certified else ""
    return best, verdict, len(members), len(frame.missing)


def _time_verdict(n: int) -> tuple[float, float, str, int]:
    """The exact check and the full verdict (critical members by the rank screen) of a rigid layout."""
    frame, members = general_frame(n, seed=n, density=1.0)
    t0 = time.perf_counter()
    rigid = exact_rigidity(frame, members).rigid
    check = time.perf_counter() - t0
    t0 = time.perf_counter()
    verdict = check_any(frame, members)
    whole = time.perf_counter() - t0
    return check, whole, f"{'rigid' if rigid else 'mechanism'}, {len(verdict.critical_members)} critical", len(members)


def _time_optimize() -> tuple[float, str, float]:
    gone = frozenset({GridBar(GridBarKind.LEDGER, 3, 4), GridBar(GridBarKind.LEDGER, 6, 9)})
    frame = Frame("face", (2500,) * 12, (2000,) * 8, supports=Supports.BASE, missing=gone)
    t0 = time.perf_counter()
    sol = optimize_frame(frame, CostCatalogue(), options=SolveOptions(time_limit=60, workers=2))
    seconds = time.perf_counter() - t0
    assert check_any(sol.frame, sol.members).stable
    return seconds, f"{sol.status.value}, {len(sol.members)} members, {sol.method_text}", sol.cost


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    print("| case | target s | seconds | members | missing bars | result |")
    print("| --- | --- | --- | --- | --- | --- |")
    for n, target in ((30, 0.5), (100, 5.0)):
        seconds, verdict, count, missing = _time_check(n, args.repeat)
        case = f"exact check {n} x {n}, 1% bars missing"
        print(f"| {case} | {target} | {seconds:.3f} | {count} | {missing} | {verdict} |")
    check, whole, words_v, count = _time_verdict(100)
    print(
        f"| exact check 100 x 100, 1% missing, every diagonal filled | 5.0 | {check:.3f} | {count} | 202 | {words_v} |"
    )
    print(f"| same, full verdict (critical members) | | {whole:.3f} | {count} | 202 | {words_v} |")
    seconds, words, cost = _time_optimize()
    print(f"| optimize 12 x 8 face, 2 ledgers omitted | 30 | {seconds:.2f} | | 2 | {words}; cost {cost:.2f} |")


if __name__ == "__main__":
    main()
