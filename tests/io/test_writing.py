"""Writing project files (src/bracegrid/io/writing.py): render_project and save_project.

References: the reader (``parse_project``) is the inverse the writer promises; the written TOML
is also read with the standard library's ``tomllib`` (an independent TOML reader) to check the
values written in the project's length unit, converted by hand (1 in = 25.4 mm, 1 ft = 304.8 mm
exactly). The random frames come from tests/strategies.py.
"""

from __future__ import annotations

import dataclasses
import random
import tomllib
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from bracegrid.io import load_project, parse_project, render_project, save_project, update_project_text
from bracegrid.model import (
    CostCatalogue,
    CostRate,
    Diagonal,
    Frame,
    Member,
    MemberKind,
    Opening,
    Project,
    Supports,
    blocked_bays,
)
from bracegrid.units import MM_PER_UNIT
from tests.strategies import frames_with_layouts

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "projects").glob("*.toml"))


def _member_order_free(project: Project) -> Project:
    """The project with each frame's members in bay order (the order the writer uses)."""
    frames = tuple(
        dataclasses.replace(f, members=tuple(sorted(f.members, key=lambda m: m.sort_key))) for f in project.frames
    )
    return dataclasses.replace(project, frames=frames)


def test_four_demo_files() -> None:
    assert [p.name for p in DEMOS] == [
        "harrow-depot.toml", "mill-lane-roof.toml", "orchard-shed.toml", "quayside-scaffold.toml",
    ]  # fmt: skip


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
def test_demo_round_trip(path: Path) -> None:
    p = load_project(path)
    again = parse_project(render_project(p), source=p.source)
    # Everything survives; members come back in bay order (see the exact-order test below).
    assert _member_order_free(again) == _member_order_free(p)
    assert again.costs == p.costs
    assert [set(f.members) for f in again.frames] == [set(f.members) for f in p.frames]
    # Writing the read-back project again gives the same text (the writer is deterministic).
    assert render_project(again) == render_project(p)


def test_demo_round_trip_keeps_member_order() -> None:
    p = load_project(ROOT / "projects" / "orchard-shed.toml")
    assert parse_project(render_project(p), source=p.source) == p


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
def test_update_keeps_the_users_file_when_nothing_changed(path: Path) -> None:
    text = path.read_text(encoding="utf-8")
    assert update_project_text(text, load_project(path)) == text


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
def test_update_writes_new_members_into_the_users_file(path: Path) -> None:
    # Add a member in every free diagonal of the first frame's first free bay, drop the frame's
    # first member and turn its second into the other kind: comments and the other lines stay.
    text = path.read_text(encoding="utf-8")
    p = load_project(path)
    frame = p.frames[0]
    used = {m.bay for m in frame.members} | blocked_bays(frame)
    free = next((i, j) for i in range(1, frame.rows + 1) for j in range(1, frame.cols + 1) if (i, j) not in used)
    members = list(frame.members[1:])
    if members:
        flipped = MemberKind.TIE if members[0].kind is MemberKind.BRACE else MemberKind.BRACE
        members[0] = dataclasses.replace(members[0], kind=flipped)
    added = (Member(*free, MemberKind.TIE, Diagonal.RISING, existing=False),)
    changed = dataclasses.replace(frame, members=(*members, *added))
    q = dataclasses.replace(p, frames=(changed, *p.frames[1:]))
    new = update_project_text(text, q)
    again = parse_project(new, source=p.source)
    assert again == q  # member order too: the file's kept members first, then the new one
    comments = [line for line in text.splitlines() if line.lstrip().startswith("#")]
    assert comments
    assert all(c in new.splitlines() for c in comments)
    assert new.count("[[frame.member]]") == sum(len(f.members) for f in q.frames)


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
def test_demo_round_trip_exact(path: Path) -> None:
    p = load_project(path)
    assert parse_project(render_project(p), source=p.source) == p


@st.composite
def _projects(draw: st.DrawFn) -> Project:
    """A generated frame dressed with every field the writer handles."""
    frame = draw(frames_with_layouts())
    rng = random.Random(draw(st.integers(0, 2**32 - 1)))
    members = tuple(dataclasses.replace(m, existing=rng.random() < 0.5) for m in frame.members)
    used = {m.bay for m in members}
    free = [(i, j) for i in range(1, frame.rows + 1) for j in range(1, frame.cols + 1) if (i, j) not in used]
    blocked = frozenset(b for b in free if rng.random() < 0.3)
    allow = rng.choice([frozenset(MemberKind), frozenset({MemberKind.BRACE}), frozenset({MemberKind.TIE})])
    frame = dataclasses.replace(
        frame,
        members=members,
        blocked=blocked,
        allow=allow,
        redundancy=rng.choice([0, 0, 1, 3]),
        opening_overlap=rng.choice([0.0, 0.25, 0.5]),
    )
    costs = CostCatalogue(
        brace=CostRate(rng.choice([18.0, 25.0, 40.5]), rng.choice([6.5, 8.0]), rng.choice([0.0, 4.0])),
        tie=CostRate(rng.choice([7.0, 9.25]), rng.choice([2.0, 3.0]), rng.choice([0.0, 3.0])),
        contingency_pct=rng.choice([0.0, 7.5]),
    )
    unit = draw(st.sampled_from(sorted(MM_PER_UNIT)))
    return Project("generated project", (frame,), costs=costs, length_unit=unit, source="<string>")


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_projects())
def test_generated_round_trip(project: Project) -> None:
    # Sizes are whole mm; written in any unit with 6 decimals they read back to the same mm
    # (worst case 0.5e-6 ft = 0.00015 mm, far below the 0.5 mm rounding step).
    again = parse_project(render_project(project))
    assert _member_order_free(again) == _member_order_free(project)


def test_lengths_in_other_units() -> None:
    opening = Opening("door", ((300, 0), (1200, 0), (1200, 2100), (300, 2100)))
    frame = Frame("f", (3000, 2400), (2500,), openings=(opening,))
    for unit, widths in {
        "mm": [3000, 2400],
        "cm": [300, 240],
        "m": [3, 2.4],
        "in": [3000 / 25.4, 2400 / 25.4],  # 118.110236..., 94.488188...
        "ft": [3000 / 304.8, 2400 / 304.8],  # 9.842519..., 7.874015...
    }.items():
        p = Project("p", (frame,), length_unit=unit)
        text = render_project(p)
        data = tomllib.loads(text)
        assert data["frame"][0]["widths"] == pytest.approx(widths, abs=1e-6)
        assert data["frame"][0]["heights"] == pytest.approx([2500 / MM_PER_UNIT[unit]], abs=1e-6)
        assert data["frame"][0]["opening"][0]["polygon"][1] == pytest.approx([1200 / MM_PER_UNIT[unit], 0], abs=1e-6)
        # The metre default is not written; any other unit is.
        assert data["project"].get("length_unit", "m") == unit
        assert ("length_unit" in data["project"]) == (unit != "m")
        again = parse_project(text)
        assert again.length_unit == unit
        assert again.frames == (frame,)


def test_whole_numbers_are_written_as_integers() -> None:
    # 3000 mm = 3 m exactly: written as 3, not 3.0; 2400 mm = 2.4 m.
    data = tomllib.loads(render_project(Project("p", (Frame("f", (3000, 2400), (2000,)),))))
    assert data["frame"][0]["widths"] == [3, 2.4]
    assert isinstance(data["frame"][0]["widths"][0], int)


def test_status_is_kept() -> None:
    members = (
        Member(1, 1, MemberKind.BRACE, Diagonal.RISING, existing=True),
        Member(1, 2, MemberKind.TIE, Diagonal.FALLING, existing=False),
        Member(1, 2, MemberKind.TIE, Diagonal.RISING, existing=False),
    )
    p = Project("p", (Frame("f", (3000, 3000), (2000,), members=members),))
    data = tomllib.loads(render_project(p))
    written = {(m["row"], m["col"], m["diagonal"]): (m["kind"], m["status"]) for m in data["frame"][0]["member"]}
    assert written == {
        (1, 1, "rising"): ("brace", "existing"),
        (1, 2, "falling"): ("tie", "proposed"),
        (1, 2, "rising"): ("tie", "proposed"),
    }
    again = parse_project(render_project(p)).frames[0]
    assert {m: m.existing for m in again.members} == {m: m.existing for m in members}


def test_optional_fields_are_written_only_when_set() -> None:
    bare = tomllib.loads(render_project(Project("p", (Frame("f", (3000,), (2000,)),))))
    frame = bare["frame"][0]
    assert set(frame) == {"name", "widths", "heights", "supports", "allow"}
    assert frame["allow"] == ["brace", "tie"]
    assert frame["supports"] == "free"
    assert set(bare["costs"]) == {"brace", "tie"}
    assert bare["costs"]["brace"] == {"per_piece": 25.0, "per_metre": 8.0}
    full = Frame(
        "g",
        (3000,),
        (2000,),
        supports=Supports.BASE,
        blocked=frozenset({(1, 1)}),
        opening_overlap=0.3,
        redundancy=2,
        allow=frozenset({MemberKind.TIE}),
    )
    costs = CostCatalogue(brace=CostRate(1.0, 2.0, 3.0), contingency_pct=5.0)
    data = tomllib.loads(render_project(Project("p", (full,), costs=costs)))
    g = data["frame"][0]
    assert (g["supports"], g["blocked"], g["opening_overlap"], g["redundancy"], g["allow"]) == (
        "base",
        [[1, 1]],
        0.3,
        2,
        ["tie"],
    )
    assert data["costs"]["brace"] == {"per_piece": 1.0, "per_metre": 2.0, "labour_per_piece": 3.0}
    assert data["costs"]["contingency_pct"] == 5.0


def test_save_project_round_trip(tmp_path: Path) -> None:
    p = load_project(ROOT / "projects" / "quayside-scaffold.toml")
    path = tmp_path / "sub" / "copy.toml"
    assert save_project(p, path) == path
    assert path.read_text(encoding="utf-8") == render_project(p)
    assert load_project(path) == dataclasses.replace(p, source=str(path))
    assert [x.name for x in path.parent.iterdir()] == ["copy.toml"]  # no temporary file left
