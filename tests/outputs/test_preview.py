"""Previews: the PNG renders non-empty at the expected pixel size; SVG and PDF are well formed.

Reference for the size: ISO 216 A3 is 420 x 297 mm; at 150 dpi that is
420 / 25.4 * 150 = 2480.3 -> 2480 by 297 / 25.4 * 150 = 1753.9 -> 1754 pixels
(matplotlib may floor the height to 1753).
"""

from __future__ import annotations

import html
import io
import random
import re
from datetime import date

import numpy as np
import pytest
from matplotlib.image import imread

from bracegrid.io import load_project
from bracegrid.outputs.drawing import DrawnSheet, build_drawing
from bracegrid.outputs.preview import PreviewFormat, preview_pixels, render_preview
from tests.drawing_cases import ORCHARD


@pytest.fixture(scope="module")
def sheet() -> DrawnSheet:
    return build_drawing(load_project(ORCHARD), when=date(2026, 12, 1))


def test_png_size_and_ink(sheet: DrawnSheet) -> None:
    assert sheet.plan.sheet == "A3"
    data = render_preview(sheet, PreviewFormat.PNG, dpi=150)
    assert data.startswith(b"\x89PNG\r\n\x1a\n")
    image = imread(io.BytesIO(data), format="png")
    height, width = image.shape[:2]
    assert width == 2480
    assert height in (1753, 1754)
    assert preview_pixels(sheet, dpi=150)[0] == width
    rgb = image[..., :3]
    ink = np.mean(np.any(rgb < 0.5, axis=-1))  # share of dark pixels
    assert 0.005 < ink < 0.5, ink  # lines and text drawn, not a black page


def test_svg_and_pdf_are_written(sheet: DrawnSheet) -> None:
    svg = render_preview(sheet, PreviewFormat.SVG)
    # 420 mm = 420 / 25.4 * 72 = 1190.55 pt (the sheet prints at true size)
    assert b'width="1190.55' in svg[:2000]
    assert b'height="841.88' in svg[:2000]
    pdf = render_preview(sheet, PreviewFormat.PDF)
    assert pdf.startswith(b"%PDF-")


def test_renders_are_repeatable_and_leave_random_state_alone(sheet: DrawnSheet) -> None:
    # Issue 10: ezdxf's hatch renderer moves pattern origins with the `random` module, so two PNGs of
    # one sheet differed. The preview uses a fixed shift and must not touch the global random state.
    state = random.getstate()
    first = render_preview(sheet, PreviewFormat.PNG, dpi=60)
    assert random.getstate() == state
    random.seed(12345)  # whatever another caller does to the global generator
    assert render_preview(sheet, PreviewFormat.PNG, dpi=60) == first
    assert render_preview(sheet, PreviewFormat.SVG) == render_preview(sheet, PreviewFormat.SVG)
    assert render_preview(sheet, PreviewFormat.PDF) == render_preview(sheet, PreviewFormat.PDF)


def test_pdf_embeds_the_font_and_svg_holds_real_text(sheet: DrawnSheet) -> None:
    # Issue 10: the PDF had no fonts (text as outlines: not searchable) and the SVG drew every letter
    # as paths. Reference: PDF 1.7 (ISO 32000-1) 9.9 embedded font programs (/FontFile2 = TrueType)
    # and 9.10.3 /ToUnicode (what makes text searchable and copyable).
    pdf = render_preview(sheet, PreviewFormat.PDF)
    assert b"/FontFile2" in pdf
    assert b"/ToUnicode" in pdf
    assert b"DejaVuSans" in pdf
    svg = render_preview(sheet, PreviewFormat.SVG).decode("utf-8")
    texts = re.findall(r"<text\b[^>]*>([^<]*)</text>", svg)
    joined = " ".join(html.unescape(t) for t in texts)
    for expected in ("ROOF PLAN", "BILL OF MATERIALS", "licensed engineer", "5000"):
        assert expected in joined
    drawn = [e for e in sheet.doc.modelspace() if e.dxftype() in {"TEXT", "MTEXT"}]
    assert len(texts) >= len(drawn)  # every text entity (and each dimension value) as text
