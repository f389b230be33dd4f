"""Member forces for people at a terminal and for spreadsheets: tables, summary lines, the CSV."""

from __future__ import annotations

import csv
import io
from collections.abc import Sequence

from rich.table import Table

from bracegrid.analysis import CAUTION
from bracegrid.mechanics import MODEL_LIMITS, CaseForces, FrameForces, MemberForce
from bracegrid.outputs.text import render_table

#: Envelope rows listed per frame in the terminal table.
ENVELOPE_ROWS = 8


def drift_text(ratio: float | None) -> str:
    """A drift ratio as ``1/N`` (N rounded), the way sway limits are written.

    Example:
        >>> drift_text(0.0025), drift_text(0.0), drift_text(None)
        ('1/400', '0', '-')
    """
    if ratio is None:
        return "-"
    if ratio == 0:
        return "0"
    return f"1/{round(1.0 / abs(ratio)):,}"


def util_text(value: float | None) -> str:
    """A utilisation as a percentage, ``-`` where no capacity is given.

    Example:
        >>> util_text(0.8766), util_text(None)
        ('87.7%', '-')
    """
    return "-" if value is None else f"{100 * value:.1f}%"


def _member_text(m: MemberForce | None) -> str:
    if m is None:
        return "-"
    mark = " OVER" if m.over else ""
    return f"{m.label}: {m.force_kn:+.2f} kN{mark}"


def _uplift_text(c: CaseForces) -> str:
    lifts = [r for r in c.reactions if r.uplift_kn > 0]
    if not lifts:
        return "none"
    worst = max(lifts, key=lambda r: r.uplift_kn)
    flag = " OVER" if worst.uplift_over else ""
    return f"{worst.uplift_kn:.2f} kN at q{worst.q}{flag}"


def render_forces(project_name: str, frames: Sequence[FrameForces]) -> str:
    """The governing members per case and the envelope of each frame, with the model's limits."""
    lines = []
    for ff in frames:
        table = Table(title=f"Member forces: {project_name} / {ff.frame}", title_justify="left")
        for head in (
            "case",
            "result",
            "governing member",
            "utilisation",
            "max drift",
            "top sway mm",
            "base uplift",
            "slack ties",
        ):
            table.add_column(head, justify="left" if head in {"case", "result", "governing member"} else "right")
        for c in ff.cases:
            if c.is_mechanism:
                table.add_row(c.title, "MECHANISM", "-", "-", "-", "-", "-", "-")
                continue
            state = "ok" if c.ok else "OVER CAPACITY"
            table.add_row(
                c.title,
                state,
                _member_text(c.governing),
                util_text(c.max_utilisation),
                drift_text(c.max_drift),
                f"{c.sway_mm[-1]:+.2f}",
                _uplift_text(c),
                str(len(c.slack_ties)),
            )
        lines.append(render_table(table, width=150))
        if ff.envelope:
            env = Table(title=f"Envelope over the cases: {ff.frame} (most utilised first)", title_justify="left")
            for head in ("member", "max tension kN", "max compression kN", "utilisation", "governing case"):
                env.add_column(head, justify="left" if head in {"member", "governing case"} else "right")
            ranked = sorted(
                ff.envelope, key=lambda e: (e.member.utilisation or 0.0, abs(e.member.force_kn)), reverse=True
            )
            for e in ranked[:ENVELOPE_ROWS]:
                mark = " OVER" if e.member.over else ""
                env.add_row(
                    e.member.label,
                    f"{e.max_tension_kn:.2f}",
                    f"{e.max_compression_kn:.2f}",
                    util_text(e.member.utilisation) + mark,
                    e.case,
                )
            lines.append(render_table(env, width=140))
        for c in ff.cases:
            if c.mechanism:
                for words in c.mechanism.words:
                    lines.append(f"{ff.frame} / {c.title}: {words}")
            for m in c.over_capacity:
                lines.append(
                    f"{ff.frame} / {c.title}: {m.label} carries {m.force_kn:+.2f} kN, over its "
                    f"{m.capacity_kn:g} kN capacity ({util_text(m.utilisation)})"
                )
            for r in c.uplift_over:
                lines.append(
                    f"{ff.frame} / {c.title}: the base at line q{r.q} lifts with {r.uplift_kn:.2f} kN, "
                    f"more than its {r.uplift_limit_kn:g} kN uplift resistance"
                )
        lines.append("")
    lines.append(f"Model: {MODEL_LIMITS}")
    lines.append("Forces in kN, tension +; utilisation = |force| / the capacity given for its sense (- = none given).")
    lines.append(f"Caution: {CAUTION}")
    return "\n".join(lines) + "\n"


def force_summary_lines(frames: Sequence[FrameForces]) -> list[str]:
    """One line per frame: largest utilisation (and where), largest drift, mechanisms (for ``check``).

    Example:
        >>> force_summary_lines([])
        []
    """
    out = []
    for ff in frames:
        if len(ff.mechanisms) == len(ff.cases):
            out.append(f"{ff.frame}: no member forces: MECHANISM under {', '.join(c.title for c in ff.mechanisms)}")
            continue
        g = ff.governing
        where = f" ({g.member.label}, {g.case})" if g is not None and g.member.utilisation is not None else ""
        util = util_text(ff.max_utilisation)
        line = f"{ff.frame}: under its load cases max utilisation {util}{where}, max drift {drift_text(ff.max_drift)}"
        if ff.mechanisms:
            line += f"; MECHANISM under {', '.join(c.title for c in ff.mechanisms)}"
        elif not ff.ok:
            line += "; OVER CAPACITY"
        out.append(line + " (bracegrid forces for the details)")
    return out


def render_force_csv(frames: Sequence[FrameForces]) -> str:
    """Every bar's force in every case: one CSV row per frame, case, sense and bar."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(
        [
            "frame",
            "case",
            "sense",
            "result",
            "kind",
            "line",
            "row",
            "col",
            "diagonal",
            "force_kn",
            "capacity_kn",
            "utilisation",
            "slack",
        ]
    )
    for ff in frames:
        for c in ff.cases:
            if c.is_mechanism:
                writer.writerow([ff.frame, c.case, c.sense.value, "mechanism", *[""] * 9])
                continue
            for m in c.members:
                writer.writerow(
                    [
                        ff.frame,
                        c.case,
                        c.sense.value,
                        "solved",
                        m.kind.value,
                        "" if m.line is None else m.line,
                        "" if m.row is None else m.row,
                        "" if m.col is None else m.col,
                        m.diagonal.value if m.diagonal else "",
                        f"{m.force_kn:.6f}",
                        "" if m.capacity_kn is None else f"{m.capacity_kn:g}",
                        "" if m.utilisation is None else f"{m.utilisation:.6f}",
                        "yes" if m.slack else "",
                    ]
                )
    return buffer.getvalue()
