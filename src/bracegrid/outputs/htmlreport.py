"""The HTML report of ``bracegrid compare``: one small, self-contained file.

Inline CSS, inline SVG figures drawn for the page (:mod:`bracegrid.outputs.figure`:
the frame at a readable size, its legend beside it, real text), no scripts and
no network fetches, so it opens straight from disk and can be mailed to a
client. Each strategy's bill of materials appears once, as an HTML table whose
total rows are the sums of its item rows (the bill's one rounding rule).
"""

from __future__ import annotations

from collections.abc import Sequence
from datetime import date

from bracegrid._version import __version__
from bracegrid.analysis import CAUTION
from bracegrid.compare import Comparison, FrameComparison, StrategyKey, StrategyResult, StrategyRobustness
from bracegrid.mechanics import FrameForces, check_frame_any
from bracegrid.model import Frame, Project
from bracegrid.outputs.bill import FrameBom, build_bom
from bracegrid.outputs.figure import frame_svg, legend_html, symbol_defs
from bracegrid.outputs.forcefigure import force_defs, force_legend_html, force_svg
from bracegrid.outputs.forcetext import drift_text, util_text
from bracegrid.outputs.robustplot import expected_words, inline_plot_svg, strategy_panels
from bracegrid.outputs.safetext import markup_text as _e
from bracegrid.outputs.terms import (
    COST,
    COUNT,
    CUT_EACH,
    LENGTH,
    MEMBER,
    STATUS,
    cents,
    counts_words,
    money_text,
    saving_text,
    supports_words,
)
from bracegrid.units import format_length_m, metres_text

_STYLE = """
body{font-family:system-ui,-apple-system,"Segoe UI",Helvetica,Arial,sans-serif;margin:2rem auto;max-width:1400px;
color:#1d2327;line-height:1.4;padding:0 1rem}
h1{margin-bottom:.2rem}h2{border-bottom:2px solid #1d2327;padding-bottom:.2rem;margin-top:2.5rem}
h3{margin-top:2rem}.meta{color:#555}
.caution{border:2px solid #b54708;background:#fff7ed;padding:.8rem 1rem;margin:1rem 0;border-radius:4px}
table{border-collapse:collapse;margin:.6rem 0;font-size:.92rem}
th,td{border:1px solid #c8ccd0;padding:.3rem .55rem;text-align:right;vertical-align:top}
th{background:#eef1f4}td.l,th.l{text-align:left}
tr.best td{background:#ecfdf3;font-weight:600}.bad{color:#b42318;font-weight:600}
figure{margin:1rem 0;border:1px solid #c8ccd0;padding:.6rem;background:#fff;display:grid;gap:1.2rem;
grid-template-columns:minmax(0,max-content) 19rem;align-items:start}
figure .draw{overflow:auto;max-height:85vh}figure svg{display:block}
figcaption{font-size:.85rem;color:#555;grid-column:1/-1}
ul.legend{list-style:none;margin:0;padding:0;font-size:.82rem}
ul.legend li{display:flex;align-items:center;gap:.5rem;margin:.1rem 0}ul.legend svg{flex:none}
.note{font-size:.85rem;color:#444;text-align:left}
@media print{figure{break-inside:avoid}h2{break-before:page}figure .draw{max-height:none}}
"""


def _money(value: float | None) -> str:
    return "-" if value is None else money_text(cents(value))


def _pct(value: float | None) -> str:
    return "-" if value is None else f"{100 * value:.2f}%"


def _saving(value: float | None) -> str:
    text = _e(saving_text(None if value is None else cents(value)))
    return f"<span class=bad>{text}</span>" if value is not None and value < 0 else text


def _comparison_table(fc: FrameComparison) -> str:
    feasible = [s for s in fc.strategies if s.cost is not None and s.stable]
    cheapest = min((s.cost for s in feasible if s.cost is not None), default=None)
    head = (
        f"<tr><th class=l>strategy</th><th class=l>{STATUS}</th><th>kept braces</th><th>kept ties</th>"
        f"<th>added braces</th><th>added ties</th><th>{LENGTH}</th><th>{COST}</th>"
        "<th>saving vs rule of thumb</th><th>stable</th><th>critical members</th><th>survives loss of</th>"
        "<th>gap</th><th>seconds</th></tr>"
    )
    rows = []
    for s in fc.strategies:
        best = " class=best" if cheapest is not None and s.cost == cheapest else ""
        stable = "yes" if s.stable else "<span class=bad>NO</span>"
        survives = "-" if s.redundancy < 0 else f"{s.redundancy} member{'s' if s.redundancy != 1 else ''}"
        rows.append(
            f"<tr{best}><td class=l>{_e(s.key.title)}</td><td class=l>{_e(s.status.value)}</td>"
            f"<td>{s.kept_braces}</td><td>{s.kept_ties}</td><td>{s.added_braces}</td><td>{s.added_ties}</td>"
            f"<td>{metres_text(s.length_mm)}</td><td>{_money(s.cost)}</td><td>{_saving(fc.saving(s.key))}</td>"
            f"<td>{stable}</td><td>{s.critical}</td><td>{survives}</td><td>{_pct(s.gap)}</td>"
            f"<td>{s.seconds:.2f}</td></tr>"
        )
        if s.note:
            rows.append(f"<tr><td></td><td colspan=13 class=note>{_e(s.note)}</td></tr>")
    return f"<table>{head}{''.join(rows)}</table>"


def _totals_table(comparison: Comparison) -> str:
    base = comparison.total(StrategyKey.BASELINE)
    rows = []
    for key in StrategyKey:
        total = comparison.total(key)
        saving = None if base is None or total is None else (cents(base) - cents(total)) / 100
        rows.append(f"<tr><td class=l>{_e(key.title)}</td><td>{_money(total)}</td><td>{_saving(saving)}</td></tr>")
    head = "<tr><th class=l>strategy</th><th>cost, all frames</th><th>saving vs rule of thumb</th></tr>"
    return f"<h2>All frames</h2><table>{head}{''.join(rows)}</table>"


def bom_table(fb: FrameBom) -> str:
    """One frame's bill of materials as an HTML table: item rows, then the total (their sum).

    Example:
        >>> from bracegrid.model import Frame, Project
        >>> f = Frame("f", (3000,), (2000,))
        >>> "<th>no.</th>" in bom_table(build_bom(Project("p", (f,))).frames[0])
        True
    """
    head = (
        f"<tr><th class=l>{MEMBER}</th><th class=l>{STATUS}</th><th>{COUNT}</th><th>{CUT_EACH}</th>"
        f"<th>{LENGTH}</th><th>{COST}</th></tr>"
    )
    rows = [
        f"<tr><td class=l>{_e(g.kind.value)}</td><td class=l>{'existing' if g.existing else 'proposed'}</td>"
        f"<td>{g.count}</td><td>{g.cut_length_mm}</td><td>{metres_text(g.length_mm)}</td>"
        f"<td>{money_text(g.cost_cents)}</td></tr>"
        for g in fb.groups
    ]
    t = fb.totals
    rows.append(
        f"<tr><th class=l colspan=2>total: {_e(counts_words(t.braces, t.ties))}</th><th>{t.members}</th><th></th>"
        f"<th>{metres_text(t.length_mm)}</th><th>{money_text(t.cost_cents)}</th></tr>"
    )
    return f"<table>{head}{''.join(rows)}</table>"


def _strategy_section(project: Project, fc: FrameComparison, s: StrategyResult) -> str:
    title = f"<h3>{_e(fc.frame.name)}: {_e(s.key.title)}</h3>"
    if s.frame is None:
        return f"{title}<p class=bad>No layout: {_e(s.note)}</p>"
    verdict = check_frame_any(s.frame)  # the figure shows what the stability check finds, not what was claimed
    bom = build_bom(project, frames=[s.frame]).frames[0]
    caption = (
        f"{counts_words(s.braces, s.ties)} ({s.added_braces + s.added_ties} added), cost {_money(s.cost)}; "
        f"{'stable' if verdict.stable else 'NOT STABLE'} (re-verified); status {s.status.value}"
    )
    figure = (
        f"<figure><div class=draw>{frame_svg(s.frame, verdict, title=f'{fc.frame.name}: {s.key.title}')}</div>"
        f"{legend_html()}<figcaption>{_e(caption)}</figcaption></figure>"
    )
    forces = "" if s.forces is None else _force_figure(s.frame, s.forces, f"{fc.frame.name}: {s.key.title}")
    return f"{title}{figure}{forces}<h4>Bill of materials</h4>{bom_table(bom)}"


def _force_figure(frame: Frame, forces: FrameForces, title: str) -> str:
    """The layout under its governing load case (or its first mechanism), drawn for the page."""
    governing = forces.governing
    shown = forces.mechanisms[:1] or tuple(c for c in forces.cases if governing and c.title == governing.case)[:1]
    if not shown:
        return ""
    case = shown[0]
    if forces.mechanisms:
        words = f"MECHANISM under {', '.join(c.title for c in forces.mechanisms)}: no forces"
    else:
        state = "within capacity" if forces.ok else "OVER CAPACITY"
        words = (
            f"under its load cases: max utilisation {util_text(forces.max_utilisation)}, max drift "
            f"{drift_text(forces.max_drift)}; {state}; governing case {case.title} shown"
        )
    rated = any(m.utilisation is not None for m in case.members)
    svg = force_svg(frame, case, title=f"{title}: {case.title}")
    return (
        f"<h4>Member forces</h4><figure><div class=draw>{svg}</div>{force_legend_html(rated=rated)}"
        f"<figcaption>{_e(words)}</figcaption></figure>"
    )


def _robustness_section(curves: Sequence[StrategyRobustness]) -> str:
    """The strategies' robustness curves: one inline SVG plot, the expected losses beside it."""
    svg = inline_plot_svg(strategy_panels(curves), prefix="robust-")
    items = "".join(f"<li>{_e(c.frame)} / {_e(c.key.title)}: {_e(expected_words(c.result))}</li>" for c in curves)
    sampled = sorted({c.result.samples for c in curves if c.result.samples})
    seeds = sorted({c.result.seed for c in curves})
    caption = (
        f"Monte Carlo curves: {', '.join(map(str, sampled))} samples each, seed {', '.join(map(str, seeds))}."
        if sampled
        else "Every value enumerated exactly."
    ) + " Losses weighted as in the project file's [robustness.loss_likelihood] (equal when absent)."
    return (
        "<h2>Robustness: members lost at random</h2>"
        "<p>For each stable strategy layout, the probability that it stays free of mechanisms after k members "
        "go missing at random (docs/robustness.md), and the expected number of losses until the first mechanism."
        f"</p><figure><div class=draw>{svg}</div><ul class=legend>{items}</ul>"
        f"<figcaption>{_e(caption)}</figcaption></figure>"
    )


def render_html(
    comparison: Comparison,
    *,
    when: date | None = None,
    time_limit: float | None = None,
    robustness: Sequence[StrategyRobustness] = (),
) -> str:
    """The whole report as one HTML document.

    Args:
        comparison: The strategies solved for each frame.
        when: Report date (default: today).
        time_limit: Solver time limit per strategy, for the record.
        robustness: The strategies' robustness curves (a section with their plot when given).

    Returns:
        HTML text with every figure inline.
    """
    day = when or date.today()
    project = comparison.project
    c = project.costs
    parts = [
        "<!DOCTYPE html><html lang=en><head><meta charset=utf-8>",
        '<meta name=viewport content="width=device-width, initial-scale=1">',
        f"<title>Bracing alternatives: {_e(project.name)}</title><style>{_STYLE}</style></head><body>",
        symbol_defs(),
        force_defs() if any(r.forces is not None for fc in comparison.frames for r in fc.strategies) else "",
        f"<h1>Bracing alternatives: {_e(project.name)}</h1>",
        f"<p class=meta>{day.isoformat()} · bracegrid {_e(__version__)}"
        + (f" · solver limit {time_limit:g} s per strategy" if time_limit else "")
        + "</p>",
        f"<div class=caution><strong>Caution.</strong> {_e(CAUTION)}</div>",
        "<h2>Project summary</h2><table><tr><th class=l>frame</th><th>bays</th><th>size</th>"
        "<th class=l>supports</th><th>members in place</th></tr>",
    ]
    for fc in comparison.frames:
        f = fc.frame
        parts.append(
            f"<tr><td class=l>{_e(f.name)}</td><td>{f.cols} x {f.rows}</td>"
            f"<td>{format_length_m(f.width_mm)} x {format_length_m(f.height_mm)}</td>"
            f"<td class=l>{_e(supports_words(f.supports))}</td><td>{len(f.members)}</td></tr>"
        )
    parts.append("</table>")
    parts.append(
        "<p>Cost of a member = (price per piece + labour per piece + price per metre x cut length)"
        f" x (1 + contingency), rounded to the cent. Brace: {c.brace.per_piece:g} + {c.brace.labour_per_piece:g} + "
        f"{c.brace.per_metre:g}/m; tie: {c.tie.per_piece:g} + {c.tie.labour_per_piece:g} + {c.tie.per_metre:g}/m; "
        f"contingency {c.contingency_pct:g}%. Members in place are kept and count in every strategy. "
        "A negative saving (marked) means the strategy costs more than the rule of thumb.</p>"
    )
    if len(comparison.frames) > 1:
        parts.append(_totals_table(comparison))
    for fc in comparison.frames:
        parts.append(f"<h2>{_e(fc.frame.name)}: comparison</h2>{_comparison_table(fc)}")
    if robustness:
        parts.append(_robustness_section(robustness))
    for fc in comparison.frames:
        parts.append(f"<h2>{_e(fc.frame.name)}: layouts</h2>")
        for s in fc.strategies:
            parts.append(_strategy_section(project, fc, s))
    parts.append(f"<div class=caution><strong>Caution.</strong> {_e(CAUTION)}</div></body></html>")
    return "\n".join(parts)
