"""Minimum-cost layouts of general frames (outlines, missing grid bars): a cut loop with mechanism cuts.

The master problem is a 0/1 program over candidate members (every allowed kind on every free
diagonal of an open bay, at most one member per diagonal) solved by HiGHS (scipy's ``milp``).
Its incumbent is checked exactly (:func:`bracegrid.mechanics.exact_rigidity`); when it is not
rigid, two kinds of valid cut are added and the master is solved again:

* mechanism cuts: the incumbent has a flex u (every bar and brace keeps its length, no tie
  lengthens). Any stable layout holds a member that u would stretch: a brace with nonzero
  elongation, or a tie with positive elongation (otherwise u would still be a flex of it, since
  adding members only adds constraints). So "at least one of those candidates" is valid; the
  incumbent holds none of them, so the cut removes it.
* directed cuts: a layout that is stable on the general frame is stable on the complete grid
  with the same bays open (missing bars only remove constraints), so every cut of the row/column
  digraph (an arc must leave every sink part and enter every source part) stays valid.

The first master optimum that checks rigid is proven optimal: every cut is valid, so the master
is a relaxation. The optimum of the complete grid with the same open bays (the existing
optimizer) is a lower bound too, and when its layout happens to be rigid on the general frame it
is the answer at once. If the time limit comes first, a greedy repair (add the cheapest
candidate the current flex stretches, until rigid) gives a layout, with the last master bound.
"""

from __future__ import annotations

import dataclasses
import itertools
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
from scipy.optimize import Bounds, LinearConstraint, milp

from bracegrid.analysis import flex_words
from bracegrid.analysis.digraph import arc_strong_components, build_arcs
from bracegrid.errors import InfeasibleError, SolverLimitError
from bracegrid.mechanics import (
    GENERAL_REDUNDANCY_CAP,
    Reduced,
    Rigidity,
    check_any,
    exact_rigidity,
    flex_of,
    member_rank,
    redundancy_any,
)
from bracegrid.model import (
    CostCatalogue,
    Diagonal,
    Frame,
    Member,
    MemberKind,
    StrengthCatalogue,
    blocked_bays,
    layout_cost,
)
from bracegrid.optimize.bays import bay_table
from bracegrid.optimize.benders import strength_reasons
from bracegrid.optimize.capacity import has_capacities
from bracegrid.optimize.loadcuts import LoadChecks, Row, no_good, rule_matrix
from bracegrid.optimize.results import FrameSolution, ProgressEvent, SolveMethod, SolveOptions, SolveStatus
from bracegrid.optimize.rules import meets_rules, rule_reasons, rule_rows

Progress = Callable[[ProgressEvent], None]
#: A candidate counts as stretched by a floating-point flex (from the tie LP) when its elongation
#: exceeds this share of the largest elongation: far above rounding (1e-15) and still far below the
#: LP's 1e-7 feasibility tolerance, so a cut only ever holds too many candidates (weaker, still valid)
#: rather than too few. Exact flexes need no tolerance (integer elongations).
STRETCH_SHARE = 1.0e-10


@dataclass(frozen=True, slots=True)
class Candidates:
    """Every member the optimizer may add to a general frame.

    Attributes:
        members: The candidates (proposed members).
        cents: Price of each, whole cents.
        slot: Index of each candidate's diagonal (at most one member per diagonal).
    """

    members: tuple[Member, ...]
    cents: tuple[int, ...]
    slot: tuple[int, ...]


def candidates(frame: Frame, costs: CostCatalogue, allow: frozenset[MemberKind]) -> Candidates:
    """The candidate members of a frame: allowed kinds on every free diagonal of every open bay."""
    closed = blocked_bays(frame)
    held = {(m.row, m.col, m.diagonal) for m in frame.members}
    members: list[Member] = []
    cents: list[int] = []
    slot: list[int] = []
    slots = 0
    for row in range(1, frame.rows + 1):
        for col in range(1, frame.cols + 1):
            if (row, col) in closed:
                continue
            for diagonal in Diagonal:
                if (row, col, diagonal) in held:
                    continue
                for kind in sorted(allow, key=lambda k: k.value):
                    members.append(Member(row, col, kind, diagonal, existing=False))
                    cents.append(costs.member_price_cents(kind, frame.cut_length_mm(row, col)))
                    slot.append(slots)
                slots += 1
    return Candidates(tuple(members), tuple(cents), tuple(slot))


def _elongations(
    red: Reduced, frame: Frame, z: Sequence[float] | Sequence[int], cands: Sequence[Member]
) -> list[float]:
    """Elongation (times length) of each candidate under the flex z (class unknowns); exact for integer z."""
    where = {n: k for k, n in enumerate(red.nodes)}
    xs, ys = frame.x_lines(), frame.y_lines()
    out = []
    for m in cands:
        if m.diagonal is Diagonal.RISING:
            a, b = (m.row - 1, m.col - 1), (m.row, m.col)
        else:
            a, b = (m.row, m.col - 1), (m.row - 1, m.col)
        ia, ib = where[a], where[b]
        dx, dy = xs[b[1]] - xs[a[1]], ys[b[0]] - ys[a[0]]
        ux = z[int(red.xclass[ib])] - z[int(red.xclass[ia])]
        uy = z[int(red.yclass[ib])] - z[int(red.yclass[ia])]
        out.append(dx * ux + dy * uy)
    return out


def _stretched(e: Sequence[float], cands: Candidates, *, exact: bool) -> list[int]:
    return _stretched_members(e, cands.members, exact=exact)


def _stretched_members(e: Sequence[float], members: Sequence[Member], *, exact: bool) -> list[int]:
    """Indices of the members a flex stretches (a brace with nonzero elongation, a tie with positive)."""
    if exact:
        return [k for k, m in enumerate(members) if (e[k] != 0 if m.kind is MemberKind.BRACE else e[k] > 0)]
    scale = max((abs(float(v)) for v in e), default=0.0)
    tol = STRETCH_SHARE * scale
    return [
        k
        for k, m in enumerate(members)
        if (abs(float(e[k])) > tol if m.kind is MemberKind.BRACE else float(e[k]) > tol)
    ]


def loss_cuts(
    frame: Frame, kept: Sequence[Member], trial: Sequence[int], cands: Candidates, k: int, *, most: int = 8
) -> list[tuple[list[int], int]]:
    """Cuts from the member losses (up to ``k`` at once) that leave the layout a mechanism: (candidates, need).

    If losing a set of members leaves a flex u, every layout that survives any k losses holds at
    least k + 1 members that u stretches: with k or fewer, losing exactly those leaves u a flex of
    the rest (u keeps every grid bar and stretches no other member). Kept members u stretches count
    towards the k + 1, so the candidates u stretches must number at least k + 1 less those. Floating
    flexes (the tie LP) count a member as stretched above a threshold, which can only weaken the cut.

    Raises:
        InfeasibleError: When u stretches no candidate and too few kept members: no layout survives.
    """
    layout = tuple(kept) + tuple(cands.members[i] for i in trial)
    out: list[tuple[list[int], int]] = []
    for size in range(1, k + 1):
        for gone in itertools.combinations(range(len(layout)), size):
            rest = [m for i, m in enumerate(layout) if i not in gone]
            result = exact_rigidity(frame, rest)
            if result.rigid:
                continue
            assert result.motion is not None
            before = len(out)
            for z in [result.motion, *result.others]:
                hit = _stretched(
                    _elongations(result.reduced, frame, z, cands.members), cands, exact=result.exact_motion
                )
                held = _stretched_members(_elongations(result.reduced, frame, z, kept), kept, exact=result.exact_motion)
                need = k + 1 - len(held)
                if need <= 0:
                    continue
                if len(hit) < need:
                    lost = ", ".join(layout[i].label for i in gone)
                    raise InfeasibleError([f"frame {frame.name!r}: no layout survives {k} member loss"
                                           f"{'es' if k > 1 else ''}: after losing {lost} too few diagonals "
                                           "could stop the mechanism that is left; clear more bays or allow "
                                           "more member kinds"])  # fmt: skip
                out.append((hit, need))
            if len(out) == before:
                # u stretches only members of ``gone`` (it is a flex of the rest), so at most k kept ones
                # and the need is at least 1: a failing loss always gives a cut. Never accept it silently.
                msg = f"internal error: a member loss on frame {frame.name!r} gave no loss cut; this is a bracegrid bug"
                raise RuntimeError(msg)
            if len(out) >= most:
                return out
    return out


def mechanism_cuts(result: Rigidity, frame: Frame, cands: Candidates) -> list[list[int]]:
    """One cut per flex of the result: the candidates it stretches (a brace with nonzero elongation,
    a tie with positive elongation). With several exact flexes (a basis), each gives its own cut."""
    assert result.motion is not None
    flexes = [result.motion, *result.others]
    cuts = []
    for z in flexes:
        e = _elongations(result.reduced, frame, z, cands.members)
        cuts.append(_stretched(e, cands, exact=result.exact_motion))
    return cuts


def mechanism_cut(result: Rigidity, frame: Frame, cands: Candidates) -> list[int]:
    """Candidates (indices) that the result's first flex stretches."""
    return mechanism_cuts(result, frame, cands)[0]


def _arcs_of(frame: Frame, m: Member) -> list[tuple[int, int]]:
    """Arcs (tail, head) of the row/column digraph a member gives (rows 0..R-1, columns R..R+C-1)."""
    row, col = m.row - 1, frame.rows + m.col - 1
    if m.kind is MemberKind.BRACE:
        return [(row, col), (col, row)]
    return [(row, col)] if m.diagonal is Diagonal.RISING else [(col, row)]


def directed_cuts(frame: Frame, layout: Sequence[Member], cands: Candidates) -> list[list[int]]:
    """Digraph cuts of the complete grid the layout violates: candidates giving an arc out of each
    sink part, and into each source part (valid for the general frame, see the module notes)."""
    complete = dataclasses.replace(frame, missing=frozenset(), absent=frozenset(), members=())
    arcs = build_arcs(complete, layout)
    count, labels = arc_strong_components(arcs)
    if count == 1:
        return []
    cs, cd = labels[arcs.src], labels[arcs.dst]
    between = cs != cd
    has_out = np.zeros(count, dtype=bool)
    has_in = np.zeros(count, dtype=bool)
    has_out[cs[between]] = True
    has_in[cd[between]] = True
    cand_arcs = [_arcs_of(frame, m) for m in cands.members]
    cuts: list[list[int]] = []
    for comp in range(count):
        if not has_out[comp]:
            cuts.append([k for k, a in enumerate(cand_arcs) if any(labels[u] == comp != labels[v] for u, v in a)])
        if not has_in[comp]:
            cuts.append([k for k, a in enumerate(cand_arcs) if any(labels[v] == comp != labels[u] for u, v in a)])
    return [c for c in cuts if c]


@dataclass(frozen=True, slots=True)
class _Master:
    chosen: tuple[int, ...]
    bound: int
    proven: bool


def _solve_master(
    cands: Candidates,
    cuts: list[list[int]],
    time_left: float,
    counts: dict[int, int],
    extra: Sequence[Row] = (),
    helpers: int = 0,
) -> _Master | None:
    """The 0/1 master: cheapest candidates meeting every cut (at least one member of each, or
    ``counts[i]`` of cut i), one member per diagonal, and the ``extra`` rows (rules, capacity and
    no-good cuts) over the candidates and ``helpers`` free 0/1 helper variables (HiGHS)."""
    n = len(cands.members)
    if n == 0:
        return _Master((), 0, True)
    width = n + helpers
    rows, cols = [], []
    for r, cut in enumerate(cuts):
        rows += [r] * len(cut)
        cols += cut
    slot = np.array(cands.slot)
    slot_rows = len(cuts) + slot
    constraints = []
    a = sp.csr_matrix(
        (np.ones(len(rows) + n), (np.concatenate([rows, slot_rows]).astype(int), np.concatenate([cols, np.arange(n)]))),
        shape=(len(cuts) + int(slot.max()) + 1, width),
    )
    lb = np.concatenate([[float(counts.get(i, 1)) for i in range(len(cuts))], np.zeros(a.shape[0] - len(cuts))])
    ub = np.concatenate([np.full(len(cuts), np.inf), np.ones(a.shape[0] - len(cuts))])
    constraints.append(LinearConstraint(a, lb, ub))
    if extra:
        e_rows = np.concatenate([np.full(len(r.cols), i) for i, r in enumerate(extra)]).astype(int)
        e_cols = np.concatenate([np.array(r.cols, dtype=int) for r in extra]).astype(int)
        e_vals = np.concatenate([np.array(r.coefs, dtype=float) for r in extra])
        b = sp.csr_matrix((e_vals, (e_rows, e_cols)), shape=(len(extra), width))
        constraints.append(LinearConstraint(b, [r.lo for r in extra], [r.hi for r in extra]))
    price = np.concatenate([np.array(cands.cents, dtype=float), np.zeros(helpers)])
    res = milp(
        price, constraints=constraints, integrality=np.ones(width),
        # mip_rel_gap 0: HiGHS's default (1e-4) would call a layout a few cents dear "optimal"
        bounds=Bounds(0, 1), options={"time_limit": max(0.5, time_left), "disp": False, "mip_rel_gap": 0.0},
    )  # fmt: skip
    if res.status == 2:
        return _Master((), 0, False)  # infeasible: the caller reports it
    if res.x is None:
        return None
    chosen = tuple(int(k) for k in np.flatnonzero(res.x[:n] > 0.5))
    bound = getattr(res, "mip_dual_bound", None)
    proven = res.status == 0
    value = round(float(res.fun))
    return _Master(chosen, value if proven or bound is None else int(np.ceil(float(bound) - 1e-6)), proven)


def _greedy(frame: Frame, kept: tuple[Member, ...], cands: Candidates, start: Sequence[int]) -> list[int] | None:
    """Add the cheapest candidate the current flex stretches until the layout is rigid."""
    chosen = list(start)
    used = {cands.slot[k] for k in chosen}
    for _ in range(len(cands.members) + 1):
        layout = kept + tuple(cands.members[k] for k in chosen)
        result = exact_rigidity(frame, layout)
        if result.rigid:
            return chosen
        hit = [k for k in mechanism_cut(result, frame, cands) if cands.slot[k] not in used]
        if not hit:
            return None
        best = min(hit, key=lambda k: cands.cents[k])
        chosen.append(best)
        used.add(cands.slot[best])
    return None


def _greedy_losses(
    frame: Frame, kept: tuple[Member, ...], cands: Candidates, start: Sequence[int], k: int, deadline: float
) -> list[int] | None:
    """Add the cheapest candidates each loss cut asks for until the layout survives any k losses."""
    chosen = list(start)
    used = {cands.slot[i] for i in chosen}
    while time.monotonic() < deadline:
        lost = loss_cuts(frame, kept, chosen, cands, k, most=1)
        if not lost:
            return chosen
        cut, need = lost[0]
        free = sorted((i for i in cut if cands.slot[i] not in used), key=lambda i: cands.cents[i])
        if not free:
            return None
        for i in free[:need]:
            chosen.append(i)
            used.add(cands.slot[i])
    return None


def _infeasible(frame: Frame, kept: tuple[Member, ...], cands: Candidates) -> list[str]:
    """Why even every candidate (a brace where allowed, else a tie) leaves a mechanism."""
    best: dict[int, Member] = {}
    for k, m in enumerate(cands.members):
        if cands.slot[k] not in best or m.kind is MemberKind.BRACE:
            best[cands.slot[k]] = m
    result = exact_rigidity(frame, kept + tuple(best.values()))
    if result.rigid:
        return []
    flex = flex_of(frame, result)
    words = flex_words(flex) if flex is not None else "a mechanism remains"
    return [
        f"frame {frame.name!r}: even with a member in every free diagonal, the frame keeps a {words}; "
        "open bays, restore missing grid bars or allow more member kinds"
    ]


def optimize_general(
    frame: Frame,
    costs: CostCatalogue,
    *,
    options: SolveOptions = SolveOptions(),
    on_progress: Progress | None = None,
    lower_bound_cents: int = 0,
    hint: Sequence[Member] = (),
    strength: StrengthCatalogue | None = None,
) -> FrameSolution:
    """Find a minimum-cost stable layout for a general frame, keeping its members.

    With capacities (``strength``) and load cases the layout must also carry every case, plastically
    and elastically, and it must follow the frame's spreading rules (:mod:`bracegrid.optimize.loadcuts`),
    unless ``options.stability_only``.

    Args:
        frame: The frame (outline, missing grid bars); its members are kept.
        costs: Prices.
        options: Time limit, allowed kinds and redundancy (at most GENERAL_REDUNDANCY_CAP here).
        on_progress: Called with progress events.
        lower_bound_cents: A proven bound on the added cost (the complete grid's optimum).
        hint: A layout of added members to try first (the complete grid's optimum).
        strength: Capacities and stiffness (None: stability and rules only).

    Returns:
        The layout, re-verified by the exact check, with its bound and gap.

    Raises:
        InfeasibleError: No layout makes the frame stable (with the mechanism that stays).
        InfeasibleError: Also when more redundancy is asked than the exact loss check covers, or when no
            layout survives the losses asked for, saying why.
        SolverLimitError: No layout within the time limit.
    """
    start = time.monotonic()
    deadline = start + max(0.0, options.time_limit)
    allow = frame.allow if options.allow is None else options.allow
    k = frame.redundancy if options.redundancy is None else options.redundancy
    if not 0 <= k <= GENERAL_REDUNDANCY_CAP:
        raise InfeasibleError(
            [
                f"frame {frame.name!r}: redundancy {k} on a frame with missing grid bars or absent bays is not "
                f"built (at most {GENERAL_REDUNDANCY_CAP}: every set of losses is checked exactly); ask for less"
            ]
        )
    kept = tuple(frame.members)
    cands = candidates(frame, costs, allow)
    reasons = _infeasible(frame, kept, cands)
    if reasons:
        raise InfeasibleError(reasons)
    rows = [] if options.stability_only else rule_rows(frame)
    checks = None
    if strength is not None and frame.loads and has_capacities(strength) and not options.stability_only:
        checks = LoadChecks(frame, strength, kept, cands.members)
    if rows or checks is not None:
        table = bay_table(complete_version(frame), costs, kept, allow)
        reasons = rule_reasons(frame, table, rows) + ([] if checks is None else strength_reasons(checks.pf, table))
        if reasons:
            raise InfeasibleError([f"frame {frame.name!r}: {r}" for r in reasons])
    extra, helpers = rule_matrix(kept, cands.members, rows)
    plastic_only: list[int] | None = None
    index = {(m.row, m.col, m.diagonal, m.kind): i for i, m in enumerate(cands.members)}
    hinted = [index[(m.row, m.col, m.diagonal, m.kind)] for m in hint if (m.row, m.col, m.diagonal, m.kind) in index]
    # Count cut: each member raises the rank of the all-bars framework by at most one, and a rigid
    # layout reaches the rank target, so at least (target - rank of the kept members) are added.
    kept_rank, target = member_rank(frame, kept)
    need = max(0, target - kept_rank)
    cuts: list[list[int]] = [list(range(len(cands.members)))] if need else []
    counts = {0: need} if need else {}
    rounds = 0
    bound = lower_bound_cents
    answer: list[int] | None = None
    proven = False

    def report(stage: str, best: int | None) -> None:
        if on_progress is not None:
            on_progress(
                ProgressEvent(
                    frame=frame.name, cost=None if best is None else best / 100, bound=bound / 100,
                    gap=None if best is None else (0.0 if best == 0 else max(0.0, (best - bound) / best)),
                    seconds=time.monotonic() - start, stage=stage,
                )
            )  # fmt: skip

    trial: list[int] = hinted
    while True:
        layout = kept + tuple(cands.members[i] for i in trial)
        result = exact_rigidity(frame, layout)
        cost = sum(cands.cents[i] for i in trial)
        adequate = result.rigid and meets_rules(kept, layout[len(kept) :], rows)
        if adequate and k:
            lost = loss_cuts(frame, kept, trial, cands, k)
            for cut, need in lost:
                counts[len(cuts)] = need
                cuts.append(cut)
            adequate = not lost
        if adequate and checks is not None:
            more = checks.capacity_cuts(trial)
            if more:  # valid for every layout that carries the cases
                extra.extend(more)
                adequate = False
            elif not checks.elastic_ok(trial):  # carries plastically only: exclude exactly this layout
                plastic_only = plastic_only or trial
                extra.append(no_good(trial, len(cands.members)))
                adequate = False
        if adequate and cost <= bound:
            answer, proven = trial, True
            break
        if adequate:
            answer = trial if answer is None or cost < sum(cands.cents[i] for i in answer) else answer
        elif not result.rigid:
            new = directed_cuts(frame, layout, cands)
            mech = mechanism_cuts(result, frame, cands)
            if not mech[0]:
                new = []  # the main flex cannot be stopped by any candidate
            else:
                new.extend(c for c in mech if c)
            if not new:
                raise InfeasibleError(_infeasible(frame, layout, cands) or [f"frame {frame.name!r}: no member stops "
                                      "the mechanism of the kept layout"])  # fmt: skip
            cuts.extend(new)
        if time.monotonic() >= deadline:
            break
        master = _solve_master(cands, cuts, deadline - time.monotonic(), counts, extra, helpers)
        rounds += 1
        if master is None:
            break
        if not master.proven and not master.chosen:
            if not extra:
                raise InfeasibleError([f"frame {frame.name!r}: the cuts admit no layout; this is a bracegrid bug"])
            if answer is None and plastic_only is None:
                asked = " and ".join(w for w, on in (("the load cases", checks is not None), ("the spreading rules",
                                     bool(rows))) if on)  # fmt: skip
                raise InfeasibleError([f"frame {frame.name!r}: no stable layout meets {asked}; relax a rule, "
                                       "clear more bays or allow stronger members"])  # fmt: skip
            proven = answer is not None  # every layout cheaper than the answer is cut off
            if proven:
                bound = sum(cands.cents[i] for i in answer or [])
            break
        bound = max(bound, master.bound)
        report(f"mechanism cuts (round {rounds}, {len(cuts) + len(extra)} cuts)", None)
        if not master.proven:
            break
        trial = list(master.chosen)
    if answer is None and plastic_only is None:
        answer = _greedy(frame, kept, cands, hinted)
        if answer is not None and k:
            answer = _greedy_losses(frame, kept, cands, answer, k, deadline + 0.1 * options.time_limit)
        if answer is not None and checks is not None:
            answer = checks.repair(answer, cands.cents, cands.slot, deadline + 0.1 * options.time_limit)
        if answer is not None and not meets_rules(kept, [cands.members[i] for i in answer], rows):
            answer = None
        if answer is None:
            msg = f"frame {frame.name!r}: no stable layout found within {options.time_limit:g} s; raise the time limit"
            raise SolverLimitError(msg)
    if answer is None:
        answer, proven = plastic_only, False  # reported as failing the elastic check
    assert answer is not None
    new_members = tuple(sorted((cands.members[i] for i in answer), key=lambda m: m.sort_key))
    members = kept + new_members
    verdict = check_any(frame, members)
    if not verdict.stable or (k and redundancy_any(frame, members, at_most=k) < k):
        msg = f"internal error: the layout for frame {frame.name!r} fails the exact re-check; this is a bracegrid bug"
        raise RuntimeError(msg)
    added = sum(cands.cents[i] for i in answer)
    bound = added if proven else min(bound, added)
    total = layout_cost(frame, costs, members)
    kept_cost = layout_cost(frame, costs, kept)
    return FrameSolution(
        frame=dataclasses.replace(frame, members=members),
        members=members,
        status=SolveStatus.OPTIMAL if proven else SolveStatus.FEASIBLE,
        cost=total,
        added_cost=layout_cost(frame, costs, new_members),
        bound=total if proven else round(kept_cost + bound / 100, 2),
        gap=0.0 if proven or added == 0 else round((added - bound) / added, 6),
        seconds=round(time.monotonic() - start, 3),
        verdict=verdict,
        method=SolveMethod.MECHANISM_CUTS if checks is None and not rows else SolveMethod.GENERAL_STRENGTH,
        redundancy=k,
        rounds=rounds,
        cuts=len(cuts) + len(extra),
    )


def complete_version(frame: Frame) -> Frame:
    """The complete grid with the same open bays: its optimum bounds the general frame's from below."""
    return dataclasses.replace(frame, missing=frozenset(), absent=frozenset(), blocked=blocked_bays(frame))
