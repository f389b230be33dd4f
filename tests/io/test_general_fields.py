"""The general-frame fields of the project file (src/bracegrid/io/general.py) and grid bar references."""

from __future__ import annotations

import pytest

from bracegrid.errors import InputError
from bracegrid.io import parse_grid_bar_refs, parse_project, render_project
from bracegrid.model import Frame, GridBar, GridBarKind, closed_bays, present_grid_bars, present_nodes

HEAD = """
[project]
name = "p"
[costs.brace]
per_piece = 20.0
per_metre = 5.0
[costs.tie]
per_piece = 8.0
per_metre = 2.0
[[frame]]
name = "f"
widths = [3, 3, 3]
heights = [2, 2]
"""


def _one(extra: str) -> Frame:
    return parse_project(HEAD + extra).frames[0]


def _problems(extra: str) -> list[str]:
    with pytest.raises(InputError) as got:
        parse_project(HEAD + extra)
    return list(got.value.problems)


def test_missing_and_absent_are_read_and_written_back() -> None:
    frame = _one('absent = [[2, 3]]\n[[frame.missing]]\nbar = "ledger"\nline = 1\nspan = 1\n'
                 '[[frame.missing]]\nbar = "standard"\nline = 0\nspan = 2\n')  # fmt: skip
    assert frame.absent == frozenset({(2, 3)})
    assert frame.missing == frozenset({GridBar(GridBarKind.LEDGER, 1, 1), GridBar(GridBarKind.STANDARD, 0, 2)})
    again = parse_project(render_project(parse_project(HEAD + "absent = [[2, 3]]\n"))).frames[0]
    assert again.absent == frozenset({(2, 3)})
    text = render_project(parse_project(HEAD + '[[frame.missing]]\nbar = "ledger"\nline = 1\nspan = 1\n'))
    assert "[[frame.missing]]" in text
    assert parse_project(text).frames[0].missing == frozenset({GridBar(GridBarKind.LEDGER, 1, 1)})


def test_bars_of_absent_bays_go_unless_a_present_bay_needs_them() -> None:
    frame = _one("absent = [[2, 3]]\n")
    bars = set(present_grid_bars(frame))
    assert GridBar(GridBarKind.LEDGER, 2, 3) not in bars  # top of the absent bay: no bay above
    assert GridBar(GridBarKind.LEDGER, 1, 3) in bars  # shared with bay r1c3
    assert GridBar(GridBarKind.STANDARD, 3, 2) not in bars  # right edge of the absent bay
    assert GridBar(GridBarKind.STANDARD, 2, 2) in bars  # shared with bay r2c2
    assert (2, 3) not in present_nodes(frame)
    assert closed_bays(frame) == frozenset({(2, 3)})


_TWICE = '[[frame.missing]]\nbar = "ledger"\nline = 1\nspan = 1\n' * 2


@pytest.mark.parametrize(
    ("extra", "words"),
    [
        ('[[frame.missing]]\nbar = "ledger"\nline = 3\nspan = 1\n', "outside the frame"),
        ('[[frame.missing]]\nbar = "standard"\nline = 1\nspan = 3\n', "outside the frame"),
        ('[[frame.missing]]\nbar = "rail"\nline = 1\nspan = 1\n', '"ledger" or "standard"'),
        ('[[frame.missing]]\nbar = "ledger"\nline = 1.5\nspan = 1\n', "whole number"),
        ('[[frame.missing]]\nbar = "ledger"\nline = 1\nspan = 1\nside = 2\n', "side"),
        (_TWICE, "already listed"),
        ('absent = [[2, 3]]\n[[frame.missing]]\nbar = "ledger"\nline = 2\nspan = 3\n', "borders only absent bays"),
        ("absent = [[3, 1]]\n", "outside the frame"),
        ("absent = [[1, 1], [1, 2], [1, 3], [2, 1], [2, 2], [2, 3]]\n", "every bay is absent"),
        ('absent = [[1, 1]]\n[[frame.member]]\nrow = 1\ncol = 1\nkind = "brace"\ndiagonal = "rising"\n', "is absent"),
    ],
)
def test_bad_general_fields_are_located_and_explained(extra: str, words: str) -> None:
    problems = _problems(extra)
    assert any(words in p for p in problems), problems


def test_member_at_a_node_without_bars_is_rejected() -> None:
    """Node (1, 1) loses all four of its bars: a member of any bay around it would hang in the air."""
    gone = "".join(
        f'[[frame.missing]]\nbar = "{k}"\nline = {line}\nspan = {span}\n'
        for k, line, span in (("ledger", 1, 1), ("ledger", 1, 2), ("standard", 1, 1), ("standard", 1, 2))
    )
    member = '[[frame.member]]\nrow = 2\ncol = 2\nkind = "tie"\ndiagonal = "falling"\n'
    problems = _problems(gone + member)
    assert any("corner node (1, 1)" in p for p in problems), problems
    frame = _one(gone)
    assert {(1, 1), (1, 2), (2, 1), (2, 2)} <= closed_bays(frame)


def test_grid_bar_references() -> None:
    frame = Frame("f", (3000,) * 4, (2000,) * 3, missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 1)}))
    assert parse_grid_bar_refs(frame, ["ledger3c4", "standard2r3", "s0r1"]) == (
        GridBar(GridBarKind.LEDGER, 3, 4), GridBar(GridBarKind.STANDARD, 0, 1), GridBar(GridBarKind.STANDARD, 2, 3),
    )  # fmt: skip
    with pytest.raises(InputError) as got:
        parse_grid_bar_refs(frame, ["ledger1c1", "ledger4c1", "ledger1r1", "beam2c2"])
    text = "\n".join(got.value.problems)
    assert "has no ledger1c1" in text
    assert "outside frame" in text
    assert "spans a column" in text
    assert "not a grid bar reference" in text
