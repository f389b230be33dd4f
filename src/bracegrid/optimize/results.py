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
    """A warm-start layout whose cost meets the complete-frame closed-form bound."""
    CUT_LOOP = "cut-loop"
    """CP-SAT on the cut model with lazily separated directed cuts."""
    LP_CUTS = "lp-cuts"
    """The LP relaxation of the cut model (cuts separated on fractional points) proves the layout; no CP-SAT round."""


def method_words(method: SolveMethod, *, pattern: PatternKind | None = None, rounds: int = 0, cuts: int = 0) -> str:
    """A solution method in words.

    Example:
        >>> method_words(SolveMethod.CLOSED_FORM, pattern=PatternKind.CYCLE)
        'closed form: one cycle of ties'
        >>> method_words(SolveMethod.CUT_LOOP, rounds=3, cuts=40)
        'CP-SAT directed cuts (3 rounds, 40 cuts)'
    """
    if method is SolveMethod.CLOSED_FORM:
        return f"closed form: {pattern.words if pattern is not None else 'complete frame'}"
    if method is SolveMethod.CUT_LOOP:
        return f"CP-SAT directed cuts ({rounds} rounds, {cuts} cuts)"
    return _METHOD_WORDS[method]


_METHOD_WORDS = {
    SolveMethod.KEPT: "kept members already suffice",
    SolveMethod.SPANNING_TREE: "minimum spanning tree of braces",
    SolveMethod.PINNED_ROWS: "pinned-base rows (exact per row)",
    SolveMethod.PATTERN_BOUND: "pattern layout, proven by the complete-frame closed-form bound",
    SolveMethod.LP_CUTS: "LP bound of the directed-cut model (HiGHS) met by the layout",
}


class SolveStatus(Enum):
    """How good a returned layout is known to be."""

    OPTIMAL = "optimal"
    """Proven minimum cost."""
    FEASIBLE = "feasible"
    """Stable, but the time limit came before a proof; see the bound and gap."""


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
    """

    time_limit: float = 60.0
    workers: int = 2
    seed: int = 0
    allow: frozenset[MemberKind] | None = None
    redundancy: int | None = None


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

    @property
    def method_text(self) -> str:
        """How it was solved, in words for reports."""
        return method_words(self.method, pattern=self.pattern, rounds=self.rounds, cuts=self.cuts)


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
