"""Member references as users type them (``r2c3``, ``r2c3:rising``), resolved in a frame.

Messages name the reference and the frame; a shell (the CLI's ``--without``) adds its own option name.
"""

from __future__ import annotations

import re
from collections.abc import Sequence

from bracegrid.errors import InputError
from bracegrid.model import Diagonal, Frame, Member

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
