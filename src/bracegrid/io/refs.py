"""Member references as users type them (``r2c3``, ``r2c3:rising``), resolved in a frame.

Messages name the reference and the frame; a shell (the CLI's ``--without``) adds its own option name.
"""

from __future__ import annotations

import re
from collections.abc import Sequence

from bracegrid.errors import InputError
from bracegrid.model import Diagonal, Frame, GridBar, GridBarKind, Member, on_grid, present_grid_bars

_MEMBER_REF = re.compile(r"^\s*r(\d+)\s*c(\d+)\s*(?::\s*(rising|falling|r|f))?\s*$", re.IGNORECASE)

#: Help text for the compact member syntax used on the command line.
MEMBER_REF_HELP = (
    "a member by bay: rROWcCOL takes out every member in that bay (e.g. r2c3); "
    "rROWcCOL:rising or :falling (or :r / :f) takes out one diagonal (e.g. r2c3:f). "
    "Rows count from 1 at the bottom, columns from 1 at the left."
)


def parse_member_refs(frame: Frame, refs: Sequence[str]) -> tuple[Member, ...]:
    """Resolve compact member references (``r2c3``, ``r2c3:rising``) in a frame.

    Args:
        frame: The frame whose members are referred to.
        refs: The references as typed.

    Returns:
        The members referred to, in frame order, without repeats.

    Raises:
        InputError: With every reference that is malformed or matches no member.

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> m = Member(2, 3, MemberKind.TIE, Diagonal.FALLING)
        >>> f = Frame("f", (1000,) * 3, (1000,) * 2, members=(m,))
        >>> parse_member_refs(f, ["r2c3:f"]) == (m,)
        True
    """
    problems: list[str] = []
    chosen: set[Member] = set()
    for ref in refs:
        match = _MEMBER_REF.match(ref)
        if match is None:
            problems.append(f"{ref!r}: not a member reference; {MEMBER_REF_HELP}")
            continue
        row, col = int(match.group(1)), int(match.group(2))
        side = (match.group(3) or "").lower()
        diagonal = {"r": Diagonal.RISING, "f": Diagonal.FALLING}.get(side[:1])
        if not (1 <= row <= frame.rows and 1 <= col <= frame.cols):
            problems.append(
                f"{ref!r}: frame {frame.name!r} has no bay r{row}c{col}; it is {frame.cols} bays wide and "
                f"{frame.rows} high (rows 1..{frame.rows} from the bottom, columns 1..{frame.cols} from the left)"
            )
            continue
        found = [m for m in frame.members if m.bay == (row, col) and (diagonal is None or m.diagonal is diagonal)]
        if not found:
            here = [m.label for m in frame.members if m.bay == (row, col)]
            hint = f"that bay holds {', '.join(here)}" if here else "that bay holds no member"
            problems.append(f"{ref!r}: no such member in frame {frame.name!r} ({hint})")
        chosen.update(found)
    if problems:
        raise InputError(problems)
    return tuple(m for m in frame.members if m in chosen)


_BAR_REF = re.compile(r"^\s*(ledger|standard|l|s)\s*(\d+)\s*([cr])\s*(\d+)\s*$", re.IGNORECASE)

#: Help text for the grid bar syntax used on the command line.
GRID_BAR_REF_HELP = (
    "a grid bar segment: ledgerLINEcCOL is the ledger on horizontal grid line LINE (0 = bottom) spanning "
    "column COL (e.g. ledger3c4); standardLINErROW is the standard on vertical grid line LINE (0 = left) "
    "spanning row ROW (e.g. standard2r5)"
)


def is_grid_bar_ref(ref: str) -> bool:
    """True when the reference names a grid bar segment (``ledger3c4``, ``standard2r5``) rather than a member.

    Example:
        >>> is_grid_bar_ref("ledger3c4"), is_grid_bar_ref("r2c3")
        (True, False)
    """
    return _BAR_REF.match(ref) is not None


def parse_grid_bar_refs(frame: Frame, refs: Sequence[str]) -> tuple[GridBar, ...]:
    """Resolve grid bar references (``ledger3c4``, ``standard2r5``) among the frame's present bars.

    Args:
        frame: The frame whose grid bars are referred to.
        refs: The references as typed.

    Returns:
        The bars, in grid order, without repeats.

    Raises:
        InputError: With every reference that is malformed, off the grid, or names a bar the frame lacks.

    Example:
        >>> f = Frame("f", (1000,) * 4, (1000,) * 3)
        >>> [b.label for b in parse_grid_bar_refs(f, ["ledger3c4", "s0r1"])]
        ['ledger3c4', 'standard0r1']
    """
    problems: list[str] = []
    chosen: set[GridBar] = set()
    present = set(present_grid_bars(frame))
    for ref in refs:
        match = _BAR_REF.match(ref)
        if match is None:
            problems.append(f"{ref!r}: not a grid bar reference; {GRID_BAR_REF_HELP}")
            continue
        kind = GridBarKind.LEDGER if match.group(1).lower().startswith("l") else GridBarKind.STANDARD
        if match.group(3).lower() != kind.span_letter:
            spans = "column (c)" if kind is GridBarKind.LEDGER else "row (r)"
            problems.append(f"{ref!r}: a {kind.value} spans a {spans}; {GRID_BAR_REF_HELP}")
            continue
        bar = GridBar(kind, int(match.group(2)), int(match.group(4)))
        if not on_grid(frame, bar):
            problems.append(f"{ref!r}: {bar.label} is outside frame {frame.name!r} "
                            f"({frame.rows} rows, {frame.cols} columns)")  # fmt: skip
        elif bar not in present:
            problems.append(
                f"{ref!r}: frame {frame.name!r} has no {bar.label} (missing already, or outside its outline)"
            )
        else:
            chosen.add(bar)
    if problems:
        raise InputError(problems)
    return tuple(sorted(chosen, key=lambda b: (b.kind.value, b.line, b.span)))
