"""Results of the member-force analysis: member forces, reactions, sway, mechanisms, envelopes."""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

from bracegrid.mechanics.framework import BarKind
from bracegrid.model import Diagonal, LoadSense, Racking

#: Utilisation above 1 + OVER_TOL counts as over capacity. Reported forces balance the loads to
#: 1e-9 of the load (the residual check), so a member designed to exactly its capacity is not
#: flagged by rounding.
OVER_TOL = 1e-9

#: What every force report states next to its numbers.
MODEL_LIMITS = (
    "First-order linear-elastic analysis of a pin-jointed frame: small displacements, no buckling of "
    "the frame as a whole, no second-order (P-delta) amplification, joints and connections as given, "
    "loads as given; ties act only in tension and go slack otherwise."
)


class CaseOutcome(Enum):
    """How a load case ended."""

    SOLVED = "solved"
    """Every member force found, in equilibrium with the loads."""
    MECHANISM = "mechanism"
    """The load drives a motion no member resists (or a part is held by no member): no forces."""


class MechanismKind(Enum):
    """Why a case has no forces."""

    FREE_PART = "free part"
    """A part of the frame is held by no member at all: it moves both ways, whatever the load."""
    DRIVEN = "driven"
    """The load pushes the frame the way no member resists (ties resisting that sense slack)."""


@dataclass(frozen=True, slots=True)
class Mechanism:
    """A motion found instead of forces, in the words of the stability check.

    Attributes:
        kind: Free part, or a motion the load drives.
        rows: Rows that rack, each with its sense.
        columns: Columns that rack, each with its sense.
        slides: Whole-frame translations the supports leave ("x", "y").
        words: What moves and why, sentence by sentence.
    """

    kind: MechanismKind
    rows: tuple[tuple[int, Racking], ...]
    columns: tuple[tuple[int, Racking], ...]
    slides: tuple[str, ...]
    words: tuple[str, ...]


@dataclass(frozen=True, slots=True)
class MemberForce:
    """The axial force in one bar of the framework under one load case.

    Attributes:
        kind: Ledger, standard, brace or tie.
        line: Grid line of a ledger (p, 0..R) or standard (q, 0..C); None for diagonals.
        row: Row a standard or diagonal spans (1-based); None for ledgers.
        col: Column a ledger or diagonal spans (1-based); None for standards.
        diagonal: Which diagonal; None for grid bars.
        force_kn: Axial force, tension +.
        capacity_kn: The capacity for this force's sense, None where not given.
        utilisation: |force| / capacity, None where no capacity is given.
        slack: A tie that carries nothing this case.
    """

    kind: BarKind
    line: int | None
    row: int | None
    col: int | None
    diagonal: Diagonal | None
    force_kn: float
    capacity_kn: float | None
    utilisation: float | None
    slack: bool = False

    @property
    def label(self) -> str:
        """Compact label: ``tie r2c3:rising``, ``standard q4 r2``, ``ledger p1 c5``.

        Example:
            >>> MemberForce(BarKind.STANDARD, 4, 2, None, None, -3.0, None, None).label
            'standard q4 r2'
        """
        if self.kind is BarKind.STANDARD:
            return f"standard q{self.line} r{self.row}"
        if self.kind is BarKind.LEDGER:
            return f"ledger p{self.line} c{self.col}"
        side = self.diagonal.value if self.diagonal else ""
        return f"{self.kind.value} r{self.row}c{self.col}:{side}"

    @property
    def key(self) -> tuple[str, int, int, int, str]:
        """Identity of the bar across load cases."""
        side = self.diagonal.value if self.diagonal else ""
        return (self.kind.value, self.line or 0, self.row or 0, self.col or 0, side)

    @property
    def over(self) -> bool:
        """True when the force exceeds the capacity given."""
        return self.utilisation is not None and self.utilisation > 1.0 + OVER_TOL


@dataclass(frozen=True, slots=True)
class Reaction:
    """What one support gives one node (force on the frame, kN).

    Attributes:
        support: ``"base"`` or the held edge (``"bottom"``, ``"top"``, ``"left"``, ``"right"``).
        line: The grid line along the support: q for the base, bottom and top; p for the sides.
        p: Horizontal grid line of the node.
        q: Vertical grid line of the node.
        fx_kn: Horizontal reaction, + to the right.
        fy_kn: Vertical reaction, + upwards; below 0 on a base is uplift held down.
        uplift_limit_kn: Upward pull a base node can take, None where not given (base only).
    """

    support: str
    line: int
    p: int
    q: int
    fx_kn: float
    fy_kn: float
    uplift_limit_kn: float | None = None

    @property
    def uplift_kn(self) -> float:
        """The pull the base must hold down (0 unless a base node lifts)."""
        return max(0.0, -self.fy_kn) if self.support == "base" else 0.0

    @property
    def uplift_over(self) -> bool:
        """True when a base node lifts more than its uplift resistance allows."""
        if self.uplift_limit_kn is None or self.support != "base":
            return False
        return self.uplift_kn > self.uplift_limit_kn + OVER_TOL * max(1.0, abs(self.fy_kn))


@dataclass(frozen=True, slots=True)
class CaseForces:
    """One load case, in one sense, on one frame and layout.

    Attributes:
        case: Load case name.
        sense: As written (+) or reversed (-).
        outcome: Solved, or a mechanism.
        mechanism: What moves (outcome mechanism only).
        members: Every bar's force (empty for a mechanism).
        reactions: Every support's reaction (empty for a mechanism).
        sway_mm: Mean horizontal displacement of each horizontal grid line 0..R.
        drift: Each row's drift ratio (sway difference over the row height), rows 1..R.
        sway_y_mm: Mean vertical displacement of each vertical grid line 0..C.
        load_kn: Sum of |nodal load| of the case (the reference of the residual).
        residual_kn: Largest out-of-balance force at any unsupported degree of freedom.
        steps: Newton steps taken.
        node_displacement_mm: Displacement of every node (x, y in turn, framework node order).
    """

    case: str
    sense: LoadSense
    outcome: CaseOutcome
    mechanism: Mechanism | None
    members: tuple[MemberForce, ...]
    reactions: tuple[Reaction, ...]
    sway_mm: tuple[float, ...]
    drift: tuple[float, ...]
    sway_y_mm: tuple[float, ...]
    load_kn: float
    residual_kn: float
    steps: int
    node_displacement_mm: tuple[float, ...] = ()

    @property
    def title(self) -> str:
        """``wind (+)``."""
        return f"{self.case} ({self.sense.value})"

    @property
    def is_mechanism(self) -> bool:
        """True when the case found a mechanism."""
        return self.outcome is CaseOutcome.MECHANISM

    @property
    def max_utilisation(self) -> float | None:
        """Largest utilisation of any member (None when no capacity is given or a mechanism)."""
        values = [m.utilisation for m in self.members if m.utilisation is not None]
        return max(values) if values else None

    @property
    def governing(self) -> MemberForce | None:
        """The member with the largest utilisation (largest |force| where no capacities are given)."""
        if not self.members:
            return None
        rated = [m for m in self.members if m.utilisation is not None]
        if rated:
            return max(rated, key=lambda m: (m.utilisation or 0.0, abs(m.force_kn)))
        return max(self.members, key=lambda m: abs(m.force_kn))

    @property
    def max_drift(self) -> float:
        """Largest |drift ratio| of any row."""
        return max((abs(d) for d in self.drift), default=0.0)

    @property
    def over_capacity(self) -> tuple[MemberForce, ...]:
        """Members whose force exceeds their capacity."""
        return tuple(m for m in self.members if m.over)

    @property
    def uplift_over(self) -> tuple[Reaction, ...]:
        """Base nodes lifting more than they can hold."""
        return tuple(r for r in self.reactions if r.uplift_over)

    @property
    def slack_ties(self) -> tuple[MemberForce, ...]:
        """Ties carrying nothing."""
        return tuple(m for m in self.members if m.slack)

    @property
    def ok(self) -> bool:
        """Solved, every member within capacity and every base node within its uplift resistance."""
        return not self.is_mechanism and not self.over_capacity and not self.uplift_over


@dataclass(frozen=True, slots=True)
class EnvelopeEntry:
    """One bar over every solved case.

    Attributes:
        member: The bar under its governing case (largest utilisation, else largest |force|).
        max_tension_kn: Largest tension over the cases (0 if never in tension).
        max_compression_kn: Largest compression over the cases, as a negative force (0 if never).
        case: Title of the governing case.
    """

    member: MemberForce
    max_tension_kn: float
    max_compression_kn: float
    case: str


@dataclass(frozen=True, slots=True)
class FrameForces:
    """Every load case of one frame, and their envelope.

    Attributes:
        frame: Frame name.
        cases: Each case in each sense, in file order.
        envelope: One entry per bar, over the solved cases (empty if none solved).
    """

    frame: str
    cases: tuple[CaseForces, ...]
    envelope: tuple[EnvelopeEntry, ...]

    @property
    def ok(self) -> bool:
        """Every case solved and within capacity."""
        return all(c.ok for c in self.cases)

    @property
    def max_utilisation(self) -> float | None:
        """Largest utilisation over the cases (None if no capacities or nothing solved)."""
        values = [u for c in self.cases if (u := c.max_utilisation) is not None]
        return max(values) if values else None

    @property
    def max_drift(self) -> float | None:
        """Largest drift ratio over the solved cases (None if none solved)."""
        values = [c.max_drift for c in self.cases if not c.is_mechanism]
        return max(values) if values else None

    @property
    def governing(self) -> EnvelopeEntry | None:
        """The envelope entry with the largest utilisation (or |force|)."""
        if not self.envelope:
            return None
        rated = [e for e in self.envelope if e.member.utilisation is not None]
        if rated:
            return max(rated, key=lambda e: (e.member.utilisation or 0.0, abs(e.member.force_kn)))
        return max(self.envelope, key=lambda e: abs(e.member.force_kn))

    @property
    def mechanisms(self) -> tuple[CaseForces, ...]:
        """Cases that found a mechanism."""
        return tuple(c for c in self.cases if c.is_mechanism)
