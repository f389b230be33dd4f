"""Example layouts for the drawing, bill and preview tests (invented scenarios)."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from bracegrid.io import load_project
from bracegrid.model import Diagonal, Member, MemberKind, Project

ROOT = Path(__file__).resolve().parents[1]
QUAYSIDE = ROOT / "projects" / "quayside-scaffold.toml"
ORCHARD = ROOT / "projects" / "orchard-shed.toml"

B, T = MemberKind.BRACE, MemberKind.TIE
RISE, FALL = Diagonal.RISING, Diagonal.FALLING


def braced_quayside() -> Project:
    """The 12 x 8 quayside face with a hand-made mixed layout (existing and proposed, braces and ties).

    Every lift of the street face gets a brace or a tie pair (the pinned base
    then needs nothing more); lifts 1-3 get a second member so some members
    are not critical. The west end frame gets a crossed tie pair per lift.
    """
    project = load_project(QUAYSIDE)
    face, end = project.frames
    members: list[Member] = []
    for r in range(1, 9):
        if r % 2:
            members.append(Member(r, 1, B, RISE, existing=True))
        else:
            members.append(Member(r, 4, T, RISE, existing=False))
            members.append(Member(r, 5, T, FALL, existing=False))
        if r <= 3:
            members.append(Member(r, 10, B, FALL, existing=False))
    members.append(Member(8, 11, T, RISE, existing=True))
    end_members = []
    for r in range(1, 9):
        end_members.append(Member(r, 1, T, RISE, existing=r > 6))
        end_members.append(Member(r, 1, T, FALL, existing=False))
    return replace(project, frames=(replace(face, members=tuple(members)), replace(end, members=tuple(end_members))))


def loose_deck() -> Project:
    """A free-standing 4 x 3 deck plan with too few members: loose parts made of rows and of columns.

    By the directed-cycle criterion: brace (1,1) joins row 1 and column 1; the rising
    tie (2,1) gives row 2 <= column 1 only and the brace (2,2) joins row 2 and column 2,
    so {row 2, column 2} racks one way only; row 3 and columns 3 and 4 are untouched
    and rack both ways.
    """
    from bracegrid.model import CostCatalogue, Frame

    members = (
        Member(1, 1, B, RISE),
        Member(2, 1, T, RISE),
        Member(2, 2, B, FALL, existing=False),
    )
    frame = Frame("deck plan", (3000, 3000, 4500, 3000), (2500, 2500, 2500), members=members)
    return Project("Loose deck (invented)", (frame,), costs=CostCatalogue())
