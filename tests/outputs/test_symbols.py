"""Drawing symbols and layers (src/bracegrid/outputs/symbols.py, layers.py) on a fresh ezdxf document.

References: ezdxf's own auditor (``Drawing.audit``) as the independent DXF validity check, and a
write-and-read-back through ezdxf's DXF reader; DXF reference: ACI colour 0 means BYBLOCK, a
linetype pattern is its total length (group 40) followed by dash (+), gap (-) and dot (0) lengths
(group 49); pattern lengths are paper mm times the drawing scale (symbols.py module docstring),
worked by hand below. Block contents drawn on layer 0 in BYBLOCK colour so an insert takes the
colour of its layer: common practice, no source.
"""

from __future__ import annotations

import io

import ezdxf
import pytest

from bracegrid.outputs.drawing import DXF_VERSION
from bracegrid.outputs.layers import Layer, member_layer
from bracegrid.outputs.symbols import (
    BAY_TAG_BLOCK,
    CRITICAL_BLOCK,
    DIM_STYLE,
    SUPPORT_BLOCK,
    TEXT_FONT,
    TEXT_STYLE,
    TICK_BLOCK,
    TIE_ACW_BLOCK,
    TIE_CW_BLOCK,
    setup_document,
    text_width,
)

BLOCKS = (SUPPORT_BLOCK, TIE_CW_BLOCK, TIE_ACW_BLOCK, CRITICAL_BLOCK, BAY_TAG_BLOCK, TICK_BLOCK)
LINETYPES = ("BG_TIE", "BG_CHAIN", "BG_EDGE")
SCALE = 50.0


@pytest.fixture(scope="module")
def doc() -> ezdxf.document.Drawing:
    d = ezdxf.new(DXF_VERSION)
    setup_document(d, scale=SCALE)
    return d


def test_every_block_is_defined_and_drawn_byblock(doc: ezdxf.document.Drawing) -> None:
    for name in BLOCKS:
        block = doc.blocks.get(name)
        assert block is not None, name
        entities = list(block)
        assert entities, name
        for e in entities:
            assert e.dxf.layer == "0"
            assert e.dxf.color == 0  # BYBLOCK
    # Hand: the support is a triangle, the pin circle and five hatch strokes.
    kinds = sorted(e.dxftype() for e in doc.blocks.get(SUPPORT_BLOCK))
    assert kinds == ["CIRCLE", "LINE", "LINE", "LINE", "LINE", "LINE", "LWPOLYLINE"]


def test_the_two_sense_blocks_differ(doc: ezdxf.document.Drawing) -> None:
    def arc(name: str) -> tuple[float, float]:
        (a,) = [e for e in doc.blocks.get(name) if e.dxftype() == "ARC"]
        return (a.dxf.start_angle, a.dxf.end_angle)

    assert arc(TIE_CW_BLOCK) == (60.0, 330.0)
    assert arc(TIE_ACW_BLOCK) == (210.0, 120.0)


def test_linetypes_are_scaled(doc: ezdxf.document.Drawing) -> None:
    for name in LINETYPES:
        assert doc.linetypes.has_entry(name), name
    tags = [(t.code, t.value) for t in doc.linetypes.get("BG_TIE").pattern_tags.tags]
    # Hand: dashes 3.0 mm, gaps 1.2 mm at 1:50 -> total 4.2 x 50 = 210, dash 150, gap -60.
    assert (40, 210.0) in tags
    assert [v for c, v in tags if c == 49] == [150.0, -60.0]
    chain = [t.value for t in doc.linetypes.get("BG_CHAIN").pattern_tags.tags if t.code == 49]
    assert chain == [300.0, -60.0, 50.0, -60.0]  # (6, -1.2, 1, -1.2) x 50


def test_text_and_dimension_styles(doc: ezdxf.document.Drawing) -> None:
    assert doc.styles.has_entry(TEXT_STYLE)
    assert doc.styles.get(TEXT_STYLE).dxf.font == TEXT_FONT
    assert doc.dimstyles.has_entry(DIM_STYLE)
    dim = doc.dimstyles.get(DIM_STYLE)
    assert dim.dxf.dimscale == SCALE
    assert dim.dxf.dimtxsty == TEXT_STYLE
    assert dim.dxf.dimtxt == 2.0


def test_every_layer_is_defined_as_specified(doc: ezdxf.document.Drawing) -> None:
    names = [layer.layer_name for layer in Layer]
    assert len(set(names)) == len(names)
    for layer in Layer:
        spec = layer.spec
        entry = doc.layers.get(spec.name)
        assert entry is not None, spec.name
        assert entry.dxf.color == spec.color
        assert entry.dxf.linetype == spec.linetype
        assert entry.dxf.lineweight == spec.lineweight
        assert entry.description == ""  # descriptions live in docs/drawings.md, not under another program's appid
        assert doc.linetypes.has_entry(spec.linetype), spec.linetype  # every layer's linetype exists
    assert member_layer(brace=True, existing=True) is Layer.BRACE_EXST
    assert member_layer(brace=True, existing=False) is Layer.BRACE_NEWW
    assert member_layer(brace=False, existing=True) is Layer.TIE_EXST
    assert member_layer(brace=False, existing=False) is Layer.TIE_NEWW


def test_auditor_finds_no_errors(doc: ezdxf.document.Drawing) -> None:
    auditor = doc.audit()
    assert not auditor.has_errors, [str(e) for e in auditor.errors]
    assert not auditor.has_fixes, [str(f) for f in auditor.fixes]


def test_survives_a_write_and_read_back() -> None:
    d = ezdxf.new(DXF_VERSION)
    setup_document(d, scale=100.0)
    buffer = io.StringIO()
    d.write(buffer)
    again = ezdxf.read(io.StringIO(buffer.getvalue()))
    for name in BLOCKS:
        assert again.blocks.get(name) is not None
    for layer in Layer:
        assert again.layers.has_entry(layer.layer_name)
    assert again.dimstyles.get(DIM_STYLE).dxf.dimscale == 100.0
    assert not again.audit().has_errors


def test_text_width_grows_with_length_and_height() -> None:
    widths = [text_width(t, 2.0) for t in ("C", "C1", "C12", "C123")]
    assert widths == sorted(widths)
    assert len(set(widths)) == len(widths)  # strictly increasing
    assert 0 < text_width("C12", 2.0) < 10  # docstring example
    # Font metrics scale linearly with the text height.
    assert text_width("LEGEND", 4.0) == pytest.approx(2 * text_width("LEGEND", 2.0), rel=0.02)
    assert text_width("", 2.0) == 0.0
