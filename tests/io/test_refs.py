"""Member references as typed on the command line (src/bracegrid/io/refs.py: parse_member_refs).

References: the syntax rROWcCOL[:rising|:falling|:r|:f] is the one stated in MEMBER_REF_HELP
(rows from 1 at the bottom, columns from 1 at the left); the expected members are read off the
test frame by hand. The library names the reference and the frame; the shell adds its own option
name, so no message may mention ``--without`` (io/refs.py module docstring).
"""

from __future__ import annotations

import pytest

from bracegrid.errors import InputError
from bracegrid.io import MEMBER_REF_HELP, parse_member_refs
from bracegrid.model import Diagonal, Frame, Member, MemberKind

TIE_F = Member(2, 3, MemberKind.TIE, Diagonal.FALLING)
BRACE_R = Member(2, 3, MemberKind.BRACE, Diagonal.RISING)
CORNER = Member(1, 1, MemberKind.BRACE, Diagonal.RISING)
# File order deliberately not bay order: the result follows the frame's order.
FRAME = Frame("north wall", (1000,) * 3, (1000,) * 2, members=(TIE_F, CORNER, BRACE_R))


def _problems(refs: list[str]) -> tuple[str, ...]:
    with pytest.raises(InputError) as info:
        parse_member_refs(FRAME, refs)
    for text in (*info.value.problems, str(info.value)):
        assert "--without" not in text
    return info.value.problems


def test_whole_bay() -> None:
    assert parse_member_refs(FRAME, ["r2c3"]) == (TIE_F, BRACE_R)
    assert parse_member_refs(FRAME, ["r1c1"]) == (CORNER,)


@pytest.mark.parametrize(
    ("ref", "expected"),
    [
        ("r2c3:rising", (BRACE_R,)),
        ("r2c3:r", (BRACE_R,)),
        ("r2c3:falling", (TIE_F,)),
        ("r2c3:f", (TIE_F,)),
    ],
)
def test_one_diagonal(ref: str, expected: tuple[Member, ...]) -> None:
    assert parse_member_refs(FRAME, [ref]) == expected


@pytest.mark.parametrize("ref", ["R2C3:F", "r2C3:Falling", "R2c3:FALLING", "  r2c3:f  ", "r2 c3 : f", "r02c03:f"])
def test_case_whitespace_and_leading_zeros(ref: str) -> None:
    assert parse_member_refs(FRAME, [ref]) == (TIE_F,)


def test_frame_order_without_repeats() -> None:
    got = parse_member_refs(FRAME, ["r2c3:r", "r1c1", "r2c3", "r1c1:rising", "r2c3:f"])
    assert got == (TIE_F, CORNER, BRACE_R)  # FRAME.members order, each once


def test_nothing_asked() -> None:
    assert parse_member_refs(FRAME, []) == ()


@pytest.mark.parametrize(
    "ref", ["2,3", "r2", "c3", "c3r2", "r2c3:x", "r2c3:", "", "rxc3", "r-1c3", "r2c3:up", "bay 2 3"]
)
def test_bad_syntax(ref: str) -> None:
    (problem,) = _problems([ref])
    assert problem.startswith(f"{ref!r}: not a member reference")
    assert MEMBER_REF_HELP in problem


def test_bay_with_no_member() -> None:
    (problem,) = _problems(["r1c2"])
    assert problem == "'r1c2': no such member in frame 'north wall' (that bay holds no member)"


def test_bay_outside_the_frame() -> None:
    (problem,) = _problems(["r9c9"])
    assert "'r9c9'" in problem
    assert "'north wall'" in problem


def test_missing_diagonal_names_what_the_bay_holds() -> None:
    (problem,) = _problems(["r1c1:f"])
    assert problem == "'r1c1:f': no such member in frame 'north wall' (that bay holds r1c1:rising)"


def test_every_problem_in_one_error() -> None:
    problems = _problems(["bad", "r2c3", "r1c2", "r1c1:falling", "r3c1"])
    # Hand: 'bad' is malformed; r1c2, r1c1:falling and r3c1 match nothing; r2c3 is fine.
    assert len(problems) == 4
    assert [p.split(":")[0] for p in problems] == ["'bad'", "'r1c2'", "'r1c1", "'r3c1'"]
    with pytest.raises(InputError, match="4 problems found"):
        parse_member_refs(FRAME, ["bad", "r2c3", "r1c2", "r1c1:falling", "r3c1"])
