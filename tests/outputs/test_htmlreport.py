"""The HTML report (src/bracegrid/outputs/htmlreport.py: render_html) of a small comparison.

References: the document is parsed with the standard library's ``html.parser`` (an independent
reader); the report promises one self-contained file with no scripts and no network fetches
(htmlreport.py module docstring), so no ``src``/``href`` and no CSS ``url()`` may point to
http:// or https:// (the SVG namespace declaration ``xmlns`` is a name, not a fetch); the strategy
titles are those of bracegrid.compare.StrategyKey; the caution is analysis.CAUTION.
"""

from __future__ import annotations

import html
import re
from collections import Counter
from datetime import date
from html.parser import HTMLParser

import pytest

from bracegrid.analysis import CAUTION
from bracegrid.compare import Comparison, StrategyKey, compare_project
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Project, Supports
from bracegrid.optimize import SolveOptions
from bracegrid.outputs.htmlreport import render_html

OPTIONS = SolveOptions(time_limit=3, workers=1, seed=0)
WHEN = date(2024, 5, 17)


class _Report(HTMLParser):
    """Collects tags, attributes, text and the rows of every table."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: Counter[str] = Counter()
        self.attrs: list[tuple[str, str, str]] = []
        self.text: list[str] = []
        self.tables: list[list[list[str]]] = []
        self._cell: list[str] | None = None
        self._open_tables: list[list[list[str]]] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags[tag] += 1
        self.attrs.extend((tag, k, v or "") for k, v in attrs)
        if tag == "table":
            self._open_tables.append([])
        elif tag == "tr" and self._open_tables:
            self._open_tables[-1].append([])
        elif tag in {"td", "th"}:
            self._cell = []

    def handle_endtag(self, tag: str) -> None:
        if tag in {"td", "th"} and self._cell is not None and self._open_tables:
            self._open_tables[-1][-1].append("".join(self._cell).strip())
            self._cell = None
        elif tag == "table" and self._open_tables:
            self.tables.append(self._open_tables.pop())

    def handle_data(self, data: str) -> None:
        self.text.append(data)
        if self._cell is not None:
            self._cell.append(data)


@pytest.fixture(scope="module")
def comparison() -> Comparison:
    project = Project(
        "Report yard <&>",
        (
            Frame("plan", (3000, 3000), (2500, 2500), members=(Member(1, 1, MemberKind.BRACE, Diagonal.RISING),)),
            # Every bay blocked: no strategy has a layout, so this frame adds no drawing (each inline
            # drawing takes about a second to render) but shows the "No layout" path and the totals.
            Frame("closed", (2500,) * 2, (2000,), supports=Supports.BASE, blocked=frozenset({(1, 1), (1, 2)})),
        ),
    )
    return compare_project(project, options=OPTIONS)


@pytest.fixture(scope="module")
def page(comparison: Comparison) -> str:
    return render_html(comparison, when=WHEN, time_limit=3)


@pytest.fixture(scope="module")
def parsed(page: str) -> _Report:
    report = _Report()
    report.feed(page)
    report.close()
    return report


def test_is_an_html_document(page: str, parsed: _Report) -> None:
    assert page.startswith("<!DOCTYPE html>")
    for tag in ("html", "head", "title", "style", "body", "h1", "table", "svg"):
        assert parsed.tags[tag] >= 1, tag
    assert parsed.tags["html"] == parsed.tags["body"] == 1
    # The project name is escaped: the raw "<&>" never appears as markup.
    assert "Report yard &lt;&amp;&gt;" in page
    assert "Bracing alternatives: Report yard <&>" in "".join(parsed.text)


def test_has_the_caution(page: str, parsed: _Report) -> None:
    text = re.sub(r"\s+", " ", "".join(parsed.text))
    assert CAUTION in text
    assert html.escape(CAUTION) in page
    assert page.count("class=caution") == 2  # at the top and at the bottom


def test_every_strategy_of_the_closed_frame_is_infeasible(comparison: Comparison, page: str) -> None:
    closed = comparison.frames[1]
    assert all(s.frame is None for s in closed.strategies)
    assert page.count("<p class=bad>No layout:") == len(StrategyKey)


def test_one_comparison_row_per_strategy(comparison: Comparison, parsed: _Report) -> None:
    titles = [k.title for k in StrategyKey]
    head = ["strategy", "status", "kept braces", "kept ties", "added braces", "added ties"]
    compare_tables = [t for t in parsed.tables if t and t[0][:6] == head]
    assert len(compare_tables) == len(comparison.frames)
    for table, fc in zip(compare_tables, comparison.frames, strict=True):
        rows = [r for r in table[1:] if r and r[0] in titles]
        assert [r[0] for r in rows] == titles  # each strategy once, in order
        for row, s in zip(rows, fc.strategies, strict=True):
            assert row[1] == s.status.value
            assert [int(v) for v in row[2:6]] == [s.kept_braces, s.kept_ties, s.added_braces, s.added_ties]
    # With two frames the totals table lists each strategy once too; no strategy works on every frame.
    totals = [t for t in parsed.tables if t and t[0][:2] == ["strategy", "cost, all frames"]]
    assert len(totals) == 1
    assert [r[0] for r in totals[0][1:]] == titles
    assert [r[1] for r in totals[0][1:]] == ["-"] * len(titles)


def test_no_external_urls_and_no_scripts(page: str, parsed: _Report) -> None:
    assert parsed.tags["script"] == 0
    assert parsed.tags["link"] == 0
    assert parsed.tags["iframe"] == 0
    for tag, name, value in parsed.attrs:
        if name in {"src", "href", "xlink:href", "action", "data"}:
            assert not value.lower().startswith(("http://", "https://", "//")), (tag, name, value)
    assert not re.search(r"url\(\s*['\"]?(https?:)?//", page, flags=re.IGNORECASE)
    assert not re.search(r"@import", page, flags=re.IGNORECASE)


def test_inline_drawings_have_unique_ids(comparison: Comparison, parsed: _Report) -> None:
    # Every strategy of every frame draws one figure (its drawing and legend); the symbols are defined
    # once per page, so no id repeats.
    assert parsed.tags["figure"] == sum(1 for fc in comparison.frames for s in fc.strategies if s.frame is not None)
    assert parsed.tags["figure"] == len(StrategyKey)  # the open frame's six layouts
    ids = [v for _, name, v in parsed.attrs if name == "id"]
    duplicates = [i for i, n in Counter(ids).items() if n > 1]
    assert duplicates == []


def test_records_date_and_time_limit(page: str) -> None:
    assert "2024-05-17" in page
    assert "solver limit 3 s per strategy" in page
    assert "solver limit" not in render_html(
        Comparison(project=Project("p", ()), frames=()), when=WHEN
    )  # no limit given, none recorded
