"""`bracegrid compare`: strategies side by side, CSV, DXF per strategy, report.html.

References for the expected costs on complete frames with uniform bays and
uniform member prices: Bolker & Crapo 1979 (SIAM J. Appl. Math. 36(3):473-490,
doi:10.1137/0136036): braces only need R + C - 1; Baglivo & Graver 1983
(*Incidence and Symmetry in Design and Architecture*, ch. 10): ties only need
2 max(R, C).
"""

from __future__ import annotations

import io
import json
import shutil
import subprocess
from html.parser import HTMLParser
from pathlib import Path

import ezdxf
import pytest

from bracegrid.analysis import is_stable
from bracegrid.cli import main
from bracegrid.compare import StrategyKey, StrategyStatus, compare_frame
from bracegrid.model import CostCatalogue, CostRate, Frame, Supports
from bracegrid.optimize import SolveOptions
from tests.common import project_head

OPTIONS = SolveOptions(time_limit=20, workers=1, seed=1)
# Uniform prices: brace a = 10, tie b = 7 per piece, nothing per metre (so bay sizes do not matter).
UNIFORM = CostCatalogue(brace=CostRate(10.0, 0.0), tie=CostRate(7.0, 0.0))

PROJECT = (
    project_head("Compare yard", brace=(10.0, 0.0), tie=(7.0, 0.0))
    + """
[[frame]]
name = "yard plan"
widths = [3.0, 3.0, 3.0, 3.0]
heights = [2.5, 2.5, 2.5]
supports = "free"
"""
)


@pytest.fixture(scope="module")
def yard() -> object:
    frame = Frame("yard plan", (3000,) * 4, (2500,) * 3)
    return compare_frame(frame, UNIFORM, options=OPTIONS)


def test_closed_forms_on_a_complete_uniform_frame(yard: object) -> None:
    r, c = 3, 4
    braces = yard.result(StrategyKey.BRACES_ONLY)  # type: ignore[attr-defined]
    ties = yard.result(StrategyKey.TIES_ONLY)  # type: ignore[attr-defined]
    assert (braces.braces, braces.ties, braces.cost) == (r + c - 1, 0, 10.0 * (r + c - 1))  # Bolker & Crapo
    assert (ties.braces, ties.ties, ties.cost) == (0, 2 * max(r, c), 7.0 * 2 * max(r, c))  # Baglivo & Graver


def test_cost_ordering_and_every_layout_reverified(yard: object) -> None:
    cost = {s.key: s.cost for s in yard.strategies}  # type: ignore[attr-defined]
    assert cost[StrategyKey.MIXED] <= min(cost[StrategyKey.BRACES_ONLY], cost[StrategyKey.TIES_ONLY])
    assert min(cost[StrategyKey.BRACES_ONLY], cost[StrategyKey.TIES_ONLY]) <= cost[StrategyKey.BASELINE]
    for s in yard.strategies:  # type: ignore[attr-defined]
        assert s.stable
        assert is_stable(s.frame)


def test_redundant_strategy_survives_every_single_loss(yard: object) -> None:
    s = yard.result(StrategyKey.MIXED_REDUNDANT)  # type: ignore[attr-defined]
    members = s.frame.members
    assert s.critical == 0
    assert s.redundancy >= 1
    for k in range(len(members)):  # brute force: take out each member in turn
        assert is_stable(s.frame, members[:k] + members[k + 1 :])


def test_infeasible_strategy_is_reported_not_raised() -> None:
    # One row, free: ties only need an X in every bay; block one bay's diagonals by blocking the bay
    # and the column it owns has no other bay: ties (and braces) cannot hold column 2.
    frame = Frame("strip", (3000, 3000), (2500,), blocked=frozenset({(1, 2)}))
    result = compare_frame(frame, UNIFORM, options=OPTIONS)
    for s in result.strategies:
        assert s.status is StrategyStatus.INFEASIBLE
        assert s.cost is None
        assert "column 2" in s.note


def test_pinned_base_rows(tmp_path: Path) -> None:
    frame = Frame("face", (2500,) * 6, (2000,) * 2, supports=Supports.BASE)
    result = compare_frame(frame, UNIFORM, options=OPTIONS)
    # THEORY.md: on a pinned base rows decouple: R braces or 2R ties.
    assert result.result(StrategyKey.BRACES_ONLY).cost == 2 * 10.0
    assert result.result(StrategyKey.TIES_ONLY).cost == 4 * 7.0
    assert result.result(StrategyKey.MIXED).cost == 20.0


class _Collect(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[str] = []
        self.external: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append(tag)
        for name, value in attrs:
            if name in {"src", "href"} and value and not value.startswith("#"):
                self.external.append(value)


def test_cli_writes_csv_dxf_per_strategy_and_self_contained_html(tmp_path: Path) -> None:
    project = tmp_path / "yard.toml"
    project.write_text(PROJECT, encoding="utf-8")
    out = io.StringIO()
    code = main(["compare", str(project), "--time-limit", "20", "--workers", "1", "--out", str(tmp_path / "o"),
                 "--json"], out=out)  # fmt: skip
    assert code == 0
    data = json.loads(out.getvalue())
    (frame,) = data["frames"]
    keys = [s["key"] for s in frame["strategies"]]
    assert keys == ["braces-only", "ties-only", "mixed", "mixed-redundant", "baseline"]
    for s in frame["strategies"]:
        assert {"key", "cost", "stable", "status", "gap", "seconds", "braces", "ties"} <= set(s)
        assert s["stable"] is True
    folder = tmp_path / "o"
    csv_lines = (folder / "yard-compare.csv").read_text(encoding="utf-8").splitlines()
    assert len(csv_lines) == 1 + 5
    for key in keys:
        doc = ezdxf.readfile(folder / f"yard-{key}.dxf")
        auditor = doc.audit()  # ezdxf's own auditor is the reference reader
        assert not auditor.has_errors
    page = (folder / "report.html").read_text(encoding="utf-8")
    parser = _Collect()
    parser.feed(page)
    assert parser.tags.count("figure") == 5  # one figure (frame drawing and legend) per strategy
    assert "table" in parser.tags
    assert parser.external == []  # no network fetches: nothing loaded from elsewhere
    assert "licensed engineer" in page


def test_cli_bad_time_limit(tmp_path: Path) -> None:
    project = tmp_path / "yard.toml"
    project.write_text(PROJECT, encoding="utf-8")
    err = io.StringIO()
    assert main(["compare", str(project), "--time-limit", "0"], err=err) == 2
    assert "--time-limit" in err.getvalue()


CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser") or shutil.which("google-chrome")


@pytest.mark.skipif(CHROMIUM is None, reason="no Chromium on this machine")
def test_report_renders_headless(tmp_path: Path) -> None:
    project = tmp_path / "yard.toml"
    project.write_text(PROJECT, encoding="utf-8")
    assert main(["compare", str(project), "--time-limit", "20", "--workers", "1", "--out", str(tmp_path / "o"),
                 "--json"], out=io.StringIO()) == 0  # fmt: skip
    shot = tmp_path / "report.png"
    subprocess.run(
        [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         f"--user-data-dir={tmp_path / 'profile'}", f"--screenshot={shot}", "--window-size=1200,2000",
         (tmp_path / "o" / "report.html").as_uri()],
        check=True, capture_output=True, timeout=120,
    )  # fmt: skip
    from PIL import Image

    with Image.open(shot) as img:
        assert img.size == (1200, 2000)
        colours = img.convert("L").getextrema()
        assert colours[0] < 100 < colours[1]  # text on a light page, not a blank screen


def test_totals_over_every_frame() -> None:
    from bracegrid.compare import compare_project
    from bracegrid.io import load_project

    project = load_project(Path(__file__).resolve().parents[2] / "projects" / "quayside-scaffold.toml")
    comparison = compare_project(project, options=OPTIONS)
    for key in StrategyKey:
        assert comparison.total(key) == pytest.approx(sum(fc.result(key).cost for fc in comparison.frames))
    # Pinned base, rows decouple: ties-only can never beat mixed.
    assert comparison.total(StrategyKey.MIXED) <= comparison.total(StrategyKey.TIES_ONLY)
