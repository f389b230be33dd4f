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
        >>> describe_part(LoosePart((3, 4), (), Racking.CLOCKWISE), "the pinned base")
        'rows 3-4 can rack clockwise only (tops sway right) relative to the pinned base; a tie or brace must stop the other sense too'
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
