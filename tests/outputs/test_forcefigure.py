"""The report's force figure: drawn for the page from the analysis, its numbers read back from the SVG.

Reference: the member forces of :func:`bracegrid.mechanics.analyse_frame` (validated in
tests/mechanics against hand statics and an independent convex solver); the figure must print
exactly those forces (kN, one decimal) and colour each bar by the force sheet's own ramp.
Python's ``xml.etree`` parses the SVG.
"""

from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest

from bracegrid.mechanics import BarKind, analyse_frame
from bracegrid.outputs.forcefigure import force_legend_html, force_svg
from bracegrid.outputs.ramp import OVER_RGB
from tests.drawing_cases import braced_quayside

SVG = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def governing() -> tuple[object, object]:
    project = braced_quayside()
    end = project.frames[1]  # the 1.3 m end frame, an X of ties per lift, with the demo's load cases
    forces = analyse_frame(end, project.strength)
    case = next(c for c in forces.cases if not c.is_mechanism)
    return end, case


def test_labels_are_the_analysed_forces(governing: tuple[object, object]) -> None:
    frame, case = governing
    root = ET.fromstring(force_svg(frame, case, title="end frame"))  # type: ignore[arg-type]
    labels = [t.text for t in root.iter(f"{SVG}text") if t.text and t.text[0] in "+-0"]
    diagonals = [m for m in case.members if m.kind in {BarKind.BRACE, BarKind.TIE} and not m.slack]  # type: ignore[attr-defined]
    for m in diagonals:
        text = (
            "0.0"
            if abs(m.force_kn) < 0.05
            else (f"{m.force_kn:+.0f}" if abs(m.force_kn) >= 100 else f"{m.force_kn:+.1f}")
        )
        assert text in labels
    over = [m for m in case.members if m.over]  # type: ignore[attr-defined]
    heavy = [p for p in root.iter(f"{SVG}path") if p.get("stroke-width") == "4"]
    assert len(heavy) == len(over)
    assert all(p.get("stroke") == "#{:02x}{:02x}{:02x}".format(*OVER_RGB) for p in heavy)


def test_legend_explains_the_ramp_and_marks() -> None:
    text = force_legend_html(rated=True)
    for words in ("utilisation", "over capacity", "slack tie", "kN, tension +", "base reaction"):
        assert words in text
