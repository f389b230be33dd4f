"""Previews: quick-look PNG, SVG and PDF of the very sheet written to DXF.

The DXF document is rendered with ezdxf's drawing add-on on a matplotlib
figure (non-interactive Agg backend) of the sheet's paper size, so the
preview prints at true scale: a 1:100 A3 sheet previews at 420 x 297 mm.

Two departures from the add-on's defaults, both in :class:`_SheetFrontend`:

- Text is real text: every TEXT and MTEXT line (dimension values included) is
  placed by the add-on's own layout and then written as a matplotlib text in
  the drawing's font (DejaVu Sans), so the SVG holds ``<text>`` elements and
  the PDF embeds the font (TrueType, searchable and selectable) instead of
  every letter drawn as outline paths.
- Hatch patterns are laid from a fixed origin shift: the add-on moves each
  pattern's origin by a random amount (so lines miss boundary corners), which
  made two renders of one sheet differ. The shift here is of the same size but
  fixed, so renders are byte-for-byte repeatable; no random state is touched.
"""

from __future__ import annotations

import io
import math
from dataclasses import dataclass
from enum import Enum
from pathlib import Path
from typing import TYPE_CHECKING, Any, Protocol

from bracegrid.errors import ExportError
from bracegrid.io import write_bytes_atomic
from bracegrid.outputs.safetext import missing_glyphs_quiet
from bracegrid.outputs.sheet import SheetPlan

if TYPE_CHECKING:
    from ezdxf.addons.drawing.properties import Properties
    from ezdxf.document import Drawing
    from ezdxf.entities.dxfgfx import DXFGraphic
    from ezdxf.entities.mtext import MText
    from ezdxf.entities.polygon import DXFPolygon
    from ezdxf.entities.text import Text
    from ezdxf.math import Matrix44
    from ezdxf.math import Vec2 as _Vec2
    from ezdxf.path import Path as DxfPath

_MM_PER_INCH = 25.4
_PT_PER_MM = 72.0 / _MM_PER_INCH
#: Cap height of DejaVu Sans per em (1493 / 2048 font units): DXF text height is the cap height.
_CAP_PER_EM = 1493 / 2048
#: Family name matplotlib knows the drawing's font by.
_FAMILY = "DejaVu Sans"
#: Fixed shift of hatch pattern origins, as fractions of the pattern line spacing (the add-on's
#: random shift lies between 0.0003 and 0.001 of it).
_HATCH_SHIFT = (0.00071, 0.00043)


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


@dataclass(frozen=True, slots=True)
class _TextLine:
    """One line of text as the add-on laid it out: baseline start, direction, cap height, colour."""

    text: str
    x: float
    y: float
    angle_deg: float
    cap_height: float
    color: str


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


def _text_line(text: str, transform: Matrix44, cap_height: float, color: str) -> _TextLine:
    origin = transform.transform((0.0, 0.0, 0.0))
    along = transform.transform_direction((1.0, 0.0, 0.0))
    up = transform.transform_direction((0.0, 1.0, 0.0))
    return _TextLine(
        text=text,
        x=float(origin.x),
        y=float(origin.y),
        angle_deg=math.degrees(math.atan2(along.y, along.x)),
        cap_height=float(cap_height * math.hypot(up.x, up.y)),
        color=color,
    )


def _frontend_class() -> type[Any]:
    """The add-on's frontend with real text and repeatable hatches (built lazily: ezdxf is imported late)."""
    from ezdxf.addons.drawing.frontend import Frontend
    from ezdxf.addons.drawing.text import simplified_text_chunks
    from ezdxf.entities.text import Text
    from ezdxf.math import Vec2
    from ezdxf.render import hatching

    class _SheetFrontend(Frontend):
        """Collects text lines instead of drawing glyph outlines; shifts hatch origins by a fixed amount."""

        def __init__(self, *args: Any, **kwargs: Any) -> None:
            super().__init__(*args, **kwargs)
            self.text_lines: list[_TextLine] = []

        def _collect(self, entity: Text | MText, properties: Properties) -> None:
            face = self.get_font_face(properties)
            for line, transform, cap_height in simplified_text_chunks(entity, self.text_engine, font_face=face):
                if line.strip():
                    self.text_lines.append(_text_line(line, transform, cap_height, properties.color))

        def draw_text_entity_2d(self, entity: DXFGraphic, properties: Properties) -> None:
            if isinstance(entity, Text):  # ATTRIB and ATTDEF are TEXT subclasses
                self._collect(entity, properties)

        def draw_simple_mtext(self, mtext: MText, properties: Properties) -> None:
            self._collect(mtext, properties)

        def draw_hatch_pattern(self, polygon: DXFPolygon, paths: list[DxfPath], properties: Properties) -> None:
            if polygon.pattern is None or len(polygon.pattern.lines) == 0:
                return
            properties.linetype_pattern = ()
            lines: list[tuple[_Vec2, _Vec2]] = []
            spacing = sum(line.offset.magnitude for line in polygon.pattern.lines) / len(polygon.pattern.lines)
            shift = Vec2(_HATCH_SHIFT[0] * spacing, _HATCH_SHIFT[1] * spacing)
            for base in hatching.pattern_baselines(
                polygon, min_hatch_line_distance=self.config.min_hatch_line_distance, jiggle_origin=False
            ):
                moved = hatching.HatchBaseLine(
                    base.origin + shift,
                    base.direction,
                    base.offset,
                    base.line_pattern,
                    min_hatch_line_distance=self.config.min_hatch_line_distance,
                )
                for line in hatching.hatch_paths(moved, paths):
                    lines.extend(moved.pattern_renderer(line.distance).render(line.start, line.end))
            self.pipeline.draw_solid_lines(lines, properties)

    return _SheetFrontend


def render_preview(sheet: SheetLike, fmt: PreviewFormat, *, dpi: int = 150) -> bytes:
    """Render the sheet to image bytes (the same sheet gives the same bytes).

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
    frontend = _frontend_class()(ctx, backend, config=config)
    frontend.draw_layout(sheet.doc.modelspace(), finalize=True)
    top = max((c.get_zorder() for c in ax.get_children()), default=0) + 1
    for t in frontend.text_lines:
        ax.text(
            t.x, t.y, t.text, rotation=t.angle_deg, rotation_mode="anchor", ha="left", va="baseline",
            fontsize=t.cap_height / scale / _CAP_PER_EM * _PT_PER_MM, family=_FAMILY, color=t.color,
            zorder=top, clip_on=False,
        )  # fmt: skip
    ax.set_xlim(0.0, w_mm * scale)
    ax.set_ylim(0.0, h_mm * scale)
    ax.set_aspect("equal", adjustable="box")
    ax.set_axis_off()
    buffer = io.BytesIO()
    # Type 42 = the TrueType font embedded (searchable text); SVG text stays <text>; no dates
    # in the metadata, so the same sheet always gives the same bytes.
    metadata: dict[str, Any] = {
        PreviewFormat.PNG: {"Software": None},
        PreviewFormat.SVG: {"Date": None, "Creator": None},
        PreviewFormat.PDF: {"CreationDate": None, "ModDate": None, "Producer": None, "Creator": None},
    }[fmt]
    with (
        missing_glyphs_quiet(),
        matplotlib.rc_context({"pdf.fonttype": 42, "svg.fonttype": "none", "svg.hashsalt": "bracegrid"}),
    ):
        fig.savefig(buffer, format=fmt.value, dpi=dpi, facecolor="white", metadata=metadata)
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
