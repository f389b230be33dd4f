"""Output bundles: every file of a ``draw`` or ``compare`` run, rendered in memory before anything is written."""

from __future__ import annotations

import re
from collections.abc import Sequence
from datetime import date
from enum import Enum

from bracegrid.compare import Comparison, StrategyKey, StrategyRobustness
from bracegrid.errors import InputError
from bracegrid.io import OutputFile
from bracegrid.model import Frame, Project
from bracegrid.outputs.bill import build_bom, render_bom_csv, render_bom_totals_csv
from bracegrid.outputs.drawing import DrawnSheet, build_drawing, dxf_bytes
from bracegrid.outputs.htmlreport import render_html
from bracegrid.outputs.preview import PreviewFormat, render_preview
from bracegrid.outputs.robustplot import PlotFormat, render_robustness_plot, strategy_panels
from bracegrid.outputs.sheet import GAP, MARGIN, MIN_BAY, SHEETS
from bracegrid.outputs.text import render_compare_csv

#: Most bays across and up one sheet can show legibly: every bay printed at least MIN_BAY (10 mm)
#: wide inside the margins of the largest sheet (A0: (1189 - 2 x 10) / 10 = 116 across,
#: (841 - 2 x 10 - 8) / 10 = 81 up, before the legend and bill band takes its share).
MAX_SHEET_COLS = int((SHEETS[-1][1] - 2 * MARGIN) / MIN_BAY)
MAX_SHEET_ROWS = int((SHEETS[-1][2] - 2 * MARGIN - GAP) / MIN_BAY)


def check_drawable(frames: Sequence[Frame], *, per_frame: bool) -> None:
    """Refuse, in words and before any drawing work, a sheet too large to read.

    A frame of more than :data:`MAX_SHEET_COLS` bays across or :data:`MAX_SHEET_ROWS` up cannot
    print every bay 10 mm wide even on A0; drawn anyway it becomes a speck at 1:16384000 and costs
    minutes and gigabytes. Several frames side by side that do not fit together can go on one
    sheet each (``per_frame``).

    Raises:
        InputError: Naming each frame too large, its size and the limit.

    Example:
        >>> try:
        ...     check_drawable([Frame("f", (3000,) * 300, (2000,) * 300)], per_frame=True)
        ... except InputError as exc:
        ...     print(exc.problems[0][:72])
        frame 'f' is 300 bays across and 300 up: too large to draw legibly on on
    """
    problems = [
        f"frame {f.name!r} is {f.cols} bays across and {f.rows} up: too large to draw legibly on one sheet (at most "
        f"{MAX_SHEET_COLS} across and {MAX_SHEET_ROWS} up, every bay 10 mm on A0); draw it in parts (split it into "
        "several frames) or use its bill of materials and check output"
        for f in frames
        if f.cols > MAX_SHEET_COLS or f.rows > MAX_SHEET_ROWS
    ]
    if not problems and not per_frame and sum(f.cols for f in frames) > MAX_SHEET_COLS:
        problems.append(
            f"the frames together are {sum(f.cols for f in frames)} bays across: too many for one sheet (at most "
            f"{MAX_SHEET_COLS}); draw one sheet per frame with --per-frame, or choose frames with --frame"
        )
    if problems:
        raise InputError(problems)


class OutputFormat(Enum):
    """File formats ``bracegrid draw`` can write (the bill CSV is always written)."""

    DXF = "dxf"
    SVG = "svg"
    PNG = "png"
    PDF = "pdf"


def parse_formats(text: str) -> tuple[OutputFormat, ...]:
    """Read a comma-separated format list such as ``"dxf,png"``.

    Raises:
        InputError: Naming every unknown format and the known ones.

    Example:
        >>> [f.value for f in parse_formats("dxf, PNG")]
        ['dxf', 'png']
    """
    known = [f.value for f in OutputFormat]
    chosen: list[OutputFormat] = []
    bad: list[str] = []
    for raw in text.split(","):
        item = raw.strip().lower().lstrip(".")
        if not item:
            continue
        if item not in known:
            bad.append(item)
        elif OutputFormat(item) not in chosen:
            chosen.append(OutputFormat(item))
    if bad or not chosen:
        what = f"unknown format {', '.join(repr(b) for b in bad)}" if bad else "no format given"
        msg = f"{text!r}: {what}; choose from {', '.join(known)} separated by commas (e.g. dxf,png)"
        raise InputError(msg)
    return tuple(chosen)


#: Longest frame part of a file name: file systems allow 255 bytes per name, and the project's
#: stem, the "-forces-" part, a sheet number and the suffix come on top (two frames that share the
#: first characters get numbered apart by the callers).
SLUG_CHARS = 60


def file_slug(name: str) -> str:
    """A file-name-safe form of a frame or project name, at most :data:`SLUG_CHARS` long.

    Example:
        >>> file_slug("West end frame #2")
        'west-end-frame-2'
        >>> len(file_slug("x" * 300))
        60
    """
    slug = re.sub(r"[^a-z0-9]+", "-", name.lower()).strip("-")[:SLUG_CHARS].strip("-")
    return slug or "frame"


def render_outputs(
    project: Project,
    *,
    stem: str,
    frames: Sequence[Frame] | None = None,
    formats: Sequence[OutputFormat] = (OutputFormat.DXF, OutputFormat.PNG),
    per_frame: bool = False,
    when: date | None = None,
    dpi: int = 150,
) -> tuple[tuple[DrawnSheet, ...], tuple[OutputFile, ...]]:
    """Render every file of a ``draw`` run in memory (nothing is written here).

    Args:
        project: The project.
        stem: Base of the file names.
        frames: Frames to draw (default: all).
        formats: Drawing and preview formats.
        per_frame: One sheet per frame instead of one for all.
        when: Title-block date (default: today).
        dpi: PNG resolution.

    Raises:
        InputError: If a sheet would be too large to read (:func:`check_drawable`).

    Returns:
        The sheets drawn and the files: ``<stem>[-<frame>].<fmt>`` per sheet,
        ``<stem>-bom.csv`` (one row per member) and ``<stem>-bom-totals.csv`` (per frame
        and overall) for the frames drawn.
    """
    chosen = tuple(project.frames if frames is None else frames)
    check_drawable(chosen, per_frame=per_frame)
    groups: list[tuple[str, tuple[Frame, ...]]]
    if per_frame:
        used: set[str] = set()
        groups = []
        for f in chosen:
            name, k = f"{stem}-{file_slug(f.name)}", 2
            while name in used:
                name, k = f"{stem}-{file_slug(f.name)}-{k}", k + 1
            used.add(name)
            groups.append((name, (f,)))
    else:
        groups = [(stem, chosen)]
    sheets: list[DrawnSheet] = []
    files: list[OutputFile] = []
    for base, group in groups:
        sheet = build_drawing(project, frames=group, when=when)
        sheets.append(sheet)
        for fmt in formats:
            if fmt is OutputFormat.DXF:
                files.append(OutputFile(f"{base}.dxf", dxf_bytes(sheet.doc)))
            else:
                files.append(
                    OutputFile(f"{base}.{fmt.value}", render_preview(sheet, PreviewFormat(fmt.value), dpi=dpi))
                )
    bom = build_bom(project, frames=chosen)
    files.append(OutputFile(f"{stem}-bom.csv", render_bom_csv(bom).encode("utf-8")))
    files.append(OutputFile(f"{stem}-bom-totals.csv", render_bom_totals_csv(bom).encode("utf-8")))
    return tuple(sheets), tuple(files)


def render_compare_outputs(
    comparison: Comparison,
    *,
    stem: str,
    when: date | None = None,
    time_limit: float | None = None,
    robustness: Sequence[StrategyRobustness] = (),
) -> tuple[OutputFile, ...]:
    """Render every file of a ``compare`` run in memory (nothing is written here).

    Args:
        comparison: The strategies compared.
        stem: Base of the file names.
        when: Title-block and report date (default: today).
        time_limit: Seconds each strategy was given (stated in the report).
        robustness: The strategies' robustness curves (then also ``<stem>-robustness.png``).

    Returns:
        ``<stem>-compare.csv``, one ``<stem>-<strategy>.dxf`` per strategy that has a layout, the
        robustness plot when curves are given, and ``report.html``.
    """
    today = when or date.today()
    project = comparison.project
    files = [OutputFile(f"{stem}-compare.csv", render_compare_csv(comparison).encode("utf-8"))]
    for key in StrategyKey:
        solved = tuple(r.frame for fc in comparison.frames for r in fc.strategies if r.key is key and r.frame)
        if solved:
            doc = build_drawing(project, frames=solved, when=today).doc
            files.append(OutputFile(f"{stem}-{key.value}.dxf", dxf_bytes(doc)))
    if robustness:
        plot = render_robustness_plot(strategy_panels(robustness), PlotFormat.PNG)
        files.append(OutputFile(f"{stem}-robustness.png", plot))
    page = render_html(comparison, when=today, time_limit=time_limit, robustness=robustness)
    files.append(OutputFile("report.html", page.encode("utf-8")))
    return tuple(files)
