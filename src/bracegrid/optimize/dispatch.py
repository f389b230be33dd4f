"""Dispatch: minimum-cost stable layouts by exact shortcuts where they exist, the cut loop otherwise.

Dispatch for one frame (docs/optimizer.md explains each route):

1. pinned base: rows decouple, each row solved exactly (no solver);
2. free frame, rigid braces only, kept members two-way: minimum spanning tree;
3. free complete frame with uniform bays and nothing kept: closed form;
4. otherwise: CP-SAT on the cut model with lazily separated directed cuts,
   warm-started from a greedy repair layout, with symmetry breaking.

Every layout returned is re-verified with :func:`bracegrid.mechanics.check_any` (the digraph on
complete grids, the exact check on general frames) and, when redundancy is asked,
:func:`bracegrid.mechanics.redundancy_any`.

References:
    E. D. Bolker and H. Crapo, "Bracing rectangular frameworks. I",
    SIAM J. Appl. Math. 36(3), 473-490 (1979), doi:10.1137/0136036.
    J. A. Baglivo and J. E. Graver, *Incidence and Symmetry in Design and
    Architecture*, Cambridge University Press (1983), ch. 10.
"""

from __future__ import annotations

import dataclasses
import time
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

from bracegrid.errors import InfeasibleError, InputError, SolverLimitError
from bracegrid.mechanics import check_any, redundancy_any
from bracegrid.model import CostCatalogue, Frame, Member, MemberKind, Project, StrengthCatalogue, Supports, layout_cost
from bracegrid.optimize.adequacy import strength_check
from bracegrid.optimize.bays import Additions, BayTable, bay_table, money
from bracegrid.optimize.benders import solve_strength
from bracegrid.optimize.capacity import has_capacities
from bracegrid.optimize.cutloop import LoopReport, solve_with_cuts
from bracegrid.optimize.diagnosis import infeasible_reasons
from bracegrid.optimize.general import complete_version, optimize_general
from bracegrid.optimize.patterns import PatternKind, closed_form_cost
from bracegrid.optimize.results import (
    MAX_REDUNDANCY,
    FrameSolution,
    ProgressEvent,
    ProjectSolution,
    SolveMethod,
    SolveOptions,
    SolveStatus,
)
from bracegrid.optimize.shortcuts import closed_form, existing_is_symmetric, pinned_base_rows, spanning_tree_braces
from bracegrid.optimize.warmstart import (
    constructive,
    constructive_redundant,
    pattern_starts,
    prune,
    redundant_pattern_starts,
)

Progress = Callable[[ProgressEvent], None]

#: Share of the time limit the stability-only solve may take before a strength-aware search.
STABLE_SHARE = 0.2


@dataclass(frozen=True, slots=True)
class _Found:
    """A route's answer before re-verification: the new members, the bound and how they were found."""

    additions: Additions
    bound: int
    proven: bool
    method: SolveMethod
    pattern: PatternKind | None = None
    rounds: int = 0
    cuts: int = 0
    members: tuple[Member, ...] | None = None
    added: int | None = None


def optimize_frame(
    frame: Frame,
    costs: CostCatalogue,
    *,
    options: SolveOptions = SolveOptions(),
    on_progress: Progress | None = None,
    strength: StrengthCatalogue | None = None,
) -> FrameSolution:
    """Find a minimum-cost stable layout for one frame, keeping its members.

    With capacities (``strength``) and load cases, or spreading rules, the layout must also carry
    every case plastically within capacity and follow the rules (:mod:`bracegrid.optimize.benders`),
    unless ``options.stability_only``. Every layout of a frame with load cases is then checked
    plastically and elastically (:attr:`FrameSolution.strength`).

    Args:
        frame: The frame; its members are kept in place at no added cost.
        costs: Prices.
        options: Time limit, workers, seed, allowed kinds, redundancy, stability only.
        on_progress: Called with progress events while solving.
        strength: Capacities and stiffness (the project's); None = stability and rules only.

    Returns:
        The layout, re-verified stable, with cost, bound, gap and how it was solved.

    Raises:
        InfeasibleError: No layout can make the frame stable (with reasons).
        SolverLimitError: No layout was found within the limit (should not happen).
        InputError: Redundancy outside 0..MAX_REDUNDANCY.

    Example:
        >>> from bracegrid.model import Frame
        >>> sol = optimize_frame(Frame("f", (3000,) * 3, (2000,) * 2, allow=frozenset({MemberKind.BRACE})),
        ...                      CostCatalogue())
        >>> sol.status.value, len(sol.members), sol.method.value
        ('optimal', 4, 'spanning-tree')
    """
    start = time.monotonic()
    deadline = start + max(0.0, options.time_limit)
    allow = frame.allow if options.allow is None else options.allow
    k = frame.redundancy if options.redundancy is None else options.redundancy
    if not 0 <= k <= MAX_REDUNDANCY:
        msg = f"frame {frame.name!r}: redundancy {k} is outside 0..{MAX_REDUNDANCY}; ask for fewer member losses"
        raise InputError(msg)
    use_loads = strength is not None and bool(frame.loads) and has_capacities(strength)
    if not frame.is_complete:
        sol = _optimize_general(frame, costs, options=options, on_progress=on_progress, strength=strength)
        return _with_checks(sol, strength, searched=not options.stability_only and use_loads)
    kept = tuple(frame.members)
    table = bay_table(frame, costs, kept, allow)
    reasons = infeasible_reasons(frame, table, allow, k)
    if reasons:
        raise InfeasibleError(reasons)

    def report(stage: str, best: int | None, bound: int) -> None:
        if on_progress is None:
            return
        gap = None if best is None else (0.0 if best == 0 else max(0.0, (best - bound) / best))
        on_progress(
            ProgressEvent(
                frame=frame.name,
                cost=None if best is None else money(table.existing_cost + best),
                bound=money(table.existing_cost + bound),
                gap=gap,
                seconds=time.monotonic() - start,
                stage=stage,
            )
        )

    if not options.stability_only and (use_loads or frame.rules.any):
        # The stability-only optimum first (a fifth of the time at most): its bound holds here too,
        # and on free frames its layout, repaired to carry the loads, is the first incumbent.
        plain = None
        if not infeasible_reasons(frame, table, allow, k):
            try:
                plain = _solve(frame, table, allow, k, options, start + STABLE_SHARE * (deadline - start), report)
            except SolverLimitError:
                plain = None
        # The seed helps where the master's own stability rows are weak (free frames: cuts found one
        # round at a time); on a pinned base the master's first answers repair better (measured on
        # the 30 x 15 face: 770.80 from master answers, 1000.40 from the stability-only seed).
        seed = () if plain is None or frame.supports is Supports.BASE else plain.additions.members(table)
        got = solve_strength(
            frame, strength or StrengthCatalogue(), table, allow, k, use_loads=use_loads, deadline=deadline,
            workers=options.workers, seed=options.seed, report=report,
            start=seed, floor=0 if plain is None else plain.bound,
        )  # fmt: skip
        found = _Found(Additions.empty(table.rows, table.cols), got.bound, got.proven, SolveMethod.STRENGTH_CUTS,
                       rounds=got.rounds, cuts=got.cuts, members=got.members, added=got.added)  # fmt: skip
    else:
        found = _solve(frame, table, allow, k, options, deadline, report)
    sol = _finish(frame, costs, table, found, k, start)
    return _with_checks(sol, strength, searched=not options.stability_only and use_loads)


def _with_checks(sol: FrameSolution, strength: StrengthCatalogue | None, *, searched: bool) -> FrameSolution:
    """The solution with both strength checks of its layout attached (a frame with load cases)."""
    if strength is None or not sol.frame.loads:
        return sol
    return dataclasses.replace(sol, strength=strength_check(sol.frame, strength, sol.members, searched=searched))


def _optimize_general(
    frame: Frame,
    costs: CostCatalogue,
    *,
    options: SolveOptions,
    on_progress: Progress | None,
    strength: StrengthCatalogue | None,
) -> FrameSolution:
    """A general frame: the complete grid's optimum (same open bays) as bound and first try, then mechanism cuts.

    The complete grid's optimum is searched for stability, redundancy and rules only: a layout that
    carries the loads on the general frame, or survives k losses there, is stable, survives them and
    keeps the rules on the complete grid (bars only add constraints), so its bound holds; the complete
    grid's elastic exclusions would not (the elastic check is not monotone).
    """
    share = dataclasses.replace(options, time_limit=0.3 * options.time_limit)
    try:
        floor = optimize_frame(complete_version(frame), costs, options=share)
    except (InfeasibleError, SolverLimitError):
        floor = None
    bound = 0 if floor is None else round(100 * (floor.bound - layout_cost(frame, costs, frame.members)))
    hint = () if floor is None else tuple(m for m in floor.members if not m.existing)
    return optimize_general(frame, costs, options=options, on_progress=on_progress,
                            lower_bound_cents=max(0, bound), hint=hint, strength=strength)  # fmt: skip


def _solve(
    frame: Frame,
    table: BayTable,
    allow: frozenset[MemberKind],
    k: int,
    options: SolveOptions,
    deadline: float,
    report: Callable[[str, int | None, int], None],
) -> _Found:
    if redundancy_any(frame, frame.members) >= k:
        report("kept members suffice", 0, 0)
        return _Found(Additions.empty(table.rows, table.cols), 0, True, SolveMethod.KEPT)
    if frame.supports is Supports.BASE:
        got = pinned_base_rows(table, k=k)
        if got is None:  # pragma: no cover - ruled out by the feasibility check
            msg = f"frame {frame.name!r}: no layout found"
            raise SolverLimitError(msg)
    else:
        got = None
        if k == 0 and MemberKind.TIE not in allow and existing_is_symmetric(table):
            got = spanning_tree_braces(table)
        if got is None and k == 0:
            got = closed_form(table)
    if got is not None:
        cost = got.additions.cost(table)
        report(got.words, cost, cost)
        return _Found(got.additions, cost, True, got.method, pattern=got.pattern)
    return _solve_cp(frame, table, allow, k, options, deadline, report)


def _uniform(table: BayTable) -> bool:
    """All open bays price a brace alike and a tie alike (the symmetric regime)."""
    open_bays = table.free_slots > 0
    braces, ties = table.brace_cost[open_bays], table.tie_cost[open_bays]
    return bool(braces.size and (braces == braces[0]).all() and (ties == ties[0]).all())


def _solve_cp(
    frame: Frame,
    table: BayTable,
    allow: frozenset[MemberKind],
    k: int,
    options: SolveOptions,
    deadline: float,
    report: Callable[[str, int | None, int], None],
) -> _Found:
    start_time = time.monotonic()
    improve: Callable[[Additions], Additions | None]
    if k == 0:
        improve = lambda a: constructive(table, a)  # noqa: E731
        tries = 12 if table.rows * table.cols <= 2500 else 2
        budget = start_time + 0.1 * max(0.0, deadline - start_time)
        starts = [
            constructive(table),
            pattern_starts(table, tries=tries, seed=options.seed, deadline=budget),
        ]
        if MemberKind.BRACE in allow and existing_is_symmetric(table):
            tree = spanning_tree_braces(table)
            if tree is not None:
                starts.append(prune(table, tree.additions))
    else:
        improve = lambda a: constructive_redundant(table, a, k, deadline=deadline)  # noqa: E731
        budget = start_time + 0.1 * max(0.0, deadline - start_time)
        # Walk starts pay off on small or uniform frames; on large random ones they only eat time.
        walks = 3 if table.rows * table.cols <= 600 or _uniform(table) else 0
        # On those large random frames the greedy start (maximum flows per member) can take the
        # whole limit under load, before any bound; the LP dive gives the layout there, and the
        # greedy layout is made afterwards only if nothing was found.
        greedy = walks > 0
        starts = [
            constructive_redundant(table, None, k, deadline=budget) if greedy else None,
            redundant_pattern_starts(table, k, tries=walks, seed=options.seed, deadline=budget),
        ]
    found = [s for s in starts if s is not None]
    incumbent = min(found, key=lambda a: a.cost(table)) if found else None
    report("warm start", None if incumbent is None else incumbent.cost(table), 0)

    def step(s: LoopReport) -> None:
        report(f"CP-SAT directed cuts (round {s.iteration}, {s.cuts} cuts)", s.best, s.bound)

    floor = 0
    if k == 0 and not frame.members:
        # Blocking bays or dearer bays never make a layout cheaper: the closed form of the
        # complete frame at the cheapest bay prices bounds every free frame with nothing kept.
        open_bays = table.free_slots > 0
        a = int(table.brace_cost[open_bays].min()) if table.brace_ok.any() else None
        b = int(table.tie_cost[open_bays].min()) if table.tie_ok and open_bays.any() else None
        if a is not None or b is not None:
            floor = closed_form_cost(table.rows, table.cols, a, b)
    result = solve_with_cuts(
        table,
        k=k,
        row_sizes=frame.heights,
        col_sizes=frame.widths,
        incumbent=incumbent,
        improve=improve,
        deadline=deadline,
        workers=options.workers,
        seed=options.seed,
        on_step=step,
        initial_bound=floor,
        lns_rounds=4,
        probe_after=0.5,
        lp_share=0.5,
        block_until=0.85,
    )
    if result.additions is None and k > 0:
        late = constructive_redundant(table, None, k, deadline=time.monotonic())
        if late is not None:
            result = dataclasses.replace(result, additions=late)
    if result.additions is None:
        msg = f"frame {frame.name!r}: no stable layout found within {options.time_limit:g} s; raise the time limit"
        raise SolverLimitError(msg)
    if result.iterations > 0:
        method = SolveMethod.CUT_LOOP
    elif result.lp_rounds:
        method = SolveMethod.LP_CUTS  # proven when the LP bound met the layout
    else:  # no solver round: proven only if the closed-form floor met the warm start
        method = SolveMethod.PATTERN_BOUND if result.proven else SolveMethod.WARM_START
    return _Found(result.additions, result.bound, result.proven, method, rounds=result.iterations, cuts=result.cuts)


def _finish(
    frame: Frame,
    costs: CostCatalogue,
    table: BayTable,
    found: _Found,
    k: int,
    start: float,
) -> FrameSolution:
    add, bound, proven = found.additions, found.bound, found.proven
    kept = tuple(frame.members)
    new = add.members(table) if found.members is None else found.members
    members = kept + tuple(sorted(new, key=lambda m: m.sort_key))
    verdict = check_any(frame, members)
    achieved = redundancy_any(frame, members) if verdict.stable else -1
    if not verdict.stable or achieved < k:
        msg = (
            f"internal error: the optimizer produced a layout for frame {frame.name!r} that fails the "
            f"re-check (stable={verdict.stable}, redundancy {achieved} < {k}); this is a bracegrid bug"
        )
        raise RuntimeError(msg)
    added = add.cost(table) if found.added is None else found.added
    bound = min(bound, added)
    if proven:
        bound = added
    gap = 0.0 if added == 0 else (added - bound) / added
    # Money is the sum of the members' prices to the cent (the bill's one rounding rule); the
    # integer cost units hold exactly those prices, so the search minimised this very sum.
    cost = layout_cost(frame, costs, members)
    return FrameSolution(
        frame=dataclasses.replace(frame, members=members),
        members=members,
        status=SolveStatus.OPTIMAL if proven else SolveStatus.FEASIBLE,
        cost=cost,
        added_cost=layout_cost(frame, costs, new),
        bound=cost if proven else min(cost, money(table.existing_cost + bound)),
        gap=round(gap, 6),
        seconds=round(time.monotonic() - start, 3),
        verdict=verdict,
        method=found.method,
        redundancy=achieved,
        pattern=found.pattern,
        rounds=found.rounds,
        cuts=found.cuts,
    )


def repair_frame(
    frame: Frame,
    costs: CostCatalogue,
    without: Sequence[Member],
    *,
    keep_clear: bool = False,
    options: SolveOptions = SolveOptions(),
    on_progress: Progress | None = None,
    strength: StrengthCatalogue | None = None,
) -> FrameSolution:
    """Take members out, keep every other member, and add the cheapest members that restore stability.

    Args:
        frame: The frame and its members.
        costs: Prices.
        without: Members taken out (matched by bay and diagonal).
        keep_clear: Leave the removed members' bays clear (no new member there).
        options: Solver options (redundancy included).
        on_progress: Progress callback.

    Returns:
        The repaired layout; its verdict lists the removed members. Bays kept
        clear that end up empty are added to the frame's ``blocked`` list.

    Raises:
        InfeasibleError: If no repair exists (e.g. the cleared bay was the only one left in a row).

    Example:
        >>> from bracegrid.model import Diagonal
        >>> b = MemberKind.BRACE
        >>> tree = tuple(Member(r, c, b, Diagonal.RISING) for r, c in ((1, 1), (1, 2), (2, 1)))
        >>> f = Frame("f", (3000, 3000), (2000, 2000), members=tree)
        >>> sol = repair_frame(f, CostCatalogue(), [tree[2]], keep_clear=True)
        >>> [m.kind.value + " " + m.label for m in sol.members if not m.existing], sorted(sol.frame.blocked)
        (['tie r2c2:falling', 'tie r2c2:rising'], [(2, 1)])
    """
    gone = {(m.row, m.col, m.diagonal) for m in without}
    removed = tuple(m for m in frame.members if (m.row, m.col, m.diagonal) in gone)
    kept = tuple(m for m in frame.members if (m.row, m.col, m.diagonal) not in gone)
    clear = frozenset(m.bay for m in removed) if keep_clear else frozenset()
    work = dataclasses.replace(frame, members=kept, blocked=frame.blocked | clear)
    sol = optimize_frame(work, costs, options=options, on_progress=on_progress, strength=strength)
    occupied = {m.bay for m in sol.members}
    blocked = frame.blocked | frozenset(b for b in clear if b not in occupied)
    final = dataclasses.replace(frame, members=sol.members, blocked=blocked)
    verdict = dataclasses.replace(sol.verdict, removed=removed)
    return dataclasses.replace(sol, frame=final, verdict=verdict)


def optimize_project(
    project: Project,
    *,
    options: SolveOptions = SolveOptions(),
    frame_names: Sequence[str] | None = None,
    on_progress: Progress | None = None,
    without: Mapping[str, Sequence[Member]] | None = None,
    keep_clear: bool = False,
) -> ProjectSolution:
    """Optimize every frame of a project (or the named ones).

    Args:
        project: The project.
        options: Solver options, applied to each frame.
        frame_names: Only these frames (default: all).
        on_progress: Called with progress events.
        without: Per frame name, members taken out before optimizing (a repair, see :func:`repair_frame`).
        keep_clear: Leave the removed members' bays clear.

    Returns:
        The solutions and the project with the new layouts in place.

    Raises:
        KeyError: If a frame name is unknown.
        InfeasibleError: If some frame has no stable layout (all such frames' reasons together).

    Example:
        >>> from bracegrid.model import Supports
        >>> p = Project("p", (Frame("f", (2500,) * 4, (2000,) * 3, supports=Supports.BASE),))
        >>> sol = optimize_project(p)
        >>> len(sol.frames[0].members), sol.frames[0].status.value
        (6, 'optimal')
    """
    chosen = [project.frame(n) for n in frame_names] if frame_names is not None else list(project.frames)
    solutions: list[FrameSolution] = []
    reasons: list[str] = []
    out_of = without or {}
    for frame in chosen:
        try:
            if out_of.get(frame.name):
                repaired = repair_frame(
                    frame, project.costs, out_of[frame.name], keep_clear=keep_clear, options=options,
                    on_progress=on_progress, strength=project.strength,
                )  # fmt: skip
                solutions.append(repaired)
            else:
                solutions.append(
                    optimize_frame(
                        frame, project.costs, options=options, on_progress=on_progress, strength=project.strength
                    )
                )
        except InfeasibleError as exc:
            reasons.extend(exc.reasons)
    if reasons:
        raise InfeasibleError(reasons)
    by_name = {s.frame.name: s.frame for s in solutions}
    frames = tuple(by_name.get(f.name, f) for f in project.frames)
    return ProjectSolution(
        project=dataclasses.replace(project, frames=frames),
        frames=tuple(solutions),
        cost=round(sum(s.cost for s in solutions), 2),
        added_cost=round(sum(s.added_cost for s in solutions), 2),
    )
