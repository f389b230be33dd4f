"""`bracegrid check`: JSON shape, exit codes, --without, --frame."""

from __future__ import annotations

import io
import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

from bracegrid.cli import main

ROOT = Path(__file__).resolve().parents[1]
SHED = str(ROOT / "projects" / "orchard-shed.toml")
SCAFFOLD = str(ROOT / "projects" / "quayside-scaffold.toml")


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    return main(list(argv), out=out, err=err), out.getvalue(), err.getvalue()


def test_json_shape_stable_project() -> None:
    code, out, _ = run("check", SHED, "--json")
    data = json.loads(out)
    assert code == 0
    assert data["stable"] is True
    for f in data["frames"]:
        assert {"name", "stable", "racking_modes", "loose_parts", "critical_members"} <= set(f)
        for m in f["critical_members"]:
            assert set(m) == {"row", "col", "kind", "diagonal"}
    wall = next(f for f in data["frames"] if f["name"] == "east wall line")
    # Two single ties on a pinned base: each is the only arc one way.
    assert sorted((m["row"], m["col"]) for m in wall["critical_members"]) == [(1, 1), (1, 4)]


def test_unstable_project_exit_1_and_loose_parts() -> None:
    code, out, _ = run("check", SCAFFOLD, "--json", "--frame", "west end frame")
    data = json.loads(out)
    assert code == 1
    assert data["stable"] is False
    (frame,) = data["frames"]
    assert frame["racking_modes"] == 8
    assert [p["rows"] for p in frame["loose_parts"]] == [[i] for i in range(1, 9)]
    assert {p["direction"] for p in frame["loose_parts"]} == {"both"}


def test_without_a_critical_member_makes_it_unstable() -> None:
    code, out, _ = run("check", SHED, "--frame", "east wall line", "--without", "r1c4:falling", "--json")
    assert code == 1
    (frame,) = json.loads(out)["frames"]
    (part,) = frame["loose_parts"]
    assert part["rows"] == [1]
    # Only the rising tie is left: the row cannot sway right, so it can only rack anticlockwise.
    assert part["direction"] == "anticlockwise"
    assert "tops sway left" in part["description"]


def test_without_needs_frame_when_several() -> None:
    code, _, err = run("check", SHED, "--without", "r1c1")
    assert code == 2
    assert "--frame" in err


@pytest.mark.parametrize("ref", ["r9c9", "bay3", "r1c2:sideways"])
def test_without_bad_reference(ref: str) -> None:
    code, _, err = run("check", SHED, "--frame", "roof plan", "--without", ref)
    assert code == 2
    assert ref in err


def test_unknown_frame() -> None:
    code, _, err = run("check", SHED, "--frame", "nope")
    assert code == 2
    assert "roof plan" in err


def test_text_output_has_table_and_caution() -> None:
    code, out, _ = run("check", SCAFFOLD)
    assert code == 1
    assert "NOT STABLE" in out
    assert "row 1 can rack both ways relative to the pinned base" in out
    assert "licensed engineer" in out


def test_module_entry_point_runs() -> None:
    proc = subprocess.run(
        [sys.executable, "-m", "bracegrid", "check", SHED], capture_output=True, text=True, check=False
    )
    assert proc.returncode == 0
    assert "STABLE" in proc.stdout


def test_check_table_names_both_numbers() -> None:
    # Issue 10: the column "braces + ties/2" showed "11 / 9", which reads as a fraction.
    code, out, _ = run("check", SHED)
    assert code == 0
    assert "weighted count" in out
    assert "least needed" in out
    assert "braces + ties/2" in out  # explained under the table
    assert not re.search(r"\d+(\.\d+)? / \d+", out)
