"""`bracegrid draw`: files written, bad input exits 2 with a message and leaves no file."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import ezdxf
import pytest

from bracegrid.cli import EXIT_INPUT, EXIT_OK, main
from tests.drawing_cases import ORCHARD, QUAYSIDE


def _run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = main(list(argv), out=out, err=err)
    return code, out.getvalue(), err.getvalue()


def test_draw_writes_dxf_and_bom(tmp_path: Path) -> None:
    code, out, err = _run("draw", str(ORCHARD), "--out", str(tmp_path), "--format", "dxf")
    assert code == EXIT_OK, err
    names = sorted(p.name for p in tmp_path.iterdir())
    assert names == ["orchard-shed-bom-totals.csv", "orchard-shed-bom.csv", "orchard-shed.dxf"]
    doc = ezdxf.readfile(tmp_path / "orchard-shed.dxf")
    assert len(doc.audit().errors) == 0  # reference reader: ezdxf's auditor
    rows = list(csv.DictReader(io.StringIO((tmp_path / "orchard-shed-bom.csv").read_text(encoding="utf-8"))))
    assert len(rows) == 14  # members listed in the demo file, one row each and nothing else
    assert {r["kind"] for r in rows} <= {"brace", "tie"}
    assert "wrote" in out
    assert "Caution:" in out


def test_per_frame_and_frame_filter(tmp_path: Path) -> None:
    code, _, err = _run("draw", str(ORCHARD), "--out", str(tmp_path), "--format", "dxf", "--per-frame")
    assert code == EXIT_OK, err
    assert {p.name for p in tmp_path.glob("*.dxf")} == {"orchard-shed-roof-plan.dxf", "orchard-shed-east-wall-line.dxf"}
    one = tmp_path / "one"
    code, _, err = _run("draw", str(QUAYSIDE), "--out", str(one), "--format", "dxf", "--frame", "west end frame")
    assert code == EXIT_OK, err
    doc = ezdxf.readfile(one / "quayside-scaffold.dxf")
    labels = {e.dxf.text for e in doc.modelspace().query("TEXT") if e.dxf.layer == "S-ANNO-TEXT"}
    assert "WEST END FRAME" in labels
    assert "STREET FACE" not in labels


def test_default_folder_is_out_in_the_current_directory(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # Without --out nothing is written beside the input (here a "projects" folder), even with --per-frame.
    source = tmp_path / "projects"
    source.mkdir()
    project = source / "yard.toml"
    project.write_text(ORCHARD.read_text(encoding="utf-8"), encoding="utf-8")
    work = tmp_path / "work"
    work.mkdir()
    monkeypatch.chdir(work)
    code, _, err = _run("draw", str(project), "--format", "dxf", "--per-frame")
    assert code == EXIT_OK, err
    assert (work / "out" / "yard-roof-plan.dxf").is_file()
    assert [p.name for p in source.iterdir()] == ["yard.toml"]


@pytest.mark.parametrize(
    ("extra", "needle"),
    [
        (["--format", "dxf,jpg"], "unknown format 'jpg'"),
        (["--format", ","], "no format given"),
        (["--frame", "nope"], "no frame of that name"),
    ],
)
def test_bad_options_exit_2_and_write_nothing(tmp_path: Path, extra: list[str], needle: str) -> None:
    out_dir = tmp_path / "out"
    code, _, err = _run("draw", str(ORCHARD), "--out", str(out_dir), *extra)
    assert code == EXIT_INPUT
    assert needle in err
    assert "Traceback" not in err
    assert not out_dir.exists()


def test_out_is_a_file(tmp_path: Path) -> None:
    clash = tmp_path / "clash"
    clash.write_text("x", encoding="utf-8")
    code, _, err = _run("draw", str(ORCHARD), "--out", str(clash), "--format", "dxf")
    assert code == EXIT_INPUT
    assert "not a folder" in err
    assert clash.read_text(encoding="utf-8") == "x"


def test_bad_project_exits_2(tmp_path: Path) -> None:
    bad = tmp_path / "bad.toml"
    bad.write_text('[project]\nname = "x"\n', encoding="utf-8")
    code, _, err = _run("draw", str(bad), "--out", str(tmp_path / "o"))
    assert code == EXIT_INPUT
    assert "bad.toml" in err
    assert not (tmp_path / "o").exists()
