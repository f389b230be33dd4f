"""General frames end to end: check, optimize --write, draw on the demo harrow-depot.toml and --without ledgers."""

from __future__ import annotations

import io
import json
from pathlib import Path

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
    assert by_layer[Layer.FRAME_OMIT.layer_name] == ["LINE"]  # one ledger left out
    assert by_layer[Layer.ABSENT.layer_name].count("HATCH") == 6  # office block and stair void
    assert by_layer[Layer.FLEX.layer_name]  # the unstable wall line's deflected shape
    texts = " ".join(e.plain_text() for e in doc.modelspace().query("MTEXT TEXT") if hasattr(e, "plain_text"))
    assert "grid bar left out" in texts
