"""Strategies: alternative bracing layouts for a frame, solved and costed side by side.

Six strategies per frame, each re-verified by the stability check:

1. ``braces-only``: rigid braces only (the optimizer, allow = brace);
2. ``ties-only``: tension-only ties only;
3. ``mixed``: the optimizer's free choice of braces and ties;
4. ``stable-only``: mixed, for stability alone: load cases, capacities and spreading rules
   ignored, so that beside ``mixed`` the price of strength is visible;
5. ``mixed-redundant``: mixed, and stable after the loss of any one member
   (or of the frame's own ``redundancy`` if that is higher);
6. ``baseline``: the rule-of-thumb layout of :mod:`bracegrid.compare.baseline`
   (common practice, no source), repaired at least cost when it leaves a
   mechanism, and reported as drawn plus the repair.

Where the project gives load cases with capacities, or spreading rules, every optimized strategy
but ``stable-only`` must carry the loads and follow the rules (unless the options ask for stability
only), and every layout, the baseline's included, is checked plastically and elastically
(:func:`bracegrid.optimize.strength_check`); the baseline's note says by how much it fails.

Strategies override the frame's ``allow`` list: the point is to price the
alternatives. Members in place (``status = "existing"``) are kept in every
strategy and counted in every cost, so the costs compare like with like;
members only proposed (``status = "proposed"``, e.g. from an earlier
``optimize --write``) are dropped, since each strategy proposes its own. With
``bare=True`` every member is dropped and each strategy starts from the bare
frame.
"""

from __future__ import annotations

import dataclasses
import math
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from enum import Enum

from bracegrid.analysis import Verdict
from bracegrid.compare.baseline import rule_of_thumb_layout
from bracegrid.errors import InfeasibleError
from bracegrid.mechanics import FrameForces, analyse_frame, check_any, missing_stiffness, redundancy_any
from bracegrid.model import (
    CostCatalogue,
    Frame,
    Member,
    MemberKind,
    Project,
    StrengthCatalogue,
    layout_cost,
    layout_cost_cents,
    layout_length_mm,
)
from bracegrid.optimize import FrameSolution, SolveOptions, SolveStatus, StrengthCheck, optimize_frame, strength_check


class StrategyKey(Enum):
    """The strategies compared, in table order."""

    BRACES_ONLY = "braces-only"
    TIES_ONLY = "ties-only"
    MIXED = "mixed"
    STABLE_ONLY = "stable-only"
    MIXED_REDUNDANT = "mixed-redundant"
    BASELINE = "baseline"

    @property
    def title(self) -> str:
        """Heading used in tables and reports."""
        return _TITLES[self]


class StrategyStatus(Enum):
    """How a strategy's layout stands."""

    OPTIMAL = "optimal"
    """Proven minimum cost for the strategy."""
    FEASIBLE = "feasible"
    """Stable, but the time limit came before a proof (see bound and gap)."""
    AS_DRAWN = "as drawn"
    """The rule-of-thumb layout, stable as the rule drew it."""
    REPAIRED = "repaired"
    """The rule-of-thumb layout left a mechanism; the cheapest repair was added (see the note)."""
    INFEASIBLE = "infeasible"
    """No layout exists under the strategy (see the note)."""

    @classmethod
    def of(cls, status: SolveStatus) -> StrategyStatus:
        """The strategy status of an optimizer answer."""
        return cls.OPTIMAL if status is SolveStatus.OPTIMAL else cls.FEASIBLE


_TITLES = {
    StrategyKey.BRACES_ONLY: "Rigid braces only",
    StrategyKey.TIES_ONLY: "Ties only",
    StrategyKey.MIXED: "Mixed (optimized)",
    StrategyKey.STABLE_ONLY: "Mixed, stability alone (loads and rules ignored)",
    StrategyKey.MIXED_REDUNDANT: "Mixed, survives loss of any one member",
    StrategyKey.BASELINE: "Rule of thumb",
}

_BOTH = frozenset(MemberKind)


@dataclass(frozen=True, slots=True)
class StrategyResult:
    """One strategy's layout for one frame.

    Attributes:
        key: Which strategy.
        frame: The frame carrying the strategy's full layout (None if infeasible).
        status: Optimal, feasible (time limit, see gap), as drawn or repaired (the baseline), or infeasible.
        cost: Whole-layout cost (money), None if infeasible.
        bound: Proven lower bound on the cost, None where not applicable.
        gap: Relative gap to the bound, None where not applicable.
        seconds: Solve time.
        braces: Rigid braces in the layout (kept and added).
        ties: Ties in the layout (kept and added).
        length_mm: Total cut length of the layout's members, whole mm (the bill's lengths).
        stable: Re-verified by the stability check.
        critical: Members whose single loss leaves a mechanism.
        redundancy: Members the layout can lose, any of them, and stay stable (-1: unstable).
        note: Why infeasible, or what the repair added.
        kept_braces: Braces already in place, kept by every strategy.
        kept_ties: Ties already in place, kept by every strategy.
        forces: The layout's member forces under the frame's load cases (None without loads, or
            when the project lacks a stiffness the layout needs).
        check: The plastic and elastic strength checks of the layout (None without load cases).
    """

    key: StrategyKey
    frame: Frame | None
    status: StrategyStatus
    cost: float | None
    bound: float | None
    gap: float | None
    seconds: float
    braces: int
    ties: int
    length_mm: int
    stable: bool
    critical: int
    redundancy: int
    note: str = ""
    kept_braces: int = 0
    kept_ties: int = 0
    forces: FrameForces | None = None
    check: StrengthCheck | None = None

    @property
    def added_braces(self) -> int:
        """Braces the strategy adds."""
        return self.braces - self.kept_braces

    @property
    def added_ties(self) -> int:
        """Ties the strategy adds."""
        return self.ties - self.kept_ties


@dataclass(frozen=True, slots=True)
class FrameComparison:
    """Every strategy for one frame.

    Attributes:
        frame: The frame as given.
        strategies: One result per strategy, in :class:`StrategyKey` order.
    """

    frame: Frame
    strategies: tuple[StrategyResult, ...]

    def result(self, key: StrategyKey) -> StrategyResult:
        """The result of one strategy."""
        return next(s for s in self.strategies if s.key is key)

    def saving(self, key: StrategyKey) -> float | None:
        """Money saved by a strategy against the baseline (None if either is infeasible)."""
        base, got = self.result(StrategyKey.BASELINE).cost, self.result(key).cost
        return None if base is None or got is None else (round(base * 100) - round(got * 100)) / 100


@dataclass(frozen=True, slots=True)
class Comparison:
    """Every frame's comparison.

    Attributes:
        project: The project as given.
        frames: One comparison per frame compared.
    """

    project: Project
    frames: tuple[FrameComparison, ...]

    def total(self, key: StrategyKey) -> float | None:
        """A strategy's cost summed over the frames (None if it is infeasible for any)."""
        costs = [fc.result(key).cost for fc in self.frames]
        return None if any(c is None for c in costs) else round(sum(c for c in costs if c is not None), 2)


def _summary(
    key: StrategyKey,
    frame: Frame,
    costs: CostCatalogue,
    members: tuple[Member, ...],
    *,
    verdict: Verdict,
    redundancy: int,
    status: StrategyStatus,
    seconds: float,
    cost: float | None = None,
    bound: float | None = None,
    gap: float | None = None,
    note: str = "",
) -> StrategyResult:
    braces = sum(1 for m in members if m.kind is MemberKind.BRACE)
    kept_braces = sum(1 for m in frame.members if m.kind is MemberKind.BRACE)
    return StrategyResult(
        key=key,
        frame=dataclasses.replace(frame, members=members),
        status=status,
        cost=layout_cost(frame, costs, members) if cost is None else cost,
        bound=bound,
        gap=gap,
        seconds=round(seconds, 3),
        braces=braces,
        ties=len(members) - braces,
        length_mm=layout_length_mm(frame, members),
        stable=verdict.stable,
        critical=len(verdict.critical_members),
        redundancy=redundancy,
        note=note,
        kept_braces=kept_braces,
        kept_ties=len(frame.members) - kept_braces,
    )


def _from_solution(
    key: StrategyKey,
    frame: Frame,
    costs: CostCatalogue,
    sol: FrameSolution,
    *,
    status: StrategyStatus | None = None,
    seconds: float | None = None,
    note: str = "",
) -> StrategyResult:
    """A strategy result from an optimizer answer (already re-verified by the optimizer).

    A status given by the caller (the baseline's) replaces the optimizer's, and with it
    the bound and gap, which then belong to the repair rather than to the strategy.
    """
    own = status is None
    return _summary(
        key, frame, costs, sol.members, verdict=sol.verdict, redundancy=sol.redundancy,
        status=StrategyStatus.of(sol.status) if status is None else status,
        seconds=sol.seconds if seconds is None else seconds, cost=sol.cost,
        bound=sol.bound if own else None, gap=sol.gap if own else None, note=note,
    )  # fmt: skip


def _infeasible(key: StrategyKey, seconds: float, reason: str) -> StrategyResult:
    return StrategyResult(
        key=key, frame=None, status=StrategyStatus.INFEASIBLE, cost=None, bound=None, gap=None,
        seconds=round(seconds, 3), braces=0, ties=0, length_mm=0, stable=False, critical=0, redundancy=-1,
        note=reason,
    )  # fmt: skip


def _optimized(
    key: StrategyKey, frame: Frame, costs: CostCatalogue, options: SolveOptions, strength: StrengthCatalogue | None
) -> StrategyResult:
    allow = {
        StrategyKey.BRACES_ONLY: frozenset({MemberKind.BRACE}),
        StrategyKey.TIES_ONLY: frozenset({MemberKind.TIE}),
    }.get(key, _BOTH)
    k = max(1, frame.redundancy) if key is StrategyKey.MIXED_REDUNDANT else 0
    t0 = time.perf_counter()
    try:
        alone = options.stability_only or key is StrategyKey.STABLE_ONLY
        sol = optimize_frame(
            frame, costs, options=dataclasses.replace(options, allow=allow, redundancy=k, stability_only=alone),
            strength=strength,
        )  # fmt: skip
    except InfeasibleError as exc:
        return _infeasible(key, time.perf_counter() - t0, "; ".join(exc.reasons))
    return _from_solution(key, frame, costs, sol)


def _baseline(frame: Frame, costs: CostCatalogue, options: SolveOptions) -> StrategyResult:
    t0 = time.perf_counter()
    drawn = rule_of_thumb_layout(frame)
    added = len(drawn) - len(frame.members)
    verdict = check_any(frame, drawn)
    if verdict.stable:
        note = f"as drawn: {added} members added by the rule, stable without repair"
        return _summary(StrategyKey.BASELINE, frame, costs, drawn, verdict=verdict,
                        redundancy=redundancy_any(frame, drawn), status=StrategyStatus.AS_DRAWN,
                        seconds=time.perf_counter() - t0, note=note)  # fmt: skip
    as_drawn_cents = layout_cost_cents(frame, costs, drawn)
    as_drawn = as_drawn_cents / 100
    try:
        sol = optimize_frame(
            dataclasses.replace(frame, members=drawn),
            costs,
            options=dataclasses.replace(options, allow=_BOTH, redundancy=0),
        )
    except InfeasibleError as exc:
        return _infeasible(StrategyKey.BASELINE, time.perf_counter() - t0, "; ".join(exc.reasons))
    repair = len(sol.members) - len(drawn)
    repair_cents = layout_cost_cents(frame, costs, sol.members) - as_drawn_cents
    note = (
        f"as drawn: {added} members by the rule, costing {as_drawn:.2f}, left a mechanism; "
        f"repair added {repair} members costing {repair_cents / 100:.2f}"
    )
    return _from_solution(StrategyKey.BASELINE, frame, costs, sol, status=StrategyStatus.REPAIRED,
                          seconds=time.perf_counter() - t0, note=note)  # fmt: skip


def _with_forces(result: StrategyResult, strength: StrengthCatalogue | None, *, searched: bool) -> StrategyResult:
    """The result with its layout's member forces and strength checks, where the frame has loads.

    The baseline's note then says whether it carries the loads, and by how much it fails.
    """
    layout = result.frame
    if strength is None or layout is None or not layout.loads:
        return result
    alone = result.key in (StrategyKey.STABLE_ONLY, StrategyKey.BASELINE)
    check = strength_check(layout, strength, layout.members, searched=searched and not alone)
    forces = None if missing_stiffness(layout, strength, layout.members) else analyse_frame(layout, strength)
    note = result.note
    if result.key is StrategyKey.BASELINE and check is not None:
        note = f"{note}; {shortfall_words(check)}" if note else shortfall_words(check)
    return dataclasses.replace(result, forces=forces, check=check, note=note)


def shortfall_words(check: StrengthCheck) -> str:
    """Whether a layout carries its loads and, if not, by how much it falls short, in words.

    Example:
        >>> from bracegrid.optimize import CaseCheck
        >>> shortfall_words(StrengthCheck((CaseCheck("w (+)", 2.5, "ledger p3 c1", 1.2, "ledger p3 c1", False),)))
        'against the loads: plastic 2.50 (w (+), ledger p3 c1), elastic 1.20 (w (+), ledger p3 c1): fails, 150% over'
    """
    plastic = max(check.cases, key=lambda c: math.inf if c.plastic is None else c.plastic)
    rated = [c for c in check.cases if c.elastic is not None]
    elastic = max(rated, key=lambda c: c.elastic or 0.0) if rated else None
    p = "no admissible force set" if plastic.plastic is None else f"{plastic.plastic:.2f}"
    parts = f"plastic {p} ({plastic.title}, {plastic.plastic_member})"
    if elastic is not None:
        parts += f", elastic {elastic.elastic:.2f} ({elastic.title}, {elastic.elastic_member})"
    elif check.elastic_note:
        parts += f", elastic not run ({check.elastic_note})"
    if check.plastic_ok and check.elastic_ok:
        return f"against the loads: {parts}: carries them"
    worst = max((v for v in (plastic.plastic, elastic.elastic if elastic else None) if v is not None), default=None)
    over = "" if worst is None or worst <= 1.0 else f", {100 * (worst - 1.0):.0f}% over"
    return f"against the loads: {parts}: fails{over}"


def compare_frame(
    frame: Frame,
    costs: CostCatalogue,
    *,
    options: SolveOptions | None = None,
    bare: bool = False,
    on_progress: Callable[[str, StrategyKey], None] | None = None,
    strength: StrengthCatalogue | None = None,
) -> FrameComparison:
    """Solve one frame under every strategy.

    Args:
        frame: The frame; members in place are kept in every strategy,
            proposed ones dropped.
        costs: Prices.
        options: Solver options (default :class:`SolveOptions`); the time limit applies to each strategy.
        bare: Drop every member and start each strategy from the bare frame.
        on_progress: Called with (frame name, strategy) as each strategy starts.
        strength: Stiffness and capacities: with them, every layout of a frame with load cases gets
            its member forces.

    Returns:
        The comparison, every layout re-verified.
    """
    options = options or SolveOptions()
    frame = dataclasses.replace(frame, members=() if bare else tuple(m for m in frame.members if m.existing))
    results = []
    for key in StrategyKey:
        if on_progress is not None:
            on_progress(frame.name, key)
        if key is StrategyKey.BASELINE:
            results.append(_baseline(frame, costs, options))
        else:
            results.append(_optimized(key, frame, costs, options, strength))
    searched = not options.stability_only
    return FrameComparison(frame=frame, strategies=tuple(_with_forces(r, strength, searched=searched) for r in results))


def compare_project(
    project: Project,
    *,
    options: SolveOptions | None = None,
    frames: Sequence[Frame] | None = None,
    bare: bool = False,
    on_progress: Callable[[str, StrategyKey], None] | None = None,
) -> Comparison:
    """Compare strategies for every frame (or the frames given); see :func:`compare_frame`."""
    chosen = project.frames if frames is None else tuple(frames)
    return Comparison(
        project=project,
        frames=tuple(
            compare_frame(
                f, project.costs, options=options, bare=bare, on_progress=on_progress, strength=project.strength
            )
            for f in chosen
        ),
    )
