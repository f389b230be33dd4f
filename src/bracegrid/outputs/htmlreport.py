"""The HTML report of ``bracegrid compare``: one self-contained file.

One file: inline CSS, inline SVG drawings, no scripts and no network fetches,
so it opens straight from disk and can be mailed to a client.
"""

from __future__ import annotations

import html
import re
from collections.abc import Sequence
from datetime import date

from bracegrid._version import __version__
from bracegrid.analysis import CAUTION
from bracegrid.compare import Comparison, FrameComparison, StrategyKey, StrategyResult, StrategyRobustness
from bracegrid.mechanics import FrameForces
from bracegrid.model import Frame, Project
from bracegrid.outputs.bill import FrameBom, build_bom
from bracegrid.outputs.drawing import build_drawing
from bracegrid.outputs.forcesheet import build_force_sheet
from bracegrid.outputs.forcetext import drift_text, util_text
from bracegrid.outputs.preview import PreviewFormat, render_preview
from bracegrid.outputs.robustplot import PlotFormat, expected_words, render_robustness_plot, strategy_panels
from bracegrid.units import format_length_m

_STYLE = """
body{font-family:system-ui,-apple-system,"Segoe UI",Helvetica,Arial,sans-serif;margin:2rem auto;max-width:1200px;
color:#1d2327;line-height:1.4;padding:0 1rem}
h1{margin-bottom:.2rem}h2{border-bottom:2px solid #1d2327;padding-bottom:.2rem;margin-top:2.5rem}
h3{margin-top:2rem}.meta{color:#555}
.caution{border:2px solid #b54708;background:#fff7ed;padding:.8rem 1rem;margin:1rem 0;border-radius:4px}
table{border-collapse:collapse;margin:.6rem 0;font-size:.92rem}
th,td{border:1px solid #c8ccd0;padding:.3rem .55rem;text-align:right;vertical-align:top}
th{background:#eef1f4}td.l,th.l{text-align:left}
tr.best td{background:#ecfdf3;font-weight:600}.bad{color:#b42318;font-weight:600}
figure{margin:1rem 0;border:1px solid #c8ccd0;padding:.4rem;background:#fff}
figure svg{width:100%;height:auto;display:block}figcaption{font-size:.85rem;color:#555}
.note{font-size:.85rem;color:#444;text-align:left}
@media print{figure{break-inside:avoid}h2{break-before:page}}
"""


def _e(text: object) -> str:
    return html.escape(str(text), quote=True)


def _money(value: float | None) -> str:
    return "-" if value is None else f"{value:,.2f}"


def _pct(value: float | None) -> str:
    return "-" if value is None else f"{100 * value:.2f}%"


def inline_svg(svg: bytes) -> str:
    """An SVG document as an inline element: no XML prolog or DOCTYPE, unique ids kept."""
    text = svg.decode("utf-8")
    text = re.sub(r"<\?xml[^>]*\?>", "", text)
    text = re.sub(r"<!DOCTYPE[^>]*>", "", text, flags=re.DOTALL)
    return text.strip()


def _scope_ids(svg: str, prefix: str) -> str:
    """Prefix every id (and its references) so several inline SVGs do not collide."""
    ids = set(re.findall(r'\bid="([^"]+)"', svg))
    for ident in sorted(ids, key=len, reverse=True):
        svg = svg.replace(f'id="{ident}"', f'id="{prefix}{ident}"')
        svg = svg.replace(f"#{ident})", f"#{prefix}{ident})").replace(f'"#{ident}"', f'"#{prefix}{ident}"')
    return svg


def _comparison_table(fc: FrameComparison) -> str:
    feasible = [s for s in fc.strategies if s.cost is not None and s.stable]
    cheapest = min((s.cost for s in feasible if s.cost is not None), default=None)
    head = (
        "<tr><th class=l>strategy</th><th class=l>status</th><th>braces</th><th>ties</th>"
        "<th>diagonal length</th><th>cost</th><th>saving vs rule of thumb</th><th>stable</th>"
        "<th>critical members</th><th>survives loss of</th><th>gap</th><th>seconds</th></tr>"
    )
    rows = []
    for s in fc.strategies:
        best = " class=best" if cheapest is not None and s.cost == cheapest else ""
        stable = "yes" if s.stable else "<span class=bad>NO</span>"
        survives = "-" if s.redundancy < 0 else f"{s.redundancy} member{'s' if s.redundancy != 1 else ''}"
        rows.append(
            f"<tr{best}><td class=l>{_e(s.key.title)}</td><td class=l>{_e(s.status.value)}</td>"
            f"<td>{s.braces}</td><td>{s.ties}</td><td>{format_length_m(s.length_mm)}</td>"
            f"<td>{_money(s.cost)}</td><td>{_money(fc.saving(s.key))}</td><td>{stable}</td>"
            f"<td>{s.critical}</td><td>{survives}</td><td>{_pct(s.gap)}</td><td>{s.seconds:.2f}</td></tr>"
        )
        if s.note:
            rows.append(f"<tr><td></td><td colspan=11 class=note>{_e(s.note)}</td></tr>")
    return f"<table>{head}{''.join(rows)}</table>"


def _totals_table(comparison: Comparison) -> str:
    base = comparison.total(StrategyKey.BASELINE)
    rows = []
    for key in StrategyKey:
        total = comparison.total(key)
        saving = None if base is None or total is None else round(base - total, 2)
        rows.append(f"<tr><td class=l>{_e(key.title)}</td><td>{_money(total)}</td><td>{_money(saving)}</td></tr>")
    head = "<tr><th class=l>strategy</th><th>cost, all frames</th><th>saving vs rule of thumb</th></tr>"
    return f"<h2>All frames</h2><table>{head}{''.join(rows)}</table>"


def _bom_table(fb: FrameBom) -> str:
    head = (
        "<tr><th class=l>kind</th><th class=l>status</th><th>count</th><th>cut length each</th>"
        "<th>length</th><th>cost</th></tr>"
    )
    rows = [
        f"<tr><td class=l>{_e(g.kind.value)}</td><td class=l>{'existing' if g.existing else 'proposed'}</td>"
        f"<td>{g.count}</td><td>{g.cut_length_mm} mm</td><td>{format_length_m(g.count * g.cut_length_mm)}</td>"
        f"<td>{_money(g.cost)}</td></tr>"
        for g in fb.groups
    ]
    t = fb.totals
    rows.append(
        f"<tr><th class=l colspan=2>total</th><th>{t.braces + t.ties}</th><th></th>"
        f"<th>{format_length_m(t.brace_length_mm + t.tie_length_mm)}</th><th>{_money(t.cost)}</th></tr>"
    )
    return f"<table>{head}{''.join(rows)}</table>"


def _strategy_section(project: Project, fc: FrameComparison, s: StrategyResult, index: int, when: date) -> str:
    title = f"<h3>{_e(fc.frame.name)}: {_e(s.key.title)}</h3>"
    if s.frame is None:
        return f"{title}<p class=bad>No layout: {_e(s.note)}</p>"
    sheet = build_drawing(project, frames=[s.frame], when=when)
    svg = _scope_ids(inline_svg(render_preview(sheet, PreviewFormat.SVG)), f"s{index}-")
    bom = build_bom(project, frames=[s.frame]).frames[0]
    caption = (
        f"{s.braces} braces, {s.ties} ties, cost {_money(s.cost)}; "
        f"{'stable' if s.stable else 'NOT STABLE'} (re-verified); status {s.status.value}"
    )
    figure = f"<figure>{svg}<figcaption>{_e(caption)}</figcaption></figure>"
    forces = "" if s.forces is None else _force_figure(project, s.frame, s.forces, index, when)
    return f"{title}{figure}{forces}<h4>Bill of materials</h4>{_bom_table(bom)}"


def _force_figure(project: Project, frame: Frame, forces: FrameForces, index: int, when: date) -> str:
    """The layout under its governing load case (or its first mechanism): one force-sheet panel."""
    governing = forces.governing
    shown = forces.mechanisms[:1] or tuple(c for c in forces.cases if governing and c.title == governing.case)[:1]
    if not shown:
        return ""
    sheet = build_force_sheet(project, frame, shown, when=when)
    svg = _scope_ids(inline_svg(render_preview(sheet, PreviewFormat.SVG)), f"f{index}-")
    if forces.mechanisms:
        words = f"MECHANISM under {', '.join(c.title for c in forces.mechanisms)}: no forces"
    else:
        state = "within capacity" if forces.ok else "OVER CAPACITY"
        words = (
            f"under its load cases: max utilisation {util_text(forces.max_utilisation)}, max drift "
            f"{drift_text(forces.max_drift)}; {state}; governing case {shown[0].title} shown"
        )
    return f"<h4>Member forces</h4><figure>{svg}<figcaption>{_e(words)}</figcaption></figure>"


def _robustness_section(curves: Sequence[StrategyRobustness]) -> str:
    """The strategies' robustness curves: one inline SVG plot and a line per strategy."""
    svg = _scope_ids(inline_svg(render_robustness_plot(strategy_panels(curves), PlotFormat.SVG)), "robust-")
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
        f"</p><figure>{svg}<figcaption>{_e(caption)}</figcaption></figure><ul>{items}</ul>"
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
        HTML text with every drawing inline.
    """
    day = when or date.today()
    project = comparison.project
    c = project.costs
    parts = [
        "<!DOCTYPE html><html lang=en><head><meta charset=utf-8>",
        '<meta name=viewport content="width=device-width, initial-scale=1">',
        f"<title>Bracing alternatives: {_e(project.name)}</title><style>{_STYLE}</style></head><body>",
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
            f"<td class=l>{_e(f.supports.value)}</td><td>{len(f.members)}</td></tr>"
        )
    parts.append("</table>")
    parts.append(
        "<p>Cost of a member = (price per piece + labour per piece + price per metre x diagonal length)"
        f" x (1 + contingency). Brace: {c.brace.per_piece:g} + {c.brace.labour_per_piece:g} + "
        f"{c.brace.per_metre:g}/m; tie: {c.tie.per_piece:g} + {c.tie.labour_per_piece:g} + {c.tie.per_metre:g}/m; "
        f"contingency {c.contingency_pct:g}%. Members in place count in every strategy.</p>"
    )
    if len(comparison.frames) > 1:
        parts.append(_totals_table(comparison))
    for fc in comparison.frames:
        parts.append(f"<h2>{_e(fc.frame.name)}: comparison</h2>{_comparison_table(fc)}")
    if robustness:
        parts.append(_robustness_section(robustness))
    index = 0
    for fc in comparison.frames:
        parts.append(f"<h2>{_e(fc.frame.name)}: drawings</h2>")
        for s in fc.strategies:
            parts.append(_strategy_section(project, fc, s, index, day))
            index += 1
    parts.append(f"<div class=caution><strong>Caution.</strong> {_e(CAUTION)}</div></body></html>")
    return "\n".join(parts)
