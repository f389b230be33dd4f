"""The outputs stage: text, JSON shapes, the bill, the DXF sheet, previews, the HTML report and file bundles."""

from bracegrid.outputs.bill import Bom, build_bom, render_bom_csv
from bracegrid.outputs.bundle import OutputFormat, parse_formats, render_compare_outputs, render_outputs
from bracegrid.outputs.drawing import DrawnSheet, build_drawing, dxf_bytes, write_dxf
from bracegrid.outputs.htmlreport import render_html
from bracegrid.outputs.preview import PreviewFormat, render_preview, write_preview
from bracegrid.outputs.shapes import check_dict, compare_dict, optimize_dict
from bracegrid.outputs.text import progress_line, render_check, render_compare, render_compare_csv, render_optimize

__all__ = [
    "Bom",
    "DrawnSheet",
    "OutputFormat",
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
    "render_compare_outputs",
    "render_html",
    "render_optimize",
    "render_outputs",
    "render_preview",
    "write_dxf",
    "write_preview",
]
