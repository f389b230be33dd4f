"""The robustness plot: probability of staying stable against members lost, as PNG or SVG (matplotlib, Agg).

One panel per frame of a comparison (a curve per strategy), or one panel for the frames of a
``robustness`` run (a curve per frame). Filled markers are exact values, open markers Monte Carlo
estimates with their 95% Clopper-Pearson band shaded. matplotlib is imported when a plot is
drawn, not at start-up.
"""

from __future__ import annotations

import io
import re
from collections.abc import Sequence
from dataclasses import dataclass
from enum import Enum

from bracegrid.analysis import ROBUSTNESS_LIMITS, Robustness
from bracegrid.compare import StrategyRobustness
from bracegrid.outputs.safetext import LABEL_CHARS, missing_glyphs_quiet, short_label

#: Line styles of successive curves on one panel.
_STYLES = ("-", "--", "-.", ":", (0, (5, 1, 1, 1)))


class PlotFormat(Enum):
    """Plot file formats."""

    PNG = "png"
    SVG = "svg"


@dataclass(frozen=True, slots=True)
class CurveSeries:
    """One curve: a label and the statistics behind it.

    Attributes:
        label: Legend text (a frame or strategy name).
        result: The statistics.
    """

    label: str
    result: Robustness


@dataclass(frozen=True, slots=True)
class PlotPanel:
    """One set of axes.

    Attributes:
        title: Shown above the axes.
        series: The curves drawn on it.
    """

    title: str
    series: tuple[CurveSeries, ...]


def expected_words(result: Robustness) -> str:
    """The expected losses to a mechanism in a few words, for legends and tables.

    Example:
        >>> from bracegrid.analysis import Estimate
        >>> from bracegrid.model import LossLikelihood
        >>> r = Robustness("f", 4, 4, True, (), Estimate(2.5, 2.4, 2.6, False), LossLikelihood(), 100, 0)
        >>> expected_words(r)
        'E[losses to mechanism] 2.50 (2.40-2.60)'
    """
    e = result.expected_losses
    if not result.stable:
        return "not stable before any loss"
    if e is None:
        return "never gets a mechanism (members never lost hold it)"
    if e.exact:
        return f"E[losses to mechanism] {e.value:.2f} (exact)"
    return f"E[losses to mechanism] {e.value:.2f} ({e.low:.2f}-{e.high:.2f})"


def robustness_panels(results: Sequence[Robustness], *, title: str = "") -> tuple[PlotPanel, ...]:
    """One panel with a curve per frame (the ``robustness`` command)."""
    return (PlotPanel(title or "Members lost at random", tuple(CurveSeries(r.frame, r) for r in results)),)


def strategy_panels(curves: Sequence[StrategyRobustness]) -> tuple[PlotPanel, ...]:
    """One panel per frame with a curve per strategy (the ``compare`` command)."""
    frames: dict[str, list[CurveSeries]] = {}
    for c in curves:
        frames.setdefault(c.frame, []).append(CurveSeries(c.key.title, c.result))
    return tuple(PlotPanel(f"{name}: members lost at random", tuple(s)) for name, s in frames.items())


def render_robustness_plot(panels: Sequence[PlotPanel], fmt: PlotFormat, *, dpi: int = 120) -> bytes:
    """Draw the panels, stacked, and return the file contents.

    Args:
        panels: What to draw (at least one).
        fmt: PNG or SVG.
        dpi: Resolution of PNG output.

    Returns:
        The image bytes (SVG ids and metadata fixed, so equal input gives equal bytes).
    """
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure
    from matplotlib.ticker import MaxNLocator

    count = max(1, len(panels))
    rows = max((len(p.series) for p in panels), default=1)
    height = 3.6 + 0.2 * rows  # axes, then one legend line per curve beneath them
    fig = Figure(figsize=(8.0, 0.5 + height * count), dpi=dpi, layout="constrained")
    axes = fig.subplots(count, 1, squeeze=False)[:, 0]
    for ax, panel in zip(axes, panels, strict=False):
        top = 1
        for n, s in enumerate(panel.series):
            r = s.result
            color = f"C{n % 10}"
            style = _STYLES[n % len(_STYLES)]
            start = 1.0 if r.stable else 0.0
            xs = [0, *(p.lost for p in r.curve)]
            ys = [start, *(p.p_stable for p in r.curve)]
            lows = [start, *(p.low for p in r.curve)]
            highs = [start, *(p.high for p in r.curve)]
            top = max(top, xs[-1])
            ax.fill_between(xs, lows, highs, color=color, alpha=0.18, linewidth=0)
            # Equal curves (strategies that found the same layout) stay visible: wider lines first, dashes.
            width = 3.2 - 0.45 * min(n, 4)
            ax.plot(
                xs,
                ys,
                color=color,
                linewidth=width,
                linestyle=style,
                label=f"{short_label(s.label)}: {expected_words(r)}",
            )
            exact = [(x, y) for x, y, p in zip(xs[1:], ys[1:], r.curve, strict=True) if p.exact]
            sampled = [(x, y) for x, y, p in zip(xs[1:], ys[1:], r.curve, strict=True) if not p.exact]
            if exact:
                ax.plot(*zip(*exact, strict=True), "o", color=color, markersize=5)
            if sampled:
                ax.plot(*zip(*sampled, strict=True), "o", markerfacecolor="white", color=color, markersize=5)
        ax.set_xlim(0, top)
        ax.set_ylim(-0.02, 1.02)
        ax.xaxis.set_major_locator(MaxNLocator(integer=True))
        ax.set_xlabel("members lost at random (k)")
        ax.set_ylabel("P(no mechanism after k losses)")
        ax.set_title(short_label(panel.title, 2 * LABEL_CHARS), loc="left", fontsize=11)
        ax.grid(alpha=0.3)
        ax.legend(loc="upper left", bbox_to_anchor=(0.0, -0.16), fontsize=8, frameon=False)
    note = (
        "Filled markers: exact (enumerated). Open markers: Monte Carlo, shaded band its 95% Clopper-Pearson "
        f"interval.\n{ROBUSTNESS_LIMITS}"
    )
    fig.supxlabel(note, fontsize=6.5, x=0.01, ha="left", color="#444444", wrap=True)
    buffer = io.BytesIO()
    with (
        missing_glyphs_quiet(),
        matplotlib.rc_context({"svg.hashsalt": "bracegrid-robustness", "svg.fonttype": "none"}),
    ):
        metadata = {"Date": None} if fmt is PlotFormat.SVG else {"Software": None}
        fig.savefig(buffer, format=fmt.value, dpi=dpi, facecolor="white", metadata=metadata)
    return buffer.getvalue()


def inline_plot_svg(panels: Sequence[PlotPanel], *, prefix: str) -> str:
    """The plot as an SVG element to place inside HTML: no XML prolog or DOCTYPE, every id prefixed.

    The prefix keeps the plot's ids (glyphs, clip paths) from colliding with other inline SVGs.
    """
    text = render_robustness_plot(panels, PlotFormat.SVG).decode("utf-8")
    text = re.sub(r"<\?xml[^>]*\?>", "", text)
    text = re.sub(r"<!DOCTYPE[^>]*>", "", text, flags=re.DOTALL).strip()
    ids = set(re.findall(r'\bid="([^"]+)"', text))
    for ident in sorted(ids, key=len, reverse=True):
        text = text.replace(f'id="{ident}"', f'id="{prefix}{ident}"')
        text = text.replace(f"#{ident})", f"#{prefix}{ident})").replace(f'"#{ident}"', f'"#{prefix}{ident}"')
    return text
