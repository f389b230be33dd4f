"""The outputs stage: text, JSON shapes, bill, DXF sheets (bracing, forces), previews, reports, plots, bundles."""

from bracegrid.outputs.bill import Bom, build_bom, render_bom_csv
from bracegrid.outputs.bundle import OutputFormat, check_drawable, parse_formats, render_compare_outputs, render_outputs
from bracegrid.outputs.drawing import DrawnSheet, build_drawing, dxf_bytes, write_dxf
from bracegrid.outputs.forcefiles import render_force_files
from bracegrid.outputs.forcesheet import ForceSheet, build_force_sheet, force_sheets
from bracegrid.outputs.forcetext import force_summary_lines, render_force_csv, render_forces
from bracegrid.outputs.htmlreport import render_html
from bracegrid.outputs.preview import PreviewFormat, render_preview, write_preview
from bracegrid.outputs.robustplot import (
    PlotFormat,
    PlotPanel,
    render_robustness_plot,
    robustness_panels,
    strategy_panels,
)
from bracegrid.outputs.safetext import short_label, visible_text
from bracegrid.outputs.shapes import check_dict, compare_dict, forces_dict, optimize_dict, robustness_dict
from bracegrid.outputs.text import (
    progress_line,
    render_check,
    render_compare,
    render_compare_csv,
    render_optimize,
    render_robustness,
)

__all__ = [
    "Bom",
    "DrawnSheet",
    "ForceSheet",
    "OutputFormat",
    "PlotFormat",
    "PlotPanel",
    "PreviewFormat",
    "build_bom",
    "build_drawing",
    "build_force_sheet",
    "check_dict",
    "check_drawable",
    "compare_dict",
    "dxf_bytes",
    "force_sheets",
    "force_summary_lines",
    "forces_dict",
    "optimize_dict",
    "parse_formats",
    "progress_line",
    "render_bom_csv",
    "render_check",
    "render_compare",
    "render_compare_csv",
    "render_compare_outputs",
    "render_force_csv",
    "render_force_files",
    "render_forces",
    "render_html",
    "render_optimize",
    "render_outputs",
    "render_preview",
    "render_robustness",
    "render_robustness_plot",
    "robustness_dict",
    "robustness_panels",
    "short_label",
    "strategy_panels",
    "visible_text",
    "write_dxf",
    "write_preview",
]
