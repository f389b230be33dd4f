"""Project-file fields of the force analysis: read, validated with located messages, written back."""

from __future__ import annotations

import pytest

from bracegrid.errors import InputError
from bracegrid.io import parse_project, render_project
from bracegrid.model import Edge, LoadSense, Supports

HEAD = """
[project]
name = "Loads yard"

[costs.brace]
per_piece = 25.0
per_metre = 8.0
tension_kn = 20.0
compression_kn = 9.0
ea_kn = 90000.0

[costs.tie]
per_piece = 9.0
per_metre = 3.0
tension_kn = 12.0
ea_kn = 20000.0

[grid]
ea_kn = 300000.0
standard_kn = 40.0
ledger_kn = 6.0
uplift_kn = 0.0
"""

FRAME = """
[[frame]]
name = "face"
widths = [2.5, 2.5, 1.8]
heights = [2.0, 2.0, 2.0, 2.0]
supports = "base"

[[frame.load]]
name = "wind"
horizontal = [1.5, 1.5, 1.5, 1.2]
reverse = true

[[frame.load]]
name = "weight and a push"
gravity = [5.0, 5.0, 5.0, 5.0]
point = [[4, 3, 2.0, 0.0]]
"""


def test_the_issue_example_reads() -> None:
    project = parse_project(HEAD + FRAME)
    s = project.strength
    assert (s.brace.tension_kn, s.brace.compression_kn, s.brace.ea_kn) == (20.0, 9.0, 90000.0)
    assert (s.tie.tension_kn, s.tie.compression_kn, s.tie.ea_kn) == (12.0, None, 20000.0)
    assert (s.grid.ea_kn, s.grid.standard_kn, s.grid.ledger_kn, s.grid.uplift_kn) == (300000.0, 40.0, 6.0, 0.0)
    wind, other = project.frames[0].loads
    assert wind.horizontal_kn == (0.0, 1.5, 1.5, 1.5, 1.2)  # line 0 added: the file gives lines 1..R
    assert wind.senses == (LoadSense.PLUS, LoadSense.MINUS)
    assert other.gravity_kn == (5.0,) * 4
    assert other.point_kn == ((4, 3, 2.0, 0.0),)
    assert not other.reverse


def test_old_files_stay_valid_and_carry_no_strength() -> None:
    text = HEAD.split("tension_kn = 20.0")[0].replace("[costs.brace]", "[costs.brace]") + (
        "[costs.tie]\nper_piece = 9.0\nper_metre = 3.0\n[[frame]]\nname = 'f'\nwidths = [3.0]\nheights = [2.0]\n"
    )
    project = parse_project(text)
    assert project.frames[0].loads == ()
    assert project.strength.grid.ea_kn is None


def test_round_trip_keeps_loads_capacities_and_held_edges() -> None:
    plan = """
[[frame]]
name = "roof"
widths = [4.0, 4.0]
heights = [5.0]
held_edges = ["left", "right", "bottom"]

[[frame.load]]
name = "north"
horizontal = [0.5, 1.0]
vertical = [0.0, -2.0, 0.0]
point = [[1, 1, 0.0, -3.0]]
reverse = true
"""
    project = parse_project(HEAD + FRAME + plan)
    again = parse_project(render_project(project))
    assert again.strength == project.strength
    assert [f.loads for f in again.frames] == [f.loads for f in project.frames]
    roof = again.frame("roof")
    assert roof.held_edges == {Edge.LEFT, Edge.RIGHT, Edge.BOTTOM}
    assert roof.supports is Supports.FREE
    assert roof.loads[0].horizontal_kn == (0.5, 1.0)  # lines 0..R given and kept


@pytest.mark.parametrize(
    ("change", "expected"),
    [
        ("horizontal = [1.5, 1.5, 1.5, 1.2]", "horizontal = [1.5, 1.5]|expected a list of 4 or 5 forces in kN"),
        (
            "horizontal = [1.5, 1.5, 1.5, 1.2]",
            "horizontal = [1.5, 'x', 1.5, 1.2]|horizontal[2]: expected a force in kN",
        ),
        ('name = "wind"', 'name = ""|load #1.name: expected a non-empty string'),
        ("reverse = true", "reverse = 1|reverse: expected true or false"),
        ("point = [[4, 3, 2.0, 0.0]]", "point = [[5, 3, 2.0, 0.0]]|node (5, 3) is outside the frame"),
        ("gravity = [5.0, 5.0, 5.0, 5.0]", "gravity = [5.0]|expected a list of 4 forces"),
        ("ledger_kn = 6.0", "ledger_kn = -6.0|[grid].ledger_kn: must be above 0 kN"),
        ("ea_kn = 20000.0", "ea_kn = 0.0|[costs.tie].ea_kn: must be above 0 kN"),
        ("ea_kn = 20000.0", "ea_kn = 0.001|more than 1e+06 times apart"),
        ("tension_kn = 12.0", "compression_kn = 3.0|a tie acts in tension only"),
        ("uplift_kn = 0.0", "uplift_kn = 0.0\nfoo = 1|[grid]: unknown field 'foo'"),
        ('name = "wind"', "name = \"wind\"\nhorizntal = [1.0]|did you mean 'horizontal'?"),
    ],
)
def test_bad_values_are_located_and_explained(change: str, expected: str) -> None:
    new, message = expected.split("|")
    text = (HEAD + FRAME).replace(change, new, 1)
    with pytest.raises(InputError) as info:
        parse_project(text)
    assert any(message in p for p in info.value.problems), info.value.problems


def test_load_problems_carry_the_line_of_their_table() -> None:
    text = (HEAD + FRAME).replace("horizontal = [1.5, 1.5, 1.5, 1.2]", "horizontal = [1.5]")
    line = next(k for k, row in enumerate(text.splitlines(), start=1) if row.strip() == "[[frame.load]]")
    with pytest.raises(InputError) as info:
        parse_project(text)
    assert any(p.startswith(f"line {line}, frame 'face' load #1.horizontal") for p in info.value.problems)


def test_missing_stiffness_with_loads_names_the_field() -> None:
    text = (HEAD + FRAME).replace("ea_kn = 90000.0\n", "")
    with pytest.raises(InputError, match=r"\[costs.brace\].ea_kn: missing: frame 'face' has load cases"):
        parse_project(text)
    text = (HEAD + FRAME).replace("ea_kn = 300000.0\n", "")
    with pytest.raises(InputError, match=r"\[grid\].ea_kn: missing"):
        parse_project(text)


def test_loads_need_a_support_and_held_edges_need_a_plan_grid() -> None:
    free = (HEAD + FRAME).replace('supports = "base"', 'supports = "free"')
    with pytest.raises(InputError, match="nothing holds it"):
        parse_project(free)
    both = (HEAD + FRAME).replace('supports = "base"', 'supports = "base"\nheld_edges = ["left"]')
    with pytest.raises(InputError, match="held by its base"):
        parse_project(both)
    weight = free.replace('supports = "free"', 'held_edges = ["left", "right", "top"]')
    with pytest.raises(InputError, match="weight acts out of its plane"):
        parse_project(weight)
    edge = (HEAD + FRAME).replace('supports = "base"', 'held_edges = ["north"]')
    with pytest.raises(InputError, match="'north' is not one of"):
        parse_project(edge)
