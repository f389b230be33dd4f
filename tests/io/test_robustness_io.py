"""The [robustness] table (io/robustness.py): read with located errors, written back, round trip."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from bracegrid.errors import InputError
from bracegrid.io import parse_project, render_project
from bracegrid.io.robustness import read_robustness, robustness_table
from bracegrid.model import LossLikelihood, MemberKind
from tests.common import project_head

FRAME = '\n[[frame]]\nname = "f"\nwidths = [3.0]\nheights = [2.0]\n'


def test_default_when_the_table_is_missing() -> None:
    project = parse_project(project_head("p") + FRAME)
    assert project.loss_likelihood == LossLikelihood()
    assert project.loss_likelihood.uniform
    assert "[robustness" not in render_project(project)


def test_reads_and_writes_back() -> None:
    text = project_head("p") + "\n[robustness.loss_likelihood]\ntie = 3\n" + FRAME
    project = parse_project(text)
    assert project.loss_likelihood == LossLikelihood(brace=1.0, tie=3.0)
    assert not project.loss_likelihood.uniform
    again = parse_project(render_project(project))
    assert again.loss_likelihood == project.loss_likelihood


def test_inline_table_form() -> None:
    text = project_head("p") + "\n[robustness]\nloss_likelihood = { brace = 0.5, tie = 2.0 }\n" + FRAME
    assert parse_project(text).loss_likelihood == LossLikelihood(brace=0.5, tie=2.0)


@pytest.mark.parametrize(
    ("table", "expect"),
    [
        (
            "[robustness.loss_likelihood]\ntie = -1",
            "line 10, [robustness.loss_likelihood].tie: expected a number 0 or above",
        ),
        ('[robustness.loss_likelihood]\ntie = "often"', "[robustness.loss_likelihood].tie: expected a number"),
        ("[robustness.loss_likelihood]\ntie = true", "got True"),
        ("[robustness.loss_likelihood]\ntie = nan", "got nan"),
        ("[robustness.loss_likelihood]\ntye = 2.0", "unknown field 'tye'; did you mean 'tie'?"),
        (
            "[robustness]\nloss_likelyhood = { tie = 2.0 }",
            "unknown field 'loss_likelyhood'; did you mean 'loss_likelihood'?",
        ),
        ("[robustness]\nloss_likelihood = 3", "expected a table of kind = likelihood"),
        ("[robustness.loss_likelihood]\nbrace = 0\ntie = 0", "every kind is 0, so nothing is ever lost"),
    ],
)
def test_bad_values_are_located_and_explained(table: str, expect: str) -> None:
    text = project_head("p") + "\n" + table + "\n" + FRAME
    with pytest.raises(InputError) as info:
        parse_project(text, source="p.toml")
    assert expect in str(info.value)


def test_robustness_is_a_known_top_level_table() -> None:
    with pytest.raises(InputError, match="did you mean 'robustness'"):
        parse_project(project_head("p") + "\n[robustnes]\n" + FRAME)


def test_table_helpers() -> None:
    assert read_robustness(None) == (LossLikelihood(), [])
    assert read_robustness(5)[1] == ["[robustness]: expected a table, got int"]
    table = robustness_table(LossLikelihood(brace=0.0, tie=2.0))
    assert table == {"loss_likelihood": {k.value: LossLikelihood(brace=0.0, tie=2.0).weight(k) for k in MemberKind}}


def test_the_documented_example_reads() -> None:
    # docs/project-file.md shows every field in one example file; it must stay a valid project.
    doc = (Path(__file__).resolve().parents[2] / "docs" / "project-file.md").read_text(encoding="utf-8")
    match = re.search(r"```toml\n(.+?)```", doc, re.DOTALL)
    assert match is not None
    assert parse_project(match.group(1)).loss_likelihood == LossLikelihood(brace=1.0, tie=3.0)
