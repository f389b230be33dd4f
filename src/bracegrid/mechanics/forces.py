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
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import scipy.linalg

from bracegrid.analysis import Verdict, anchor_words, check_layout, describe_part, format_numbers
from bracegrid.errors import InputError, NumericalError
from bracegrid.mechanics.framework import BAR_KINDS, BarFramework, BarKind, BoolArray, FloatArray, build_framework
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
        free: Motions no member resists in either sense.
        dof_map: Free degrees of freedom (supports and datums removed).
        datums: Degrees of freedom fixed only to pin undriven whole-frame motions.
    """

    framework: BarFramework
    strength: StrengthCatalogue
    verdict: Verdict
    free: FreeMotions
    dof_map: DofMap
    datums: tuple[int, ...]

    @property
    def frame(self) -> Frame:
        """The frame."""
        return self.framework.frame


def _datum_dofs(frame: Frame, free: FreeMotions, fixed: BoolArray) -> tuple[int, ...]:
    """Degrees of freedom that pin the whole-frame motions: one per motion, well conditioned."""
    if free.count == 0 or free.internal:
        return ()
    motions = np.array([node_motion(frame, z) for z in free.basis])  # (k, dofs)
    candidates = np.flatnonzero(~fixed)
    _, _, pivots = scipy.linalg.qr(motions[:, candidates], pivoting=True, mode="economic")
    return tuple(sorted(int(candidates[p]) for p in pivots[: free.count]))


def prepare_layout(frame: Frame, strength: StrengthCatalogue, members: Sequence[Member] | None = None) -> LayoutModel:
    """Build the framework of a layout and what its load cases share.

    Raises:
        InputError: If a stiffness the layout needs is missing.
    """
    if not frame.is_complete:
        msg = (
            f"frame {frame.name!r}: member forces of a frame with missing grid bars or absent bays are not "
            "built yet (docs/general-frames.md); its stability is checked exactly by bracegrid check"
        )
        raise InputError(msg)
    layout = tuple(frame.members if members is None else members)
    fw = build_framework(frame, strength, members=layout)
    free = free_motions(frame, layout)
    fixed = fw.fixed_mask()
    datums = _datum_dofs(frame, free, fixed)
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


def _free_part(model: LayoutModel) -> Mechanism:
    frame = model.frame
    moving = np.zeros(frame.rows + frame.cols + 2, dtype=bool)
    for z in model.free.basis:
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
        alone = free_motions(fw.frame, held).count == self.model.free.count
        weights = self.stiffness * np.where(taut, 1.0, 0.0 if alone else SLACK_STIFFNESS)
        return self.cache.put(key, assemble_stiffness(fw, self.model.dof_map, weights))

    def solve(self, case: LoadCase, sense: LoadSense) -> CaseForces:
        model = self.model
        frame, fw = model.frame, model.framework
        title = f"{case.name} ({sense.value})"
        loads = nodal_loads(frame, case, sense)
        total = float(np.abs(loads).sum())
        if model.free.internal:
            return _mechanism_case(case, sense, _free_part(model), total)
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
        if z is not None:
            return _mechanism_case(case, sense, _driven(model, z, title), total)
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
        sway = grid[:, :, 0].mean(axis=1)
        sway_y = grid[:, :, 1].mean(axis=0)
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
