"""General frames end to end: check, optimize --write, draw on the demo harrow-depot.toml and --without ledgers."""

from __future__ import annotations

import io
import json
from pathlib import Path

import pytest

from bracegrid.cli import main
from bracegrid.io import load_project
from bracegrid.mechanics import check_any
from bracegrid.outputs import build_drawing
from bracegrid.outputs.layers import Layer
from tests.physics_general import general_physically_rigid

ROOT = Path(__file__).resolve().parents[1]
DEPOT = str(ROOT / "projects" / "harrow-depot.toml")
SCAFFOLD = str(ROOT / "projects" / "quayside-scaffold.toml")


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    return main(list(argv), out=out, err=err), out.getvalue(), err.getvalue()


def test_check_names_the_method_and_the_mechanism() -> None:
    code, out, _ = run("check", DEPOT, "--json")
    assert code == 1
    frames = {f["name"]: f for f in json.loads(out)["frames"]}
    roof, wall = frames["depot roof"], frames["loading bay wall"]
    assert roof["method"] == wall["method"] == "exact"
    assert roof["stable"] is True
    assert "mechanism" not in roof
    assert wall["stable"] is False
    # the first-lift ledger right of the dock door slides: its nodes move sideways, nothing else
    moved = {(n["p"], n["q"]) for n in wall["mechanism"]["nodes"]}
    assert moved == {(1, 3), (1, 4), (1, 5), (1, 6)}
    assert all(n["dy"] == 0 for n in wall["mechanism"]["nodes"])
    assert wall["mechanism"]["exact"] is True
    # the exact check's count: every member raises the rigidity matrix's rank by at most one, so a rigid
    # layout has at least as many members as the degrees of freedom the grid bars leave (the roof: 12 ties)
    assert roof["maxwell"]["count"] == roof["braces"] + roof["ties"] == 12
    assert roof["maxwell"]["count"] >= roof["maxwell"]["needed"]


def test_check_complete_frames_say_digraph_and_without_a_ledger_says_exact() -> None:
    _, out, _ = run("check", SCAFFOLD, "--json")
    assert {f["method"] for f in json.loads(out)["frames"]} == {"digraph"}
    code, out, _ = run("check", SCAFFOLD, "--frame", "street face", "--without", "ledger1c4", "--json")
    assert code == 1
    (face,) = json.loads(out)["frames"]
    assert face["method"] == "exact"


def test_bad_grid_bar_reference_is_exit_2() -> None:
    code, _, err = run("check", SCAFFOLD, "--frame", "street face", "--without", "ledger9c4")
    assert code == 2
    assert "--without" in err
    assert "outside frame" in err


def test_optimize_writes_a_stable_general_layout(tmp_path: Path) -> None:
    target = tmp_path / "braced.toml"
    code, _, _ = run("optimize", DEPOT, "--write", str(target), "--time-limit", "30", "--workers", "2")
    assert code == 0
    project = load_project(target)
    for frame in project.frames:
        assert not frame.is_complete  # the outline and the missing ledger are kept
        assert check_any(frame, frame.members).stable
        assert general_physically_rigid(frame, frame.members)
    code, _, _ = run("check", str(target))
    assert code == 0


def test_drawing_shows_omitted_bars_absent_bays_and_the_flex() -> None:
    project = load_project(DEPOT)
    doc = build_drawing(project).doc
    by_layer: dict[str, list[str]] = {}
    for e in doc.modelspace():
        by_layer.setdefault(e.dxf.layer, []).append(e.dxftype())
    assert by_layer[Layer.FRAME_OMIT.layer_name] == ["LINE", "LINE"]  # one ledger left out on each wall line
    assert by_layer[Layer.ABSENT.layer_name].count("HATCH") == 6  # office block and stair void
    assert by_layer[Layer.FLEX.layer_name]  # the unstable wall line's deflected shape
    texts = " ".join(e.plain_text() for e in doc.modelspace().query("MTEXT TEXT") if hasattr(e, "plain_text"))
    assert "grid bar left out" in texts


def test_forces_on_general_frames_mechanism_and_solved(tmp_path: Path) -> None:
    code, out, _ = run("forces", DEPOT, "--json", "--out", str(tmp_path))
    frames = {f["name"]: f for f in json.loads(out)["frames"]}
    assert "depot roof" not in frames  # no load cases there
    wall, repaired = frames["loading bay wall"], frames["loading bay wall, repaired"]
    assert all(c["mechanism"] and c["members"] == [] for c in wall["cases"])  # never numbers
    assert wall["cases"][0]["mechanism_description"][0].startswith("the exact check finds a mechanism")
    case = repaired["cases"][0]
    assert not case["mechanism"]
    bars = {(m["kind"], m.get("line"), m.get("row"), m.get("col")) for m in case["members"]}
    assert not any(kind == "ledger" and line == 1 and col == 3 for kind, line, _, col in bars)  # left out
    # 15 kN of wind on the first lift (6 + 6 + 3) is carried by the two rising braces of lift 1 (4 x 3 m bays:
    # horizontal share 0.8 of the force)
    braces = [m for m in case["members"] if m["kind"] == "brace" and m["row"] == 1]
    assert sum(0.8 * m["force_kn"] for m in braces) == pytest.approx(15.0, abs=1e-9)
    assert code == 1  # one case set is a mechanism
    assert (tmp_path / "harrow-depot-forces-loading-bay-wall-repaired.png").stat().st_size > 0
    code, out, _ = run("check", DEPOT, "--json")
    summaries = {f["name"]: f.get("forces") for f in json.loads(out)["frames"]}
    assert summaries["loading bay wall"]["mechanism_cases"]
    assert summaries["loading bay wall, repaired"]["ok"] is True
