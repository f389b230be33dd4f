"""Strength-aware layouts: a CP-SAT master over candidate members, cuts from the checks, elastic verification.

The master chooses members (one per free diagonal at most, of an allowed kind) at least cost subject to
the cuts found so far. Each answer is checked in turn, and the first check that fails adds cuts:

1. stability: directed cuts (a pinned base: every lift needs k + 1 arcs each way, exactly, from the
   start; a free frame: violated sets of :func:`bracegrid.optimize.separation.violated_cuts`);
2. plastic capacity per load case and sense: on a pinned base the per-lift cut-set inequalities
   and their rounded forms are in the master from the start; a free frame's are separated by one
   maximum flow per case; then the LP with every grid-bar limit, whose Farkas ray is a Benders
   feasibility cut (:mod:`bracegrid.optimize.capacity`);
3. elastic: the tension-only analysis of :mod:`bracegrid.mechanics`; a layout it finds over
   capacity is excluded exactly (a no-good cut on that one layout) and the master solved again.

The spreading rules are linear rows in the master (:mod:`bracegrid.optimize.rules`). Every cut
is valid for every layout that passes the checks, so the master's bound is a proven lower bound
on the cost of any layout passing them all; an answer that passes them all at a proven master
optimum is optimal.
"""

from __future__ import annotations

import dataclasses
import math
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from bracegrid.analysis.digraph import leaving_bays
from bracegrid.errors import InfeasibleError, NumericalError, SolverLimitError
from bracegrid.mechanics import FrameForces, MemberForce, analyse_frame, missing_stiffness
from bracegrid.mechanics.framework import BarKind
from bracegrid.mechanics.motions import z_of_row
from bracegrid.model import (
    RULE_FIELDS,
    Diagonal,
    Frame,
    Member,
    MemberKind,
    MemberStrength,
    StrengthCatalogue,
    Supports,
)
from bracegrid.optimize.annealing import Judge, Verdict, anneal
from bracegrid.optimize.bays import Additions, BayTable
from bracegrid.optimize.capacity import (
    CARRY_REL,
    Candidate,
    CapacityCut,
    PlasticFrame,
    arc_capacity,
    carries,
    cover_cut,
    cut_from,
    farkas_cut,
    farkas_ray,
    flow_cut,
    lift_cuts,
    min_utilisation,
    plastic_frame,
    ray_images,
    rounded_cut,
)
from bracegrid.optimize.cutmodel import configure
from bracegrid.optimize.rules import RuleRow, meets_rules, rule_reasons, rule_rows
from bracegrid.optimize.separation import violated_cuts

Report = Callable[[str, int | None, int], None]

#: Share of the time limit spent excluding elastically inadequate layouts one by one (exact) before
#: the plastic model is asked for a margin instead.
EXACT_SHARE = 0.4
#: Rounds between greedy repairs of a master answer into a layout that carries every case (an
#: incumbent); the first answers are always repaired until one is found.
REPAIR_EVERY = 5
#: Relative gap at which a master solve stops: early rounds only need an answer to separate, and
#: the bound stays proven; a layout found within the gap becomes the incumbent and the search goes
#: on below it (measured on the 30 x 15 face: rounds 3x faster than solving each to optimality).
MASTER_GAP = 0.01
#: Add the cuts of every image of each Farkas ray (moved by whole bays, mirrored): measured on the
#: uniform 30 x 15 face, without them the master moves the bracing one bay per round.
USE_IMAGES = True
#: Share of the time limit one pruning of a repaired layout may take.
PRUNE_SHARE = 0.1
#: Capacity shares the greedy repair tries in turn until its layout passes the elastic check too.
REPAIR_MARGINS = (1.0, 0.85, 0.7, 0.55)
#: Share of the time limit left to the annealing search (:mod:`bracegrid.optimize.annealing`) when
#: the elastic check is to be met: on the 20 x 20 plan grid the cut loop's later rounds found no
#: adequate layout, while annealing found one within 30 s (see that module).
ANNEAL_SHARE = 0.4
#: Capacity share the plastic model may use once the margin heuristic is on (measured on the demo:
#: layouts at 90% plastic utilisation passed the elastic check after a few rounds).
MARGIN = 0.9


def _scaled_strength(strength: StrengthCatalogue, factor: float) -> StrengthCatalogue:
    """Every capacity times ``factor`` (stiffness unchanged)."""

    def times(v: float | None) -> float | None:
        return None if v is None else v * factor

    def member(m: MemberStrength) -> MemberStrength:
        return dataclasses.replace(m, tension_kn=times(m.tension_kn), compression_kn=times(m.compression_kn))

    g = strength.grid
    grid = dataclasses.replace(g, standard_kn=times(g.standard_kn), ledger_kn=times(g.ledger_kn),
                               uplift_kn=times(g.uplift_kn))  # fmt: skip
    return StrengthCatalogue(brace=member(strength.brace), tie=member(strength.tie), grid=grid)


@dataclass(frozen=True, slots=True)
class StrengthFound:
    """What the strength-aware search found.

    Attributes:
        members: The new members.
        added: Their cost in cost units.
        bound: Proven lower bound on the added cost of any layout passing every check.
        proven: The layout is proven minimal among those passing every check it passes.
        rounds: Master solves.
        cuts: Cuts added (stability, capacity, elastic).
        elastic_excluded: Layouts the elastic check turned down.
    """

    members: tuple[Member, ...]
    added: int
    bound: int
    proven: bool
    rounds: int
    cuts: int
    elastic_excluded: int


def candidates_of(frame: Frame, table: BayTable, allow: frozenset[MemberKind]) -> list[Candidate]:
    """Kept members first, then every new member the table allows (each kind on each free diagonal)."""
    out = [Candidate(m.row, m.col, m.diagonal, m.kind, kept=True) for m in frame.members]
    for i in range(1, table.rows + 1):
        for j in range(1, table.cols + 1):
            for d, free in ((Diagonal.RISING, table.rising_free), (Diagonal.FALLING, table.falling_free)):
                if not free[i - 1, j - 1]:
                    continue
                if MemberKind.BRACE in allow and table.brace_ok[i - 1, j - 1]:
                    out.append(Candidate(i, j, d, MemberKind.BRACE))
                if table.tie_ok:
                    out.append(Candidate(i, j, d, MemberKind.TIE))
    return out


def gives_up(c: Candidate) -> bool:
    """The candidate gives the arc row -> col (a brace, or a rising tie)."""
    return c.kind is MemberKind.BRACE or c.diagonal is Diagonal.RISING


def gives_down(c: Candidate) -> bool:
    """The candidate gives the arc col -> row (a brace, or a falling tie)."""
    return c.kind is MemberKind.BRACE or c.diagonal is Diagonal.FALLING


def additions_of(table: BayTable, cands: Sequence[Candidate], chosen: Sequence[bool]) -> Additions:
    """Per-bay counts of the chosen new members (for the stability separation)."""
    braces = np.zeros((table.rows, table.cols), dtype=np.int64)
    rising = np.zeros_like(braces)
    falling = np.zeros_like(braces)
    for c, on in zip(cands, chosen, strict=True):
        if on and not c.kept:
            i, j = c.row - 1, c.col - 1
            if c.kind is MemberKind.BRACE:
                braces[i, j] += 1
            elif c.diagonal is Diagonal.RISING:
                rising[i, j] += 1
            else:
                falling[i, j] += 1
    return Additions(braces, rising, falling)


def unit_cost(table: BayTable, c: Candidate) -> int:
    """Cost units of a new candidate (0 for a kept one)."""
    if c.kept:
        return 0
    cost = table.brace_cost if c.kind is MemberKind.BRACE else table.tie_cost
    return int(cost[c.row - 1, c.col - 1])


def elastic_forces(frame: Frame, strength: StrengthCatalogue, members: Sequence[Member]) -> FrameForces | None:
    """The tension-only analysis of a layout under the frame's cases (None: a stiffness is missing)."""
    if not frame.loads or missing_stiffness(frame, strength, members):
        return None
    return analyse_frame(frame, strength, members=members)


class _Master:
    """The CP-SAT master: one boolean per new candidate, the rows and cuts found so far."""

    def __init__(self, frame: Frame, table: BayTable, cands: Sequence[Candidate], k: int) -> None:
        from ortools.sat.python import cp_model  # heavy: imported where the model is built

        self.cp = cp_model
        self.model = cp_model.CpModel()
        self.cands = tuple(cands)
        self.table = table
        self.k = k
        self.x: dict[int, Any] = {}
        for idx, c in enumerate(cands):
            if not c.kept:
                self.x[idx] = self.model.new_bool_var(f"x{idx}")
        slots: dict[tuple[int, int, Diagonal], list[Any]] = {}
        for idx, var in self.x.items():
            c = cands[idx]
            slots.setdefault((c.row, c.col, c.diagonal), []).append(var)
        for group in slots.values():
            if len(group) > 1:
                self.model.add_at_most_one(group)
        self.objective = sum(unit_cost(table, cands[i]) * v for i, v in self.x.items())
        self.model.minimize(self.objective)
        self.cuts = 0
        need = k + 1
        if frame.supports is Supports.BASE:
            # A pinned base: every node set's cut is a sum of single-lift cuts (docs/theory.md).
            for i in range(1, table.rows + 1):
                kept_up, kept_down = int(table.exist_up[i - 1].sum()), int(table.exist_down[i - 1].sum())
                ups = [v for j, v in self.x.items() if cands[j].row == i and gives_up(cands[j])]
                downs = [v for j, v in self.x.items() if cands[j].row == i and gives_down(cands[j])]
                self.model.add(sum(ups) >= need - kept_up)
                self.model.add(sum(downs) >= need - kept_down)
        else:
            n = table.rows + table.cols
            for v in range(n):
                self.add_node_set(frozenset({v}))
                self.add_node_set(frozenset(range(n)) - {v})

    def add_node_set(self, s: frozenset[int]) -> None:
        """At least k + 1 member arcs leave node set s."""
        up, down = leaving_bays(self.table.rows, self.table.cols, s)
        kept = int(self.table.exist_up[up].sum() + self.table.exist_down[down].sum())
        terms = []
        for idx, var in self.x.items():
            c = self.cands[idx]
            i, j = c.row - 1, c.col - 1
            if (up[i, j] and gives_up(c)) or (down[i, j] and gives_down(c)):
                terms.append(var)
        self.model.add(sum(terms) >= self.k + 1 - kept)
        self.cuts += 1

    def add_cut(self, cut: CapacityCut) -> None:
        """A capacity cut over the candidates."""
        self.model.add(sum(c * self.x[k] for k, c in cut.terms if k in self.x) >= cut.need)
        self.cuts += 1

    def add_rule(self, row: RuleRow, kept_in: dict[tuple[int, int], int]) -> None:
        """A spreading rule over bays."""
        bays = set(row.bays)
        kept = sum(kept_in.get(b, 0) for b in bays)
        per_bay: dict[tuple[int, int], list[Any]] = {}
        for idx, var in self.x.items():
            c = self.cands[idx]
            if (c.row, c.col) in bays:
                per_bay.setdefault((c.row, c.col), []).append(var)
        if row.braced_bays:
            marks: list[Any] = []
            for b in row.bays:
                if kept_in.get(b, 0):
                    marks.append(1)
                elif b in per_bay:
                    z = self.model.new_bool_var(f"braced{b}")
                    self.model.add(z <= sum(per_bay[b]))
                    marks.append(z)
            if row.at_least is not None:
                self.model.add(sum(marks) >= row.at_least)
            return
        count = sum(v for group in per_bay.values() for v in group)
        if row.at_least is not None:
            self.model.add(count >= row.at_least - kept)
        if row.at_most is not None:
            self.model.add(count <= row.at_most - kept)

    def below(self, cost: int) -> None:
        """Only layouts cheaper than ``cost`` are of use from now on (an incumbent costs that)."""
        if not isinstance(self.objective, int):
            self.model.add(self.objective <= cost - 1)

    def exclude(self, chosen: Sequence[bool]) -> None:
        """Exactly this layout is no answer (the elastic check turned it down)."""
        lits = [(1 - v) if chosen[i] else v for i, v in self.x.items()]
        self.model.add(sum(lits) >= 1)
        self.cuts += 1

    def solve(
        self, *, seconds: float, workers: int, seed: int, hint: Sequence[bool] | None, gap: float
    ) -> tuple[str, list[bool], int]:
        """(status word, chosen flags over every candidate, proven bound).

        The word is ``optimal`` (proven), ``gap`` (stopped within the relative gap), ``feasible``
        (stopped by the time limit), ``infeasible`` or ``unknown``.
        """
        cp = self.cp
        self.model.clear_hints()  # type: ignore[no-untyped-call]
        if hint is not None:
            for i, v in self.x.items():
                self.model.add_hint(v, bool(hint[i]))
        solver = cp.CpSolver()
        configure(solver.parameters, workers=workers, seed=seed, seconds=seconds)
        solver.parameters.relative_gap_limit = gap
        status = solver.solve(self.model)
        if status == cp.INFEASIBLE:
            return "infeasible", [], 0
        if status not in (cp.OPTIMAL, cp.FEASIBLE):
            return "unknown", [], 0
        chosen = [c.kept for c in self.cands]
        for i, v in self.x.items():
            chosen[i] = bool(solver.value(v))
        bound = math.ceil(solver.best_objective_bound - 1e-6)
        if status == cp.OPTIMAL:
            return ("optimal" if bound >= round(solver.objective_value) else "gap"), chosen, bound
        return "feasible", chosen, bound


def strength_reasons(pf: PlasticFrame, table: BayTable) -> list[str]:
    """Load cases that no layout can carry, in words (checked with every candidate present)."""
    out: list[str] = []
    frame = pf.frame
    everything = [True] * len(pf.candidates)
    if frame.supports is Supports.BASE:
        for load in pf.loads:
            for i in range(1, frame.rows + 1):
                h = frame.heights[i - 1]
                need = float(load.work[z_of_row(i)]) / h
                side = 0 if need > 0 else 1
                have = sum(
                    arc_capacity(frame, c, float(pf.tension[k]), float(pf.compression[k]))[side] / h
                    for k, c in enumerate(pf.candidates)
                    if c.row == i
                )
                if abs(need) > have * (1 + CARRY_REL):
                    blocked = int((table.free_slots[i - 1] == 0).sum())
                    out.append(
                        f"lift {i} needs {abs(need):.3g} kN of horizontal capacity in case {load.title}; with "
                        f"{blocked} bay{'s' if blocked != 1 else ''} blocked the most it can hold is {have:.3g} kN"
                    )
    if out:
        return out
    for load in pf.loads:
        if carries(pf, load, everything):
            continue  # the phase-one LP decides, as in the loop; the utilisation LP (15x slower) gives words
        u = min_utilisation(pf, load, everything)
        if not u.carried:
            if u.value is None:
                out.append(f"case {load.title}: even with every open diagonal braced no force set balances the "
                           "load within the limits given (check uplift_kn and the supports)")  # fmt: skip
            else:
                out.append(f"case {load.title}: even with every open diagonal braced the best force set loads "
                           f"{u.governing} to {u.value:.2f} times its capacity")  # fmt: skip
    return out


def solve_strength(
    frame: Frame,
    strength: StrengthCatalogue,
    table: BayTable,
    allow: frozenset[MemberKind],
    k: int,
    *,
    use_loads: bool,
    deadline: float,
    workers: int,
    seed: int,
    report: Report,
    start: Sequence[Member] = (),
    floor: int = 0,
) -> StrengthFound:
    """The cheapest layout meeting stability, redundancy, rules and (with ``use_loads``) every load case.

    ``start`` (new members of a stable layout, e.g. the stability-only optimum) seeds the master's hint
    and, repaired, a first incumbent; ``floor`` is a proven lower bound on the added cost known
    beforehand (the stability-only bound: every layout here is stable too).

    Raises:
        InfeasibleError: With reasons in words, when the rules or the loads rule every layout out.
        SolverLimitError: When the time limit came before any layout passed the plastic checks.
    """
    cands = candidates_of(frame, table, allow)
    rows = rule_rows(frame)
    reasons = rule_reasons(frame, table, rows)
    pf = plastic_frame(frame, strength, cands) if use_loads and frame.loads else None
    if pf is not None:
        reasons += strength_reasons(pf, table)
    if reasons:
        raise InfeasibleError([f"frame {frame.name!r}: {r}" for r in reasons])
    master = _Master(frame, table, cands, k)
    kept_in: dict[tuple[int, int], int] = {}
    for m in frame.members:
        kept_in[m.bay] = kept_in.get(m.bay, 0) + 1
    for row in rows:
        master.add_rule(row, kept_in)
    if pf is not None:
        for cut in lift_cuts(pf):
            master.add_cut(cut)
    best: list[bool] | None = None
    best_cost: int | None = None
    plastic_only: list[bool] | None = None
    bound = floor
    rounds = 0
    excluded = 0
    proven = False
    elastic_needed = pf is not None and not missing_stiffness(frame, strength, [c.member for c in cands])
    exact = True
    margin: PlasticFrame | None = None
    scaled: dict[float, PlasticFrame] = {}
    seen: set[tuple[tuple[tuple[int, int], ...], int]] = set()
    images = USE_IMAGES
    costs = [unit_cost(table, c) for c in cands]

    def price(chosen: Sequence[bool]) -> int:
        return sum(cost for cost, on in zip(costs, chosen, strict=True) if on)

    started = time.monotonic()
    # With the elastic check to meet, the cut loop leaves a share of the time to the annealing
    # search below (used only when the loop has not proven its answer).
    final = deadline
    if elastic_needed:
        deadline = started + (1.0 - ANNEAL_SHARE) * max(0.0, final - started)
    exact_until = started + EXACT_SHARE * max(0.0, deadline - started)

    def incumbent(start_from: list[bool]) -> tuple[tuple[list[bool], int] | None, list[bool] | None]:
        """(a layout passing both checks and its cost, else None; a plastic-only layout met on the way).

        The answer is repaired greedily until it carries every case, with a growing margin on the
        capacities until the elastic check passes too, then pruned (heuristic; only the master
        proves anything). Cuts of the real model met on the way go to the master.
        """
        assert pf is not None
        fallback = None
        for factor in REPAIR_MARGINS:
            if factor not in scaled:
                scaled[factor] = plastic_frame(frame, _scaled_strength(strength, factor), cands)
            met: list[CapacityCut] = []
            fixed = _repair(scaled[factor], table, rows, start_from, deadline, met)
            if factor == 1.0:
                for cut in met:  # cuts of the real model: valid for every layout
                    master.add_cut(cut)
            if fixed is None:
                break
            cost = price(fixed)
            if best_cost is not None and cost >= best_cost:
                break
            if _elastic_ok(frame, strength, cands, fixed, elastic_needed):
                until = min(deadline, time.monotonic() + PRUNE_SHARE * max(0.0, deadline - started))
                lean = _prune(scaled[factor], table, rows, k, fixed, until)
                if lean != fixed and _elastic_ok(frame, strength, cands, lean, elastic_needed):
                    fixed = lean
                    cost = price(fixed)
                return (fixed, cost), fallback
            fallback = fallback or fixed
        return None, fallback

    def cheaper(have: list[bool] | None, other: list[bool] | None) -> list[bool] | None:
        """The cheaper of two plastic-only layouts (the annealing search may start from it)."""
        if have is None or other is None:
            return have or other
        return min(have, other, key=price)

    seed_layout = _flags(cands, start)
    if seed_layout is not None and _meets_rows(rows, cands, seed_layout):
        if pf is None:
            best, best_cost = seed_layout, price(seed_layout)
        else:
            found_layout, fallback = incumbent(seed_layout)
            plastic_only = cheaper(plastic_only, fallback)
            if found_layout is not None:
                best, best_cost = found_layout
        if best_cost is not None:
            master.below(best_cost)
    if pf is not None and frame.supports is Supports.BASE:
        for layout in _staircases(pf, table, k):
            if not _meets_rows(rows, cands, layout):
                continue
            found_layout, fallback = incumbent(layout)
            plastic_only = cheaper(plastic_only, fallback)
            if found_layout is not None and (best_cost is None or found_layout[1] < best_cost):
                best, best_cost = found_layout
                master.below(best_cost)
    if best_cost is not None and bound >= best_cost:
        proven, bound = True, best_cost
    while not proven:
        remaining = deadline - time.monotonic()
        if remaining <= 0.01:
            break
        status, chosen, got_bound = master.solve(
            seconds=remaining, workers=workers, seed=seed, hint=best or plastic_only, gap=MASTER_GAP
        )
        rounds += 1
        if status == "infeasible":
            if best is None and plastic_only is None:
                given = [f"{k} = {v}" for k, v in zip(RULE_FIELDS, frame.rules.values(), strict=True) if v is not None]
                what = ", ".join(given) if given else "no spreading rules"
                loads = "the load cases" if pf is not None else "stability"
                msg = (f"frame {frame.name!r}: no layout meets {loads} and the spreading rules together ({what}); "
                       "relax a rule or clear more bays")  # fmt: skip
                raise InfeasibleError([msg])
            proven = best is not None and exact
            if best_cost is not None and exact:
                bound = best_cost
            break
        if status == "unknown":
            break
        cost = price(chosen)
        solved = status in ("optimal", "gap")
        if solved and exact:
            bound = max(bound, min(got_bound, cost))
        sets = [] if frame.supports is Supports.BASE else violated_cuts(table, additions_of(table, cands, chosen), k)
        for s in sets:
            master.add_node_set(s)
        cuts: list[CapacityCut] = []
        if not sets and pf is not None:
            for load in pf.loads:
                flows = flow_cut(pf, load, chosen)
                if flows:
                    cuts += flows
                    continue
                ray = farkas_ray(pf, load, chosen)
                if ray is None:
                    continue
                got = cut_from(pf, load, *ray)
                if got is None or got.holds(chosen):
                    got = cover_cut(pf, chosen, f"case {load.title}")
                cuts.append(got)
                fewest = rounded_cut(got)
                if fewest is not None:
                    cuts.append(fewest)
                if images:
                    for image in ray_images(pf, *ray):
                        for other in pf.loads:
                            more = cut_from(pf, other, *image)
                            if more is not None and more.terms and more.key not in seen:
                                seen.add(more.key)
                                cuts.append(more)
        for cut in cuts:
            master.add_cut(cut)
        if cuts and pf is not None and (best is None or rounds % REPAIR_EVERY == 0):
            found_layout, fallback = incumbent(chosen)
            plastic_only = cheaper(plastic_only, fallback)
            if found_layout is not None:
                best, best_cost = found_layout
                master.below(best_cost)
        report(f"strength cuts (round {rounds}, {master.cuts} cuts)", best_cost, bound)
        if sets or cuts:
            continue
        if elastic_needed:
            forces = elastic_forces(frame, strength, [c.member for c, on in zip(cands, chosen, strict=True) if on])
            if forces is not None and not forces.ok:
                plastic_only = cheaper(plastic_only, chosen)
                if not solved:
                    break
                if margin is None and time.monotonic() >= exact_until:
                    # The exact exclusions have not met an elastically adequate layout: ask the
                    # plastic model for a margin from here on (a heuristic: the bound stays the
                    # last exact one and the answer is not claimed optimal).
                    margin = plastic_frame(frame, _scaled_strength(strength, MARGIN), cands)
                    exact = False
                if margin is not None:
                    extra = [c for load in margin.loads if (c := farkas_cut(margin, load, chosen)) is not None]
                    for cut in extra:
                        master.add_cut(cut)
                    if extra:
                        continue
                master.exclude(chosen)
                excluded += 1
                continue
        if best_cost is None or cost < best_cost:
            best, best_cost = chosen, cost
        proven = status == "optimal" and exact
        if proven:
            bound = cost
            break
        if status != "gap" or (exact and bound >= cost):
            proven = exact and bound >= cost
            break
        master.below(cost)  # within the master's gap: look for a cheaper one
    if elastic_needed and not proven and pf is not None and time.monotonic() < final:
        start_from = best or plastic_only or _fullest(pf, rows, k, table)
        if start_from is not None:
            annealed = anneal(
                cands, costs, start_from,
                holds=lambda x: _stable_at(frame, table, cands, x, k) and _meets_rows(rows, cands, x),
                judge=_judge(frame, strength, cands), deadline=final, seed=seed,
            )  # fmt: skip
            if (annealed is not None and (best_cost is None or annealed.cost < best_cost)
                    and all(carries(pf, load, annealed.chosen) for load in pf.loads)):  # fmt: skip
                best, best_cost = list(annealed.chosen), annealed.cost
                report(f"annealing ({annealed.evaluations} elastic analyses)", best_cost, bound)
    if best_cost is not None:
        bound = min(bound, best_cost)
    pick = best if best is not None else plastic_only
    if pick is None and pf is not None:
        pick = _fullest(pf, rows, k, table)
    if pick is None:
        msg = f"frame {frame.name!r}: no layout passed the checks within the time limit; raise the time limit"
        raise SolverLimitError(msg)
    new = tuple(c.member for c, on in zip(cands, pick, strict=True) if on and not c.kept)
    added = price(pick)
    return StrengthFound(new, added, min(bound, added), proven and best is not None, rounds, master.cuts, excluded)


#: Starting columns tried for the staircase incumbents (shares of the room the staircase leaves).
STAIR_STARTS = (0.5, 0.0, 1.0)


def _staircases(pf: PlasticFrame, table: BayTable, k: int) -> list[list[bool]]:
    """Pinned base: first incumbents whose lifts pass their shear on from node to node (heuristic seeds).

    Each lift gets the fewest members of the rounded lift cut-sets in each sense (at least k + 1),
    of the kind with the most capacity per unit cost. Rising diagonals climb one bay to the right per
    lift and falling ones one bay to the left, so a diagonal's top end is the next one's bottom end
    and the shear moves between lifts without travelling along the ledgers (which a ledger limit
    caps); a lift's extra members sit beside its first. Measured on the uniform 30 x 15 face, the
    master's own answers repaired cost 12% to 45% more. The caller repairs, checks and prunes each
    seed like any other; only the master proves anything. Frames narrower than their height, or
    whose staircase meets a blocked or occupied diagonal, get no seed from that start.
    """
    frame = pf.frame
    cands = pf.candidates
    rows, cols = frame.rows, frame.cols
    if cols < rows:
        return []
    by_slot: dict[tuple[int, int, Diagonal], list[int]] = {}
    for idx, c in enumerate(cands):
        if not c.kept:
            by_slot.setdefault((c.row, c.col, c.diagonal), []).append(idx)
    count: dict[tuple[int, int], int] = {}
    for i in range(1, rows + 1):
        for side in (0, 1):
            count[(i, side)] = k + 1
        for load in pf.loads:
            supply = float(load.work[z_of_row(i)])
            side = 0 if supply > 0 else 1
            caps = [arc_capacity(frame, c, float(pf.tension[n]), float(pf.compression[n]))[side]
                    for n, c in enumerate(cands) if c.row == i]  # fmt: skip
            largest = max(caps, default=0.0)
            if largest > 0 and math.isfinite(largest) and abs(supply) > 0:
                need = math.ceil(abs(supply) / largest * (1.0 - 1e-9))
                count[(i, side)] = max(count[(i, side)], need)
    out: list[list[bool]] = []
    room = cols - rows
    for share in STAIR_STARTS:
        c0 = 1 + round(share * room)
        chosen = [c.kept for c in cands]
        ok = True
        for i in range(1, rows + 1):
            for side, diag in ((0, Diagonal.RISING), (1, Diagonal.FALLING)):
                first = c0 + i - 1 if side == 0 else cols - c0 + 2 - i
                step = 1 if side == 0 else -1
                placed = 0
                col = first
                while placed < count[(i, side)] and 1 <= col <= cols:
                    options = [n for n in by_slot.get((i, col, diag), []) if arc_capacity(
                        frame, cands[n], float(pf.tension[n]), float(pf.compression[n]))[side] > 0]  # fmt: skip
                    if options:
                        best = max(options, key=lambda n: arc_capacity(
                            frame, cands[n], float(pf.tension[n]), float(pf.compression[n]))[side]
                            / max(1, unit_cost(table, cands[n])))  # fmt: skip
                        chosen[best] = True
                        placed += 1
                    elif col == first:
                        break
                    col += step
                if placed < count[(i, side)]:
                    ok = False
        if ok and chosen not in out:
            out.append(chosen)
    return out


def _elastic_ok(
    frame: Frame, strength: StrengthCatalogue, cands: Sequence[Candidate], chosen: Sequence[bool], needed: bool
) -> bool:
    if not needed:
        return True
    forces = elastic_forces(frame, strength, [c.member for c, on in zip(cands, chosen, strict=True) if on])
    return forces is None or forces.ok


def _repair(
    pf: PlasticFrame,
    table: BayTable,
    rows: Sequence[RuleRow],
    start: Sequence[bool],
    deadline: float,
    found: list[CapacityCut],
) -> list[bool] | None:
    """A layout that carries every case, from ``start`` by greedy additions (an upper bound; None if stuck).

    Each step takes the first violated Benders cut and adds the free candidates it values most per
    unit cost until that cut is met, never one that would break an upper limit of the rules. More
    members never lose capacity, so stability and the lower limits stay met. Every cut met on the
    way is valid for all layouts and is appended to ``found`` for the master.
    """
    cands = pf.candidates
    cur = list(start)
    caps = [(set(r.bays), r.at_most) for r in rows if r.at_most is not None]
    counts = [sum(1 for c, on in zip(cands, cur, strict=True) if on and (c.row, c.col) in bays) for bays, _ in caps]
    while time.monotonic() < deadline:
        cut = next((got for load in pf.loads if (got := farkas_cut(pf, load, cur)) is not None), None)
        if cut is None:
            return cur
        found.append(cut)
        taken = {(c.row, c.col, c.diagonal) for c, on in zip(cands, cur, strict=True) if on}
        ranked = sorted(
            ((coef / max(1, unit_cost(table, cands[k])), k, coef) for k, coef in cut.terms if not cur[k]), reverse=True
        )
        have = sum(coef for k, coef in cut.terms if cur[k])
        added = False
        for _, k, coef in ranked:
            if have >= cut.need:
                break
            c = cands[k]
            spot = (c.row, c.col, c.diagonal)
            hits = [n for n, (bays, _) in enumerate(caps) if (c.row, c.col) in bays]
            if spot in taken or any(counts[n] >= caps[n][1] for n in hits):
                continue
            cur[k] = True
            taken.add(spot)
            for n in hits:
                counts[n] += 1
            have += coef
            added = True
        if not added:
            return None
    return None


def _flags(cands: Sequence[Candidate], start: Sequence[Member]) -> list[bool] | None:
    """The candidates of a layout's new members (None if one of them is no candidate)."""
    if not start:
        return None
    index = {(c.row, c.col, c.diagonal, c.kind): i for i, c in enumerate(cands) if not c.kept}
    chosen = [c.kept for c in cands]
    for m in start:
        i = index.get((m.row, m.col, m.diagonal, m.kind))
        if i is None:
            return None
        chosen[i] = True
    return chosen


def _meets_rows(rows: Sequence[RuleRow], cands: Sequence[Candidate], chosen: Sequence[bool]) -> bool:
    """Whether a layout meets every spreading rule row."""
    return meets_rules((), [c.member for c, on in zip(cands, chosen, strict=True) if on], rows)


def _fullest(pf: PlasticFrame, rows: Sequence[RuleRow], k: int, table: BayTable) -> list[bool] | None:
    """Every free diagonal with its strongest member (a brace where allowed), if that layout carries
    every case and meets the rules' upper limits: the last resort when the time limit came first."""
    cands = pf.candidates
    chosen = [c.kept for c in cands]
    for slot in {(c.row, c.col, c.diagonal) for c in cands if not c.kept}:
        options = [i for i, c in enumerate(cands) if not c.kept and (c.row, c.col, c.diagonal) == slot]
        chosen[max(options, key=lambda i: (cands[i].kind is MemberKind.BRACE, pf.tension[i]))] = True
    for r in rows:
        if r.at_most is not None:
            inside = sum(1 for c, on in zip(cands, chosen, strict=True) if on and (c.row, c.col) in set(r.bays))
            if inside > r.at_most:
                return None
    if pf.frame.supports is not Supports.BASE and violated_cuts(table, additions_of(table, cands, chosen), k):
        return None
    if any(farkas_ray(pf, load, chosen) is not None for load in pf.loads):
        return None
    return chosen


def _stable_at(frame: Frame, table: BayTable, cands: Sequence[Candidate], chosen: Sequence[bool], k: int) -> bool:
    """Whether a layout is stable and survives the loss of any k members (pinned base: every lift k + 1
    members each way; free frames: no node set with k or fewer arcs leaving it)."""
    if frame.supports is Supports.BASE:
        up, down = [0] * (frame.rows + 1), [0] * (frame.rows + 1)
        for d, on in zip(cands, chosen, strict=True):
            if on:
                up[d.row] += gives_up(d)
                down[d.row] += gives_down(d)
        return min(up[1:]) >= k + 1 and min(down[1:]) >= k + 1
    return not violated_cuts(table, additions_of(table, cands, chosen), k)


def _judge(frame: Frame, strength: StrengthCatalogue, cands: Sequence[Candidate]) -> Judge:
    """The elastic verdict of a layout for the annealing search (None for a mechanism or a failed solve)."""

    def judge(chosen: Sequence[bool]) -> Verdict | None:
        try:
            forces = elastic_forces(frame, strength, [c.member for c, on in zip(cands, chosen, strict=True) if on])
        except NumericalError:
            return None
        if forces is None or any(c.is_mechanism for c in forces.cases):
            return None
        worst = 0.0
        hot: set[tuple[int, int]] = set()
        for case in forces.cases:
            worst = max(worst, case.max_utilisation or 0.0)
            for m in case.over_capacity:
                hot.update(_beside(m))
            for r in case.uplift_over:
                limit = r.uplift_limit_kn or 0.0
                worst = max(worst, r.uplift_kn / limit if limit > 0 else 1.0 + r.uplift_kn)
                hot.update({(1, r.q), (1, r.q + 1)})
        return Verdict(worst, forces.ok, tuple(sorted(hot)))

    return judge


def _beside(m: MemberForce) -> set[tuple[int, int]]:
    """The bays (row, column) a bar borders or spans."""
    if m.kind is BarKind.LEDGER and m.line is not None and m.col is not None:
        return {(m.line, m.col), (m.line + 1, m.col)}
    if m.kind is BarKind.STANDARD and m.line is not None and m.row is not None:
        return {(m.row, m.line), (m.row, m.line + 1)}
    return {(m.row, m.col)} if m.row is not None and m.col is not None else set()


def _prune(
    pf: PlasticFrame, table: BayTable, rows: Sequence[RuleRow], k: int, start: Sequence[bool], deadline: float
) -> list[bool]:
    """Take out the dearest members one by one while the layout stays stable, within the rules and carries
    every case (a local improvement of a repaired layout; the caller re-runs the elastic check)."""
    cands = pf.candidates
    cur = list(start)
    lows = [(set(r.bays), r.at_least, r.braced_bays) for r in rows if r.at_least is not None]
    frame = pf.frame
    order = sorted((k_ for k_, on in enumerate(cur) if on and not cands[k_].kept),
                   key=lambda k_: -unit_cost(table, cands[k_]))  # fmt: skip
    for idx in order:
        if time.monotonic() >= deadline:
            break
        cur[idx] = False
        ok = _stable_at(frame, table, cands, cur, k)
        for bays, least, braced in lows if ok else ():
            inside = [d for d, on in zip(cands, cur, strict=True) if on and (d.row, d.col) in bays]
            if (len({(d.row, d.col) for d in inside}) if braced else len(inside)) < least:
                ok = False
                break
        if ok and any(farkas_ray(pf, load, cur) is not None for load in pf.loads):
            ok = False
        if not ok:
            cur[idx] = True
    return cur
