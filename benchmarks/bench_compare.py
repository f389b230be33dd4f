"""`compare` benchmark: solve time against drawing time, and the size of report.html.

Run: .venv/bin/python benchmarks/bench_compare.py [--cases demo,30x30,80x80] [--limit 10] [--workers 2]

Does what `bracegrid compare` does, step by step through the library (the same calls the
CLI makes, files kept in memory): solve every frame under the five strategies, then draw
one DXF per strategy, the CSV and report.html. Prints solve seconds, drawing seconds
(everything after the solve), the whole, and the report's size. Cases (invented, seeded):
the demo project projects/quayside-scaffold.toml (60 s limit, as the CLI default), and
free frames with random bay sizes 1-3 m and 10 % of bays blocked (the optimizer
benchmark's generator), solved with the given limit.
"""

from __future__ import annotations

import argparse
import random
import sys
import time
from datetime import date
from pathlib import Path

from bracegrid.compare import StrategyKey, compare_project
from bracegrid.io import load_project
from bracegrid.model import Frame, Project
from bracegrid.optimize import SolveOptions
from bracegrid.outputs import build_drawing, dxf_bytes, render_compare_csv, render_html

DEMO = Path(__file__).resolve().parents[1] / "projects" / "quayside-scaffold.toml"


def random_frame(rows: int, cols: int, seed: int) -> Frame:
    rng = random.Random(seed)
    widths = tuple(rng.randint(10, 30) * 100 for _ in range(cols))
    heights = tuple(rng.randint(10, 30) * 100 for _ in range(rows))
    shut = frozenset((i, j) for i in range(1, rows + 1) for j in range(1, cols + 1) if rng.random() < 0.1)
    return Frame(f"{rows}x{cols}", widths, heights, blocked=shut)


def project_for(case: str) -> tuple[Project, float | None]:
    if case == "demo":
        return load_project(DEMO), 60.0
    rows, cols = (int(n) for n in case.split("x"))
    return Project(f"bench {case}", (random_frame(rows, cols, rows * cols),)), None


def run(project: Project, options: SolveOptions) -> tuple[float, float, int]:
    t0 = time.perf_counter()
    comparison = compare_project(project, options=options)
    t1 = time.perf_counter()
    files = [render_compare_csv(comparison).encode("utf-8")]
    for key in StrategyKey:
        solved = tuple(r.frame for fc in comparison.frames for r in fc.strategies if r.key is key and r.frame)
        if solved:
            files.append(dxf_bytes(build_drawing(project, frames=solved, when=date.today()).doc))
    page = render_html(comparison, when=date.today(), time_limit=options.time_limit).encode("utf-8")
    t2 = time.perf_counter()
    return t1 - t0, t2 - t1, len(page)


def main(argv: list[str]) -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--cases", default="demo,30x30,80x80")
    parser.add_argument("--limit", type=float, default=10.0, help="seconds per strategy for the random frames")
    parser.add_argument("--workers", type=int, default=2)
    args = parser.parse_args(argv)
    print(f"{'case':>8} {'limit s':>8} {'solve s':>8} {'draw s':>8} {'total s':>8} {'report kB':>10}")
    for case in args.cases.split(","):
        project, limit = project_for(case)
        options = SolveOptions(time_limit=limit or args.limit, workers=args.workers, seed=0)
        solve, draw, size = run(project, options)
        total = solve + draw
        print(f"{case:>8} {options.time_limit:>8g} {solve:>8.2f} {draw:>8.2f} {total:>8.2f} {size / 1024:>10.0f}")


if __name__ == "__main__":
    main(sys.argv[1:])
