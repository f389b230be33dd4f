"""The robustness plot (outputs/robustplot.py), its JSON shape (outputs/shapes.py) and its HTML section.

References: Pillow reads the PNG back; the standard library's ``xml.etree`` and ``html.parser``
read the SVG and the report; the JSON keys ``name``, ``members``, ``curve`` (``lost``,
``p_stable``, ``low``, ``high``, ``exact``) and ``expected_losses_to_mechanism`` are fixed by the
issue that asked for the command.
"""

from __future__ import annotations

import io
import json
import xml.etree.ElementTree as ET
from html.parser import HTMLParser

import numpy as np
from PIL import Image

from bracegrid.analysis import RobustnessOptions, robustness_of
from bracegrid.compare import compare_project, compare_robustness
from bracegrid.model import Diagonal, Frame, LossLikelihood, Member, MemberKind, Project, Supports
from bracegrid.optimize import SolveOptions
from bracegrid.outputs import PlotFormat, render_robustness_plot, robustness_dict, robustness_panels, strategy_panels
from bracegrid.outputs.htmlreport import _robustness_section

B, T = MemberKind.BRACE, MemberKind.TIE
X = tuple(Member(i, j, T, d) for i in (1, 2) for j in (1, 2, 3) for d in Diagonal)
FRAME = Frame("x ties 2x3", (3000,) * 3, (2000,) * 2, members=X)


def _results() -> list:
    sampled = robustness_of(FRAME, options=RobustnessOptions(max_lost=6, samples=300, exact_limit=0))
    exact = robustness_of(FRAME, options=RobustnessOptions(max_lost=6))
    never = robustness_of(
        Frame("held", (3000,), (2000,), supports=Supports.BASE, members=(Member(1, 1, B, Diagonal.RISING),)),
        likelihood=LossLikelihood(brace=0.0, tie=1.0),
    )
    loose = robustness_of(Frame("loose", (3000,), (2000,)))
    return [sampled, exact, never, loose]


def test_png_is_drawn_and_svg_is_repeatable() -> None:
    panels = robustness_panels(_results())
    png = render_robustness_plot(panels, PlotFormat.PNG, dpi=80)
    with Image.open(io.BytesIO(png)) as image:
        assert image.format == "PNG"
        assert len(np.unique(np.asarray(image.convert("L")))) > 10
    svg = render_robustness_plot(panels, PlotFormat.SVG)
    assert svg == render_robustness_plot(panels, PlotFormat.SVG)  # fixed ids and no date: same bytes
    root = ET.fromstring(svg)
    assert root.tag.endswith("svg")


def test_json_shape_of_every_kind_of_result() -> None:
    data = json.loads(json.dumps(robustness_dict(_results()), allow_nan=False))  # finite numbers only
    sampled, exact, never, loose = data["frames"]
    for f in data["frames"]:
        assert {"name", "members", "curve", "expected_losses_to_mechanism"} <= set(f)
    assert not sampled["curve"][1]["exact"]
    assert sampled["samples"] == 300
    assert sampled["expected_losses_low"] <= sampled["expected_losses_to_mechanism"] <= sampled["expected_losses_high"]
    assert all(p["exact"] for p in exact["curve"])
    assert exact["expected_losses_exact"] is True
    assert never["expected_losses_to_mechanism"] is None
    assert never["curve"] == []
    assert loose["stable"] is False
    assert loose["expected_losses_to_mechanism"] == 0.0


def test_compare_section_holds_the_strategy_curves() -> None:
    # The whole report (with its six sheet previews) is parsed in tests/compare/test_strategies.py;
    # here the section the robustness hook adds, on its own.
    project = Project("yard", (Frame("bay line", (3000,) * 3, (2000,) * 2, supports=Supports.BASE),))
    comparison = compare_project(project, options=SolveOptions(time_limit=3, workers=1, seed=0))
    curves = compare_robustness(comparison, options=RobustnessOptions(samples=200))
    assert len(curves) == 6
    assert all(c.result.stable for c in curves)
    assert [p.title for p in strategy_panels(curves)] == ["bay line: members lost at random"]
    section = _robustness_section(curves)

    class Count(HTMLParser):
        svg = 0

        def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
            self.svg += tag == "svg"

    parser = Count()
    parser.feed(section)
    assert parser.svg == 1
    assert section.startswith("<h2>Robustness: members lost at random</h2>")
    assert section.count("<li>") == 6
    assert "E[losses to mechanism]" in section
    assert 'id="robust-' in section  # ids scoped so they cannot clash with the sheet drawings
