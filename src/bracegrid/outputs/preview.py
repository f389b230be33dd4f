"""Previews: quick-look PNG, SVG and PDF of the very sheet written to DXF.

The DXF document is rendered with ezdxf's drawing add-on on a matplotlib
figure (non-interactive Agg backend) of the sheet's paper size, so the
preview prints at true scale: a 1:100 A3 sheet previews at 420 x 297 mm.
"""

from __future__ import annotations

import io
from enum import Enum
from pathlib import Path
from typing import TYPE_CHECKING, Protocol

from bracegrid.errors import ExportError
from bracegrid.io import write_bytes_atomic
from bracegrid.outputs.sheet import SheetPlan

if TYPE_CHECKING:
    from ezdxf.document import Drawing

_MM_PER_INCH = 25.4


class SheetLike(Protocol):
    """Any finished sheet: its document and its plan (stability drawings and force sheets alike)."""

    @property
    def doc(self) -> Drawing:
        """The ezdxf document."""

    @property
    def plan(self) -> SheetPlan:
        """Sheet size and scale."""


class PreviewFormat(Enum):
    """Preview file formats."""

    PNG = "png"
    SVG = "svg"
    PDF = "pdf"


def preview_pixels(sheet: SheetLike, *, dpi: int = 150) -> tuple[int, int]:
    """Width and height in pixels of a PNG preview at ``dpi``.

    Example:
        >>> from bracegrid.outputs.drawing import build_drawing
        >>> from bracegrid.model import Frame, Project
        >>> preview_pixels(build_drawing(Project("p", (Frame("f", (3000,), (2000,)),))), dpi=100)
        (1654, 1169)
    """
    w, h = sheet.plan.paper
    return (round(w / _MM_PER_INCH * dpi), round(h / _MM_PER_INCH * dpi))


def render_preview(sheet: SheetLike, fmt: PreviewFormat, *, dpi: int = 150) -> bytes:
    """Render the sheet to image bytes.

    Args:
        sheet: The drawing to show.
        fmt: PNG, SVG or PDF.
        dpi: Resolution of PNG output (SVG and PDF are vector).

    Returns:
        The file contents.
    """
    import matplotlib

    matplotlib.use("Agg")
    from ezdxf.addons.drawing.config import BackgroundPolicy, ColorPolicy, Configuration, LineweightPolicy
    from ezdxf.addons.drawing.frontend import Frontend
    from ezdxf.addons.drawing.matplotlib import MatplotlibBackend
    from ezdxf.addons.drawing.properties import RenderContext
    from matplotlib.figure import Figure

    w_mm, h_mm = sheet.plan.paper
    scale = sheet.plan.scale
    fig = Figure(figsize=(w_mm / _MM_PER_INCH, h_mm / _MM_PER_INCH), dpi=dpi)
    ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
    config = Configuration(
        background_policy=BackgroundPolicy.WHITE,
        color_policy=ColorPolicy.COLOR,
        lineweight_policy=LineweightPolicy.ABSOLUTE,
        min_lineweight=0.13,
    )
    ctx = RenderContext(sheet.doc)
    backend = MatplotlibBackend(ax, adjust_figure=False)
    Frontend(ctx, backend, config=config).draw_layout(sheet.doc.modelspace(), finalize=True)
    ax.set_xlim(0.0, w_mm * scale)
    ax.set_ylim(0.0, h_mm * scale)
    ax.set_aspect("equal", adjustable="box")
    ax.set_axis_off()
    buffer = io.BytesIO()
    fig.savefig(buffer, format=fmt.value, dpi=dpi, facecolor="white")
    return buffer.getvalue()


def write_preview(sheet: SheetLike, path: str | Path, fmt: PreviewFormat, *, dpi: int = 150) -> Path:
    """Render and write a preview atomically.

    Raises:
        ExportError: If rendering or writing fails.
    """
    try:
        data = render_preview(sheet, fmt, dpi=dpi)
    except (ValueError, RuntimeError, OSError) as exc:
        msg = f"cannot render the {fmt.value} preview for {path}: {exc}"
        raise ExportError(msg) from exc
    return write_bytes_atomic(path, data)
