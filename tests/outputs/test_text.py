"""Terminal text (src/bracegrid/outputs/text.py): render_check, render_optimize, render_compare, progress_line.

References: the verdicts come from the stability check on THEORY.md's cases (a spanning tree of
braces is stable with every brace critical; three ties in a chain on a 2 x 2 frame are floppy);
the loose-part wording is that of analysis/words.py (checked in tests/analysis/test_words.py);
the progress line format is the docstring example of progress_line, worked by hand.
"""

from __future__ import annotations

import csv
import io
import re

import pytest

from bracegrid.analysis import CAUTION, anchor_words, check_frame, describe_part
from bracegrid.compare import StrategyKey, compare_project
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Project, Supports
from bracegrid.optimize import ProgressEvent, SolveOptions, optimize_project
from bracegrid.outputs.text import progress_line, render_check, render_compare, render_compare_csv, render_optimize

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING
OPTIONS = SolveOptions(time_limit=5, workers=1, seed=0)

TREE = Frame("tree frame", (3000, 3000), (4000,), members=(Member(1, 1, B, R), Member(1, 2, B, F)))
CHAIN = Frame(
    "chain frame",
    (3000, 3000),
    (4000, 4000),
    members=(Member(1, 1, T, R), Member(1, 2, T, F), Member(2, 2, T, R)),  # THEORY.md: floppy 2 x 2
)


def _flat(text: str) -> str:
    """Collapse line breaks and runs of spaces, so wrapped words still match."""
    return re.sub(r"\s+", " ", text)


def test_render_check_verdicts_and_caution() -> None:
    text = render_check("Check yard", [check_frame(TREE), check_frame(CHAIN)])
    assert "Stability check: Check yard" in text
    rows = {line.split("│")[1].strip(): line for line in text.splitlines() if line.count("│") > 3}
    assert "STABLE" in rows["tree frame"]
    assert "NOT STABLE" not in rows["tree frame"]
    assert "NOT STABLE" in rows["chain frame"]
    assert f"Caution: {CAUTION}" in _flat(text)
    assert text.endswith("\n")


def test_render_check_loose_parts_and_critical_members() -> None:
    chain = check_frame(CHAIN)
    assert chain.loose_parts
    text = render_check("p", [check_frame(TREE), chain])
    flat = _flat(text)
    for part in chain.loose_parts:
        assert f"chain frame: {describe_part(part, anchor_words(chain))}" in flat
    assert "can rack" in flat
    # Both braces of a two-bay tree are critical (each is a bridge).
    assert "tree frame: critical (single loss makes it unstable): brace r1c1:rising, brace r1c2:falling" in flat
    assert "chain frame: critical" not in flat  # an unstable frame has no critical members


def test_render_check_names_removed_members() -> None:
    v = check_frame(TREE, without=[TREE.members[0]])
    flat = _flat(render_check("p", [v]))
    assert "tree frame: checked without brace r1c1:rising" in flat
    assert "NOT STABLE" in flat
    assert "column 1 can rack both ways" in flat


def test_render_check_on_a_pinned_base() -> None:
    base = Frame("lift", (3000,), (2000,), supports=Supports.BASE, members=(Member(1, 1, T, R),))
    flat = _flat(render_check("p", [check_frame(base)]))
    # A rising tie alone: the lift can still sway left (THEORY.md; tests/analysis/test_words.py).
    assert "lift: row 1 can rack anticlockwise only (tops sway left) relative to the pinned base" in flat


@pytest.mark.parametrize(
    ("event", "expected"),
    [
        # Docstring example: 10.00, 9.50, 0.05 -> 5.00%, 1.25 s shown with one decimal.
        (
            ProgressEvent(frame="f", cost=10.0, bound=9.5, gap=0.05, seconds=1.25, stage="CP-SAT"),
            "f: best 10.00  bound 9.50  gap 5.00%  1.2 s  CP-SAT",
        ),
        (
            ProgressEvent(frame="north", cost=None, bound=0.0, gap=None, seconds=0.0, stage="warm start"),
            "north: best -  bound 0.00  gap -  0.0 s  warm start",
        ),
        (
            ProgressEvent(frame="g", cost=1234.5678, bound=1200.0, gap=0.028, seconds=12.34, stage="x"),
            "g: best 1234.57  bound 1200.00  gap 2.80%  12.3 s  x",
        ),
    ],
)
def test_progress_line(event: ProgressEvent, expected: str) -> None:
    assert progress_line(event) == expected


def test_render_optimize() -> None:
    project = Project("Opt yard", (Frame("base", (2500,) * 3, (2000,) * 2, supports=Supports.BASE),))
    solution = optimize_project(project, options=OPTIONS)
    text = render_optimize("Opt yard", solution)
    flat = _flat(text)
    assert "Optimized layout: Opt yard" in text
    assert "OPTIMAL" in text
    assert f"Total cost {solution.cost:.2f}" in flat
    assert "base: pinned-base rows (exact per row)" in flat
    assert "base: add " in flat
    assert f"Caution: {CAUTION}" in flat


def test_render_compare_and_csv() -> None:
    project = Project("Cmp yard", (Frame("plan", (3000,) * 2, (2000,) * 2),))
    comparison = compare_project(project, options=OPTIONS)
    flat = _flat(render_compare(comparison))
    assert "Bracing alternatives: plan" in flat
    for key in StrategyKey:
        assert key.value in flat
    assert f"Caution: {CAUTION}" in flat
    rows = list(csv.DictReader(io.StringIO(render_compare_csv(comparison))))
    assert [r["key"] for r in rows] == [k.value for k in StrategyKey]
    assert {r["frame"] for r in rows} == {"plan"}
