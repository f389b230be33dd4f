"""Member forces of a frame's layout under its load cases: the direct stiffness method, tension-only ties.

For each layout the bar framework is built once, its free motions are found exactly, and then
every load case (in each sense it acts) is either

* a **mechanism**: some part is held by no member at all, or the load does work on a motion no
  member resists (the ties that would resist that sense are slack or absent). Reported with the
  stability check's words; no numbers come from a singular matrix; or
* **solved** by :func:`bracegrid.mechanics.tension.solve_tension_only`, then checked: the
  out-of-balance force at every unsupported degree of freedom must be below 1e-9 of the load.

Whole-frame motions the supports leave free and the load does not drive (a plan grid held only on
its two side edges, loaded along them) are pinned at datum degrees of freedom; their reactions are
part of the residual check, so a datum never carries load.

General frames (missing grid bars, absent bays; docs/general-frames.md) are decided by the exact
first-order rigidity check (:func:`bracegrid.mechanics.rigidity.exact_rigidity`) instead of the
complete-grid free motions: a layout that is not rigid gives every case as a mechanism in the
exact check's words; a rigid one is solved as above, on the bars and nodes the frame has, with the
rigid-body motions its supports leave (exact, from the reduced framework) as its whole-frame motions.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import scipy.linalg

from bracegrid.analysis import Verdict, anchor_words, check_layout, describe_part, flex_words, format_numbers
from bracegrid.errors import InputError, NumericalError
from bracegrid.mechanics.checking import exact_verdict, flex_of
from bracegrid.mechanics.framework import (
    BAR_KINDS,
    BarFramework,
    BarKind,
    BoolArray,
    FloatArray,
    build_framework,
    node_index,
)
from bracegrid.mechanics.loading import nodal_loads
from bracegrid.mechanics.motions import (
    DRIVEN_REL,
    FreeMotions,
    driven_motion,
    free_motions,
    node_motion,
    work_coefficients,
    z_of_col,
    z_of_row,
)
from bracegrid.mechanics.results import (
    CaseForces,
    CaseOutcome,
    EnvelopeEntry,
    FrameForces,
    Mechanism,
    MechanismKind,
    MemberForce,
    Reaction,
)
from bracegrid.mechanics.rigidity import Rigidity, exact_rigidity, rank_target
from bracegrid.mechanics.stiffness import (
    DofMap,
    FactorCache,
    Factorisation,
    assemble_stiffness,
    compatibility_matrix,
    full_compatibility_matrix,
)
from bracegrid.mechanics.tension import ACCEPT_REL, SLACK_STIFFNESS, solve_tension_only
from bracegrid.model import Frame, LoadCase, LoadSense, Member, MemberKind, Project, Racking, StrengthCatalogue


@dataclass(frozen=True, slots=True)
class LayoutModel:
    """Everything about one frame and layout that every load case shares.

    Attributes:
        framework: The bar framework.
        strength: Capacities and stiffness.
        verdict: The stability check of the layout (for the words of a mechanism).
        free: Motions no member resists in either sense (complete grids; None on general frames).
        dof_map: Free degrees of freedom (supports, datums and inactive nodes removed).
        datums: Degrees of freedom fixed only to pin undriven whole-frame motions.
        exact: The exact rigidity check (general frames; None on complete grids).
        whole: Node motions (rows, every degree of freedom) of the rigid-body motions the supports
            leave a rigid general frame (empty on complete grids and non-rigid layouts).
    """

    framework: BarFramework
    strength: StrengthCatalogue
    verdict: Verdict
    free: FreeMotions | None
    dof_map: DofMap
    datums: tuple[int, ...]
    exact: Rigidity | None = None
    whole: FloatArray | None = None

    @property
    def frame(self) -> Frame:
        """The frame."""
        return self.framework.frame


def _datum_dofs(motions: FloatArray, fixed: BoolArray) -> tuple[int, ...]:
    """Degrees of freedom that pin the whole-frame motions (rows of node motions): one per motion, well conditioned."""
    if motions.shape[0] == 0:
        return ()
    candidates = np.flatnonzero(~fixed)
    _, _, pivots = scipy.linalg.qr(motions[:, candidates], pivoting=True, mode="economic")
    return tuple(sorted(int(candidates[p]) for p in pivots[: motions.shape[0]]))


def _whole_motions(fw: BarFramework, exact: Rigidity) -> FloatArray:
    """The rigid-body motions the supports leave a general frame, as node motions (k, dofs), exact integers."""
    red = exact.reduced
    _, free, motions = rank_target(red)
    out = np.zeros((motions.shape[1], fw.dofs))
    for k in range(motions.shape[1]):
        z = np.zeros(red.classes)
        z[free] = motions[:, k]
        big = float(np.abs(z).max()) or 1.0
        for n, (p, q) in enumerate(red.nodes):
            node = node_index(fw.frame, p, q)
            out[k, 2 * node] = z[red.xclass[n]] / big
            out[k, 2 * node + 1] = z[red.yclass[n]] / big
    return out


def _prepare_general(frame: Frame, strength: StrengthCatalogue, layout: tuple[Member, ...]) -> LayoutModel:
    fw = build_framework(frame, strength, members=layout)
    exact = exact_rigidity(frame, layout)
    whole = _whole_motions(fw, exact) if exact.rigid else np.zeros((0, fw.dofs))
    fixed = fw.fixed_mask() | fw.inactive_mask()
    datums = _datum_dofs(whole, fixed)
    mask = fixed.copy()
    mask[list(datums)] = True
    return LayoutModel(
        framework=fw, strength=strength, verdict=exact_verdict(frame, layout, exact, critical=False), free=None,
        dof_map=DofMap.of(fw.dofs, mask), datums=datums, exact=exact, whole=whole,
    )  # fmt: skip


def prepare_layout(frame: Frame, strength: StrengthCatalogue, members: Sequence[Member] | None = None) -> LayoutModel:
    """Build the framework of a layout and what its load cases share.

    Raises:
        InputError: If a stiffness the layout needs is missing.
    """
    layout = tuple(frame.members if members is None else members)
    if not frame.is_complete:
        return _prepare_general(frame, strength, layout)
    fw = build_framework(frame, strength, members=layout)
    free = free_motions(frame, layout)
    fixed = fw.fixed_mask()
    datums = (
        () if free.count == 0 or free.internal
        else _datum_dofs(np.array([node_motion(frame, z) for z in free.basis]), fixed)
    )  # fmt: skip
    mask = fixed.copy()
    mask[list(datums)] = True
    return LayoutModel(
        framework=fw,
        strength=strength,
        verdict=check_layout(frame, layout),
        free=free,
        dof_map=DofMap.of(fw.dofs, mask),
        datums=datums,
    )


# --------------------------------------------------------------------------- words


def _who(rows: Sequence[int], columns: Sequence[int]) -> str:
    parts = []
    if rows:
        parts.append(f"row{'s' if len(rows) > 1 else ''} {format_numbers(rows)}")
    if columns:
        parts.append(f"column{'s' if len(columns) > 1 else ''} {format_numbers(columns)}")
    return " and ".join(parts)


def _sense_words(racking: Racking, *, row: bool) -> str:
    if racking is Racking.CLOCKWISE:
        return "clockwise (tops sway right)" if row else "clockwise (right side drops)"
    return "anticlockwise (tops sway left)" if row else "anticlockwise (right side rises)"


def _verdict_words(verdict: Verdict, only_both: bool = False) -> list[str]:
    anchor = anchor_words(verdict)
    return [
        f"stability check: {describe_part(p, anchor)}"
        for p in verdict.loose_parts
        if not only_both or p.racking is Racking.BOTH
    ]


def _free_part(model: LayoutModel, free: FreeMotions) -> Mechanism:
    frame = model.frame
    moving = np.zeros(frame.rows + frame.cols + 2, dtype=bool)
    for z in free.basis:
        moving |= np.abs(z) > 0
    rows = tuple(i for i in range(1, frame.rows + 1) if moving[z_of_row(i)])
    cols = tuple(j for j in range(1, frame.cols + 1) if moving[z_of_col(frame, j)])
    words = [
        f"{_who(rows, cols) or 'the frame'} can move both ways with no member resisting: no diagonal "
        "holds that part, whatever the load; add a brace, or a tie in each sense"
    ]
    words += _verdict_words(model.verdict, only_both=True)
    return Mechanism(
        kind=MechanismKind.FREE_PART,
        rows=tuple((i, Racking.BOTH) for i in rows),
        columns=tuple((j, Racking.BOTH) for j in cols),
        slides=(),
        words=tuple(words),
    )


def _driven(model: LayoutModel, z: FloatArray | None, title: str) -> Mechanism:
    frame = model.frame
    rows: list[tuple[int, Racking]] = []
    cols: list[tuple[int, Racking]] = []
    slides: list[str] = []
    if z is not None:
        top = float(np.abs(z).max()) or 1.0
        tol = 1e-6 * top
        for i in range(1, frame.rows + 1):
            v = float(z[z_of_row(i)])
            if abs(v) > tol:
                rows.append((i, Racking.CLOCKWISE if v > 0 else Racking.ANTICLOCKWISE))
        for j in range(1, frame.cols + 1):
            v = float(z[z_of_col(frame, j)])
            if abs(v) > tol:
                cols.append((j, Racking.CLOCKWISE if v > 0 else Racking.ANTICLOCKWISE))
        slides = [axis for axis, v in (("x", z[0]), ("y", z[1])) if abs(float(v)) > tol]
    groups = []
    for sense in (Racking.CLOCKWISE, Racking.ANTICLOCKWISE):
        r = [i for i, s in rows if s is sense]
        c = [j for j, s in cols if s is sense]
        if r:
            groups.append(f"{_who(r, [])} {_sense_words(sense, row=True)}")
        if c:
            groups.append(f"{_who([], c)} {_sense_words(sense, row=False)}")
    moved = "; ".join(groups)
    if slides:
        moved = (moved + "; " if moved else "") + "the whole frame slides along " + " and ".join(slides)
    words = [
        f"under {title} the load moves the frame the way no member resists: {moved or 'it moves'}; "
        "the ties that would resist that sense are slack or absent. Add members resisting it (or supports)"
    ]
    words += _verdict_words(model.verdict)
    return Mechanism(MechanismKind.DRIVEN, tuple(rows), tuple(cols), tuple(slides), tuple(words))


def _general_mechanism(model: LayoutModel) -> Mechanism:
    """Every case of a general layout the exact check finds not first-order rigid."""
    exact = model.exact
    flex = flex_of(model.frame, exact) if exact is not None else None
    found = f"the exact check finds a {flex_words(flex)}" if flex is not None else "the exact check finds a mechanism"
    if exact is not None and exact.bar_rigid:
        kind = MechanismKind.DRIVEN
        why = (
            "with every member as a bar the frame would be rigid, but its ties cannot all be taut together "
            "(no proper self-stress): a load in the sense the slack ties should resist moves it. Add braces, "
            "or ties in the other sense"
        )
    else:
        kind = MechanismKind.FREE_PART
        why = (
            "no member resists that motion, whatever the load: add a brace, or a tie in each sense, in a bay that moves"
        )
    words = (
        f"{found}.",
        f"{why}; member forces are reported only for a first-order rigid layout (docs/general-frames.md).",
    )
    return Mechanism(kind=kind, rows=(), columns=(), slides=(), words=words)


def _whole_driven(model: LayoutModel, motion: FloatArray, title: str) -> Mechanism:
    """A load that moves a rigid general frame as one body its supports leave free."""
    active = model.framework.active
    u = motion.reshape(-1, 2)[active]
    tol = 1e-9 * (float(np.abs(u).max()) or 1.0)  # exact integer motions, scaled to 1: zero is zero
    turning = float(np.ptp(u[:, 0])) > tol or float(np.ptp(u[:, 1])) > tol
    slides = () if turning else tuple(a for a, k in (("x", 0), ("y", 1)) if abs(float(u[0, k])) > tol)
    what = "it turns" if turning else "it slides along " + " and ".join(slides)
    words = (
        f"under {title} the load moves the whole frame as one rigid body its supports leave free ({what}); "
        "add supports (a held edge or a pinned base) that stop that motion",
    )
    return Mechanism(MechanismKind.DRIVEN, (), (), slides, words)


# --------------------------------------------------------------------------- one case


def _capacity(strength: StrengthCatalogue, kind: BarKind, force: float) -> float | None:
    if kind is BarKind.STANDARD:
        return strength.grid.standard_kn
    if kind is BarKind.LEDGER:
        return strength.grid.ledger_kn
    values = strength.of(MemberKind.BRACE if kind is BarKind.BRACE else MemberKind.TIE)
    return values.tension_kn if force >= 0 else values.compression_kn


def _members(model: LayoutModel, force: FloatArray) -> tuple[MemberForce, ...]:
    fw = model.framework
    out = []
    for k in range(fw.bars):
        kind = BAR_KINDS[int(fw.kind[k])]
        t = float(force[k]) + 0.0
        cap = _capacity(model.strength, kind, t)
        util = abs(t) / cap if cap else None
        if kind.is_grid:
            line, row, col, diagonal = int(fw.line[k]), None, None, None
            if kind is BarKind.STANDARD:
                row = int(fw.row[k])
            else:
                col = int(fw.col[k])
        else:
            m = fw.members[k - fw.first_diagonal]
            line, row, col, diagonal = None, m.row, m.col, m.diagonal
        out.append(MemberForce(kind, line, row, col, diagonal, t, cap, util, kind is BarKind.TIE and t == 0.0))
    return tuple(out)


def _reactions(model: LayoutModel, imbalance: FloatArray) -> tuple[Reaction, ...]:
    frame = model.frame
    limit = model.strength.grid.uplift_kn
    by_node: dict[tuple[str, int, int], list[float]] = {}
    for s in model.framework.supports:
        entry = by_node.setdefault((s.support, s.p, s.q), [0.0, 0.0])
        entry[s.dof % 2] = float(imbalance[s.dof]) + 0.0
    out = []
    for (support, p, q), (fx, fy) in by_node.items():
        line = p if support in ("left", "right") else q
        out.append(Reaction(support, line, p, q, fx, fy, limit if support == "base" else None))
    del frame
    return tuple(out)


def _mechanism_case(case: LoadCase, sense: LoadSense, mechanism: Mechanism, load: float) -> CaseForces:
    return CaseForces(
        case=case.name, sense=sense, outcome=CaseOutcome.MECHANISM, mechanism=mechanism, members=(),
        reactions=(), sway_mm=(), drift=(), sway_y_mm=(), load_kn=load, residual_kn=0.0, steps=0,
    )  # fmt: skip


class _Solver:
    """Working state of one layout's analysis: the factorisation cache and the Newton matrices."""

    def __init__(self, model: LayoutModel) -> None:
        self.model = model
        fw = model.framework
        self.compat = compatibility_matrix(fw, model.dof_map)
        self.full = full_compatibility_matrix(fw)
        self.stiffness = fw.stiffness_kn_per_mm
        self.cache = FactorCache()
        self.rigid: dict[bytes, bool] = {}

    def newton_matrix(self, taut: BoolArray) -> Factorisation:
        key = taut.tobytes()
        got = self.cache.get(key)
        if got is not None:
            return got
        fw = self.model.framework
        # Taut members alone hold the frame iff they leave no more free motions than all members do.
        held = [m for m, t in zip(fw.members, taut[fw.first_diagonal :], strict=True) if t]
        if self.model.free is not None:
            alone = free_motions(fw.frame, held).count == self.model.free.count
        else:  # general frame (rigid): the taut members alone, as bars, must hold it
            bars = [dataclasses.replace(m, kind=MemberKind.BRACE) for m in held]
            alone = exact_rigidity(fw.frame, bars).rigid
        weights = self.stiffness * np.where(taut, 1.0, 0.0 if alone else SLACK_STIFFNESS)
        return self.cache.put(key, assemble_stiffness(fw, self.model.dof_map, weights))

    def _complete_mechanism(self, loads: FloatArray, title: str) -> Mechanism | None:
        """The mechanism a complete grid's case meets (None when it can be solved)."""
        model = self.model
        frame, fw = model.frame, model.framework
        if model.free is None:  # pragma: no cover - complete grids always have their free motions
            return None
        if model.free.internal:
            return _free_part(model, model.free)
        work = work_coefficients(frame, loads)
        # A stable layout leaves only whole-frame motions the supports allow (both senses): the load
        # drives one iff it does work on it. Otherwise the cone of motions needs the programme.
        z = None
        for motion in model.free.basis:
            done = float(work @ motion)
            if abs(done) > DRIVEN_REL * float(np.abs(work).sum() * np.abs(motion).max()):
                z = motion if done > 0 else -motion
                break
        if z is None and not model.verdict.stable:
            z = driven_motion(frame, fw.members, work)
        return _driven(model, z, title) if z is not None else None

    def solve(self, case: LoadCase, sense: LoadSense) -> CaseForces:
        model = self.model
        frame, fw = model.frame, model.framework
        title = f"{case.name} ({sense.value})"
        loads = nodal_loads(frame, case, sense)
        total = float(np.abs(loads).sum())
        if model.free is None:  # general frame: the exact check decides
            if model.exact is None or not model.exact.rigid:
                return _mechanism_case(case, sense, _general_mechanism(model), total)
            # A rigid layout leaves only rigid-body motions the supports allow (both senses): the
            # load drives one iff it does work on it (the same threshold as on complete grids).
            for motion in model.whole if model.whole is not None else ():
                done = float(loads @ motion)
                if abs(done) > DRIVEN_REL * float(np.abs(loads).sum() * np.abs(motion).max()):
                    return _mechanism_case(case, sense, _whole_driven(model, motion, title), total)
        else:
            mechanism = self._complete_mechanism(loads, title)
            if mechanism is not None:
                return _mechanism_case(case, sense, mechanism, total)
        reduced = loads[model.dof_map.free]
        eq = solve_tension_only(self.compat, self.stiffness, fw.tension_only, reduced, self.newton_matrix)
        if not eq.bounded:
            return _mechanism_case(case, sense, _driven(model, None, title), total)
        imbalance = self.full.T @ eq.force - loads
        unsupported = np.ones(fw.dofs, dtype=bool)
        unsupported[[s.dof for s in fw.supports]] = False
        residual = float(np.abs(imbalance[unsupported]).max()) if unsupported.any() else 0.0
        if residual > ACCEPT_REL * max(total, 1e-300):
            msg = (
                f"frame {frame.name!r}, case {title}: the solve left an out-of-balance force of {residual:.3g} kN "
                f"(more than {ACCEPT_REL:g} of the load, {total:.3g} kN), so no forces are reported; the stiffness "
                "values may be too far apart (check every ea_kn)"
            )
            raise NumericalError(msg)
        u = np.zeros(fw.dofs)
        u[model.dof_map.free] = eq.displacement
        grid = u.reshape(frame.rows + 1, frame.cols + 1, 2)
        on = fw.active.reshape(frame.rows + 1, frame.cols + 1)  # mean over the nodes the frame has
        sway = (grid[:, :, 0] * on).sum(axis=1) / np.maximum(on.sum(axis=1), 1)
        sway_y = (grid[:, :, 1] * on).sum(axis=0) / np.maximum(on.sum(axis=0), 1)
        drift = np.diff(sway) / np.array(frame.heights, dtype=np.float64)
        return CaseForces(
            case=case.name,
            sense=sense,
            outcome=CaseOutcome.SOLVED,
            mechanism=None,
            members=_members(model, eq.force),
            reactions=_reactions(model, imbalance),
            sway_mm=tuple(float(s) + 0.0 for s in sway),
            drift=tuple(float(d) + 0.0 for d in drift),
            sway_y_mm=tuple(float(s) + 0.0 for s in sway_y),
            load_kn=total,
            residual_kn=residual,
            steps=eq.steps,
            node_displacement_mm=tuple((u + 0.0).tolist()),
        )


def envelope(cases: Sequence[CaseForces]) -> tuple[EnvelopeEntry, ...]:
    """Each bar's largest tension and compression over the solved cases, and its governing case."""
    solved = [c for c in cases if not c.is_mechanism]
    if not solved:
        return ()
    out = []
    for k, first in enumerate(solved[0].members):
        pairs = [(c, c.members[k]) for c in solved]
        rated = [p for p in pairs if p[1].utilisation is not None]
        pool = rated or pairs
        case, member = max(pool, key=lambda p: (p[1].utilisation or 0.0, abs(p[1].force_kn)))
        tension = max((m.force_kn for _, m in pairs), default=0.0)
        compression = min((m.force_kn for _, m in pairs), default=0.0)
        del first
        out.append(EnvelopeEntry(member, max(tension, 0.0), min(compression, 0.0) + 0.0, case.title))
    return tuple(out)


def _pick_cases(frame: Frame, names: Sequence[str] | None) -> tuple[LoadCase, ...]:
    if names is None:
        return frame.loads
    known = {c.name: c for c in frame.loads}
    bad = [n for n in names if n not in known]
    if bad:
        listed = ", ".join(repr(c.name) for c in frame.loads) or "none"
        msg = f"frame {frame.name!r} has no load case {', '.join(repr(b) for b in bad)}; its cases: {listed}"
        raise InputError(msg)
    return tuple(known[n] for n in names)


def analyse_frame(
    frame: Frame,
    strength: StrengthCatalogue,
    *,
    members: Sequence[Member] | None = None,
    cases: Sequence[str] | None = None,
) -> FrameForces:
    """Member forces, reactions and sway of a layout under each of the frame's load cases.

    Args:
        frame: The frame, with its load cases.
        strength: Stiffness (needed) and capacities (optional) of members and grid bars.
        members: The layout (default: the frame's own members).
        cases: Names of the load cases to analyse (default: all).

    Returns:
        One result per case and sense, and the envelope.

    Raises:
        InputError: If a stiffness is missing or a case name is unknown.
        NumericalError: If a solve cannot meet its residual check.

    Example:
        >>> from bracegrid.model import Diagonal, GridStrength, MemberStrength, Supports
        >>> s = StrengthCatalogue(tie=MemberStrength(ea_kn=2e4), grid=GridStrength(ea_kn=3e5))
        >>> f = Frame("bay", (3000,), (4000,), supports=Supports.BASE, loads=(LoadCase("push", (0.0, 6.0)),),
        ...           members=(Member(1, 1, MemberKind.TIE, Diagonal.RISING), Member(1, 1, MemberKind.TIE,
        ...           Diagonal.FALLING)))
        >>> [round(m.force_kn, 9) for m in analyse_frame(f, s).cases[0].members if m.kind.value == "tie"]
        [10.0, 0.0]
    """
    chosen = _pick_cases(frame, cases)
    model = prepare_layout(frame, strength, members)
    solver = _Solver(model)
    results = tuple(solver.solve(case, sense) for case in chosen for sense in case.senses)
    return FrameForces(frame=frame.name, cases=results, envelope=envelope(results))


def analyse_project(
    project: Project, *, frames: Sequence[Frame] | None = None, cases: Sequence[str] | None = None
) -> tuple[FrameForces, ...]:
    """Analyse every frame that has load cases (or the frames given); see :func:`analyse_frame`."""
    chosen = project.frames if frames is None else tuple(frames)
    return tuple(analyse_frame(f, project.strength, cases=cases) for f in chosen if f.loads)
