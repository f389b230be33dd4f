"""Strength-aware optimizer: a printed table against the targets (not a timed test).

Frames (capacities and loads invented, of the demo's size):

* 12 x 8 scaffold face, pinned base, one wind case both ways (two opposite cases) with weight,
  capacities on diagonals, standards and ledger connections: target proven optimal under 10 s;
* 30 x 15 face, two cases both ways (four): target gap under 1%;
* 20 x 20 plan grid held on two edges, a case along each direction, both ways: target gap under 2%;
* spreading rules only (no loads) on the 12 x 8 face: target proven optimal under 5 s.

``--mip`` also solves the 12 x 8 face as one plain MIP of the same model (HiGHS through
scipy.optimize.milp: member choices and every case's bar forces together), for comparison.

Run: ``.venv/bin/python benchmarks/bench_strength.py [--limit 60] [--workers 2] [--mip]``.
"""

from __future__ import annotations

import argparse
import dataclasses
import time

import numpy as np

from bracegrid.model import (
    CostCatalogue,
    CostRate,
    Edge,
    Frame,
    GridStrength,
    LoadCase,
    MemberKind,
    MemberStrength,
    SpreadRules,
    StrengthCatalogue,
    Supports,
)
from bracegrid.optimize import SolveOptions, optimize_frame
from bracegrid.optimize.bays import bay_table, money
from bracegrid.optimize.benders import candidates_of, unit_cost
from bracegrid.optimize.capacity import plastic_frame

COSTS = CostCatalogue(
    brace=CostRate(per_piece=18.0, per_metre=6.5, labour_per_piece=4.0),
    tie=CostRate(per_piece=7.0, per_metre=2.0, labour_per_piece=3.0),
)
STRENGTH = StrengthCatalogue(
    brace=MemberStrength(tension_kn=12.0, compression_kn=9.0, ea_kn=110000.0),
    tie=MemberStrength(tension_kn=12.0, ea_kn=10000.0),
    grid=GridStrength(ea_kn=110000.0, standard_kn=40.0, ledger_kn=6.0, uplift_kn=10.0),
)


def face(cols: int, rows: int, cases: int) -> Frame:
    """A scaffold face on a pinned base, wind-like cases both ways with the weight of the standards."""
    loads = []
    for k in range(cases):
        top = 0.5 + 0.25 * k
        horizontal = (0.0, *([1.0 - 0.3 * k] * (rows - 1)), top)
        loads.append(LoadCase(f"case{k + 1}", horizontal, reverse=True, gravity_kn=(10.0,) * (cols + 1)))
    return Frame("face", (2500,) * cols, (2000,) * rows, supports=Supports.BASE, loads=tuple(loads))


def plan_grid(n: int) -> Frame:
    """A square plan grid held by wall lines along its two side edges, two cases along them, both ways."""
    even = LoadCase("even", (0.0,) * (n + 1), vertical_kn=(0.0, *([0.8] * (n - 1)), 0.0), reverse=True)
    ramp = tuple(0.0 if q in (0, n) else 1.2 * q / n for q in range(n + 1))
    rising = LoadCase("ramp", (0.0,) * (n + 1), vertical_kn=ramp, reverse=True)
    return Frame("plan", (3000,) * n, (3000,) * n, held_edges=frozenset({Edge.LEFT, Edge.RIGHT}),
                 loads=(even, rising))  # fmt: skip


def plain_mip(frame: Frame, limit: float) -> tuple[str, float, float, float]:
    """The same model as one MIP (HiGHS): (status, cost, bound, seconds)."""
    from scipy.optimize import Bounds, LinearConstraint, milp
    from scipy.sparse import bmat, csr_matrix, diags, hstack

    table = bay_table(frame, COSTS, (), frame.allow)
    cands = candidates_of(frame, table, frame.allow)
    pf = plastic_frame(frame, STRENGTH, cands)
    n_c, n_g = len(cands), pf.grid_count
    n_t = n_g + n_c
    cases = len(pf.loads)
    # variables: x (n_c binaries), then per case t (n_t)
    blocks = []
    lo_rows, hi_rows = [], []
    big = 1e3
    for s, load in enumerate(pf.loads):
        row = [None] * (1 + cases)
        row[1 + s] = pf.equilibrium
        blocks.append(row)
        b = load.nodal[pf.free_dofs]
        lo_rows.append(b)
        hi_rows.append(b)
        # t_c - T x <= 0 and -t_c - C x <= 0
        sel = hstack([csr_matrix((n_c, n_g)), diags(np.ones(n_c))]).tocsr()
        t_cap = np.minimum(pf.tension, big)
        c_cap = np.minimum(pf.compression, big)
        row = [None] * (1 + cases)
        row[0] = diags(-t_cap)
        row[1 + s] = sel
        blocks.append(row)
        row = [None] * (1 + cases)
        row[0] = diags(-c_cap)
        row[1 + s] = -sel
        blocks.append(row)
        lo_rows += [np.full(n_c, -np.inf), np.full(n_c, -np.inf)]
        hi_rows += [np.zeros(n_c), np.zeros(n_c)]
        if pf.uplift is not None and pf.uplift_kn is not None:
            row = [None] * (1 + cases)
            row[1 + s] = pf.uplift
            blocks.append(row)
            lo_rows.append(np.full(pf.uplift.shape[0], -np.inf))
            hi_rows.append(pf.uplift_kn - load.nodal[pf.base_y])
    shapes = [n_c] + [n_t] * cases
    for row in blocks:
        for k, cell in enumerate(row):
            if cell is None:
                continue
            assert cell.shape[1] == shapes[k]
    # fill empty columns so bmat knows every block width
    first = blocks[0]
    first[0] = csr_matrix((first[1 + 0].shape[0], n_c))
    for k in range(2, 1 + cases):
        first[k] = csr_matrix((first[1].shape[0], n_t)) if first[k] is None else first[k]
    a = bmat(blocks, format="csr")
    grid_lo = np.where(np.isinf(pf.grid_tension), -np.inf, -pf.grid_tension)
    grid_hi = np.where(np.isinf(pf.grid_tension), np.inf, pf.grid_tension)
    t_lo = np.concatenate([grid_lo, np.full(n_c, -np.inf)])
    t_hi = np.concatenate([grid_hi, np.full(n_c, np.inf)])
    lb = np.concatenate([np.zeros(n_c), *[t_lo] * cases])
    ub = np.concatenate([np.ones(n_c), *[t_hi] * cases])
    cost = np.concatenate([[unit_cost(table, c) for c in cands], np.zeros(n_t * cases)])
    integrality = np.concatenate([np.ones(n_c), np.zeros(n_t * cases)])
    # stability of a pinned base: every lift an arc each way
    stab = []
    for i in range(1, frame.rows + 1):
        for up in (True, False):
            r = np.zeros(n_c + n_t * cases)
            for k, c in enumerate(cands):
                if c.row == i and (c.kind is MemberKind.BRACE or (c.diagonal.value == "rising") == up):
                    r[k] = 1.0
            stab.append(r)
    # one member per diagonal
    slots: dict[tuple[int, int, str], list[int]] = {}
    for k, c in enumerate(cands):
        slots.setdefault((c.row, c.col, c.diagonal.value), []).append(k)
    one = []
    for ks in slots.values():
        r = np.zeros(n_c + n_t * cases)
        r[ks] = 1.0
        one.append(r)
    cons = [
        LinearConstraint(a, np.concatenate(lo_rows), np.concatenate(hi_rows)),
        LinearConstraint(np.array(stab), 1.0, np.inf),
        LinearConstraint(np.array(one), 0.0, 1.0),
    ]
    t0 = time.monotonic()
    res = milp(cost, constraints=cons, integrality=integrality, bounds=Bounds(lb, ub),
               options={"time_limit": limit, "disp": False})  # fmt: skip
    seconds = time.monotonic() - t0
    got = money(res.fun) if res.x is not None else float("nan")
    bound = money(getattr(res, "mip_dual_bound", float("nan")) or float("nan"))
    return ("optimal" if res.status == 0 else res.message.split(".")[0]), got, bound, seconds


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--limit", type=float, default=60.0)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--mip", action="store_true", help="also the plain MIP of the 12 x 8 face")
    args = parser.parse_args()
    options = SolveOptions(time_limit=args.limit, workers=args.workers)
    rules = SpreadRules(max_unbraced_bays=3, end_bay_within=1, max_members_per_column=10)
    runs = [
        ("12 x 8 face, 2 cases (1 reversed)", face(12, 8, 1), STRENGTH, "proven < 10 s"),
        ("30 x 15 face, 4 cases (2 reversed)", face(30, 15, 2), STRENGTH, "gap < 1%"),
        ("20 x 20 plan grid, 2 edges, 4 cases", plan_grid(20), STRENGTH, "gap < 2%"),
        ("12 x 8 face, rules only", dataclasses.replace(face(12, 8, 1), loads=(), rules=rules), None, "proven < 5 s"),
    ]
    print(f"{'frame':38} {'status':9} {'cost':>9} {'bound':>9} {'gap':>7} {'time s':>8} {'rounds':>6}  "
          f"{'carries (plastic/elastic)':26} target")  # fmt: skip
    for title, frame, strength, target in runs:
        t0 = time.monotonic()
        sol = optimize_frame(frame, COSTS, options=options, strength=strength)
        seconds = time.monotonic() - t0
        check = sol.strength
        carries = "-" if check is None else f"{check.plastic_ok}/{check.elastic_ok}"
        print(f"{title:38} {sol.status.value:9} {sol.cost:9.2f} {sol.bound:9.2f} {100 * sol.gap:6.2f}% "
              f"{seconds:8.2f} {sol.rounds:6d}  {carries:26} {target}")  # fmt: skip
    if args.mip:
        status, cost, bound, seconds = plain_mip(face(12, 8, 1), args.limit)
        print(f"{'12 x 8 face, plain MIP (HiGHS)':38} {status:9} {cost:9.2f} {bound:9.2f} {'':7} {seconds:8.2f}")


if __name__ == "__main__":
    main()
