"""Project file validation: every problem found, located, explained; exit code 2."""

from __future__ import annotations

import io
import json
from pathlib import Path

import pytest

from bracegrid.cli import main
from bracegrid.errors import InputError
from bracegrid.io import load_project, parse_project, render_project
from bracegrid.model import Diagonal, MemberKind, Supports

ROOT = Path(__file__).resolve().parents[2]

GOOD = """
[project]
name = "Test yard"

[costs.brace]
per_piece = 25.0
per_metre = 8.0
[costs.tie]
per_piece = 9.0
per_metre = 3.0

[[frame]]
name = "north wall line"
widths = [3.0, 3.0, 2.4, 3.0]
heights = [2.0, 2.0, 2.0]
supports = "free"
blocked = [[1, 2]]
allow = ["brace", "tie"]

[[frame.opening]]
name = "loading door"
polygon = [[6.2, 0.0], [8.2, 0.0], [8.2, 3.4], [6.2, 3.4]]

[[frame.member]]
row = 1
col = 1
kind = "brace"
diagonal = "rising"
"""


def _run(tmp_path: Path, text: str, *extra: str) -> tuple[int, str, str]:
    path = tmp_path / "p.toml"
    path.write_text(text, encoding="utf-8")
    out, err = io.StringIO(), io.StringIO()
    code = main(["check", str(path), *extra], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


def test_issue_example_loads() -> None:
    p = parse_project(GOOD)
    f = p.frames[0]
    assert (f.rows, f.cols) == (3, 4)
    assert f.widths == (3000, 3000, 2400, 3000)
    assert f.supports is Supports.FREE
    assert f.members[0].kind is MemberKind.BRACE
    assert f.members[0].diagonal is Diagonal.RISING
    assert p.costs.brace.per_metre == 8.0


def test_opening_blocks_overlapped_bays_only() -> None:
    from bracegrid.model import blocked_bays

    f = parse_project(GOOD).frames[0]
    # Door x 6.2-8.2 m lies in column 3 (6.0-8.4 m); height 3.4 m reaches row 2 (2.0-4.0 m).
    assert blocked_bays(f) == {(1, 2), (1, 3), (2, 3)}


def test_overlap_fraction_threshold() -> None:
    text = GOOD.replace('allow = ["brace", "tie"]', 'allow = ["brace", "tie"]\nopening_overlap = 0.5')
    from bracegrid.model import blocked_bays

    f = parse_project(text).frames[0]
    # Row 2 overlap is 1.4 m of 2.0 m height over 2.0 of 2.4 m width: 58% > 50%: still blocked.
    assert (2, 3) in blocked_bays(f)
    text2 = text.replace("3.4], [6.2, 3.4]", "2.6], [6.2, 2.6]")
    assert (2, 3) not in blocked_bays(parse_project(text2).frames[0])


def test_round_trip_through_saving() -> None:
    p = parse_project(GOOD)
    again = parse_project(render_project(p))
    assert again.frames == p.frames
    assert again.costs == p.costs


def test_units_in_strings() -> None:
    p = parse_project(GOOD.replace("widths = [3.0, 3.0, 2.4, 3.0]", 'widths = ["3000 mm", "300 cm", "2.4 m", 3]'))
    assert p.frames[0].widths == (3000, 3000, 2400, 3000)


BAD_CASES = {
    "missing widths": (GOOD.replace("widths = [3.0, 3.0, 2.4, 3.0]\n", ""), "widths"),
    "wrong type": (GOOD.replace("widths = [3.0, 3.0, 2.4, 3.0]", 'widths = "wide"'), "non-empty list"),
    "negative size": (GOOD.replace("heights = [2.0, 2.0, 2.0]", "heights = [2.0, -2.0, 2.0]"), "positive"),
    "member in blocked bay": (GOOD.replace("row = 1\ncol = 1", "row = 1\ncol = 2"), "blocked"),
    "member under opening": (GOOD.replace("row = 1\ncol = 1", "row = 2\ncol = 3"), "covered by an opening"),
    "opening outside": (GOOD.replace("[8.2, 3.4], [6.2, 3.4]", "[8.2, 9.4], [6.2, 9.4]"), "extends beyond the frame"),
    "unknown kind": (GOOD.replace('kind = "brace"', 'kind = "strut"'), "'strut' is not one of"),
    "unknown diagonal": (GOOD.replace('diagonal = "rising"', 'diagonal = "up"'), "'up' is not one of"),
    "bad supports": (GOOD.replace('supports = "free"', 'supports = "fixed"'), "supports"),
    "row out of range": (GOOD.replace("row = 1\ncol = 1", "row = 7\ncol = 1"), "rows run 1..3"),
    "typo field": (GOOD.replace("heights =", "hieghts ="), "did you mean 'heights'"),
    "no costs": (GOOD[: GOOD.index("[costs.brace]")] + GOOD[GOOD.index("[[frame]]") :], "costs"),
    "bad toml": (GOOD.replace('name = "Test yard"', "name = Test yard"), "not valid TOML"),
    "self-crossing opening": (
        GOOD.replace(
            "[[6.2, 0.0], [8.2, 0.0], [8.2, 3.4], [6.2, 3.4]]", "[[6.2, 0.0], [8.2, 3.4], [8.2, 0.0], [6.2, 3.4]]"
        ),
        "not a valid polygon",
    ),
    "duplicate diagonal": (
        GOOD + '\n[[frame.member]]\nrow = 1\ncol = 1\nkind = "tie"\ndiagonal = "rising"\n',
        "already holds",
    ),
    "blocked outside": (GOOD.replace("blocked = [[1, 2]]", "blocked = [[1, 9]]"), "columns run 1..4"),
}


@pytest.mark.parametrize("case", sorted(BAD_CASES))
def test_malformed_file_gives_clear_error_and_exit_2(tmp_path: Path, case: str) -> None:
    text, expected = BAD_CASES[case]
    with pytest.raises(InputError) as info:
        parse_project(text, source="p.toml")
    assert expected in str(info.value)
    code, out, err = _run(tmp_path, text)
    assert code == 2
    assert out == ""
    assert expected in err
    assert "Traceback" not in err


def test_all_problems_reported_at_once_with_lines() -> None:
    text = GOOD.replace("heights = [2.0, 2.0, 2.0]", "heights = [2.0, -2.0, 2.0]").replace(
        'kind = "brace"', 'kind = "strut"'
    )
    with pytest.raises(InputError) as info:
        parse_project(text, source="p.toml")
    assert len(info.value.problems) == 2
    message = str(info.value)
    assert "2 problems found" in message
    assert "line 12, frame" in message  # the [[frame]] header line
    assert "line 24, frame" in message  # the [[frame.member]] header line


def test_missing_file(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="file not found"):
        load_project(tmp_path / "nope.toml")


@pytest.mark.parametrize("name", ["orchard-shed.toml", "quayside-scaffold.toml"])
def test_demo_projects_load_and_check(name: str) -> None:
    p = load_project(ROOT / "projects" / name)
    assert p.frames
    out = io.StringIO()
    code = main(["check", str(ROOT / "projects" / name), "--json"], out=out)
    data = json.loads(out.getvalue())
    assert code == (0 if data["stable"] else 1)
    assert {f["name"] for f in data["frames"]} == {f.name for f in p.frames}


def test_written_files_get_the_usual_permissions(tmp_path: Path) -> None:
    import os
    import stat

    from bracegrid.io import write_text_atomic

    umask = os.umask(0)
    os.umask(umask)
    path = write_text_atomic(tmp_path / "x.toml", "a = 1\n")
    assert stat.S_IMODE(path.stat().st_mode) == 0o666 & ~umask
