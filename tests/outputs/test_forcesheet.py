"""The force sheet: read back and audited by ezdxf, its own layers, one entity per bar, markers, previews.

Reference reader: ezdxf's loader and auditor (``ezdxf.readfile``, ``Drawing.audit``); Pillow for the
PNG. Counts are checked against the analysis the sheet draws.
"""

from __future__ import annotations

import io
from collections import Counter
from datetime import date
from pathlib import Path

import ezdxf
import pytest
from PIL import Image

from bracegrid.mechanics import analyse_frame
from bracegrid.model import (
    Diagonal,
    Frame,
    GridStrength,
    LoadCase,
    Member,
    MemberKind,
    MemberStrength,
    Project,
    StrengthCatalogue,
    Supports,
)
from bracegrid.outputs import OutputFormat, render_force_files
from bracegrid.outputs.drawing import dxf_bytes
from bracegrid.outputs.forcesheet import OVER_BLOCK, ForceLayer, build_force_sheet, nice_factor
from bracegrid.outputs.preview import PreviewFormat, preview_pixels, render_preview
from bracegrid.outputs.ramp import utilisation_rgb

T = MemberKind.TIE
STRENGTH = StrengthCatalogue(
    tie=MemberStrength(tension_kn=10.0, ea_kn=20000.0),
    brace=MemberStrength(tension_kn=20.0, compression_kn=9.0, ea_kn=90000.0),
    grid=GridStrength(ea_kn=300000.0, standard_kn=12.0, ledger_kn=6.0, uplift_kn=0.0),
)
WHEN = date(2026, 12, 1)


@pytest.fixture(scope="module")
def tower() -> tuple[Project, Frame]:
    members = tuple(Member(i, 2, T, d) for i in (1, 2, 3) for d in Diagonal)
    frame = Frame(
        "tower",
        (2500, 1800, 2500),
        (2000, 2000, 2000),
        supports=Supports.BASE,
        members=members,
        loads=(LoadCase("wind", (0.0, 3.0, 3.0, 1.5), reverse=True),),
    )
    return Project("force sheet test", (frame,), strength=STRENGTH), frame


def test_sheet_audits_clean_and_draws_every_bar_on_its_layer(tower: tuple[Project, Frame], tmp_path: Path) -> None:
    project, frame = tower
    forces = analyse_frame(frame, STRENGTH)
    sheet = build_force_sheet(project, frame, forces.cases, when=WHEN)
    path = tmp_path / "sheet.dxf"
    path.write_bytes(dxf_bytes(sheet.doc))
    doc = ezdxf.readfile(path)
    assert not doc.audit().has_errors
    names = {layer.dxf.name for layer in doc.layers}
    assert {layer.layer_name for layer in ForceLayer} <= names
    msp = doc.modelspace()
    lines = Counter(e.dxf.layer for e in msp.query("LINE"))
    slack = sum(len(c.slack_ties) for c in forces.cases)
    bars = sum(len(c.members) for c in forces.cases)
    assert lines[ForceLayer.SLACK.layer_name] == slack
    assert lines[ForceLayer.MEMBER.layer_name] == bars - slack
    inserts = Counter(e.dxf.name for e in msp.query("INSERT") if e.dxf.layer == ForceLayer.OVER.layer_name)
    assert inserts[OVER_BLOCK] == sum(len(c.over_capacity) for c in forces.cases) > 0
    texts = " ".join(e.dxf.text for e in msp.query("TEXT"))
    assert f"deflected shape x {sheet.factor:g}" in texts
    assert "OVER CAPACITY" in texts
    notes = " ".join(e.text for e in msp.query("MTEXT"))
    assert "no second-order (P-delta)" in notes
    assert "licensed engineer" in notes


def test_a_mechanism_panel_shades_what_moves(tower: tuple[Project, Frame]) -> None:
    project, frame = tower
    import dataclasses

    one_sense = dataclasses.replace(frame, members=tuple(m for m in frame.members if m.diagonal is Diagonal.RISING))
    forces = analyse_frame(one_sense, STRENGTH)
    sheet = build_force_sheet(project, one_sense, forces.cases, when=WHEN)
    msp = sheet.doc.modelspace()
    shaded = [h for h in msp.query("HATCH") if h.dxf.layer == ForceLayer.MECHANISM.layer_name]
    assert len(shaded) == 3  # the three lifts rack left under the reversed wind
    assert any("MECHANISM" in e.dxf.text for e in msp.query("TEXT"))


def test_preview_and_file_set(tower: tuple[Project, Frame]) -> None:
    project, frame = tower
    forces = analyse_frame(frame, STRENGTH)
    sheets, files = render_force_files(
        project, [forces], stem="t", formats=(OutputFormat.DXF, OutputFormat.PNG), when=WHEN
    )
    assert [f.name for f in files] == ["t-forces.csv", "t-forces-tower.dxf", "t-forces-tower.png"]
    png = Image.open(io.BytesIO(files[-1].data))
    want = preview_pixels(sheets[0])
    assert abs(png.size[0] - want[0]) <= 1
    assert abs(png.size[1] - want[1]) <= 1  # matplotlib rounds the figure size down
    colours = png.convert("RGB").getcolors(maxcolors=1 << 20) or []
    assert len(colours) > 20  # colours drawn, not a blank page
    assert render_preview(sheets[0], PreviewFormat.SVG).startswith(b"<?xml")


def test_colour_ramp_and_exaggeration_factor() -> None:
    assert utilisation_rgb(0.0) == (70, 110, 200)
    assert utilisation_rgb(1.0) == (220, 60, 30)
    assert utilisation_rgb(1.01) == (150, 0, 110)
    assert [nice_factor(x) for x in (1.0, 3.0, 7.5, 99.0, 0.04)] == [1.0, 2.0, 5.0, 50.0, 0.02]
