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
    assert keys == ["braces-only", "ties-only", "mixed", "stable-only", "mixed-redundant", "baseline"]
    for s in frame["strategies"]:
        assert {"key", "cost", "stable", "status", "gap", "seconds", "braces", "ties"} <= set(s)
        assert s["stable"] is True
    folder = tmp_path / "o"
    csv_lines = (folder / "yard-compare.csv").read_text(encoding="utf-8").splitlines()
    assert len(csv_lines) == 1 + 6
    for key in keys:
        doc = ezdxf.readfile(folder / f"yard-{key}.dxf")
        auditor = doc.audit()  # ezdxf's own auditor is the reference reader
        assert not auditor.has_errors
    page = (folder / "report.html").read_text(encoding="utf-8")
    parser = _Collect()
    parser.feed(page)
    # one figure (frame drawing and legend) per strategy, one robustness plot
    assert parser.tags.count("figure") == 6 + 1
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


KEPT_PROJECT = (
    project_head("Kept yard", brace=(10.0, 0.0), tie=(7.0, 0.0))
    + """
[[frame]]
name = "yard plan"
widths = [3.0, 3.0, 3.0, 3.0]
heights = [2.5, 2.5, 2.5]
supports = "free"

[[frame.member]]
row = 2
col = 2
kind = "tie"
diagonal = "rising"
"""
)


def test_kept_and_added_members_apart_and_wording(tmp_path: Path) -> None:
    # Issue 10: a braces-only row showed ties (members in place are kept); kept and added members
    # are now separate columns. The status column says as drawn / repaired, not "rule of thumb";
    # a negative saving is marked; "Rule of thumb (as drawn, repaired)" no longer sits beside
    # "stable without repair".
    project = tmp_path / "kept.toml"
    project.write_text(KEPT_PROJECT, encoding="utf-8")
    out = io.StringIO()
    assert main(["compare", str(project), "--time-limit", "20", "--workers", "1", "--out", str(tmp_path / "o"),
                 "--json"], out=out) == 0  # fmt: skip
    (frame,) = json.loads(out.getvalue())["frames"]
    rows = {s["key"]: s for s in frame["strategies"]}
    braces_only = rows["braces-only"]
    assert (braces_only["kept_ties"], braces_only["added_ties"]) == (1, 0)
    assert braces_only["added_braces"] == braces_only["braces"]
    for s in rows.values():
        assert s["braces"] == s["kept_braces"] + s["added_braces"]
        assert s["ties"] == s["kept_ties"] + s["added_ties"]
    assert rows["baseline"]["status"] in {"as drawn", "repaired"}
    page = (tmp_path / "o" / "report.html").read_text(encoding="utf-8")
    assert "Rule of thumb (as drawn, repaired)" not in page
    assert "<th>kept ties</th>" in page
    assert "<th>added braces</th>" in page
    text = io.StringIO()
    assert main(["compare", str(project), "--time-limit", "20", "--workers", "1", "--out", str(tmp_path / "t")],
                out=text) == 0  # fmt: skip
    table = text.getvalue()
    assert "kept" in table
    assert "added" in table
    assert "rule of thumb" not in table.split("All frames")[0].split("kept =")[0]
    if any(s["saving"] is not None and s["saving"] < 0 for s in rows.values()):
        assert "(dearer)" in table
        assert "(dearer)" in page


def test_negative_saving_is_marked() -> None:
    from bracegrid.outputs.terms import saving_text

    assert saving_text(-1230) == "-12.30 (dearer)"
    assert saving_text(1230) == "12.30"


def test_report_is_small_real_text_and_each_bill_once(tmp_path: Path) -> None:
    # Issue 10: report.html was about 10 MB, drew every letter as a path, shrank the A3 sheet to the
    # page and showed the bill twice. Now: a figure per strategy drawn for the page (frame and legend),
    # text as text, the bill once as an HTML table, and the costs in the JSON equal to the bills.
    from bracegrid.compare import compare_project
    from bracegrid.io import load_project
    from bracegrid.outputs import render_html
    from bracegrid.outputs.bill import build_bom

    demo = load_project(Path(__file__).resolve().parents[2] / "projects" / "quayside-scaffold.toml")
    comparison = compare_project(demo, options=OPTIONS)
    page = render_html(comparison)
    assert len(page.encode("utf-8")) < 500_000
    parser = _Collect()
    parser.feed(page)
    forces = page.count("<h4>Member forces</h4>")  # the demo has load cases: a force figure per layout
    assert parser.tags.count("figure") == 12 + forces  # two frames x six strategies
    assert page.count("<h4>Bill of materials</h4>") == 12
    assert "BILL OF MATERIALS" not in page  # the sheet's table is not drawn into the figures
    assert parser.tags.count("path") < 2000  # lines and symbols only, no glyph outlines
    assert page.count(">street face: Ties only</title>") == 1
    assert 'ul class="legend"' in page
    for fc in comparison.frames:
        for s in fc.strategies:
            assert s.frame is not None
            bom = build_bom(demo, frames=[s.frame])
            assert round((s.cost or 0) * 100) == bom.totals.cost_cents
            assert s.length_mm == bom.totals.length_mm


def test_help_says_what_the_time_limit_bounds() -> None:
    # Issue 10: say in --help what --time-limit bounds (each strategy's solve) and what the run may take.
    out = io.StringIO()
    import contextlib

    with contextlib.redirect_stdout(out):
        assert main(["compare", "--help"]) == 0
    text = " ".join(out.getvalue().split())
    assert "each strategy's solve of each frame" in text
    assert "the whole run may take up to 6 x S x the number of frames" in text
