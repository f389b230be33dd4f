"""`bracegrid optimize` on the command line: JSON fields, exit codes, --write round trip.

Reference for the stability of written layouts: the check command itself
(directed-cycle criterion, Baglivo & Graver 1983) and the bar-framework
reference tests/physics.py (numpy rank + scipy linprog).
"""

from __future__ import annotations

import io
import json
from pathlib import Path

import pytest

from bracegrid.cli import main
from bracegrid.io import load_project
from tests.common import project_head
from tests.physics import physically_rigid

ROOT = Path(__file__).resolve().parents[1]
QUAYSIDE = str(ROOT / "projects" / "quayside-scaffold.toml")

SMALL = (
    project_head("cli test")
    + """
[[frame]]
name = "front"
widths = [3.0, 2.0, 2.5]
heights = [2.0, 1.5]
[[frame.member]]
row = 1
col = 1
kind = "brace"
diagonal = "rising"
[[frame]]
name = "side"
widths = [2.0, 2.0]
heights = [2.0, 2.0, 2.0]
supports = "base"
"""
)


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = main(list(argv), out=out, err=err)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture
def small(tmp_path: Path) -> Path:
    p = tmp_path / "small.toml"
    p.write_text(SMALL, encoding="utf-8")
    return p


def test_json_fields(small: Path) -> None:
    code, out, _ = run("optimize", str(small), "--json", "--workers", "1", "--time-limit", "20")
    assert code == 0
    data = json.loads(out)
    assert set(data) >= {"cost", "frames"}
    assert [f["name"] for f in data["frames"]] == ["front", "side"]
    for f in data["frames"]:
        assert set(f) >= {"name", "status", "cost", "added_cost", "bound", "gap", "seconds", "members"}
        assert f["status"] in {"optimal", "feasible"}
        for m in f["members"]:
            assert set(m) >= {"row", "col", "kind", "diagonal", "existing"}
    front = data["frames"][0]
    kept = {"row": 1, "col": 1, "kind": "brace", "diagonal": "rising", "existing": True}
    assert any(kept.items() <= m.items() for m in front["members"])
    # Every total is the sum of the rows it covers, to the cent and the millimetre (one rounding rule).
    assert round(data["cost"] * 100) == sum(round(f["cost"] * 100) for f in data["frames"])
    for f in data["frames"]:
        assert round(f["cost"] * 100) == sum(round(m["cost"] * 100) for m in f["members"])
        assert round(f["added_cost"] * 100) == sum(round(m["cost"] * 100) for m in f["members"] if not m["existing"])
        assert round(f["diagonal_length_m"] * 1000) == sum(m["cut_length_mm"] for m in f["members"])


def test_text_table_and_frame_option(small: Path) -> None:
    code, out, _ = run("optimize", str(small), "--frame", "side", "--workers", "1")
    assert code == 0
    assert "side" in out
    assert "OPTIMAL" in out
    assert "front" not in out.split("Total")[0]
    assert "Caution" in out


def test_write_round_trip_checks_stable(small: Path, tmp_path: Path) -> None:
    target = tmp_path / "out" / "solved.toml"
    code, _, _ = run("optimize", str(small), "--write", str(target), "--workers", "1")
    assert code == 0
    code, out, _ = run("check", str(target))
    assert code == 0, out
    solved = load_project(target)
    for frame in solved.frames:
        assert physically_rigid(frame)
        assert any(not m.existing for m in frame.members)
    kept = [m for m in solved.frames[0].members if m.existing]
    assert [(m.row, m.col, m.kind.value) for m in kept] == [(1, 1, "brace")]


def test_quayside_demo_runs() -> None:
    code, out, _ = run("optimize", QUAYSIDE, "--json", "--workers", "1")
    assert code == 0
    data = json.loads(out)
    assert all(f["status"] == "optimal" for f in data["frames"])


def test_bad_input_exit_2(small: Path, tmp_path: Path) -> None:
    assert run("optimize", str(small), "--allow", "rope")[0] == 2
    assert run("optimize", str(small), "--frame", "nope")[0] == 2
    assert run("optimize", str(small), "--time-limit", "0")[0] == 2
    assert run("optimize", str(tmp_path / "missing.toml"))[0] == 2


def test_infeasible_exit_3_and_no_file(small: Path, tmp_path: Path) -> None:
    bad = tmp_path / "bad.toml"
    bad.write_text(SMALL.replace('supports = "base"', 'supports = "base"\nblocked = [[3, 1], [3, 2]]'), "utf-8")
    target = tmp_path / "never.toml"
    code, _, err = run("optimize", str(bad), "--write", str(target))
    assert code == 3
    assert "frame 'side': row 3 has every bay blocked" in err
    assert not target.exists()


def test_allow_ties_only(small: Path) -> None:
    code, out, _ = run("optimize", str(small), "--allow", "tie", "--json", "--frame", "side")
    assert code == 0
    kinds = {m["kind"] for m in json.loads(out)["frames"][0]["members"]}
    assert kinds == {"tie"}
