"""JSON shapes: every result as a JSON-ready dict, the one place that builds them.

``--json`` of every command uses these (and any later shell reuses them); field names other
tools read are fixed (see docs/). Values are Python scalars, never numpy ones.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from bracegrid.analysis import CAUTION, Verdict, anchor_words, describe_part
from bracegrid.compare import Comparison
from bracegrid.model import CostCatalogue, Frame, Member, MemberKind, layout_length_mm
from bracegrid.optimize import FrameSolution, ProjectSolution
from bracegrid.units import metres


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


def check_dict(verdicts: Sequence[Verdict]) -> dict[str, Any]:
    """The JSON object of ``bracegrid check``."""
    return {
        "stable": all(v.stable for v in verdicts),
        "frames": [verdict_dict(v) for v in verdicts],
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


def optimize_member_dict(member: Member, frame: Frame, costs: CostCatalogue) -> dict[str, Any]:
    """A member of an optimized layout as JSON: whether it was kept, its cut length and price.

    ``cost`` follows the bill's one rounding rule, so a frame's ``cost`` is the sum of its members'.
    """
    cut = frame.cut_length_mm(member.row, member.col)
    return {
        **member_dict(member),
        "existing": member.existing,
        "cut_length_mm": cut,
        "cost": costs.member_price_cents(member.kind, cut) / 100,
    }


def frame_solution_dict(solution: FrameSolution, costs: CostCatalogue) -> dict[str, Any]:
    """One frame's optimizer answer as a JSON-ready dict.

    Args:
        solution: One frame's answer.
        costs: The prices (each member's ``cost`` is given).

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
