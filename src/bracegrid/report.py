"""Text and JSON rendering of results. Returns strings and dicts; never prints."""

from __future__ import annotations

import io
from collections.abc import Iterable, Sequence
from typing import Any

from rich.console import Console
from rich.table import Table

from bracegrid.model import LoosePart, Member, Racking, Supports, Verdict

#: The caution every report, drawing title block and the README carries.
CAUTION = (
    "bracegrid proves only that the layout leaves no mechanism (first-order, pin-jointed, "
    "ties taut). Member sizing, connections, foundations, loads and code compliance rest "
    "with a licensed engineer and the local codes."
)


def format_numbers(values: Iterable[int]) -> str:
    """Compress sorted numbers into ranges.

    Example:
        >>> format_numbers([1, 2, 3, 5, 7, 8])
        '1-3, 5, 7-8'
    """
    items = sorted(set(values))
    spans: list[str] = []
    start = prev = None
    for v in items:
        if start is None:
            start = prev = v
        elif prev is not None and v == prev + 1:
            prev = v
        else:
            spans.append(f"{start}" if start == prev else f"{start}-{prev}")
            start = prev = v
    if start is not None:
        spans.append(f"{start}" if start == prev else f"{start}-{prev}")
    return ", ".join(spans)


def _who(rows: Sequence[int], columns: Sequence[int]) -> str:
    parts = []
    if rows:
        parts.append(f"row{'s' if len(rows) > 1 else ''} {format_numbers(rows)}")
    if columns:
        parts.append(f"column{'s' if len(columns) > 1 else ''} {format_numbers(columns)}")
    return " with ".join(parts) if parts else "nothing"


def anchor_words(verdict: Verdict) -> str:
    """What loose parts move relative to."""
    if verdict.supports is Supports.BASE:
        return "the pinned base"
    return f"the part holding {_who(verdict.anchor_rows, verdict.anchor_columns)}"


def describe_part(part: LoosePart, anchor: str) -> str:
    """One loose part in plain words.

    Example:
        >>> describe_part(LoosePart((3, 4), (), Racking.CLOCKWISE), "the pinned base").split(";")[0]
        'rows 3-4 can rack clockwise only (tops sway right) relative to the pinned base'
    """
    who = _who(part.rows, part.columns)
    if part.racking is Racking.BOTH:
        return f"{who} can rack both ways relative to {anchor}: no member ties it to the rest"
    if part.racking is Racking.CLOCKWISE:
        hint = "tops sway right" if part.rows else "right side drops"
    else:
        hint = "tops sway left" if part.rows else "right side rises"
    return (
        f"{who} can rack {part.racking.value} only ({hint}) relative to {anchor}; "
        "a tie or brace must stop the other sense too"
    )


def redundancy_words(k: int) -> str:
    """A layout's redundancy in plain words.

    Example:
        >>> redundancy_words(1)
        'survives the loss of any one member'
        >>> redundancy_words(2)
        'survives the loss of any 2 members'
    """
    if k < 0:
        return "not stable"
    if k == 0:
        return "a single member loss can leave a mechanism"
    return "survives the loss of any one member" if k == 1 else f"survives the loss of any {k} members"


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


def render_table(table: Table, *, width: int = 110) -> str:
    """Render a rich table to plain text."""
    buffer = io.StringIO()
    Console(file=buffer, width=width, color_system=None, force_terminal=False).print(table)
    return buffer.getvalue()


def _members_text(members: Sequence[Member], *, limit: int = 12) -> str:
    labels = [f"{m.kind.value} {m.label}" for m in members[:limit]]
    more = f" ... and {len(members) - limit} more" if len(members) > limit else ""
    return ", ".join(labels) + more


def render_check(project_name: str, verdicts: Sequence[Verdict]) -> str:
    """Human-readable result of ``bracegrid check``."""
    table = Table(title=f"Stability check: {project_name}", title_justify="left")
    for head in ("frame", "verdict", "racking modes", "braces", "ties", "braces + ties/2", "critical"):
        table.add_column(head, justify="left" if head in {"frame", "verdict"} else "right")
    for v in verdicts:
        table.add_row(
            v.frame,
            "STABLE" if v.stable else "NOT STABLE",
            str(v.racking_modes),
            str(v.braces),
            str(v.ties),
            f"{v.maxwell_count:g} / {v.maxwell_needed}",
            str(len(v.critical_members)),
        )
    lines = [render_table(table)]
    for v in verdicts:
        if v.removed:
            lines.append(f"{v.frame}: checked without {_members_text(v.removed)}")
        anchor = anchor_words(v)
        for part in v.loose_parts:
            lines.append(f"{v.frame}: {describe_part(part, anchor)}")
        if v.critical_members:
            lines.append(f"{v.frame}: critical (single loss makes it unstable): {_members_text(v.critical_members)}")
    lines.append("")
    lines.append(f"Caution: {CAUTION}")
    return "\n".join(lines) + "\n"


# --- optimize -------------------------------------------------------------------------------------------------


def _solution_parts(solution: Any) -> dict[str, Any]:
    """Counts and lengths of one frame solution (duck-typed to avoid importing the optimizer)."""
    from bracegrid.model import MemberKind

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


def frame_solution_dict(solution: Any) -> dict[str, Any]:
    """One frame's optimizer answer as a JSON-ready dict.

    Args:
        solution: A :class:`bracegrid.optimize.FrameSolution`.

    Returns:
        name, status, cost, added_cost, bound, gap, seconds, method, counts,
        redundancy achieved, critical members and the members.
    """
    parts = _solution_parts(solution)
    return {
        "name": solution.frame.name,
        "status": solution.status.value,
        "cost": solution.cost,
        "added_cost": solution.added_cost,
        "bound": solution.bound,
        "gap": solution.gap,
        "seconds": solution.seconds,
        "method": solution.method,
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


def optimize_dict(solution: Any) -> dict[str, Any]:
    """The JSON object of ``bracegrid optimize``.

    Args:
        solution: A :class:`bracegrid.optimize.ProjectSolution`.

    Returns:
        ``{"cost", "added_cost", "frames": [...], "caution"}``.
    """
    return {
        "cost": solution.cost,
        "added_cost": solution.added_cost,
        "frames": [frame_solution_dict(f) for f in solution.frames],
        "caution": CAUTION,
    }


def render_optimize(project_name: str, solution: Any) -> str:
    """Human-readable result of ``bracegrid optimize``.

    Args:
        project_name: Shown in the title.
        solution: A :class:`bracegrid.optimize.ProjectSolution`.

    Returns:
        A table (one row per frame) and notes.
    """
    table = Table(title=f"Optimized layout: {project_name}", title_justify="left")
    heads = ("frame", "status", "braces (new)", "ties (new)", "diagonals m", "cost", "added", "bound", "gap", "time s")
    for head in heads:
        table.add_column(head, justify="left" if head in {"frame", "status"} else "right")
    for s in solution.frames:
        parts = _solution_parts(s)
        table.add_row(
            s.frame.name,
            s.status.value.upper(),
            f"{parts['braces']} ({parts['new_braces']})",
            f"{parts['ties']} ({parts['new_ties']})",
            f"{parts['length_m']:.2f}",
            f"{s.cost:.2f}",
            f"{s.added_cost:.2f}",
            f"{s.bound:.2f}",
            f"{100 * s.gap:.2f}%",
            f"{s.seconds:.2f}",
        )
    lines = [render_table(table, width=130)]
    lines.append(f"Total cost {solution.cost:.2f} (added {solution.added_cost:.2f}).")
    for s in solution.frames:
        new = [m for m in s.members if not m.existing]
        if s.verdict.removed:
            lines.append(f"{s.frame.name}: repaired without {_members_text(s.verdict.removed)}")
        lines.append(f"{s.frame.name}: {s.method}; {redundancy_words(s.redundancy)}")
        if new:
            lines.append(f"{s.frame.name}: add {_members_text(new, limit=20)}")
        if s.verdict.critical_members:
            lines.append(
                f"{s.frame.name}: critical (single loss makes it unstable): {len(s.verdict.critical_members)} member(s)"
            )
    lines.append("")
    lines.append(f"Caution: {CAUTION}")
    return "\n".join(lines) + "\n"


def progress_line(event: Any) -> str:
    """One live status line from an optimizer progress event.

    Example:
        >>> from types import SimpleNamespace as E
        >>> progress_line(E(frame="f", cost=10.0, bound=9.5, gap=0.05, seconds=1.25, stage="CP-SAT"))
        'f: best 10.00  bound 9.50  gap 5.00%  1.2 s  CP-SAT'
    """
    best = "-" if event.cost is None else f"{event.cost:.2f}"
    gap = "-" if event.gap is None else f"{100 * event.gap:.2f}%"
    return f"{event.frame}: best {best}  bound {event.bound:.2f}  gap {gap}  {event.seconds:.1f} s  {event.stage}"


def _compare_rows(comparison: Any) -> list[dict[str, Any]]:
    rows = []
    for fc in comparison.frames:
        for s in fc.strategies:
            rows.append(
                {
                    "frame": fc.frame.name,
                    "key": s.key.value,
                    "strategy": s.key.title,
                    "status": s.status,
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


def compare_dict(comparison: Any) -> dict[str, Any]:
    """The JSON object of ``bracegrid compare``."""
    frames: dict[str, list[dict[str, Any]]] = {}
    for row in _compare_rows(comparison):
        item = {k: v for k, v in row.items() if k not in {"frame", "strategy"}}
        frames.setdefault(row["frame"], []).append(item)
    return {
        "project": comparison.project.name,
        "frames": [{"name": name, "strategies": items} for name, items in frames.items()],
        "caution": CAUTION,
    }


def render_compare_csv(comparison: Any) -> str:
    """The comparison table as CSV (one row per frame and strategy)."""
    import csv

    rows = _compare_rows(comparison)
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=list(rows[0]) if rows else ["frame"], lineterminator="\n")
    writer.writeheader()
    for row in rows:
        writer.writerow({k: "" if v is None else v for k, v in row.items()})
    return buffer.getvalue()


def render_compare(comparison: Any) -> str:
    """Human-readable comparison tables, one per frame."""
    lines = []
    for fc in comparison.frames:
        table = Table(title=f"Bracing alternatives: {fc.frame.name}", title_justify="left")
        for head in ("strategy", "status", "braces", "ties", "length m", "cost", "saving", "stable",
                     "critical", "survives", "gap", "time s"):  # fmt: skip
            left = head in {"strategy", "status"}
            table.add_column(head, justify="left" if left else "right", no_wrap=left)
        for s in fc.strategies:
            saving = fc.saving(s.key)
            table.add_row(
                s.key.value,
                s.status,
                str(s.braces),
                str(s.ties),
                f"{s.length_mm / 1000:.2f}",
                "-" if s.cost is None else f"{s.cost:.2f}",
                "-" if saving is None else f"{saving:.2f}",
                "yes" if s.stable else "NO",
                str(s.critical),
                "-" if s.redundancy < 0 else f"{s.redundancy}",
                "-" if s.gap is None else f"{100 * s.gap:.2f}%",
                f"{s.seconds:.2f}",
            )
        lines.append(render_table(table, width=130))
        for s in fc.strategies:
            if s.note:
                lines.append(f"{fc.frame.name} / {s.key.value}: {s.note}")
        lines.append("")
    if len(comparison.frames) > 1:
        parts = []
        from bracegrid.compare import StrategyKey

        for key in StrategyKey:
            total = comparison.total(key)
            parts.append(f"{key.value} {'-' if total is None else f'{total:.2f}'}")
        lines.append("All frames: " + ", ".join(parts))
    lines.append("saving = rule-of-thumb baseline cost minus the strategy's cost; survives = member losses survived")
    lines.append(f"Caution: {CAUTION}")
    return "\n".join(lines) + "\n"
