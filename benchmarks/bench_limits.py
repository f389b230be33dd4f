"""Benchmark: does ``optimize --time-limit S`` bound the whole run on large frames?

For square frames of N x N bays (invented for the benchmark: 2.4 m bays, 2 m lifts, a pinned
base (solved by an exact shortcut) or free (CP-SAT search), one bay in 25 blocked at random,
seed 7) it runs the real script ``bracegrid optimize --time-limit S --workers 2 --json`` in a
fresh process and prints, per size: the start-up just before (``bracegrid check --help``), the wall
time, the run's exit code and what it reported (layout with its bound, or "no layout within the
limit", exit 4). The target (issue 17): wall time within 1.1 x S plus start-up. A run still
going after ``--kill`` seconds is stopped and reported as such.

Run: python benchmarks/bench_limits.py [--sizes 200,300,1000,3000] [--limit 5] [--kill 120]
"""

from __future__ import annotations

import argparse
import json
import random
import subprocess
import sys
import tempfile
import time
from pathlib import Path


def _project(n: int, folder: Path, supports: str = "base") -> Path:
    rng = random.Random(7)
    blocked = sorted({(rng.randint(1, n), rng.randint(1, n)) for _ in range(n * n // 25)})
    path = folder / f"grid-{n}-{supports}.toml"
    rows = ", ".join(f"[{i}, {j}]" for i, j in blocked)
    path.write_text(
        '[project]\nname = "limits benchmark (invented)"\n'
        "[costs.brace]\nper_piece = 25.0\nper_metre = 8.0\n[costs.tie]\nper_piece = 9.0\nper_metre = 3.0\n"
        f'[[frame]]\nname = "grid {n}"\nwidths = [{", ".join(["2.4"] * n)}]\nheights = [{", ".join(["2.0"] * n)}]\n'
        f'supports = "{supports}"\nblocked = [{rows}]\n',
        encoding="utf-8",
    )
    return path


def _timed(argv: list[str], kill: float) -> tuple[float, int | None, str, str]:
    started = time.monotonic()
    try:
        done = subprocess.run(argv, capture_output=True, text=True, timeout=kill, check=False)
    except subprocess.TimeoutExpired:
        return time.monotonic() - started, None, "", ""
    return time.monotonic() - started, done.returncode, done.stdout, done.stderr


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", default="200,300,1000,3000")
    parser.add_argument("--limit", type=float, default=5.0)
    parser.add_argument("--kill", type=float, default=120.0)
    parser.add_argument("--supports", default="base,free", help="base (exact shortcut), free (CP-SAT search)")
    args = parser.parse_args()
    script = [sys.executable, "-m", "bracegrid"]
    startup_argv = [*script, "check", "--help"]  # imports every library the run uses, then stops
    startup = min(_timed(startup_argv, 60)[0] for _ in range(3))
    print(f"start-up (bracegrid check --help, best of 3): {startup:.2f} s; limit {args.limit:g} s")
    print(f"{'frame':>11} {'supports':>8} {'start-up s':>10} {'wall s':>8} {'target s':>9} {'exit':>5}  result")
    cases = [(int(x), s) for s in args.supports.split(",") for x in args.sizes.split(",")]
    with tempfile.TemporaryDirectory() as tmp:
        for n, supports in cases:
            path = _project(n, Path(tmp), supports)
            argv = [*script, "optimize", str(path), "--time-limit", str(args.limit), "--workers", "2", "--json"]
            here = _timed(startup_argv, 60)[0]  # start-up now (the machine's load varies)
            wall, code, out, err = _timed(argv, args.kill)
            target = 1.1 * args.limit + here
            if code is None:
                result = f"still running after {args.kill:g} s (killed)"
            elif code == 0:
                frame = json.loads(out)["frames"][0]
                result = f"{frame.get('status')}: cost {frame.get('cost')} bound {frame.get('bound')}"
            else:
                result = (err.strip().splitlines() or ["(no message)"])[-1][:90]
            shown = code if code is not None else "-"
            print(f"{n:>5}x{n:<5} {supports:>8} {here:10.1f} {wall:8.1f} {target:9.1f} {shown:>5}  {result}")


if __name__ == "__main__":
    main()
