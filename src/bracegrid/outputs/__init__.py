"""The outputs stage: text, JSON shapes, bill, DXF sheet, previews, HTML report, file bundles, robustness plot."""

from bracegrid.outputs.bill import Bom, build_bom, render_bom_csv
from bracegrid.outputs.bundle import OutputFormat, parse_formats, render_outputs
from bracegrid.outputs.drawing import DrawnSheet, build_drawing, dxf_bytes, write_dxf
from bracegrid.outputs.htmlreport import render_html
from bracegrid.outputs.preview import PreviewFormat, render_preview, write_preview
from bracegrid.outputs.robustplot import (
    PlotFormat,
    PlotPanel,
    render_robustness_plot,
    robustness_panels,
    strategy_panels,
)
from bracegrid.outputs.shapes import check_dict, compare_dict, optimize_dict, robustness_dict
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
    "OutputFormat",
    "PlotFormat",
    "PlotPanel",
    "PreviewFormat",
    "build_bom",
    "build_drawing",
    "check_dict",
    "compare_dict",
    "dxf_bytes",
    "optimize_dict",
    "parse_formats",
    "progress_line",
    "render_bom_csv",
    "render_check",
    "render_compare",
    "render_compare_csv",
    "render_html",
    "render_optimize",
    "render_outputs",
    "render_preview",
    "render_robustness",
    "render_robustness_plot",
    "robustness_dict",
    "robustness_panels",
    "strategy_panels",
    "write_dxf",
    "write_preview",
]
