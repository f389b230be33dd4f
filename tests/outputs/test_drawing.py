"""DXF drawings: read back and audited by ezdxf, geometry checked against the input sizes.

Reference reader: ezdxf's own loader and auditor (``ezdxf.readfile`` and
``Drawing.audit``; ezdxf documentation, "Auditor"). Geometry references are
computed independently here with numpy (cumulative sums of the input widths
and heights give the bay corners) rather than through ``Frame.x_lines``.
"""

from __future__ import annotations

import os
from collections import Counter
from datetime import date
from pathlib import Path

import ezdxf
import numpy as np
import pytest
from ezdxf import bbox
from ezdxf.document import Drawing

from bracegrid._version import __version__
from bracegrid.analysis import CAUTION
from bracegrid.errors import ExportError
from bracegrid.io import load_project
from bracegrid.model import Diagonal, MemberKind, Supports, blocked_bays
from bracegrid.outputs.drawing import DrawnSheet, build_drawing, write_dxf
from bracegrid.outputs.layers import Layer
from bracegrid.outputs.symbols import CRITICAL_BLOCK, SUPPORT_BLOCK, TIE_ACW_BLOCK, TIE_CW_BLOCK
from tests.drawing_cases import ORCHARD, QUAYSIDE, braced_quayside, loose_deck

WHEN = date(2026, 12, 1)


def _write_and_read(sheet: DrawnSheet, tmp_path: Path, name: str) -> Drawing:
    path = write_dxf(sheet.doc, tmp_path / f"{name}.dxf")
    return ezdxf.readfile(path)


@pytest.fixture(scope="module")
def braced(tmp_path_factory: pytest.TempPathFactory) -> tuple[DrawnSheet, Drawing]:
    sheet = build_drawing(braced_quayside(), when=WHEN)
    return sheet, _write_and_read(sheet, tmp_path_factory.mktemp("dxf"), "braced")


@pytest.fixture(scope="module")
def unbraced(tmp_path_factory: pytest.TempPathFactory) -> tuple[DrawnSheet, Drawing]:
    sheet = build_drawing(load_project(QUAYSIDE), when=WHEN)
    return sheet, _write_and_read(sheet, tmp_path_factory.mktemp("dxf"), "unbraced")


@pytest.fixture(scope="module")
def orchard(tmp_path_factory: pytest.TempPathFactory) -> tuple[DrawnSheet, Drawing]:
    sheet = build_drawing(load_project(ORCHARD), when=WHEN)
    return sheet, _write_and_read(sheet, tmp_path_factory.mktemp("dxf"), "orchard")


@pytest.fixture(scope="module")
def deck(tmp_path_factory: pytest.TempPathFactory) -> tuple[DrawnSheet, Drawing]:
    sheet = build_drawing(loose_deck(), when=WHEN)
    return sheet, _write_and_read(sheet, tmp_path_factory.mktemp("dxf"), "deck")


CASES = ["braced", "unbraced", "orchard", "deck"]


@pytest.fixture(params=CASES)
def case(request: pytest.FixtureRequest) -> tuple[DrawnSheet, Drawing]:
    return request.getfixturevalue(request.param)  # type: ignore[no-any-return]


def test_written_dxf_passes_the_ezdxf_auditor(case: tuple[DrawnSheet, Drawing]) -> None:
    # Reference: ezdxf's auditor, run on the file as read back from disk.
    _, doc = case
    auditor = doc.audit()
    assert len(auditor.errors) == 0
    assert len(auditor.fixes) == 0


def test_version_and_units(case: tuple[DrawnSheet, Drawing]) -> None:
    # DXF reference, HEADER section: AC1027 is R2013; $INSUNITS 4 = millimetres.
    _, doc = case
    assert doc.dxfversion == "AC1027"
    assert doc.header["$INSUNITS"] == 4
    assert doc.header["$MEASUREMENT"] == 1
    assert "BG_TEXT" in doc.styles


def test_every_layer_defined_and_documented(case: tuple[DrawnSheet, Drawing]) -> None:
    _, doc = case
    docs = (Path(__file__).resolve().parents[2] / "docs" / "drawings.md").read_text(encoding="utf-8")
    used = {e.dxf.layer for e in doc.modelspace()}
    for layer in Layer:
        assert layer.layer_name in doc.layers
        spec = layer.spec
        # the docs' layer table row says what layers.py says: colour, linetype, weight, whose codes
        row = f"| `{spec.name}` | {spec.description} | {spec.color} | {spec.linetype} | {spec.lineweight / 100:.2f} |"
        assert f"{row} {spec.origin} |" in docs
    assert used <= {layer.layer_name for layer in Layer}


def _entities(doc: Drawing, layer: Layer, kind: str) -> list[ezdxf.entities.DXFGraphic]:
    return [e for e in doc.modelspace() if e.dxf.layer == layer.layer_name and e.dxftype() == kind]


def test_member_lines_per_layer_equal_member_counts(case: tuple[DrawnSheet, Drawing]) -> None:
    sheet, doc = case
    members = [m for fs in sheet.frames for m in fs.frame.members]
    expected = Counter((m.kind, m.existing) for m in members)
    layers = {
        (MemberKind.BRACE, True): Layer.BRACE_EXST,
        (MemberKind.BRACE, False): Layer.BRACE_NEWW,
        (MemberKind.TIE, True): Layer.TIE_EXST,
        (MemberKind.TIE, False): Layer.TIE_NEWW,
    }
    for key, layer in layers.items():
        assert len([e for e in doc.modelspace() if e.dxf.layer == layer.layer_name]) == expected[key], layer


def test_markers_supports_and_hatches_counted(case: tuple[DrawnSheet, Drawing]) -> None:
    sheet, doc = case
    members = [m for fs in sheet.frames for m in fs.frame.members]
    inserts = Counter(e.dxf.name for e in doc.modelspace() if e.dxftype() == "INSERT" and e.dxf.layer != "S-ANNO-LEGN")
    ties = [m for m in members if m.kind is MemberKind.TIE]
    assert inserts[TIE_CW_BLOCK] == sum(1 for m in ties if m.diagonal is Diagonal.RISING)
    assert inserts[TIE_ACW_BLOCK] == sum(1 for m in ties if m.diagonal is Diagonal.FALLING)
    assert inserts[CRITICAL_BLOCK] == sum(len(fs.verdict.critical_members) for fs in sheet.frames)
    base = [fs.frame for fs in sheet.frames if fs.frame.supports is Supports.BASE]
    assert inserts[SUPPORT_BLOCK] == sum(f.cols + 1 for f in base)
    assert len(_entities(doc, Layer.OPENING_PATT, "HATCH")) == sum(len(blocked_bays(fs.frame)) for fs in sheet.frames)
    loose = sum(len(p.rows) + len(p.columns) for fs in sheet.frames for p in fs.verdict.loose_parts)
    assert len(_entities(doc, Layer.LOOSE, "HATCH")) == loose


def test_unbraced_face_is_shaded_loose_every_lift(unbraced: tuple[DrawnSheet, Drawing]) -> None:
    # Theory (pinned base): every lift needs its own brace or tie pair; with no members,
    # each of the 8 lifts is a loose part that racks both ways.
    sheet, doc = unbraced
    face = sheet.frames[0]
    assert len(face.verdict.loose_parts) == 8
    tags = [e.dxf.text for e in _entities(doc, Layer.LOOSE, "TEXT")]
    assert sum(1 for t in tags if t.endswith("both ways")) == 16  # 8 lifts on each of the two frames


def test_loose_deck_parts_tagged(deck: tuple[DrawnSheet, Drawing]) -> None:
    # Expected parts derived by hand in drawing_cases.loose_deck (directed-cycle criterion).
    sheet, doc = deck
    parts = sheet.frames[0].verdict.loose_parts
    assert sorted((p.rows, p.columns) for p in parts) == [((), (3,)), ((), (4,)), ((2,), (2,)), ((3,), ())]
    tags = {e.dxf.text for e in _entities(doc, Layer.LOOSE, "TEXT")}
    assert any(t.endswith("anticlockwise only") or t.endswith("clockwise only") for t in tags)
    assert sum(1 for t in tags if t.endswith("(C3)") or t.endswith("(C4)")) == 2


def test_diagonal_endpoints_are_bay_corners(case: tuple[DrawnSheet, Drawing]) -> None:
    # Independent reference: bay corners from numpy cumulative sums of the input sizes.
    sheet, doc = case
    layers = {Layer.BRACE_EXST.layer_name, Layer.BRACE_NEWW.layer_name, Layer.TIE_EXST.layer_name,
              Layer.TIE_NEWW.layer_name}  # fmt: skip
    drawn = sorted(
        (round(e.dxf.start.x, 3), round(e.dxf.start.y, 3), round(e.dxf.end.x, 3), round(e.dxf.end.y, 3))
        for e in doc.modelspace()
        if e.dxftype() == "LINE" and e.dxf.layer in layers
    )
    expected = []
    for fs, (ox, oy) in zip(sheet.frames, sheet.plan.origins, strict=True):
        xs = ox + np.concatenate([[0], np.cumsum(fs.frame.widths)])
        ys = oy + np.concatenate([[0], np.cumsum(fs.frame.heights)])
        for m in fs.frame.members:
            x0, x1, y0, y1 = xs[m.col - 1], xs[m.col], ys[m.row - 1], ys[m.row]
            seg = (x0, y0, x1, y1) if m.diagonal is Diagonal.RISING else (x0, y1, x1, y0)
            expected.append(tuple(round(float(v), 3) for v in seg))
    assert drawn == sorted(expected)


def test_dimension_values_equal_input_sizes(case: tuple[DrawnSheet, Drawing]) -> None:
    # Each DIMENSION's measurement (ezdxf computes it from the defining points) equals an input size.
    sheet, doc = case
    measured = sorted(round(float(e.get_measurement()), 6) for e in doc.modelspace().query("DIMENSION"))
    expected: list[float] = []
    for fs in sheet.frames:
        f = fs.frame
        expected += [float(w) for w in f.widths] + [float(h) for h in f.heights]
        if f.cols > 1:
            expected.append(float(np.sum(f.widths)))
        if f.rows > 1:
            expected.append(float(np.sum(f.heights)))
    assert measured == sorted(expected)
    assert all(e.dxf.layer == Layer.GRID_DIMS.layer_name for e in doc.modelspace().query("DIMENSION"))


def test_title_block_carries_caution_version_and_project(case: tuple[DrawnSheet, Drawing]) -> None:
    sheet, doc = case
    texts = [e.plain_text() for e in doc.modelspace().query("MTEXT")]
    texts += [e.dxf.text for e in doc.modelspace().query("TEXT")]
    joined = " ".join(" ".join(t.split()) for t in texts)
    assert CAUTION in joined
    assert __version__ in joined
    assert "2026-12-01" in joined
    assert sheet.bom.project in joined


def test_labels_count_rows_and_columns(case: tuple[DrawnSheet, Drawing]) -> None:
    sheet, doc = case
    labels = Counter(e.dxf.text for e in _entities(doc, Layer.GRID_LABEL, "TEXT"))
    for fs in sheet.frames:
        for r in range(1, fs.frame.rows + 1):
            assert labels[f"R{r}"] >= 1
        for c in range(1, fs.frame.cols + 1):
            assert labels[f"C{c}"] >= 1
    assert sum(labels.values()) == sum(fs.frame.rows + fs.frame.cols for fs in sheet.frames)


def _text_boxes(doc: Drawing) -> list[tuple[str, bbox.BoundingBox]]:
    out = []
    for e in doc.modelspace():
        items = list(e.virtual_entities()) if e.dxftype() == "DIMENSION" else [e]
        for t in items:
            if t.dxftype() == "TEXT":
                out.append((t.dxf.text, bbox.extents([t], fast=False)))
            elif t.dxftype() == "MTEXT":
                out.append((t.plain_text(), bbox.extents([t], fast=False)))
    return out


@pytest.mark.parametrize("name", ["braced", "unbraced", "deck"])
def test_no_two_labels_overlap(name: str, request: pytest.FixtureRequest) -> None:
    # The issue asks for no overlapping labels on a 12 x 8 frame; text extents from ezdxf's bbox module.
    _, doc = request.getfixturevalue(name)
    boxes = _text_boxes(doc)
    clashes = [
        (a[0], b[0])
        for i, a in enumerate(boxes)
        for b in boxes[i + 1 :]
        if a[1].has_intersection(b[1])
    ]  # fmt: skip
    assert clashes == []


def test_sheet_is_a3_and_all_inside_the_border(braced: tuple[DrawnSheet, Drawing]) -> None:
    sheet, doc = braced
    assert sheet.plan.sheet == "A3"
    w, h = sheet.plan.paper
    ext = bbox.extents(doc.modelspace(), fast=True)
    assert ext.extmin.x >= 0
    assert ext.extmin.y >= 0
    assert ext.extmax.x <= w * sheet.plan.scale + 1e-6
    assert ext.extmax.y <= h * sheet.plan.scale + 1e-6


def test_failed_write_leaves_no_partial_file(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # The rename is the commit point: make it fail and check nothing is left behind.
    sheet = build_drawing(load_project(ORCHARD), when=WHEN)
    target = tmp_path / "out.dxf"

    def broken(*_args: object) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", broken)
    with pytest.raises(ExportError, match="No space left"):
        write_dxf(sheet.doc, target)
    assert list(tmp_path.iterdir()) == []


def test_failed_write_keeps_the_older_file(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    sheet = build_drawing(load_project(ORCHARD), when=WHEN)
    target = tmp_path / "out.dxf"
    target.write_text("older drawing", encoding="utf-8")

    def broken(_stream: object, *args: object, **kwargs: object) -> None:
        raise OSError(5, "Input/output error")

    monkeypatch.setattr(type(sheet.doc), "write", broken)
    with pytest.raises(ExportError):
        write_dxf(sheet.doc, target)
    assert target.read_text(encoding="utf-8") == "older drawing"
    assert [p.name for p in tmp_path.iterdir()] == ["out.dxf"]
