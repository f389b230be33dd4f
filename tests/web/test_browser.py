"""The editor in a real browser: Debian's Chromium, headless, driven by Playwright from Python.

The browser is never downloaded: the tests use the system's ``chromium`` (``.ci/run`` installs it
with apt when it is missing) and skip, saying why, only when none can be had. Screenshots for the
developer to look at go to ``build/screenshots/``.

Independent check: braces on every bay of row 1 and of column 1 form a spanning tree of the
bipartite row/column graph (R + C - 1 braces), which is rigid (Bolker and Crapo, "Bracing
rectangular frameworks. I", SIAM J. Appl. Math. 36(3), 1979, doi:10.1137/0136036); one brace fewer
is not. The saved layout is also re-checked with the bar-framework physics of tests/physics.py.
"""

from __future__ import annotations

import os
import re
import shutil
import signal
import subprocess
import sys
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest

from bracegrid.io import load_project
from bracegrid.mechanics import analyse_frame
from bracegrid.model import MemberKind
from bracegrid.optimize import SolveOptions, SolveStatus, optimize_frame
from tests.physics import physically_rigid
from tests.web.helpers import ROOT, copy_project

playwright = pytest.importorskip("playwright.sync_api", reason="Playwright's Python package is not installed")

SHOTS = ROOT / "build" / "screenshots"
#: Flags for a headless Chromium that stays off the network and needs no GPU or sandbox.
CHROMIUM_FLAGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
]


def _chromium() -> str | None:
    for name in ("chromium", "chromium-browser"):
        found = shutil.which(name)
        if found:
            return found
    return "/usr/bin/chromium" if Path("/usr/bin/chromium").exists() else None


@pytest.fixture(scope="module")
def browser() -> Iterator[Any]:
    path = _chromium()
    if path is None:
        pytest.skip("no Chromium on this machine (install Debian's package: apt-get install chromium)")
    with playwright.sync_playwright() as p:
        try:
            b = p.chromium.launch(executable_path=path, args=CHROMIUM_FLAGS)
        except Exception as exc:  # a browser that cannot start is as good as none
            pytest.skip(f"Chromium at {path} did not start: {exc}")
        yield b
        b.close()


@pytest.fixture
def served(tmp_path: Path, request: pytest.FixtureRequest) -> Iterator[tuple[str, Path]]:
    """A real ``bracegrid edit`` on a copy of a demo project; yields its URL and the file."""
    name = getattr(request, "param", "mill-lane-roof.toml")
    project = copy_project(tmp_path, name)
    proc = subprocess.Popen(
        [sys.executable, "-m", "bracegrid", "edit", str(project), "--no-browser"],
        cwd=project.parent,  # outputs go into out/<project>-edit/ in the current directory
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env={**os.environ, "PYTHONUNBUFFERED": "1"},
    )
    try:
        assert proc.stdout is not None
        url = proc.stdout.readline().strip()
        assert url.startswith("http://127.0.0.1:"), url
        yield url, project
    finally:
        proc.send_signal(signal.SIGINT)
        try:
            proc.communicate(timeout=20)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.communicate()


@pytest.fixture
def page(browser: Any) -> Iterator[Any]:
    context = browser.new_context(viewport={"width": 1440, "height": 940})
    tab = context.new_page()
    errors: list[str] = []
    tab.on("pageerror", lambda exc: errors.append(str(exc)))
    # The browser logs every 4xx answer; those the tests provoke (422, 409) are not page errors.
    expected = re.compile(r"^Failed to load resource: the server responded with a status of 4(09|22)")
    tab.on(
        "console", lambda msg: errors.append(msg.text) if msg.type == "error" and not expected.match(msg.text) else None
    )
    yield tab
    context.close()
    assert errors == [], errors


# Client coordinates of a point on a bay's diagonal (30 % along it from its lower end).
_POINT = """([r, c, d]) => {
  const g = window.bracegrid.geometry, svg = document.getElementById('grid');
  const x0 = g.xs[c - 1], x1 = g.xs[c], y0 = g.H - g.ys[r - 1], y1 = g.H - g.ys[r];
  const t = 0.3;
  const x = x0 + (x1 - x0) * t, y = d === 'rising' ? y0 + (y1 - y0) * t : y1 + (y0 - y1) * (1 - t);
  const p = svg.createSVGPoint(); p.x = x; p.y = y;
  const q = p.matrixTransform(svg.getScreenCTM());
  return [q.x, q.y];
}"""

_SETTLED = (
    "() => { const s = window.bracegrid; "
    "return s.checkSeq > 0 && !s.inflight && !s.pending && s.shownSeq === s.checkSeq; }"
)


def _point(tab: Any, row: int, col: int, diagonal: str = "rising") -> tuple[float, float]:
    x, y = tab.evaluate(_POINT, [row, col, diagonal])
    return float(x), float(y)


def _settle(tab: Any) -> str:
    tab.wait_for_function(_SETTLED, timeout=15000)
    state: str = tab.get_attribute("#verdict-state", "data-state")
    return state


def _click(tab: Any, row: int, col: int, diagonal: str = "rising") -> str:
    tab.mouse.click(*_point(tab, row, col, diagonal))
    return _settle(tab)


def _drag(tab: Any, row: int, cols: range) -> str:
    first = _point(tab, row, cols[0])
    tab.mouse.move(*first)
    tab.mouse.down()
    for c in cols[1:]:
        tab.mouse.move(*_point(tab, row, c), steps=3)
    tab.mouse.up()
    return _settle(tab)


def _summary(tab: Any, field: str) -> str:
    text: str = tab.inner_text(f'#summary dd[data-field="{field}"]')
    return text


def _open(tab: Any, url: str) -> str:
    tab.goto(url)
    tab.wait_for_selector("#verdict-state[data-state='stable'], #verdict-state[data-state='unstable']")
    return _settle(tab)


def test_click_the_demo_roof_until_stable_undo_save_reload(page: Any, served: tuple[str, Path]) -> None:
    url, project = served
    assert _open(page, url) == "unstable"  # the demo roof holds no member yet
    assert "racking mode" in page.inner_text("#verdict-state")
    assert page.locator("#loose li").count() >= 1
    # row 1: drag paints ties across every bay, a second drag makes them braces
    assert _drag(page, 1, range(1, 13)) == "unstable"
    assert _summary(page, "ties") == "12"
    assert _drag(page, 1, range(1, 13)) == "unstable"
    assert _summary(page, "braces") == "12"
    # column 1, rows 2-8: click twice each (nothing -> tie -> brace)
    states = []
    for row in range(2, 9):
        _click(page, row, 1)
        states.append(_click(page, row, 1))
    assert states[:-1] == ["unstable"] * 6  # one brace short of the spanning tree: not yet
    assert states[-1] == "stable"  # R + C - 1 = 8 + 12 - 1 = 19 braces in a spanning tree
    assert _summary(page, "braces") == "19"
    assert "critical member" in page.inner_text("#critical")
    SHOTS.mkdir(parents=True, exist_ok=True)
    page.screenshot(path=str(SHOTS / "editor-mill-lane-stable.png"))
    # undo the last click (brace back to tie): not stable; redo: stable again
    page.click("#undo")
    assert _settle(page) == "unstable"
    assert _summary(page, "ties") == "1"
    page.screenshot(path=str(SHOTS / "editor-mill-lane-undone.png"))
    page.keyboard.press("Control+Shift+Z")
    assert _settle(page) == "stable"
    # save, then reload the page and find the same layout
    page.click("#save")
    page.wait_for_function("() => document.getElementById('file-state').textContent.startsWith('Saved')")
    saved = load_project(project).frame("roof plane")
    assert sum(1 for m in saved.members if m.kind is MemberKind.BRACE) == 19
    assert physically_rigid(saved, saved.members)
    assert (project.parent / f"{project.name}.bak").exists()
    page.reload()
    assert _settle(page) == "stable"
    assert _summary(page, "braces") == "19"
    assert page.evaluate("() => window.bracegrid.frames[0].members.size") == 19


def test_keyboard_cycles_and_keeps_a_bay_clear(page: Any, served: tuple[str, Path]) -> None:
    url, _ = served
    _open(page, url)
    page.focus("#grid")
    page.keyboard.press("Space")
    _settle(page)
    page.keyboard.press("Space")
    _settle(page)
    assert _summary(page, "braces") == "1"
    page.keyboard.press("ArrowRight")
    page.keyboard.press("d")
    page.keyboard.press("Space")
    _settle(page)
    assert _summary(page, "ties") == "1"
    assert page.evaluate("() => [...window.bracegrid.frames[0].members.keys()].sort()") == ["1,1,rising", "1,2,falling"]
    page.keyboard.press("b")  # keep bay r1c2 clear: its tie goes
    _settle(page)
    assert page.evaluate("() => [...window.bracegrid.frames[0].blocked]") == ["1,2"]
    assert _summary(page, "ties") == "0"
    page.keyboard.press("Control+z")
    _settle(page)
    assert _summary(page, "ties") == "1"


def test_sizes_edit_with_the_loaders_message_beside_the_field(page: Any, served: tuple[str, Path]) -> None:
    url, _ = served
    _open(page, url)
    page.fill("#widths", "5, 5, x, 5, 5, 5, 5, 5, 5, 5, 5, 5")
    page.press("#widths", "Enter")
    assert _settle(page) == "invalid"
    assert "widths[3]: cannot read 'x' as a length" in page.inner_text("#widths-message")
    page.fill("#widths", "5, 5, 6, 5, 5, 5, 5, 5, 5, 5, 5, 5")
    page.press("#widths", "Enter")
    assert _settle(page) == "unstable"
    assert page.inner_text("#widths-message") == ""
    assert "6 m" in page.text_content("#layer-labels")
    page.select_option("#supports", "base")
    assert _settle(page) == "unstable"


@pytest.mark.parametrize("served", ["orchard-shed.toml"], indirect=True)
def test_save_conflict_offers_reload_and_a_copy(page: Any, served: tuple[str, Path]) -> None:
    url, project = served
    assert _open(page, url) == "stable"
    _click(page, 2, 3)  # add a tie
    project.write_text(project.read_text(encoding="utf-8") + "\n# changed by someone else\n", encoding="utf-8")
    changed = project.read_bytes()
    page.click("#save")
    page.wait_for_selector("#conflict:not([hidden])")
    assert "changed on disk" in page.inner_text("#conflict-text")
    assert project.read_bytes() == changed
    page.click("#save-copy")
    page.wait_for_selector("#copy-link a")
    href = page.get_attribute("#copy-link a", "href")
    assert re.match(r"^/out/\d+\?t=", href or "")
    copies = list((project.parent / "out" / "orchard-shed-edit").glob("orchard-shed-copy-*.toml"))
    assert len(copies) == 1
    page.once("dialog", lambda dialog: dialog.accept())
    page.click("#reload")
    page.wait_for_selector("#conflict", state="hidden")
    assert _settle(page) == "stable"


@pytest.mark.parametrize("served", ["orchard-shed.toml"], indirect=True)
def test_optimize_streams_then_offers_members_apart_until_accepted(page: Any, served: tuple[str, Path]) -> None:
    url, _ = served
    _open(page, url)
    assert _click(page, 3, 3) == "unstable"  # the roof's r3c3 brace cycles away (brace -> nothing)
    page.fill("#time-limit", "5")
    page.click("#optimize")
    page.wait_for_selector("#proposal-card:not([hidden])", timeout=60000)
    offered = page.locator("#layer-offers line").count()
    assert offered >= 1
    assert page.locator("#layer-members line").count() == 11  # still apart from the layout
    page.screenshot(path=str(SHOTS / "editor-orchard-offer.png"))
    page.click("#accept")
    assert _settle(page) == "stable"
    assert page.locator("#layer-members line.planned").count() == offered
    assert page.locator("#layer-offers line").count() == 0


@pytest.mark.parametrize("served", ["orchard-shed.toml"], indirect=True)
def test_compare_links_and_cancel(page: Any, served: tuple[str, Path]) -> None:
    url, project = served
    _open(page, url)
    page.click("button.frame-tab[data-index='1']")
    _settle(page)
    page.fill("#time-limit", "2")
    page.click("#compare")
    page.wait_for_selector("#compare-card:not([hidden])", timeout=120000)
    assert page.locator("#compare-table tbody tr").count() == 6
    names = page.locator("#compare-files a").all_inner_texts()
    assert "report.html" in names
    assert (project.parent / "out" / "orchard-shed-edit" / "report.html").exists()
    # a long optimize on the roof, cancelled from the page
    page.click("button.frame-tab[data-index='0']")
    _settle(page)
    page.evaluate("() => { document.querySelector('#keep-clear').checked = false; }")
    page.fill("#time-limit", "120")
    _click(page, 3, 3)  # cycle the r3c3 brace away: unstable again
    page.click("#optimize")
    page.wait_for_selector("#cancel:not([hidden])")
    page.click("#cancel")
    page.wait_for_function("() => document.getElementById('job-message').textContent.includes('cancelled')")
    assert page.locator("#proposal-card").is_hidden()


@pytest.mark.parametrize("served", ["orchard-shed.toml"], indirect=True)
def test_members_coloured_by_utilisation_after_the_verdict(page: Any, served: tuple[str, Path]) -> None:
    """Orchard shed (invented loads): the stable roof plan's members take the force sheets' colours."""
    url, project = served
    assert _open(page, url) == "stable"
    page.wait_for_function("() => { const f = window.bracegrid.frames[0]; return f.forces && f.forces.available; }")
    want = analyse_frame(load_project(project).frames[0], load_project(project).strength)
    rated = page.locator("#layer-members line.rated")
    assert rated.count() == len(load_project(project).frames[0].members)
    assert page.locator("#layer-util line.grid-util").count() > 0  # standards and ledgers with a capacity
    state = page.inner_text("#forces-state")
    assert f"{100 * (want.max_utilisation or 0.0):.0f} %" in state
    assert page.locator("#forces-cases li").count() == len(want.cases)
    colours = page.eval_on_selector_all("#layer-members line.rated", "ls => ls.map(l => l.style.stroke)")
    assert all(c.startswith("rgb(") for c in colours)
    SHOTS.mkdir(parents=True, exist_ok=True)
    page.screenshot(path=str(SHOTS / "editor-orchard-utilisation.png"))
    # colouring off: members back in their kind colours; a click on a member re-analyses
    page.uncheck("#colour-util")
    assert page.locator("#layer-members line.rated").count() == 0
    assert page.locator("#layer-util line").count() == 0


@pytest.mark.parametrize("served", ["quayside-scaffold.toml"], indirect=True)
def test_stability_only_checkbox_prices_stability_alone(page: Any, served: tuple[str, Path]) -> None:
    """Quayside street face (invented loads): the box switches the editor's optimize to stability alone.

    Both optima are proven, so the page's totals must equal the library's for the same frame.
    """
    url, project = served
    loaded = load_project(project)
    frame = loaded.frames[0]

    def solve(only: bool) -> Any:
        options = SolveOptions(time_limit=30, workers=1, stability_only=only)
        return optimize_frame(frame, loaded.costs, strength=loaded.strength, options=options)

    want = {only: solve(only) for only in (True, False)}
    assert all(s.status is SolveStatus.OPTIMAL for s in want.values())
    assert want[True].cost < want[False].cost  # the loads cost something here
    _open(page, url)
    page.fill("#time-limit", "30")
    for only in (True, False):
        page.set_checked("#stability-only", only)
        page.click("#optimize")
        page.wait_for_selector("#proposal-card:not([hidden])", timeout=90000)
        text = page.inner_text("#proposal-text")
        assert f"whole layout {want[only].cost:.2f}" in text, text
        assert "proven cheapest" in text
        page.click("#discard")
        page.wait_for_selector("#proposal-card", state="hidden")
