"""JSON shapes: every result as a JSON-ready dict, the one place that builds them.

``--json`` of every command uses these (and any later shell reuses them); field names other
tools read are fixed (see docs/). Values are Python scalars, never numpy ones.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from bracegrid.analysis import (
    CAUTION,
    CONFIDENCE,
    ROBUSTNESS_LIMITS,
    Addition,
    AdditionAdvice,
    Robustness,
    Verdict,
    addition_words,
    anchor_words,
    describe_part,
)
from bracegrid.compare import Comparison
from bracegrid.model import Member, MemberKind
from bracegrid.optimize import FrameSolution, ProjectSolution


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
    }


def addition_dict(addition: Addition) -> dict[str, Any]:
    """One candidate addition as JSON: the member, the loose parts it locks, its price."""
    return {
        "member": member_dict(addition.member),
        "parts_locked": addition.parts_locked,
        "cost": addition.cost,
        "description": addition_words(addition),
    }


def check_dict(verdicts: Sequence[Verdict], *, additions: Mapping[str, AdditionAdvice] | None = None) -> dict[str, Any]:
    """The JSON object of ``bracegrid check``.

    Args:
        verdicts: One per frame.
        additions: For unstable frames (by name), the single additions that lock the most loose
            parts; each frame listed gets ``best_additions`` and ``best_additions_per_cost``.
    """
    frames = []
    for v in verdicts:
        item = verdict_dict(v)
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
    """Counts and diagonal length of one frame solution."""
    frame = solution.frame
    members = solution.members
    new = [m for m in members if not m.existing]
    length_mm = sum(frame.diagonal_length_mm(m.row, m.col) for m in members)
    return {
        "braces": sum(1 for m in members if m.kind is MemberKind.BRACE),
        "ties": sum(1 for m in members if m.kind is MemberKind.TIE),
        "new_braces": sum(1 for m in new if m.kind is MemberKind.BRACE),
        "new_ties": sum(1 for m in new if m.kind is MemberKind.TIE),
        "length_m": round(length_mm / 1000.0, 3),
    }


def optimize_member_dict(member: Member) -> dict[str, Any]:
    """A member of an optimized layout as JSON (with whether it was kept)."""
    return {**member_dict(member), "existing": member.existing}


def frame_solution_dict(solution: FrameSolution) -> dict[str, Any]:
    """One frame's optimizer answer as a JSON-ready dict.

    Args:
        solution: One frame's answer.

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
        "members": [optimize_member_dict(m) for m in solution.members],
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
        "frames": [frame_solution_dict(f) for f in solution.frames],
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
                    "diagonal_length_m": round(s.length_mm / 1000.0, 3),
                    "critical_members": s.critical,
                    "redundancy": s.redundancy,
                    "bound": s.bound,
                    "gap": s.gap,
                    "seconds": s.seconds,
                    "note": s.note,
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
