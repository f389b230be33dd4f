"""Text and CSV rendering of results for people at a terminal. Returns strings; never prints."""

from __future__ import annotations

import csv
import io
from collections.abc import Mapping, Sequence

from rich.console import Console
from rich.table import Table

from bracegrid.analysis import (
    CAUTION,
    ROBUSTNESS_LIMITS,
    AdditionAdvice,
    CheckMethod,
    Robustness,
    Verdict,
    addition_words,
    anchor_words,
    describe_part,
    flex_words,
    redundancy_words,
)
from bracegrid.compare import Comparison, StrategyKey
from bracegrid.mechanics import FrameForces
from bracegrid.model import Member, MemberKind
from bracegrid.optimize import ProgressEvent, ProjectSolution, StrengthCheck
from bracegrid.outputs.shapes import compare_rows, solution_counts
from bracegrid.outputs.terms import COST, LENGTH, SAVING, STATUS, cents, money_text, saving_text
from bracegrid.units import metres_text


def render_table(table: Table, *, width: int = 110) -> str:
    """Render a rich table to plain text."""
    buffer = io.StringIO()
    Console(file=buffer, width=width, color_system=None, force_terminal=False).print(table)
    return buffer.getvalue()


def _members_text(members: Sequence[Member], *, limit: int = 12) -> str:
    labels = [f"{m.kind.value} {m.label}" for m in members[:limit]]
    more = f" ... and {len(members) - limit} more" if len(members) > limit else ""
    return ", ".join(labels) + more


def render_check(
    project_name: str,
    verdicts: Sequence[Verdict],
    *,
    notes: Sequence[str] = (),
    additions: Mapping[str, AdditionAdvice] | None = None,
) -> str:
    """Human-readable result of ``bracegrid check``.

    Args:
        project_name: Shown in the title.
        verdicts: One per frame.
        notes: Extra lines before the caution.
        additions: For unstable frames (by name), the single additions that lock the most loose parts.
    """
    table = Table(title=f"Stability check: {project_name}", title_justify="left")
    for head in ("frame", "verdict", "method", "racking modes", "braces", "ties", "weighted count", "least needed",
                 "critical"):  # fmt: skip
        table.add_column(head, justify="left" if head in {"frame", "verdict"} else "right")
    for v in verdicts:
        table.add_row(
            v.frame,
            "STABLE" if v.stable else "NOT STABLE",
            v.method.value,
            str(v.racking_modes),
            str(v.braces),
            str(v.ties),
            f"{v.maxwell_count:g}",
            str(v.maxwell_needed),
            str(len(v.critical_members)),
        )
    lines = [render_table(table)]
    lines.append(
        "weighted count = braces + ties/2 (a tie holds one racking sense, half a brace); least needed = the "
        "weighted count every stable layout reaches (rows + columns - 1; rows on a pinned base)"
        + (
            "; method exact (missing grid bars or an outline): weighted count = braces + ties (each member "
            "raises the rigidity matrix's rank by at most one), least needed = degrees of freedom left by the "
            "grid bars and supports, the rank a rigid layout's members must reach"
            if any(v.method is CheckMethod.EXACT for v in verdicts)
            else ""
        )
    )
    for v in verdicts:
        if v.removed:
            lines.append(f"{v.frame}: checked without {_members_text(v.removed)}")
        anchor = anchor_words(v)
        for part in v.loose_parts:
            lines.append(f"{v.frame}: {describe_part(part, anchor)}")
        if v.flex is not None:
            lines.append(f"{v.frame}: {flex_words(v.flex)}")
        if v.critical_members:
            lines.append(f"{v.frame}: critical (single loss makes it unstable): {_members_text(v.critical_members)}")
        advice = (additions or {}).get(v.frame)
        if advice is not None:
            lines.extend(_additions_lines(advice))
    lines.extend(notes)
    lines.append("")
    lines.append(f"Caution: {CAUTION}")
    return "\n".join(lines) + "\n"


def _additions_lines(advice: AdditionAdvice) -> list[str]:
    name = advice.frame
    if not advice.most:
        return [f"{name}: no single member locks a loose part on its own ({advice.candidates} candidates tried)"]
    lines = [
        f"{name}: best single additions ({advice.candidates} candidates tried, {advice.racking_modes} loose parts):"
    ]
    lines += [f"  {addition_words(a)}" for a in advice.most]
    if [a.member for a in advice.per_cost] != [a.member for a in advice.most]:
        lines.append(f"{name}: most loose parts per unit cost:")
        lines += [f"  {addition_words(a)}, {a.per_cost:.3f} parts per unit" for a in advice.per_cost]
    return lines


def render_robustness(project_name: str, results: Sequence[Robustness], *, ranking: int = 10) -> str:
    """Human-readable result of ``bracegrid robustness``.

    Args:
        project_name: Shown in the titles.
        results: One per frame.
        ranking: Members listed in each frame's ranking.

    Returns:
        Per frame: the curve table, the expected losses to a mechanism, the member ranking; then
        the model's limits and the caution.
    """
    lines = [f"Robustness: {project_name}", ""]
    for r in results:
        table = Table(title=f"{r.frame}: members lost at random", title_justify="left")
        for head in ("lost", "P(stable)", "95% interval", "how"):
            table.add_column(head, justify="left" if head == "how" else "right")
        for p in r.curve:
            span = "-" if p.exact else f"{p.low:.4f} - {p.high:.4f}"
            how = "exact" if p.exact else f"Monte Carlo, {r.samples} samples"
            table.add_row(str(p.lost), f"{p.p_stable:.4f}", span, how)
        if r.curve:
            lines.append(render_table(table))
        e = r.expected_losses
        if not r.stable:
            lines.append(
                f"{r.frame}: not stable before any loss; the stability check lists the single additions that help most"
            )
        elif e is None:
            lines.append(f"{r.frame}: never gets a mechanism: the members never lost hold it on their own")
        else:
            how = "exact" if e.exact else f"95% interval {e.low:.2f} - {e.high:.2f}, Monte Carlo"
            lines.append(f"{r.frame}: expected losses to the first mechanism {e.value:.2f} ({how})")
        lines.append(f"{r.frame}: {r.members} members, {r.losable} can be lost; seed {r.seed}")
        if not r.likelihood.uniform:
            weights = ", ".join(f"{k.value} {r.likelihood.weight(k):g}" for k in MemberKind)
            lines.append(f"{r.frame}: losses weighted by kind ({weights})")
        if r.ranking and all(d.critical for d in r.ranking):
            lines.append(f"{r.frame}: every member is critical: losing any one leaves a mechanism")
        elif r.ranking:
            lines.append(
                f"{r.frame}: members whose absence lowers the curve most (mean drop over k = 1..{len(r.curve)}, "
                f"{r.ranking_samples} paired samples each):"
            )
            for d in r.ranking[:ranking]:
                tag = " (critical)" if d.critical else ""
                lines.append(
                    f"  {d.member.kind.value} {d.member.label}{tag}: {d.drop:.4f} ({d.low:.4f} - {d.high:.4f})"
                )
        lines.append("")
    lines.append(f"Limits: {ROBUSTNESS_LIMITS}")
    lines.append(f"Caution: {CAUTION}")
    return "\n".join(lines) + "\n"


def render_optimize(project_name: str, solution: ProjectSolution) -> str:
    """Human-readable result of ``bracegrid optimize``.

    Args:
        project_name: Shown in the title.
        solution: The project's answer.

    Returns:
        A table (one row per frame) and notes.
    """
    table = Table(title=f"Optimized layout: {project_name}", title_justify="left")
    heads = ("frame", STATUS, "kept braces", "kept ties", "added braces", "added ties", LENGTH, COST, "added cost",
             "bound", "gap", "time s")  # fmt: skip
    for head in heads:
        table.add_column(head, justify="left" if head in {"frame", STATUS} else "right")
    for s in solution.frames:
        parts = solution_counts(s)
        table.add_row(
            s.frame.name,
            s.status.value.upper(),
            str(parts["braces"] - parts["new_braces"]),
            str(parts["ties"] - parts["new_ties"]),
            str(parts["new_braces"]),
            str(parts["new_ties"]),
            metres_text(parts["length_mm"]),
            money_text(cents(s.cost)),
            money_text(cents(s.added_cost)),
            money_text(cents(s.bound)),
            f"{100 * s.gap:.2f}%",
            f"{s.seconds:.2f}",
        )
    lines = [render_table(table, width=150)]
    lines.append(f"Total cost {money_text(cents(solution.cost))} (added {money_text(cents(solution.added_cost))}).")
    for s in solution.frames:
        new = [m for m in s.members if not m.existing]
        if s.verdict.removed:
            lines.append(f"{s.frame.name}: repaired without {_members_text(s.verdict.removed)}")
        lines.append(f"{s.frame.name}: {s.method_text}; {redundancy_words(s.redundancy)}")
        if new:
            lines.append(f"{s.frame.name}: add {_members_text(new, limit=20)}")
        lines += strength_lines(s.frame.name, s.strength)
        if s.verdict.critical_members:
            lines.append(
                f"{s.frame.name}: critical (single loss makes it unstable): {len(s.verdict.critical_members)} member(s)"
            )
    lines.append("")
    lines.append(f"Caution: {CAUTION}")
    return "\n".join(lines) + "\n"


def strength_lines(name: str, check: StrengthCheck | None) -> list[str]:
    """Which strength checks a layout passes and, per case, the governing member and its utilisation."""
    if check is None:
        return []
    how = "" if check.searched else " (layout found for stability alone)"
    out = [f"{name}: {check.words}{how}"]
    for c in check.cases:
        p = "none admissible" if c.plastic is None else f"{c.plastic:.2f}"
        e = "-" if c.elastic is None else f"{c.elastic:.2f}"
        out.append(f"  {c.title}: plastic {p} ({c.plastic_member}); elastic {e} ({c.elastic_member})")
    return out


def progress_line(event: ProgressEvent) -> str:
    """One live status line from an optimizer progress event.

    Example:
        >>> progress_line(ProgressEvent(frame="f", cost=10.0, bound=9.5, gap=0.05, seconds=1.25, stage="CP-SAT"))
        'f: best 10.00  bound 9.50  gap 5.00%  1.2 s  CP-SAT'
    """
    best = "-" if event.cost is None else f"{event.cost:.2f}"
    gap = "-" if event.gap is None else f"{100 * event.gap:.2f}%"
    return f"{event.frame}: best {best}  bound {event.bound:.2f}  gap {gap}  {event.seconds:.1f} s  {event.stage}"


def render_compare_csv(comparison: Comparison) -> str:
    """The comparison table as CSV (one row per frame and strategy)."""
    rows = compare_rows(comparison)
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=list(rows[0]) if rows else ["frame"], lineterminator="\n")
    writer.writeheader()
    for row in rows:
        writer.writerow({k: "" if v is None else v for k, v in row.items()})
    return buffer.getvalue()


def _force_cells(forces: FrameForces | None) -> tuple[str, str]:
    """Max utilisation and max drift of a strategy's layout, as table cells."""
    if forces is None:
        return ("-", "-")
    if forces.mechanisms:
        return ("MECH.", "-")
    util = forces.max_utilisation
    drift = forces.max_drift
    flag = "" if forces.ok else " !"
    return (
        "-" if util is None else f"{100 * util:.0f}%{flag}",
        "-" if not drift else f"1/{round(1 / drift):,}",
    )


def carries_cell(check: StrengthCheck | None) -> str:
    """Which strength checks a layout passes, as a table cell: both, plastic only, or NO.

    Example:
        >>> from bracegrid.optimize import CaseCheck
        >>> carries_cell(StrengthCheck((CaseCheck("w (+)", 0.5, "-", 1.3, "-", False),)))
        'plastic only'
    """
    if check is None:
        return "-"
    if check.plastic_ok and check.elastic_ok:
        return "yes"
    if check.plastic_ok:
        return "plastic only"
    return "NO"


def render_compare(comparison: Comparison) -> str:
    """Human-readable comparison tables, one per frame."""
    lines = []
    for fc in comparison.frames:
        table = Table(title=f"Bracing alternatives: {fc.frame.name}", title_justify="left")
        loaded = any(s.forces is not None for s in fc.strategies)
        checked = any(s.check is not None for s in fc.strategies)
        extra = (("carries loads",) if checked else ()) + (("max util", "max drift") if loaded else ())
        for head in ("strategy", STATUS, "kept braces", "kept ties", "added braces", "added ties", LENGTH, COST,
                     SAVING, "stable", "critical", "survives", *extra, "gap", "time s"):  # fmt: skip
            left = head in {"strategy", STATUS}
            table.add_column(head, justify="left" if left else "right", no_wrap=left)
        for s in fc.strategies:
            saving = fc.saving(s.key)
            table.add_row(
                s.key.value,
                s.status.value,
                str(s.kept_braces),
                str(s.kept_ties),
                str(s.added_braces),
                str(s.added_ties),
                metres_text(s.length_mm),
                "-" if s.cost is None else money_text(cents(s.cost)),
                saving_text(None if saving is None else cents(saving)),
                "yes" if s.stable else "NO",
                str(s.critical),
                "-" if s.redundancy < 0 else f"{s.redundancy}",
                *((carries_cell(s.check),) if checked else ()),
                *(_force_cells(s.forces) if loaded else ()),
                "-" if s.gap is None else f"{100 * s.gap:.2f}%",
                f"{s.seconds:.2f}",
            )
        lines.append(render_table(table, width=180 if loaded else 160))
        for s in fc.strategies:
            if s.note:
                lines.append(f"{fc.frame.name} / {s.key.value}: {s.note}")
        lines.append("")
    if len(comparison.frames) > 1:
        parts = []
        for key in StrategyKey:
            total = comparison.total(key)
            parts.append(f"{key.value} {'-' if total is None else money_text(cents(total))}")
        lines.append("All frames: " + ", ".join(parts))
    lines.append(
        "kept = members in place, kept by every strategy; added = members the strategy adds; "
        "saving = rule-of-thumb baseline cost minus the strategy's cost (dearer: the strategy costs more); "
        "survives = member losses survived"
    )
    if any(s.check is not None for fc in comparison.frames for s in fc.strategies):
        lines.append(
            "carries loads: yes = every case within capacity plastically (an admissible force set exists) and "
            "elastically (tension-only analysis); plastic only = the elastic analysis finds a member or base over"
        )
    if any(s.forces is not None for fc in comparison.frames for s in fc.strategies):
        lines.append(
            "max util / max drift: the layout under the frame's load cases (! = a member over capacity or a base "
            "node lifting beyond its resistance; bracegrid forces)"
        )
    lines.append(f"Caution: {CAUTION}")
    return "\n".join(lines) + "\n"
