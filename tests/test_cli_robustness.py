"""`bracegrid robustness` and the single-addition advice of `bracegrid check`: output, JSON shape, errors, files."""

from __future__ import annotations

import io
import json
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

from bracegrid.cli import main
from tests.common import project_head

ROOT = Path(__file__).resolve().parents[1]
SHED = str(ROOT / "projects" / "orchard-shed.toml")

#: The 2 x 2 tie chain: three ties, three loose parts; a fourth closing the 4-cycle locks all three.
CHAIN = (
    project_head("chain")
    + """
[[frame]]
name = "chain"
widths = [3.0, 3.0]
heights = [2.0, 2.0]
[[frame.member]]
row = 1
col = 1
kind = "tie"
diagonal = "rising"
[[frame.member]]
row = 1
col = 2
kind = "tie"
diagonal = "falling"
[[frame.member]]
row = 2
col = 2
kind = "tie"
diagonal = "rising"
"""
)


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    return main(list(argv), out=out, err=err), out.getvalue(), err.getvalue()


def test_json_has_the_fixed_shape_and_writes_the_plots(tmp_path: Path) -> None:
    code, out, _ = run("robustness", SHED, "--json", "--max-lost", "4", "--samples", "500", "--out", str(tmp_path))
    assert code == 0
    data = json.loads(out)
    assert {"frames", "caution", "limits", "files"} <= set(data)
    for f in data["frames"]:
        assert {"name", "members", "curve", "expected_losses_to_mechanism"} <= set(f)
        assert [p["lost"] for p in f["curve"]] == list(range(1, len(f["curve"]) + 1))
        for p in f["curve"]:
            assert set(p) == {"lost", "p_stable", "low", "high", "exact"}
            assert 0 <= p["low"] <= p["p_stable"] <= p["high"] <= 1
    roof = next(f for f in data["frames"] if f["name"] == "roof plan")
    assert roof["members"] == 12
    assert roof["curve"][0] == {"lost": 1, "p_stable": 8 / 12, "low": 8 / 12, "high": 8 / 12, "exact": True}
    assert [m["critical"] for m in roof["member_ranking"][:4]] == [True] * 4
    png, svg = sorted(Path(p) for p in data["files"])
    with Image.open(png) as image:
        assert image.size[0] > 600
        assert len(np.unique(np.asarray(image.convert("L")))) > 10
    assert svg.read_text(encoding="utf-8").lstrip().startswith("<?xml")


def test_text_output_names_method_limits_and_caution(tmp_path: Path) -> None:
    code, out, _ = run("robustness", SHED, "--frame", "roof plan", "--out", str(tmp_path))
    assert code == 0
    assert "roof plan: expected losses to the first mechanism 1.99 (exact)" in out
    assert "brace r1c4:rising (critical)" in out
    assert "Limits: Stability only" in out
    assert "licensed engineer" in out
    assert (tmp_path / "orchard-shed-robustness.png").exists()


def test_same_seed_same_numbers(tmp_path: Path) -> None:
    project = tmp_path / "big.toml"
    # A 4 x 6 frame with an X of ties in every bay: too many loss sets to enumerate past k = 2.
    members = "".join(
        f'[[frame.member]]\nrow = {i}\ncol = {j}\nkind = "tie"\ndiagonal = "{d}"\n'
        for i in range(1, 5) for j in range(1, 7) for d in ("rising", "falling")
    )  # fmt: skip
    project.write_text(project_head("x") + '[[frame]]\nname = "x"\nwidths = [3.0, 3.0, 3.0, 3.0, 3.0, 3.0]\n'
                       "heights = [2.0, 2.0, 2.0, 2.0]\n" + members, encoding="utf-8")  # fmt: skip
    args = ("robustness", str(project), "--json", "--samples", "2000", "--seed", "5", "--out", str(tmp_path / "o"))
    first, second = json.loads(run(*args)[1]), json.loads(run(*args)[1])
    assert first["frames"] == second["frames"]
    curve = first["frames"][0]["curve"]
    exact = [p["exact"] for p in curve]
    assert exact[:2] == [True, True]
    assert not all(exact)
    assert exact == sorted(exact, reverse=True)
    other = json.loads(run(*args[:-4], "--seed", "6", "--out", str(tmp_path / "o"))[1])
    assert other["frames"][0]["curve"][5] != curve[5]


def test_unstable_frame_exit_1(tmp_path: Path) -> None:
    project = tmp_path / "chain.toml"
    project.write_text(CHAIN, encoding="utf-8")
    code, out, _ = run("robustness", str(project), "--out", str(tmp_path / "o"))
    assert code == 1
    assert "not stable before any loss" in out


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("--samples", "0"), "--samples 0: give at least 1"),
        (("--max-lost", "0"), "--max-lost 0: give at least 1"),
        (("--workers", "0"), "--workers 0: give at least 1"),
        (("--frame", "nope"), "--frame 'nope': no frame of that name"),
    ],
)
def test_bad_options_exit_2_and_write_nothing(tmp_path: Path, args: tuple[str, ...], message: str) -> None:
    out_dir = tmp_path / "o"
    code, _, err = run("robustness", SHED, "--out", str(out_dir), *args)
    assert code == 2
    assert message in err
    assert "Traceback" not in err
    assert not out_dir.exists()


def test_bad_likelihood_in_the_file_exit_2(tmp_path: Path) -> None:
    project = tmp_path / "p.toml"
    project.write_text(
        CHAIN.replace("[[frame]]", "[robustness.loss_likelihood]\ntie = -2\n\n[[frame]]"), encoding="utf-8"
    )
    code, _, err = run("robustness", str(project), "--out", str(tmp_path / "o"))
    assert code == 2
    assert "line 10, [robustness.loss_likelihood].tie: expected a number 0 or above" in err
    assert not (tmp_path / "o").exists()


def test_weighted_losses_are_reported(tmp_path: Path) -> None:
    text = (
        Path(SHED)
        .read_text(encoding="utf-8")
        .replace("[[frame]]", "[robustness.loss_likelihood]\ntie = 3.0\n\n[[frame]]", 1)
    )
    project = tmp_path / "shed.toml"
    project.write_text(text, encoding="utf-8")
    code, out, _ = run("robustness", str(project), "--json", "--out", str(tmp_path / "o"))
    assert code == 0
    data = json.loads(out)
    roof = next(f for f in data["frames"] if f["name"] == "roof plan")
    assert roof["loss_likelihood"] == {"brace": 1.0, "tie": 3.0}
    # Ties are 6 of the 16 weight units; every critical member is a brace: P(k=1) = 1 - 4/16.
    assert roof["curve"][0]["p_stable"] == 0.75


def test_check_lists_the_addition_that_closes_the_cycle(tmp_path: Path) -> None:
    project = tmp_path / "chain.toml"
    project.write_text(CHAIN, encoding="utf-8")
    code, out, _ = run("check", str(project))
    assert code == 1
    assert "tie r2c1:falling locks 3 loose parts" in out
    code, out, _ = run("check", str(project), "--json")
    frame = json.loads(out)["frames"][0]
    best = frame["best_additions"][0]
    assert best["member"] == {"row": 2, "col": 1, "kind": "tie", "diagonal": "falling"}
    assert best["parts_locked"] == 3
    assert frame["best_additions_per_cost"][0]["parts_locked"] == 3


def test_check_on_a_stable_project_has_no_additions() -> None:
    code, out, _ = run("check", SHED, "--json")
    assert code == 0
    assert all("best_additions" not in f for f in json.loads(out)["frames"])
