"""JSON shapes: every result as a JSON-ready dict, the one place that builds them.

``--json`` of every command uses these (and any later shell reuses them); field names other
tools read are fixed (see docs/). Values are Python scalars, never numpy ones.
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping, Sequence
from typing import Any

from bracegrid.analysis import (
    CAUTION,
    CONFIDENCE,
    ROBUSTNESS_LIMITS,
    Addition,
    AdditionAdvice,
    Flex,
    Robustness,
    Verdict,
    addition_words,
    anchor_words,
    describe_part,
    flex_words,
)
from bracegrid.compare import Comparison, StrategyKey
from bracegrid.mechanics import MODEL_LIMITS, BarKind, CaseForces, FrameForces, MemberForce, Reaction
from bracegrid.model import (
    CostCatalogue,
    Frame,
    Member,
    MemberKind,
    Project,
    blocked_bays,
    layout_cost,
    layout_length_mm,
)
from bracegrid.optimize import FrameSolution, ProgressEvent, ProjectSolution, StrengthCheck
from bracegrid.outputs.ramp import OVER_RGB, RAMP, UNRATED_RGB, hex_colour, utilisation_rgb
from bracegrid.units import length_in_unit, metres


def member_dict(member: Member) -> dict[str, Any]:
    """A member as JSON."""
    return {"row": member.row, "col": member.col, "kind": member.kind.value, "diagonal": member.diagonal.value}


def verdict_dict(verdict: Verdict) -> dict[str, Any]:
    """A check verdict as a JSON-ready dict."""
    anchor = anchor_words(verdict)
    return {
        "name": verdict.frame,
        "stable": verdict.stable,
        "racking_modes": verdict.racking_modes,
        "loose_parts": [
            {
                "rows": list(p.rows),
                "columns": list(p.columns),
                "direction": p.racking.value,
                "description": describe_part(p, anchor),
            }
            for p in verdict.loose_parts
        ],
        "anchor": {"rows": list(verdict.anchor_rows), "columns": list(verdict.anchor_columns)},
        "critical_members": [member_dict(m) for m in verdict.critical_members],
        "braces": verdict.braces,
        "ties": verdict.ties,
        "maxwell": {"count": verdict.maxwell_count, "needed": verdict.maxwell_needed},
        "removed": [member_dict(m) for m in verdict.removed],
        "method": verdict.method.value,
    } | ({"mechanism": flex_dict(verdict.flex)} if verdict.flex is not None else {})


def flex_dict(flex: Flex) -> dict[str, Any]:
    """A general frame's mechanism as JSON: words, moving nodes (largest move 1) and racking bays."""
    return {
        "description": flex_words(flex),
        "exact": flex.exact,
        "nodes": [{"p": m.p, "q": m.q, "dx": round(m.dx, 6), "dy": round(m.dy, 6)} for m in flex.moves],
        "bays": [{"row": b.row, "col": b.col, "direction": b.racking.value} for b in flex.bays],
    }


def addition_dict(addition: Addition) -> dict[str, Any]:
    """One candidate addition as JSON: the member, the loose parts it locks, its price."""
    return {
        "member": member_dict(addition.member),
        "parts_locked": addition.parts_locked,
        "cost": addition.cost,
        "description": addition_words(addition),
    }


def check_dict(
    verdicts: Sequence[Verdict],
    *,
    forces: Mapping[str, FrameForces] | None = None,
    additions: Mapping[str, AdditionAdvice] | None = None,
) -> dict[str, Any]:
    """The JSON object of ``bracegrid check``.

    Args:
        verdicts: One per frame.
        forces: Frames with load cases (by name) gain a ``forces`` summary.
        additions: For unstable frames (by name), the single additions that lock the most loose
            parts; each frame listed gets ``best_additions`` and ``best_additions_per_cost``.
    """
    frames = []
    for v in verdicts:
        item = verdict_dict(v)
        if forces and v.frame in forces:
            item["forces"] = force_summary_dict(forces[v.frame])
        advice = (additions or {}).get(v.frame)
        if advice is not None:
            item["best_additions"] = [addition_dict(a) for a in advice.most]
            item["best_additions_per_cost"] = [addition_dict(a) for a in advice.per_cost]
        frames.append(item)
    return {"stable": all(v.stable for v in verdicts), "frames": frames, "caution": CAUTION}


def robustness_frame_dict(result: Robustness) -> dict[str, Any]:
    """One frame's robustness statistics as JSON.

    The keys ``name``, ``members``, ``curve`` (``lost``, ``p_stable``, ``low``, ``high``, ``exact``)
    and ``expected_losses_to_mechanism`` are fixed (docs/robustness.md); the others add detail.
    """
    e = result.expected_losses
    return {
        "name": result.frame,
        "members": result.members,
        "curve": [
            {"lost": p.lost, "p_stable": p.p_stable, "low": p.low, "high": p.high, "exact": p.exact}
            for p in result.curve
        ],
        "expected_losses_to_mechanism": None if e is None else e.value,
        "expected_losses_low": None if e is None else e.low,
        "expected_losses_high": None if e is None else e.high,
        "expected_losses_exact": None if e is None else e.exact,
        "stable": result.stable,
        "losable": result.losable,
        "samples": result.samples,
        "seed": result.seed,
        "loss_likelihood": {k.value: result.likelihood.weight(k) for k in MemberKind},
        "member_ranking": [
            {
                "member": member_dict(d.member),
                "curve_drop": d.drop,
                "low": d.low,
                "high": d.high,
                "critical": d.critical,
            }
            for d in result.ranking
        ],
        "ranking_samples": result.ranking_samples,
    }


def robustness_dict(results: Sequence[Robustness]) -> dict[str, Any]:
    """The JSON object of ``bracegrid robustness``: ``{"frames": [...]}`` plus the method and limits."""
    return {
        "frames": [robustness_frame_dict(r) for r in results],
        "confidence": CONFIDENCE,
        "intervals": "Clopper-Pearson for probabilities, Student t for means",
        "limits": ROBUSTNESS_LIMITS,
        "caution": CAUTION,
    }


def solution_counts(solution: FrameSolution) -> dict[str, Any]:
    """Counts and total cut length of one frame solution (``length_mm`` whole mm, ``length_m`` the same in m)."""
    frame = solution.frame
    members = solution.members
    new = [m for m in members if not m.existing]
    length_mm = layout_length_mm(frame, members)
    return {
        "braces": sum(1 for m in members if m.kind is MemberKind.BRACE),
        "ties": sum(1 for m in members if m.kind is MemberKind.TIE),
        "new_braces": sum(1 for m in new if m.kind is MemberKind.BRACE),
        "new_ties": sum(1 for m in new if m.kind is MemberKind.TIE),
        "length_mm": length_mm,
        "length_m": metres(length_mm),
    }


def optimize_member_dict(
    member: Member, frame: Frame | None = None, costs: CostCatalogue | None = None
) -> dict[str, Any]:
    """A member of a layout as JSON: whether it was kept and, given its frame and prices, its cut length and price.

    ``cost`` follows the bill's one rounding rule, so a frame's ``cost`` is the sum of its members'.
    """
    out: dict[str, Any] = {**member_dict(member), "existing": member.existing}
    if frame is not None and costs is not None:
        cut = frame.cut_length_mm(member.row, member.col)
        out["cut_length_mm"] = cut
        out["cost"] = costs.member_price_cents(member.kind, cut) / 100
    return out


def frame_solution_dict(solution: FrameSolution, costs: CostCatalogue | None = None) -> dict[str, Any]:
    """One frame's optimizer answer as a JSON-ready dict.

    Args:
        solution: One frame's answer.
        costs: The prices; given, each member carries its ``cut_length_mm`` and ``cost``.

    Returns:
        name, status, cost, added_cost, bound, gap, seconds, method, counts,
        redundancy achieved, critical members and the members.
    """
    parts = solution_counts(solution)
    return {
        "name": solution.frame.name,
        "status": solution.status.value,
        "cost": solution.cost,
        "added_cost": solution.added_cost,
        "bound": solution.bound,
        "gap": solution.gap,
        "seconds": solution.seconds,
        "method": solution.method_text,
        "stable": solution.verdict.stable,
        "redundancy": solution.redundancy,
        "braces": parts["braces"],
        "ties": parts["ties"],
        "new_braces": parts["new_braces"],
        "new_ties": parts["new_ties"],
        "diagonal_length_m": parts["length_m"],
        "critical_members": [member_dict(m) for m in solution.verdict.critical_members],
        "removed": [member_dict(m) for m in solution.verdict.removed],
        "members": [optimize_member_dict(m, solution.frame, costs) for m in solution.members],
        **strength_dicts(solution.strength),
    }


def strength_dicts(check: StrengthCheck | None) -> dict[str, Any]:
    """The fixed keys ``carries_loads`` and ``utilisation`` (null without load cases) and ``strength``.

    ``strength`` holds the words and, per case and sense, both utilisations and governing members.

    Example:
        >>> strength_dicts(None)
        {'carries_loads': None, 'utilisation': None, 'strength': None}
    """
    if check is None:
        return {"carries_loads": None, "utilisation": None, "strength": None}
    cases = [
        {
            "case": c.title,
            "plastic": _r(c.plastic),
            "plastic_member": c.plastic_member,
            "elastic": _r(c.elastic),
            "elastic_member": c.elastic_member,
            "elastic_ok": c.elastic_ok,
        }
        for c in check.cases
    ]
    return {
        "carries_loads": {"plastic": check.plastic_ok, "elastic": check.elastic_ok},
        "utilisation": {"plastic": _r(check.plastic_max), "elastic": _r(check.elastic_max)},
        "strength": {"words": check.words, "searched_with_loads": check.searched, "cases": cases},
    }


def optimize_dict(solution: ProjectSolution) -> dict[str, Any]:
    """The JSON object of ``bracegrid optimize``.

    Args:
        solution: The project's answer.

    Returns:
        ``{"cost", "added_cost", "frames": [...], "caution"}``.
    """
    return {
        "cost": solution.cost,
        "added_cost": solution.added_cost,
        "frames": [frame_solution_dict(f, solution.project.costs) for f in solution.frames],
        "caution": CAUTION,
    }


def compare_rows(comparison: Comparison) -> list[dict[str, Any]]:
    rows = []
    for fc in comparison.frames:
        for s in fc.strategies:
            rows.append(
                {
                    "frame": fc.frame.name,
                    "key": s.key.value,
                    "strategy": s.key.title,
                    "status": s.status.value,
                    "cost": s.cost,
                    "saving": fc.saving(s.key),
                    "stable": s.stable,
                    "braces": s.braces,
                    "ties": s.ties,
                    "kept_braces": s.kept_braces,
                    "kept_ties": s.kept_ties,
                    "added_braces": s.added_braces,
                    "added_ties": s.added_ties,
                    "diagonal_length_m": metres(s.length_mm),
                    "critical_members": s.critical,
                    "redundancy": s.redundancy,
                    "bound": s.bound,
                    "gap": s.gap,
                    "seconds": s.seconds,
                    "note": s.note,
                    "max_utilisation": _r(s.forces.max_utilisation) if s.forces else None,
                    "max_drift": _r(s.forces.max_drift, 9) if s.forces else None,
                    "within_capacity": s.forces.ok if s.forces else None,
                    "carries_loads": strength_dicts(s.check)["carries_loads"],
                    "utilisation": strength_dicts(s.check)["utilisation"],
                }
            )
    return rows


def compare_dict(comparison: Comparison) -> dict[str, Any]:
    """The JSON object of ``bracegrid compare``."""
    frames: dict[str, list[dict[str, Any]]] = {}
    for row in compare_rows(comparison):
        item = {k: v for k, v in row.items() if k not in {"frame", "strategy"}}
        frames.setdefault(row["frame"], []).append(item)
    return {
        "project": comparison.project.name,
        "frames": [{"name": name, "strategies": items} for name, items in frames.items()],
        "caution": CAUTION,
    }


# --- the browser editor (docs/editor.md) -------------------------------------------------------


def progress_dict(event: ProgressEvent) -> dict[str, Any]:
    """An optimizer progress event (incumbent, bound and gap while it runs) as JSON."""
    return {
        "frame": event.frame,
        "cost": event.cost,
        "bound": event.bound,
        "gap": event.gap,
        "seconds": round(event.seconds, 3),
        "stage": event.stage,
    }


def compare_progress_dict(frame: str, key: StrategyKey, step: int, steps: int) -> dict[str, Any]:
    """A ``compare`` progress step as JSON: which strategy of which frame is done, of how many."""
    return {"frame": frame, "strategy": key.value, "stage": f"{frame}: {key.title}", "step": step, "steps": steps}


def layout_summary_dict(frame: Frame, costs: CostCatalogue) -> dict[str, Any]:
    """Member counts, diagonal length and price of a frame's layout (its members as they stand)."""
    members = frame.members
    length_mm = layout_length_mm(frame, members)
    return {
        "members": len(members),
        "braces": sum(1 for m in members if m.kind is MemberKind.BRACE),
        "ties": sum(1 for m in members if m.kind is MemberKind.TIE),
        "proposed": sum(1 for m in members if not m.existing),
        "diagonal_length_m": metres(length_mm),
        "cost": layout_cost(frame, costs, members),
    }


def editor_frame_dict(frame: Frame, unit: str) -> dict[str, Any]:
    """A frame as the editor draws and edits it.

    Sizes come twice: in whole millimetres for drawing, and in the project's length unit as the
    file writes them, for the fields the user edits. ``blocked`` holds the bays listed in the file;
    ``blocked_by_openings`` the further bays the openings cover.
    """
    listed = frame.blocked
    return {
        "name": frame.name,
        "widths_mm": list(frame.widths),
        "heights_mm": list(frame.heights),
        "widths": [length_in_unit(w, unit) for w in frame.widths],
        "heights": [length_in_unit(h, unit) for h in frame.heights],
        "supports": frame.supports.value,
        "allow": sorted(k.value for k in frame.allow),
        "redundancy": frame.redundancy,
        "blocked": [list(b) for b in sorted(listed)],
        "blocked_by_openings": [list(b) for b in sorted(blocked_bays(frame) - listed)],
        "openings": [{"name": o.name, "polygon_mm": [list(p) for p in o.polygon]} for o in frame.openings],
        "members": [optimize_member_dict(m) for m in frame.members],
        "load_cases": [c.name for c in frame.loads],
    } | ({"general": True, "general_note": general_note(frame)} if not frame.is_complete else {})


def general_note(frame: Frame) -> str:
    """What the editor says about a general frame: it is checked exactly but shown read-only."""
    bars = ", ".join(b.label for b in sorted(frame.missing)) or "none"
    return (
        f"Frame {frame.name!r} has missing grid bars ({bars}) or absent bays: the editor checks it exactly "
        "but shows it read-only (it does not draw missing bars); edit it in the project file, or draw it "
        "with bracegrid draw."
    )


def editor_project_dict(project: Project, *, version: str, file_name: str) -> dict[str, Any]:
    """The project as the editor loads it, with the version its saves must name."""
    return {
        "name": project.name,
        "file": file_name,
        "version": version,
        "length_unit": project.length_unit,
        "frames": [editor_frame_dict(f, project.length_unit) for f in project.frames],
        "caution": CAUTION,
    }


def live_check_dict(frame: Frame, verdict: Verdict, costs: CostCatalogue, *, unit: str) -> dict[str, Any]:
    """The editor's live verdict: the check of ``bracegrid check --json`` plus counts, cost, sizes and blocked bays."""
    return {
        "verdict": verdict_dict(verdict),
        "summary": layout_summary_dict(frame, costs),
        "sizes": {
            "widths_mm": list(frame.widths),
            "heights_mm": list(frame.heights),
            "width": length_in_unit(frame.width_mm, unit),
            "height": length_in_unit(frame.height_mm, unit),
            "unit": unit,
        },
        "blocked_by_openings": [list(b) for b in sorted(blocked_bays(frame) - frame.blocked)],
        "caution": CAUTION,
    }


def _bay_diagonal(m: Member) -> tuple[int, int, str]:
    return (m.row, m.col, m.diagonal.value)


def proposal_dict(before: Frame, solution: FrameSolution) -> dict[str, Any]:
    """An optimizer or repair answer as a proposal against the layout it started from.

    ``added`` are the members the solver puts in, ``removed`` those a repair takes out, and
    ``blocked`` the frame's listed blocked bays after it (a repair that keeps bays clear adds them).
    """
    old = {_bay_diagonal(m) for m in before.members}
    new = {_bay_diagonal(m) for m in solution.members}
    return {
        "frame": before.name,
        "solution": frame_solution_dict(solution),
        "added": [optimize_member_dict(m) for m in solution.members if _bay_diagonal(m) not in old],
        "removed": [optimize_member_dict(m) for m in before.members if _bay_diagonal(m) not in new],
        "blocked": [list(b) for b in sorted(solution.frame.blocked)],
        "caution": CAUTION,
    }


_FIELD = re.compile(r"\.(widths|heights|blocked|supports)(?:\[(\d+)\])?")
_ITEM = re.compile(r" (member|opening) #(\d+)")


def problems_dict(problems: Iterable[str], *, frame_names: Sequence[str] = ()) -> dict[str, Any]:
    """Loader problems as JSON, each tied to the frame and field it names so a page can show it there.

    Example:
        >>> problems_dict(["frame 'f'.widths[2]: size must be positive"], frame_names=["f"])["problems"][0]
        {'frame': 'f', 'field': 'widths', 'index': 2, 'message': "frame 'f'.widths[2]: size must be positive"}
    """
    texts = list(problems)
    items: list[dict[str, Any]] = []
    for text in texts:
        where = text.split(": ", 1)[0]
        frame = next((n for n in frame_names if f"frame {n!r}" in where), None)
        field, index = "project", None
        if (m := _FIELD.search(where)) is not None:
            field, index = m.group(1), int(m.group(2)) if m.group(2) else None
        elif (m := _ITEM.search(where)) is not None:
            field, index = f"{m.group(1)}s", int(m.group(2))
        elif frame is not None:
            field = "frame"
        items.append({"frame": frame, "field": field, "index": index, "message": text})
    return {"error": "invalid", "message": "; ".join(texts), "problems": items}


def error_dict(error: str, message: str, **extra: Any) -> dict[str, Any]:
    """Any refused request as JSON: a short error word, a sentence, and what else helps the caller."""
    return {"error": error, "message": message, **extra}


# --------------------------------------------------------------------------- member forces


def _r(value: float | None, digits: int = 6) -> float | None:
    return None if value is None else round(float(value), digits) + 0.0


def member_force_dict(m: MemberForce) -> dict[str, Any]:
    """One bar's force as JSON (fixed keys: kind, row/col/diagonal or line/row or line/col, force_kn, utilisation).

    Example:
        >>> from bracegrid.mechanics import BarKind, MemberForce
        >>> member_force_dict(MemberForce(BarKind.STANDARD, 3, 2, None, None, -12.5, 40.0, 0.3125))
        {'kind': 'standard', 'line': 3, 'row': 2, 'force_kn': -12.5, 'utilisation': 0.3125, 'capacity_kn': 40.0}
    """
    out: dict[str, Any] = {"kind": m.kind.value}
    if m.kind is BarKind.STANDARD:
        out |= {"line": m.line, "row": m.row}
    elif m.kind is BarKind.LEDGER:
        out |= {"line": m.line, "col": m.col}
    else:
        out |= {"row": m.row, "col": m.col, "diagonal": m.diagonal.value if m.diagonal else None}
    out |= {"force_kn": _r(m.force_kn), "utilisation": _r(m.utilisation), "capacity_kn": m.capacity_kn}
    if m.kind is BarKind.TIE:
        out["slack"] = m.slack
    return out


def reaction_dict(r: Reaction) -> dict[str, Any]:
    """One support reaction as JSON (fixed keys: line, fx_kn, fy_kn)."""
    out: dict[str, Any] = {
        "line": r.line,
        "fx_kn": _r(r.fx_kn),
        "fy_kn": _r(r.fy_kn),
        "support": r.support,
        "p": r.p,
        "q": r.q,
    }
    if r.support == "base":
        out |= {"uplift_kn": _r(r.uplift_kn), "uplift_limit_kn": r.uplift_limit_kn, "uplift_over": r.uplift_over}
    return out


def case_forces_dict(c: CaseForces) -> dict[str, Any]:
    """One load case in one sense as JSON (fixed keys: name, sense, mechanism, members, reactions, sway_mm)."""
    governing = c.governing
    return {
        "name": c.case,
        "sense": c.sense.value,
        "mechanism": c.is_mechanism,
        "members": [member_force_dict(m) for m in c.members],
        "reactions": [reaction_dict(r) for r in c.reactions],
        "sway_mm": [_r(s) for s in c.sway_mm],
        "drift": [_r(d, 9) for d in c.drift],
        "sway_y_mm": [_r(s) for s in c.sway_y_mm],
        "ok": c.ok,
        "max_utilisation": _r(c.max_utilisation),
        "governing": None if governing is None else member_force_dict(governing),
        "over_capacity": [member_force_dict(m) for m in c.over_capacity],
        "uplift_over": [reaction_dict(r) for r in c.uplift_over],
        "slack_ties": len(c.slack_ties),
        "mechanism_kind": c.mechanism.kind.value if c.mechanism else None,
        "mechanism_description": list(c.mechanism.words) if c.mechanism else [],
        "load_kn": _r(c.load_kn),
        "residual_kn": c.residual_kn,
        "newton_steps": c.steps,
    }


def force_summary_dict(ff: FrameForces) -> dict[str, Any]:
    """A frame's force results in brief (for ``check --json``)."""
    governing = ff.governing
    return {
        "ok": ff.ok,
        "max_utilisation": _r(ff.max_utilisation),
        "max_drift": _r(ff.max_drift, 9),
        "governing": None if governing is None else {**member_force_dict(governing.member), "case": governing.case},
        "mechanism_cases": [c.title for c in ff.mechanisms],
    }


def frame_forces_dict(ff: FrameForces) -> dict[str, Any]:
    """One frame's force analysis as JSON."""
    return {
        "name": ff.frame,
        "cases": [case_forces_dict(c) for c in ff.cases],
        "envelope": [
            {
                **member_force_dict(e.member),
                "max_tension_kn": _r(e.max_tension_kn),
                "max_compression_kn": _r(e.max_compression_kn),
                "case": e.case,
            }
            for e in ff.envelope
        ],
        **force_summary_dict(ff),
    }


def _bar_colour(m: MemberForce) -> str:
    """The force sheets' colour of a bar: the utilisation ramp, the over-capacity colour, or unrated grey."""
    if m.utilisation is None:
        return hex_colour(UNRATED_RGB)
    return hex_colour(OVER_RGB if m.over else utilisation_rgb(m.utilisation))


def editor_forces_dict(ff: FrameForces | None, *, reason: str = "") -> dict[str, Any]:
    """The editor's utilisation view of one edited frame: each bar's envelope, cases in brief.

    ``available`` is false (with ``reason`` in words) where the frame has no load cases, lacks a
    stiffness, or is a mechanism under every case; the page then colours nothing.

    Example:
        >>> editor_forces_dict(None, reason="no load cases")["available"]
        False
    """
    if ff is None:
        return {"available": False, "reason": reason, "model_limits": MODEL_LIMITS, "caution": CAUTION}
    governing = ff.governing
    ramp = [[at, hex_colour(rgb)] for at, rgb in RAMP]
    return {
        "available": bool(ff.envelope),
        "reason": reason if ff.envelope else "every load case finds a mechanism: nothing to colour",
        "ok": ff.ok,
        "max_utilisation": _r(ff.max_utilisation),
        "governing": None if governing is None else {"label": governing.member.label, "case": governing.case},
        "bars": [
            {
                **member_force_dict(e.member),
                "label": e.member.label,
                "case": e.case,
                "over": e.member.over,
                "colour": _bar_colour(e.member),
            }
            for e in ff.envelope
        ],
        "ramp": ramp,
        "over_colour": hex_colour(OVER_RGB),
        "cases": [
            {"title": c.title, "ok": c.ok, "mechanism": c.is_mechanism, "max_utilisation": _r(c.max_utilisation)}
            for c in ff.cases
        ],
        "model_limits": MODEL_LIMITS,
        "caution": CAUTION,
    }


def forces_dict(frames: Sequence[FrameForces]) -> dict[str, Any]:
    """The JSON object of ``bracegrid forces``."""
    return {
        "ok": all(f.ok for f in frames),
        "frames": [frame_forces_dict(f) for f in frames],
        "model_limits": MODEL_LIMITS,
        "caution": CAUTION,
    }
