"""Repairs after taking members out, N-1 options and their CLI.

References: stability by the directed-cycle criterion (Baglivo & Graver 1983,
ch. 10) via bracegrid.analysis; the bar-framework reference tests/physics.py
(numpy rank + scipy linprog); exhaustive enumeration
(tests/validation/test_exhaustive_optimize.py) as the independent minimum.
"""

from __future__ import annotations

import dataclasses
import io
import json
import random
from pathlib import Path

import pytest

from bracegrid.analysis import find_critical_members, is_stable
from bracegrid.cli import main
from bracegrid.errors import InfeasibleError
from bracegrid.model import CostCatalogue, Diagonal, Frame, Member, MemberKind, Supports
from bracegrid.optimize import SolveOptions, optimize_frame, repair_frame
from tests.common import project_head
from tests.physics import physically_rigid
from tests.validation.test_exhaustive_optimize import _units, exhaustive_minimum

OPTS = SolveOptions(time_limit=20, workers=1, seed=0)


def _stable_frame(seed: int) -> Frame:
    rng = random.Random(seed)
    rows, cols = rng.randint(2, 3), rng.randint(2, 3)
    f = Frame("r", tuple(rng.choice([1500, 2500, 3000]) for _ in range(cols)),
              tuple(rng.choice([1500, 2000]) for _ in range(rows)))  # fmt: skip
    sol = optimize_frame(f, CostCatalogue(), options=OPTS)
    return dataclasses.replace(f, members=tuple(dataclasses.replace(m, existing=True) for m in sol.members))


@pytest.mark.parametrize("seed", range(10))
@pytest.mark.parametrize("keep_clear", [False, True])
def test_repair_two_routes_one_answer(seed: int, keep_clear: bool) -> None:
    """Repair of a critical member == fresh optimize with the rest fixed (and the bay blocked) == enumeration."""
    frame = _stable_frame(seed)
    critical = find_critical_members(frame)
    assert critical, "a minimum layout has critical members"
    gone = critical[seed % len(critical)]
    rest = tuple(m for m in frame.members if m != gone)
    blocked = frame.blocked | ({gone.bay} if keep_clear else set())
    fresh_frame = dataclasses.replace(frame, members=rest, blocked=frozenset(blocked))
    try:
        repaired = repair_frame(frame, CostCatalogue(), [gone], keep_clear=keep_clear, options=OPTS)
    except InfeasibleError:
        with pytest.raises(InfeasibleError):
            optimize_frame(fresh_frame, CostCatalogue(), options=OPTS)
        return
    fresh = optimize_frame(fresh_frame, CostCatalogue(), options=OPTS)
    assert repaired.added_cost == pytest.approx(fresh.added_cost, abs=0.006)
    assert is_stable(frame, repaired.members)
    assert physically_rigid(frame, repaired.members)
    assert gone not in repaired.members
    assert repaired.verdict.removed == (gone,)
    if keep_clear:
        assert all(m.bay != gone.bay or m in rest for m in repaired.members)
    added = [m for m in repaired.members if m not in rest]
    units = sum(_units(CostCatalogue(), m.kind, frame, m.row, m.col) for m in added)
    assert exhaustive_minimum(fresh_frame, CostCatalogue(), frame.allow, units) is None


def test_repair_keep_clear_blocks_empty_bay_in_result() -> None:
    tree = tuple(Member(r, c, MemberKind.BRACE, Diagonal.RISING) for r, c in ((1, 1), (1, 2), (2, 1), (2, 3)))
    f = Frame("f", (3000,) * 3, (2000,) * 2, members=tree)
    sol = repair_frame(f, CostCatalogue(), [tree[3]], keep_clear=True, options=OPTS)
    assert (2, 3) in sol.frame.blocked
    assert all(m.bay != (2, 3) for m in sol.members)


def test_redundancy_option_and_frame_field_agree() -> None:
    f = Frame("f", (2500,) * 3, (2000,) * 3)
    a = optimize_frame(f, CostCatalogue(), options=dataclasses.replace(OPTS, redundancy=1))
    b = optimize_frame(dataclasses.replace(f, redundancy=1), CostCatalogue(), options=OPTS)
    assert a.cost == b.cost
    assert a.redundancy >= 1
    assert b.redundancy >= 1
    assert not a.verdict.critical_members


def test_redundancy_two_pinned_base() -> None:
    """Pinned base, k = 2: each row needs three member arcs each way (cuts are sets of rows)."""
    f = Frame("f", (2500,) * 3, (2000,) * 2, supports=Supports.BASE)
    sol = optimize_frame(f, CostCatalogue(), options=dataclasses.replace(OPTS, redundancy=2))
    from bracegrid.analysis import redundancy_of

    assert redundancy_of(f, sol.members) >= 2
    for i in range(len(sol.members)):
        for j in range(i + 1, len(sol.members)):
            rest = [m for k, m in enumerate(sol.members) if k not in (i, j)]
            assert is_stable(f, rest)


SMALL = (
    project_head("repair test")
    + """
[[frame]]
name = "front"
widths = [3.0, 3.0, 3.0]
heights = [2.0, 2.0]
[[frame.member]]
row = 1
col = 1
kind = "brace"
diagonal = "rising"
[[frame.member]]
row = 1
col = 2
kind = "brace"
diagonal = "rising"
[[frame.member]]
row = 1
col = 3
kind = "brace"
diagonal = "rising"
[[frame.member]]
row = 2
col = 2
kind = "brace"
diagonal = "falling"
[[frame]]
name = "side"
widths = [2.0]
heights = [2.0, 2.0]
supports = "base"
"""
)


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    return main(list(argv), out=out, err=err), out.getvalue(), err.getvalue()


@pytest.fixture
def small(tmp_path: Path) -> Path:
    p = tmp_path / "small.toml"
    p.write_text(SMALL, encoding="utf-8")
    return p


def test_cli_repair_without_keep_clear_and_write(small: Path, tmp_path: Path) -> None:
    target = tmp_path / "fixed.toml"
    code, out, _ = run("optimize", str(small), "--frame", "front", "--without", "r2c2", "--keep-clear",
                       "--json", "--write", str(target), "--workers", "1")  # fmt: skip
    assert code == 0
    data = json.loads(out)["frames"][0]
    assert data["removed"] == [{"row": 2, "col": 2, "kind": "brace", "diagonal": "falling"}]
    assert all((m["row"], m["col"]) != (2, 2) for m in data["members"])
    assert run("check", str(target), "--frame", "front")[0] == 0  # "side" was not optimized


def test_cli_without_needs_frame_and_known_member(small: Path) -> None:
    assert run("optimize", str(small), "--without", "r2c2")[0] == 2
    assert run("optimize", str(small), "--frame", "front", "--without", "r2c1")[0] == 2
    assert run("optimize", str(small), "--keep-clear")[0] == 2
    assert run("optimize", str(small), "--redundancy", "-1")[0] == 2


def test_cli_redundancy_json(small: Path) -> None:
    code, out, _ = run("optimize", str(small), "--redundancy", "1", "--json", "--workers", "1")
    assert code == 0
    for f in json.loads(out)["frames"]:
        assert f["redundancy"] >= 1
        assert f["critical_members"] == []
    code, out, _ = run("optimize", str(small), "--json", "--workers", "1", "--frame", "side")
    frame = json.loads(out)["frames"][0]
    assert frame["redundancy"] == 0
    assert frame["critical_members"]


def test_redundancy_out_of_range_is_bad_input(small: Path) -> None:
    from bracegrid.errors import InputError

    with pytest.raises(InputError, match="redundancy 9"):
        optimize_frame(Frame("f", (2500,), (2000,)), CostCatalogue(), options=dataclasses.replace(OPTS, redundancy=9))
    assert run("optimize", str(small), "--redundancy", "9")[0] == 2
