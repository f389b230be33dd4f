"""Names with control characters in drawings, plots and reports (found by fuzzing the strength fields).

Before: a frame named with a bell (U+0007) or NEL (U+0085) made matplotlib warn "Glyph 7 missing
from font(s)" on the force sheet's PNG and the robustness plot, a 300-character name squeezed the
plot's axes to nothing ("constrained_layout not applied"), and the SVG files held characters XML
forbids. Now every such character is written as a Python escape and plot labels are shortened.
"""

from __future__ import annotations

import json
import warnings
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from bracegrid.cli import main
from bracegrid.outputs import short_label, visible_text
from bracegrid.outputs.safetext import markup_text

ROOT = Path(__file__).resolve().parents[2]


def _named(tmp_path: Path, name: str) -> Path:
    text = (ROOT / "projects" / "quayside-scaffold.toml").read_text(encoding="utf-8")
    text = text.replace('name = "street face"', f"name = {json.dumps(name)}", 1)
    path = tmp_path / "named.toml"
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize("name", ["bell\u0007 face", "nel\u0085face", "x" * 300, "\u202eevil face", "名前 face"])
def test_forces_robustness_and_draw_stay_quiet(tmp_path: Path, name: str) -> None:
    path = _named(tmp_path, name)
    runs = [
        ["forces", str(path), "--frame", name, "--out", str(tmp_path / "f"), "--format", "png,svg,dxf"],
        ["robustness", str(path), "--frame", name, "--samples", "200", "--max-lost", "3", "--out",
         str(tmp_path / "r")],
        ["draw", str(path), "--out", str(tmp_path / "d")],
    ]  # fmt: skip
    for argv in runs:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            assert main(argv) in (0, 1), argv
    for svg in (tmp_path / "f").glob("*.svg"):
        ET.parse(svg)  # well-formed XML
    for svg in (tmp_path / "r").glob("*.svg"):
        ET.parse(svg)
        assert name not in svg.read_text(encoding="utf-8") or name.isprintable()


def test_escapes() -> None:
    assert visible_text("a\u0007b") == "a\\x07b"
    assert visible_text("line\nbreak") == "line\\nbreak"
    assert visible_text("line\nbreak", one_line=False) == "line\nbreak"
    assert visible_text("ünïcödé 名前") == "ünïcödé 名前"  # printable text is left alone
    assert short_label("x" * 61) == "x" * 59 + "…"
    assert markup_text("<b>\u0007") == "&lt;b&gt;\\x07"
