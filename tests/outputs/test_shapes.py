"""JSON shapes (src/bracegrid/outputs/shapes.py): check_dict, optimize_dict, compare_dict and their parts.

The JSON field names are read by other tools, so they are fixed: the key sets below pin what the
functions return today (shapes.py module docstring; docs/). Expected values: counts and lengths by
hand (3-4-5 bays), stability by THEORY.md's 2 x 2 example (three ties in a chain are floppy); every
object must survive ``json.dumps`` (standard library) and hold only Python scalars, never numpy ones.
"""

from __future__ import annotations

import json
from typing import Any

import pytest

from bracegrid.analysis import CAUTION, check_frame
from bracegrid.compare import Comparison, StrategyKey, compare_project
from bracegrid.model import Diagonal, Frame, GridBar, GridBarKind, Member, MemberKind, Project, Supports
from bracegrid.optimize import ProjectSolution, SolveOptions, optimize_project
from bracegrid.outputs.shapes import (
    check_dict,
    compare_dict,
    compare_rows,
    editor_frame_dict,
    frame_solution_dict,
    member_dict,
    optimize_dict,
    solution_counts,
    verdict_dict,
)

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING
OPTIONS = SolveOptions(time_limit=5, workers=1, seed=0)

MEMBER_KEYS = {"row", "col", "kind", "diagonal"}
VERDICT_KEYS = {
    "name", "stable", "racking_modes", "loose_parts", "anchor", "critical_members", "braces", "ties", "maxwell",
    "removed", "method",
}  # fmt: skip
FRAME_SOLUTION_KEYS = {
    "name", "status", "cost", "added_cost", "bound", "gap", "seconds", "method", "stable", "redundancy", "braces",
    "ties", "new_braces", "new_ties", "diagonal_length_m", "critical_members", "removed", "members",
    "carries_loads", "utilisation", "strength",
}  # fmt: skip
STRATEGY_KEYS = {
    "key", "status", "cost", "saving", "stable", "braces", "ties", "diagonal_length_m", "critical_members",
    "redundancy", "bound", "gap", "seconds", "note", "max_utilisation", "max_drift", "within_capacity",
    "kept_braces", "kept_ties", "added_braces", "added_ties", "carries_loads", "utilisation",
}  # fmt: skip

CHAIN = (Member(1, 1, T, R), Member(1, 2, T, F), Member(2, 2, T, R))  # THEORY.md: floppy 2 x 2
FLOPPY = Frame("chain", (3000, 3000), (4000, 4000), members=CHAIN)
TREE = Frame("tree", (3000, 3000), (4000,), members=(Member(1, 1, B, R), Member(1, 2, B, F)))
PROJECT = Project(
    "shapes yard",
    (
        Frame("wall", (3000, 3000), (4000, 4000), members=(Member(1, 1, B, R),)),
        Frame("base", (2500,) * 3, (2000,) * 2, supports=Supports.BASE),
    ),
)


@pytest.fixture(scope="module")
def solution() -> ProjectSolution:
    return optimize_project(PROJECT, options=OPTIONS)


@pytest.fixture(scope="module")
def comparison() -> Comparison:
    return compare_project(PROJECT, options=OPTIONS)


def _only_python_scalars(value: Any) -> None:
    if isinstance(value, dict):
        for k, v in value.items():
            assert type(k) is str
            _only_python_scalars(v)
    elif isinstance(value, list):
        for v in value:
            _only_python_scalars(v)
    else:
        assert value is None or type(value) in {bool, int, float, str}, (value, type(value))


def test_member_dict() -> None:
    assert member_dict(Member(2, 3, T, F)) == {"row": 2, "col": 3, "kind": "tie", "diagonal": "falling"}


def test_check_dict_keys_and_values() -> None:
    verdicts = [check_frame(TREE), check_frame(FLOPPY), check_frame(TREE, without=[TREE.members[1]])]
    out = check_dict(verdicts)
    assert set(out) == {"stable", "frames", "caution"}
    assert out["stable"] is False  # the chain is floppy
    assert out["caution"] == CAUTION
    assert [set(f) for f in out["frames"]] == [VERDICT_KEYS] * 3
    tree, chain, cut = out["frames"]
    assert (tree["name"], tree["stable"], tree["racking_modes"], tree["braces"], tree["ties"]) == (
        "tree",
        True,
        0,
        2,
        0,
    )
    assert tree["maxwell"] == {"count": 2.0, "needed": 2}  # 2 braces against R + C - 1 = 2
    assert [set(m) for m in tree["critical_members"]] == [MEMBER_KEYS] * 2  # both braces of a tree are critical
    assert tree["loose_parts"] == []
    assert chain["stable"] is False
    assert chain["racking_modes"] >= 1
    assert set(chain["anchor"]) == {"rows", "columns"}
    assert chain["loose_parts"]
    for part in chain["loose_parts"]:
        assert set(part) == {"rows", "columns", "direction", "description"}
        assert part["direction"] in {"both", "clockwise", "anticlockwise"}
        assert "can rack" in part["description"]
    assert cut["removed"] == [member_dict(TREE.members[1])]
    assert cut["stable"] is False
    _only_python_scalars(out)
    json.dumps(out)


def test_verdict_dict_matches_check_dict() -> None:
    v = check_frame(FLOPPY)
    assert check_dict([v])["frames"] == [verdict_dict(v)]
    assert check_dict([check_frame(TREE)])["stable"] is True


def test_optimize_dict_keys(solution: ProjectSolution) -> None:
    out = optimize_dict(solution)
    assert set(out) == {"cost", "added_cost", "frames", "caution"}
    assert out["caution"] == CAUTION
    assert out["cost"] == solution.cost
    assert [set(f) for f in out["frames"]] == [FRAME_SOLUTION_KEYS] * 2
    for f, s in zip(out["frames"], solution.frames, strict=True):
        assert f == frame_solution_dict(s, solution.project.costs)
        assert f["stable"] is True
        assert f["status"] == "optimal"
        assert f["braces"] + f["ties"] == len(f["members"])
        assert f["new_braces"] + f["new_ties"] == sum(1 for m in f["members"] if not m["existing"])
        for m in f["members"]:
            assert set(m) == MEMBER_KEYS | {"existing", "cut_length_mm", "cost"}
        # the bill's one rounding rule: the frame's cost is the sum of its members' prices, to the cent
        assert round(f["cost"] * 100) == sum(round(m["cost"] * 100) for m in f["members"])
    wall = out["frames"][0]
    first = wall["members"][0]
    assert {k: first[k] for k in MEMBER_KEYS | {"existing"}} == {
        "row": 1, "col": 1, "kind": "brace", "diagonal": "rising", "existing": True,
    }  # fmt: skip
    _only_python_scalars(out)
    json.dumps(out)


def test_solution_counts(solution: ProjectSolution) -> None:
    wall = solution.frames[0]
    counts = solution_counts(wall)
    assert set(counts) == {"braces", "ties", "new_braces", "new_ties", "length_mm", "length_m"}
    # Every bay of "wall" is 3 x 4 m: a 5 m diagonal each (3-4-5).
    assert counts["length_m"] == 5.0 * len(wall.members)


def test_compare_dict_keys(comparison: Comparison) -> None:
    out = compare_dict(comparison)
    assert set(out) == {"project", "frames", "caution"}
    assert out["project"] == "shapes yard"
    assert out["caution"] == CAUTION
    assert [f["name"] for f in out["frames"]] == ["wall", "base"]
    for f in out["frames"]:
        assert set(f) == {"name", "strategies"}
        assert [s["key"] for s in f["strategies"]] == [k.value for k in StrategyKey]
        for s in f["strategies"]:
            assert set(s) == STRATEGY_KEYS
        baseline = f["strategies"][-1]
        assert baseline["saving"] == 0.0  # the baseline saves nothing against itself
    _only_python_scalars(out)
    json.dumps(out)


def test_compare_rows_are_flat(comparison: Comparison) -> None:
    rows = compare_rows(comparison)
    assert len(rows) == 2 * len(StrategyKey)
    for row in rows:
        assert set(row) == STRATEGY_KEYS | {"frame", "strategy"}
    assert rows[0]["strategy"] == StrategyKey.BRACES_ONLY.title


def test_editor_marks_general_frames_read_only() -> None:
    plain = Frame("f", (3000, 3000), (2000,))
    assert "general" not in editor_frame_dict(plain, "m")
    gap = Frame("g", (3000, 3000), (2000,), missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 2)}))
    got = editor_frame_dict(gap, "m")
    assert got["general"] is True
    assert "ledger1c2" in got["general_note"]
    assert "read-only" in got["general_note"]
