"""The optimizer's options and results: what was asked, how good the answer is known to be, how it was found."""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

from bracegrid.analysis import Verdict
from bracegrid.model import Frame, Member, MemberKind, Project
from bracegrid.optimize.patterns import PatternKind

#: Largest redundancy the optimizer accepts (the achieved value is measured up to this cap).
MAX_REDUNDANCY = 8


class SolveMethod(Enum):
    """How a layout was found (docs/optimizer.md describes each route)."""

    KEPT = "kept"
    """The members in place already suffice: nothing added."""
    SPANNING_TREE = "spanning-tree"
    """Braces only on a free frame: Kruskal's minimum spanning tree (exact)."""
    PINNED_ROWS = "pinned-rows"
    """A pinned base: each row settled exactly on its own."""
    CLOSED_FORM = "closed-form"
    """A complete uniform free frame: the closed-form optimum."""
    PATTERN_BOUND = "pattern-bound"
    """A warm-start layout whose cost meets the complete-frame closed-form bound (proven by it)."""
    WARM_START = "warm-start"
    """A warm-start layout (greedy repair, shuffled patterns); the time limit came before any solver round."""
    CUT_LOOP = "cut-loop"
    """CP-SAT on the cut model with lazily separated directed cuts."""
    LP_CUTS = "lp-cuts"
    """The LP relaxation of the cut model (cuts separated on fractional points) and its dive; no CP-SAT round."""
    MECHANISM_CUTS = "mechanism-cuts"
    """A general frame: HiGHS MILP rounds with cuts from mechanisms (exact check) and from the digraph."""
    STRENGTH_CUTS = "strength-cuts"
    """CP-SAT over candidate members with stability, rule, capacity (flow and Benders) and elastic cuts."""
    GENERAL_STRENGTH = "general-strength-cuts"
    """A general frame with loads or rules: HiGHS MILP rounds with mechanism, rule, capacity and elastic cuts."""


class SolveStatus(Enum):
    """How good a returned layout is known to be."""

    OPTIMAL = "optimal"
    """Proven minimum cost."""
    FEASIBLE = "feasible"
    """Stable, but the time limit came before a proof; see the bound and gap."""


def method_words(
    method: SolveMethod,
    status: SolveStatus,
    *,
    pattern: PatternKind | None = None,
    rounds: int = 0,
    cuts: int = 0,
    gap: float = 0.0,
) -> str:
    """How a layout was found and what is proven about it, in words that follow from the status.

    Only an OPTIMAL status earns the word "proven"; a FEASIBLE one says that the time limit
    stopped the search and gives the gap to the proven bound.

    Example:
        >>> method_words(SolveMethod.CLOSED_FORM, SolveStatus.OPTIMAL, pattern=PatternKind.CYCLE)
        'closed form: one cycle of ties; proven optimal'
        >>> method_words(SolveMethod.CUT_LOOP, SolveStatus.OPTIMAL, rounds=1, cuts=40)
        'CP-SAT directed cuts (1 round, 40 cuts); proven optimal'
        >>> words = method_words(SolveMethod.PATTERN_BOUND, SolveStatus.FEASIBLE, gap=0.0323)
        >>> words.split("; ")[1]
        'not proven optimal: the time limit came first, gap 3.23% to the proven bound'
    """
    if method is SolveMethod.PATTERN_BOUND and status is not SolveStatus.OPTIMAL:
        method = SolveMethod.WARM_START  # a bound that did not meet the layout proves nothing
    how = method_how(method, pattern=pattern, rounds=rounds, cuts=cuts)
    if status is SolveStatus.OPTIMAL:
        return f"{how}; proven optimal"
    return f"{how}; not proven optimal: the time limit came first, gap {100 * gap:.2f}% to the proven bound"


def method_how(method: SolveMethod, *, pattern: PatternKind | None = None, rounds: int = 0, cuts: int = 0) -> str:
    """How a layout was found, without what is proven (progress stages use it).

    Example:
        >>> method_how(SolveMethod.CUT_LOOP, rounds=1, cuts=40)
        'CP-SAT directed cuts (1 round, 40 cuts)'
    """
    if method is SolveMethod.CLOSED_FORM:
        return f"closed form: {pattern.words if pattern is not None else 'complete frame'}"
    if method is SolveMethod.CUT_LOOP:
        return f"CP-SAT directed cuts ({_count(rounds, 'round')}, {_count(cuts, 'cut')})"
    if method is SolveMethod.MECHANISM_CUTS:
        counts = f"{_count(rounds, 'round')}, {_count(cuts, 'cut')}"
        return f"HiGHS MILP with mechanism and directed cuts, exact check ({counts})"
    if method is SolveMethod.GENERAL_STRENGTH:
        counts = f"{_count(rounds, 'round')}, {_count(cuts, 'cut')}"
        return f"HiGHS MILP with mechanism, rule and capacity cuts, exact and elastic checks ({counts})"
    if method is SolveMethod.STRENGTH_CUTS:
        return f"CP-SAT with stability, rule and capacity cuts ({_count(rounds, 'round')}, {_count(cuts, 'cut')})"
    return _METHOD_WORDS[method]


def _count(n: int, word: str) -> str:
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


_METHOD_WORDS = {
    SolveMethod.KEPT: "kept members already suffice",
    SolveMethod.SPANNING_TREE: "minimum spanning tree of braces",
    SolveMethod.PINNED_ROWS: "pinned-base rows (exact per row)",
    SolveMethod.PATTERN_BOUND: "pattern layout meeting the complete-frame closed-form bound",
    SolveMethod.WARM_START: "warm-start layout (greedy repair and patterns), no solver round ran",
    SolveMethod.LP_CUTS: "LP relaxation of the directed-cut model (HiGHS) and LP dive, no CP-SAT round",
}


@dataclass(frozen=True, slots=True)
class SolveOptions:
    """Options of the optimizer.

    Attributes:
        time_limit: Wall-clock seconds per frame.
        workers: CP-SAT worker threads.
        seed: CP-SAT random seed. With one worker, or when a run ends before
            its time limit, the same seed gives the same layout.
        allow: Member kinds that may be added (None = each frame's own ``allow``).
        redundancy: Members whose loss the layout must survive (None = each frame's own).
        stability_only: Ignore load cases, capacities and spreading rules (the price of stability alone).
    """

    time_limit: float = 60.0
    workers: int = 2
    seed: int = 0
    allow: frozenset[MemberKind] | None = None
    redundancy: int | None = None
    stability_only: bool = False


@dataclass(frozen=True, slots=True)
class ProgressEvent:
    """A progress report while a frame is being solved.

    Attributes:
        frame: Frame name.
        cost: Best stable layout cost so far (whole layout, money), None if none yet.
        bound: Proven lower bound on the whole layout cost (money).
        gap: Relative gap on the added cost, None if no layout yet.
        seconds: Time spent on this frame.
        stage: What is running.
    """

    frame: str
    cost: float | None
    bound: float
    gap: float | None
    seconds: float
    stage: str


@dataclass(frozen=True, slots=True)
class FrameSolution:
    """The optimizer's answer for one frame.

    Attributes:
        frame: The frame with ``members`` replaced by the full layout.
        members: Kept members (as they were) followed by new ones (``existing=False``).
        status: Optimal or feasible.
        cost: Cost of the whole layout, kept members included (money, two decimals).
        added_cost: Cost of the new members only.
        bound: Proven lower bound on ``cost``.
        gap: ``(added_cost - (bound - kept cost)) / added_cost`` (0 when proven or nothing added).
        seconds: Wall-clock time spent.
        verdict: Stability check of the layout (always stable).
        method: How it was solved.
        redundancy: Member losses the layout is proven to survive.
        pattern: The closed-form layout used, for the closed-form method.
        rounds: Solver rounds of the cut loop (0 for the exact shortcuts).
        cuts: Cuts in the cut model at the end.
        strength: Both strength checks of the layout (None: the frame has no load cases).
    """

    frame: Frame
    members: tuple[Member, ...]
    status: SolveStatus
    cost: float
    added_cost: float
    bound: float
    gap: float
    seconds: float
    verdict: Verdict
    method: SolveMethod
    redundancy: int = 0
    pattern: PatternKind | None = None
    rounds: int = 0
    cuts: int = 0
    strength: StrengthCheck | None = None

    @property
    def method_text(self) -> str:
        """How it was solved and what is proven, in words for reports (they follow from :attr:`status`)."""
        return method_words(
            self.method, self.status, pattern=self.pattern, rounds=self.rounds, cuts=self.cuts, gap=self.gap
        )


@dataclass(frozen=True, slots=True)
class ProjectSolution:
    """The optimizer's answer for a project.

    Attributes:
        project: The project with solved frames' members replaced by their layouts.
        frames: One solution per solved frame, in project order.
        cost: Sum of the frames' layout costs.
        added_cost: Sum of the frames' added costs.
    """

    project: Project
    frames: tuple[FrameSolution, ...]
    cost: float
    added_cost: float


@dataclass(frozen=True, slots=True)
class CaseCheck:
    """Both strength checks of one load case in one sense on a returned layout.

    Attributes:
        title: ``wind (+)``.
        plastic: Least largest utilisation over admissible force sets (None: no admissible set).
        plastic_member: The bar at that utilisation, or why there is none.
        elastic: Largest utilisation in the tension-only elastic analysis (None: not run, a
            mechanism, or nothing rated).
        elastic_member: The governing bar of the elastic analysis (with base uplift over its
            limit named), or why there is none.
        elastic_ok: Solved with every member and base node within capacity (None: not run).
    """

    title: str
    plastic: float | None
    plastic_member: str
    elastic: float | None
    elastic_member: str
    elastic_ok: bool | None

    @property
    def plastic_ok(self) -> bool:
        """Within capacity plastically (to one millionth)."""
        return self.plastic is not None and self.plastic <= 1.0 + 1e-6


@dataclass(frozen=True, slots=True)
class StrengthCheck:
    """What the two strength checks say about a layout (only for frames with load cases).

    Attributes:
        cases: One check per case and sense.
        elastic_note: Why the elastic analysis did not run ("" when it did).
        searched: The layout was searched with the loads (False: stability alone was asked).
    """

    cases: tuple[CaseCheck, ...]
    elastic_note: str = ""
    searched: bool = True

    @property
    def plastic_ok(self) -> bool:
        """Every case within capacity plastically."""
        return all(c.plastic_ok for c in self.cases)

    @property
    def elastic_ok(self) -> bool:
        """Every case solved elastically within capacity (False when not run)."""
        return bool(self.cases) and all(c.elastic_ok is True for c in self.cases)

    @property
    def plastic_max(self) -> float | None:
        """Largest plastic utilisation over the cases (None if some case has no admissible set)."""
        values = [c.plastic for c in self.cases]
        return None if any(v is None for v in values) else max((v for v in values if v is not None), default=0.0)

    @property
    def elastic_max(self) -> float | None:
        """Largest elastic utilisation over the cases (None if not run or nothing rated)."""
        values = [c.elastic for c in self.cases if c.elastic is not None]
        return max(values) if values else None

    @property
    def words(self) -> str:
        """Which checks passed, in words that never claim more than the checks show.

        Example:
            >>> StrengthCheck((CaseCheck("w (+)", 0.8, "tie r1c1:rising", 1.2, "tie r1c1:rising", False),)).words
            'plastic check passes (0.80); elastic check FAILS (1.20): not adequate'
        """
        p = self.plastic_max
        if self.plastic_ok:
            plastic = f"plastic check passes ({p:.2f})"
        else:
            plastic = "plastic check FAILS" + (f" ({p:.2f})" if p is not None else " (no admissible force set)")
        if self.elastic_note:
            return f"{plastic}; elastic check not run ({self.elastic_note})"
        e = self.elastic_max
        shown = f" ({e:.2f})" if e is not None else ""
        elastic = f"elastic check passes{shown}" if self.elastic_ok else f"elastic check FAILS{shown}"
        verdict = "carries the loads" if self.plastic_ok and self.elastic_ok else "not adequate"
        return f"{plastic}; {elastic}: {verdict}"
