"""`bracegrid forces`: the fixed JSON shape, exit codes 0/1/2, the CSV and the force sheets; check's summary."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import ezdxf
import pytest

from bracegrid.cli import main
from bracegrid.io import load_project, render_project
from bracegrid.model import Diagonal, Member, MemberKind
from bracegrid.optimize import SolveOptions, optimize_project

ROOT = Path(__file__).resolve().parents[1]
SHED = str(ROOT / "projects" / "orchard-shed.toml")
SCAFFOLD = ROOT / "projects" / "quayside-scaffold.toml"


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    return main(list(argv), out=out, err=err), out.getvalue(), err.getvalue()


@pytest.fixture(scope="module")
def optimized(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The demo scaffold braced at least cost for stability alone (``optimize --stability-only``)."""
    project = load_project(SCAFFOLD)
    solution = optimize_project(project, options=SolveOptions(time_limit=20, workers=1, seed=0, stability_only=True))
    path = tmp_path_factory.mktemp("forces") / "quayside-braced.toml"
    path.write_text(render_project(solution.project), encoding="utf-8")
    return path


def test_json_shape_is_the_fixed_one() -> None:
    code, out, _ = run("forces", SHED, "--json")
    data = json.loads(out)
    assert code == 0
    assert data["ok"] is True
    assert {"frames", "model_limits", "caution"} <= set(data)
    for frame in data["frames"]:
        assert {"name", "cases"} <= set(frame)
        for case in frame["cases"]:
            assert {"name", "sense", "mechanism", "members", "reactions", "sway_mm"} <= set(case)
            assert case["sense"] in {"+", "-"}
            assert case["mechanism"] is False
            for m in case["members"]:
                assert {"kind", "force_kn", "utilisation"} <= set(m)
                if m["kind"] in {"brace", "tie"}:
                    assert {"row", "col", "diagonal"} <= set(m)
                elif m["kind"] == "standard":
                    assert {"line", "row"} <= set(m)
                    assert "col" not in m
                else:
                    assert m["kind"] == "ledger"
                    assert {"line", "col"} <= set(m)
                    assert "row" not in m
                assert m["utilisation"] is None or m["utilisation"] >= 0
            for r in case["reactions"]:
                assert {"line", "fx_kn", "fy_kn"} <= set(r)
    roof = next(f for f in data["frames"] if f["name"] == "roof plan")
    rows = 4
    assert all(len(c["sway_mm"]) == rows + 1 for c in roof["cases"])
    assert [c["name"] for c in roof["cases"]] == ["north wind", "north wind", "gable wind", "gable wind"]


def test_the_optimized_scaffold_concentrates_force_in_its_end_bay(optimized: Path, tmp_path: Path) -> None:
    code, out, _ = run(
        "forces", str(optimized), "--frame", "street face", "--json", "--out", str(tmp_path), "--format", "dxf"
    )
    data = json.loads(out)
    assert code == 1
    assert data["ok"] is False
    face = data["frames"][0]
    governing = face["governing"]
    assert governing["utilisation"] > 1.0
    assert governing.get("col") == 12 or governing.get("line") in (11, 12)  # in the 1.8 m end bay
    wind = next(c for c in face["cases"] if c["name"] == "wind" and c["sense"] == "+")
    over = {(m["kind"], m.get("line")) for m in wind["over_capacity"]}
    assert ("standard", 12) in over  # the end-bay standard takes the overturning
    uplift = [r for r in wind["reactions"] if r["uplift_over"]]
    assert uplift
    assert all(r["line"] >= 10 for r in uplift)
    files = sorted(p.name for p in tmp_path.iterdir())
    assert files == sorted(data["files"][k].rsplit("/", 1)[-1] for k in range(len(files)))
    assert "quayside-braced-forces.csv" in files
    assert "quayside-braced-forces-street-face-1.dxf" in files
    rows = list(csv.DictReader((tmp_path / "quayside-braced-forces.csv").open(encoding="utf-8")))
    bars = 13 * 8 + 12 * 9 + 16  # standards, ledgers, the 16 ties
    assert len(rows) == 4 * bars  # two cases, two senses each
    doc = ezdxf.readfile(tmp_path / "quayside-braced-forces-street-face-1.dxf")
    assert doc.audit().has_errors is False


def test_the_strength_aware_demo_layout_passes_forces(tmp_path: Path) -> None:
    """What the README demo writes now: the layout carries every case, so ``forces`` exits 0."""
    project = load_project(SCAFFOLD)
    solution = optimize_project(project, options=SolveOptions(time_limit=20, workers=1, seed=0))
    path = tmp_path / "quayside-braced.toml"
    path.write_text(render_project(solution.project), encoding="utf-8")
    code, out, _ = run("forces", str(path), "--json")
    assert code == 0
    assert json.loads(out)["ok"] is True


def test_a_case_and_text_output(optimized: Path) -> None:
    code, out, _ = run("forces", str(optimized), "--case", "notional")
    assert code == 0  # the notional sway alone stays within capacity, with the demo's 10 kN hold-down
    assert "notional (+)" in out
    assert "wind (+)" not in out
    assert "First-order linear-elastic" in out
    assert "Caution:" in out


def test_mechanism_exits_1_with_words(tmp_path: Path) -> None:
    project = load_project(SCAFFOLD)
    end = project.frame("west end frame")
    one_sense = tuple(Member(r, 1, MemberKind.TIE, Diagonal.RISING) for r in range(1, 9))
    import dataclasses

    changed = dataclasses.replace(project, frames=(dataclasses.replace(end, members=one_sense),))
    path = tmp_path / "p.toml"
    path.write_text(render_project(changed), encoding="utf-8")
    code, out, _ = run("forces", str(path), "--json")
    data = json.loads(out)
    assert code == 1
    minus = [c for c in data["frames"][0]["cases"] if c["sense"] == "-"]
    assert minus
    assert all(c["mechanism"] and c["members"] == [] for c in minus)
    assert "anticlockwise" in minus[0]["mechanism_description"][0]


@pytest.mark.parametrize(
    ("argv", "needle"),
    [
        (["--frame", "nope"], "--frame 'nope'"),
        (["--case", "gust"], "no load case named 'gust'"),
        (["--out", "__FILE__"], "--out"),
        (["--format", "jpg", "--out", "x"], "--format"),
    ],
)
def test_bad_input_exits_2(tmp_path: Path, argv: list[str], needle: str) -> None:
    a_file = tmp_path / "f.txt"
    a_file.write_text("x")
    argv = [str(a_file) if a == "__FILE__" else (str(tmp_path / a) if a == "x" else a) for a in argv]
    code, _, err = run("forces", SHED, *argv)
    assert code == 2
    assert needle in err
    assert not (tmp_path / "x").exists()


def test_a_project_without_loads_exits_2() -> None:
    code, _, err = run("forces", str(ROOT / "projects" / "mill-lane-roof.toml"))
    assert code == 2
    assert "no load cases" in err


def test_check_prints_utilisation_and_drift_where_loads_are_given() -> None:
    code, out, _ = run("check", SHED)
    assert code == 0
    assert "roof plan: under its load cases max utilisation" in out
    assert "max drift 1/" in out
    code, out, _ = run("check", SHED, "--json")
    data = json.loads(out)
    roof = next(f for f in data["frames"] if f["name"] == "roof plan")
    assert roof["forces"]["ok"] is True
    assert 0 < roof["forces"]["max_utilisation"] <= 1
