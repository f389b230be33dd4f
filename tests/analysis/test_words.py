"""Plain-word explanations (src/bracegrid/analysis/words.py): numbers, loose parts, anchors, redundancy, caution.

References: the racking senses are defined in model/kinds.py (Racking: clockwise = a row's top
sways right, a column's right side drops); THEORY.md ("Counting loose parts"): a part no member
ties to the rest moves both ways, a part held only by ties one way only; a rising diagonal
lengthens when the top of its bay sways right (THEORY.md, "What a diagonal does"), so a rising tie
alone leaves only the anticlockwise sense. The caution's wording on who is responsible follows
THEORY.md ("Limits of the model"). Expected strings are written out by hand.
"""

from __future__ import annotations

import pytest

from bracegrid.analysis import (
    CAUTION,
    LoosePart,
    Verdict,
    anchor_words,
    check_layout,
    describe_part,
    format_numbers,
    redundancy_words,
)
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Racking, Supports

BASE = "the pinned base"


@pytest.mark.parametrize(
    ("values", "expected"),
    [
        ([1, 2, 3, 5, 7, 8], "1-3, 5, 7-8"),
        ([], ""),
        ([4], "4"),
        ([3, 1, 2, 2], "1-3"),  # unsorted with a repeat
        ([10, 12, 11, 1], "1, 10-12"),
        ([1, 3, 5], "1, 3, 5"),
        ((x for x in (6, 7)), "6-7"),  # any iterable
    ],
)
def test_format_numbers(values: object, expected: str) -> None:
    assert format_numbers(values) == expected  # type: ignore[arg-type]


def test_rows_clockwise() -> None:
    text = describe_part(LoosePart((3, 4), (), Racking.CLOCKWISE), BASE)
    assert text == (
        "rows 3-4 can rack clockwise only (tops sway right) relative to the pinned base; "
        "a tie or brace must stop the other sense too"
    )


def test_rows_anticlockwise() -> None:
    text = describe_part(LoosePart((2,), (), Racking.ANTICLOCKWISE), BASE)
    assert text.startswith("row 2 can rack anticlockwise only (tops sway left) relative to the pinned base;")


def test_columns_clockwise_and_anticlockwise() -> None:
    cw = describe_part(LoosePart((), (1, 2, 3), Racking.CLOCKWISE), "the part holding row 1")
    acw = describe_part(LoosePart((), (5,), Racking.ANTICLOCKWISE), "the part holding row 1")
    assert cw.startswith("columns 1-3 can rack clockwise only (right side drops) relative to the part holding row 1;")
    assert acw.startswith("column 5 can rack anticlockwise only (right side rises) relative to the part holding row 1;")


def test_both_ways() -> None:
    text = describe_part(LoosePart((2,), (4, 6), Racking.BOTH), BASE)
    assert (
        text == "row 2 with columns 4, 6 can rack both ways relative to the pinned base: no member ties it to the rest"
    )


def test_rows_with_columns_use_the_row_wording() -> None:
    text = describe_part(LoosePart((1, 2), (3,), Racking.CLOCKWISE), BASE)
    assert "rows 1-2 with column 3 can rack clockwise only (tops sway right)" in text


def test_one_sense_parts_ask_for_the_other_sense() -> None:
    for racking in (Racking.CLOCKWISE, Racking.ANTICLOCKWISE):
        assert describe_part(LoosePart((1,), (), racking), BASE).endswith(
            "a tie or brace must stop the other sense too"
        )
    assert "must stop" not in describe_part(LoosePart((1,), (), Racking.BOTH), BASE)


def test_a_rising_tie_on_a_pinned_base_leaves_the_anticlockwise_sense() -> None:
    # THEORY.md: the top swaying right lengthens the rising diagonal, which the tie resists; the row
    # can still sway left. The check's verdict and the words must say exactly that.
    frame = Frame("f", (3000,), (2000,), supports=Supports.BASE)
    verdict = check_layout(frame, [Member(1, 1, MemberKind.TIE, Diagonal.RISING)])
    (part,) = verdict.loose_parts
    assert part.racking is Racking.ANTICLOCKWISE
    assert describe_part(part, anchor_words(verdict)).startswith(
        "row 1 can rack anticlockwise only (tops sway left) relative to the pinned base"
    )
    falling = check_layout(frame, [Member(1, 1, MemberKind.TIE, Diagonal.FALLING)])
    assert falling.loose_parts[0].racking is Racking.CLOCKWISE


def _verdict(supports: Supports, rows: tuple[int, ...], columns: tuple[int, ...]) -> Verdict:
    return Verdict(
        frame="f",
        stable=False,
        racking_modes=1,
        loose_parts=(),
        anchor_rows=rows,
        anchor_columns=columns,
        critical_members=(),
        braces=0,
        ties=0,
        maxwell_needed=3,
        supports=supports,
    )


def test_anchor_words() -> None:
    assert anchor_words(_verdict(Supports.BASE, (1,), (1, 2))) == "the pinned base"
    assert anchor_words(_verdict(Supports.FREE, (1, 2), (1,))) == "the part holding rows 1-2 with column 1"
    assert anchor_words(_verdict(Supports.FREE, (3,), ())) == "the part holding row 3"
    assert anchor_words(_verdict(Supports.FREE, (), (2, 4))) == "the part holding columns 2, 4"
    assert anchor_words(_verdict(Supports.FREE, (), ())) == "the part holding nothing"


def test_anchor_of_a_real_free_frame() -> None:
    # 1 x 2 free frame, one brace in bay (1, 1): row 1 and column 1 rack together (the larger part),
    # column 2 is loose both ways (nothing ties it).
    frame = Frame("f", (3000, 3000), (2000,))
    verdict = check_layout(frame, [Member(1, 1, MemberKind.BRACE, Diagonal.RISING)])
    assert anchor_words(verdict) == "the part holding row 1 with column 1"
    (part,) = verdict.loose_parts
    assert describe_part(part, anchor_words(verdict)) == (
        "column 2 can rack both ways relative to the part holding row 1 with column 1: no member ties it to the rest"
    )


@pytest.mark.parametrize(
    ("k", "expected"),
    [
        (-1, "not stable"),
        (0, "a single member loss can leave a mechanism"),
        (1, "survives the loss of any one member"),
        (2, "survives the loss of any 2 members"),
        (8, "survives the loss of any 8 members"),
    ],
)
def test_redundancy_words(k: int, expected: str) -> None:
    assert redundancy_words(k) == expected


def test_caution() -> None:
    assert "licensed engineer" in CAUTION
    assert "mechanism" in CAUTION
    assert "first-order" in CAUTION
    for duty in ("Member sizing", "connections", "foundations", "loads", "code compliance"):
        assert duty in CAUTION
