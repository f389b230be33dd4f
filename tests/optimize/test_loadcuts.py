"""Loads and spreading rules on general frames (missing grid bars, outlines): rows, cuts and repairs.

Reference values: the rules are checked on the returned layouts by counting bays directly; the
load checks by the same plastic and elastic analyses ``bracegrid forces`` uses; the exhaustive
comparison is in tests/validation/test_exhaustive_strength.py.
"""

from __future__ import annotations

import dataclasses
import itertools
import json
import time
from pathlib import Path
from typing import Any

import numpy as np
import pytest

from bracegrid.cli import main
from bracegrid.errors import InfeasibleError
from bracegrid.mechanics import check_any
from bracegrid.model import (
    CostCatalogue,
    Diagonal,
    Frame,
    GridBar,
    GridBarKind,
    GridStrength,
    LoadCase,
    Member,
    MemberKind,
    MemberStrength,
    SpreadRules,
    StrengthCatalogue,
    Supports,
)
from bracegrid.optimize import SolveOptions, SolveStatus, optimize_frame
from bracegrid.optimize.general import candidates
from bracegrid.optimize.loadcuts import LoadChecks, no_good, rule_matrix
from bracegrid.optimize.rules import RuleRow, meets_rules, rule_rows

STRONG = StrengthCatalogue(
    brace=MemberStrength(tension_kn=20.0, compression_kn=12.0, ea_kn=8e4),
    tie=MemberStrength(tension_kn=15.0, ea_kn=4e4),
    grid=GridStrength(ea_kn=4e5, standard_kn=60.0, ledger_kn=15.0),
)
OPTIONS = SolveOptions(time_limit=30, workers=1)


def wall(**more: Any) -> Frame:
    """A 5 x 3 wall on a pinned base whose first-lift ledger over bay 3 is left out."""
    missing = frozenset({GridBar(GridBarKind.LEDGER, 1, 3)})
    base = Frame("wall", (3000,) * 5, (2500,) * 3, supports=Supports.BASE, missing=missing)
    return dataclasses.replace(base, **more)


def unbraced_runs(frame: Frame, members: tuple[Member, ...]) -> int:
    """The longest run of consecutive bays of one lift holding no diagonal (counted directly)."""
    longest = 0
    for i in range(1, frame.rows + 1):
        run = 0
        for j in range(1, frame.cols + 1):
            run = 0 if any(m.row == i and m.col == j for m in members) else run + 1
            longest = max(longest, run)
    return longest


def test_rules_hold_on_a_frame_with_a_missing_ledger() -> None:
    """Before: the general-frame route ignored the rules and called the layout optimal (a run of 2)."""
    frame = wall(rules=SpreadRules(max_unbraced_bays=1))
    sol = optimize_frame(frame, CostCatalogue(), options=OPTIONS)
    assert check_any(frame, sol.members).stable
    assert unbraced_runs(frame, sol.members) <= 1
    plain = optimize_frame(wall(), CostCatalogue(), options=OPTIONS)
    assert unbraced_runs(frame, plain.members) > 1  # the rule binds here
    assert sol.cost >= plain.cost
    assert sol.status is SolveStatus.OPTIMAL


def test_loads_are_carried_on_a_frame_with_a_missing_ledger() -> None:
    case = LoadCase("wind", (0.0, 6.0, 6.0, 3.0), reverse=True)
    frame = wall(loads=(case,), allow=frozenset(MemberKind))
    sol = optimize_frame(frame, CostCatalogue(), options=OPTIONS, strength=STRONG)
    assert sol.strength is not None
    assert sol.strength.plastic_ok
    assert sol.strength.elastic_ok
    only = optimize_frame(frame, CostCatalogue(), strength=STRONG,
                          options=SolveOptions(time_limit=30, workers=1, stability_only=True))  # fmt: skip
    assert only.strength is not None
    assert not only.strength.searched
    assert sol.cost >= only.cost


def test_json_reports_the_load_checks_of_a_general_frame(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    text = (Path(__file__).resolve().parents[2] / "projects" / "harrow-depot.toml").read_text(encoding="utf-8")
    brace = "ea_kn = 80000.0\ntension_kn = 20.0\ncompression_kn = 12.0"
    text = text.replace("ea_kn = 80000.0               # invented", brace)
    text = text.replace("ea_kn = 40000.0               # invented", "ea_kn = 40000.0\ntension_kn = 15.0")
    path = tmp_path / "depot.toml"
    path.write_text(text, encoding="utf-8")
    code = main(["optimize", str(path), "--json", "--time-limit", "20"])
    data = json.loads(capsys.readouterr().out)
    assert code == 0
    walls = [f for f in data["frames"] if f["name"].startswith("loading bay wall")]
    assert walls
    assert all(f["carries_loads"] == {"plastic": True, "elastic": True} for f in walls)


def test_infeasible_loads_say_why() -> None:
    weak = StrengthCatalogue(tie=MemberStrength(tension_kn=0.5, ea_kn=4e4), grid=GridStrength(ea_kn=4e5))
    frame = wall(loads=(LoadCase("wind", (0.0, 6.0, 6.0, 3.0)),), allow=frozenset({MemberKind.TIE}))
    with pytest.raises(InfeasibleError) as err:
        optimize_frame(frame, CostCatalogue(), options=OPTIONS, strength=weak)
    assert "needs" in str(err.value) or "capacity" in str(err.value)


def test_no_good_excludes_exactly_one_layout() -> None:
    rng = np.random.default_rng(3)
    for _ in range(20):
        n = int(rng.integers(1, 7))
        trial = [k for k in range(n) if rng.random() < 0.5]
        row = no_good(trial, n)
        for bits in itertools.product((0, 1), repeat=n):
            value = sum(c * bits[k] for k, c in zip(row.cols, row.coefs, strict=True))
            same = all(bits[k] == (k in trial) for k in range(n))
            assert (value >= row.lo) != same


def test_braced_bay_rows_count_bays_not_members() -> None:
    """min_braced_bays = 2 on one lift: two members in one bay do not meet it, one in each of two bays do."""
    frame = Frame("f", (1000,) * 3, (2000,), rules=SpreadRules(min_braced_bays=2))
    members = [Member(1, j, MemberKind.TIE, d) for j in (1, 2, 3) for d in Diagonal]
    rows, helpers = rule_matrix([], members, rule_rows(frame))
    assert helpers == 3

    def feasible(picked: set[int]) -> bool:
        # the best helper values: z_b = 1 where the bay holds a picked member
        z = [int(any(k in picked for k, m in enumerate(members) if m.col == j)) for j in (1, 2, 3)]
        x = [int(k in picked) for k in range(len(members))] + z
        return all(r.lo <= sum(c * x[k] for k, c in zip(r.cols, r.coefs, strict=True)) <= r.hi for r in rows)

    assert not feasible({0, 1})  # both diagonals of bay 1
    assert feasible({0, 2})
    assert meets_rules([], [members[0], members[2]], rule_rows(frame))
    assert not meets_rules([], [members[0], members[1]], rule_rows(frame))
    kept = [Member(1, 1, MemberKind.BRACE, Diagonal.RISING, existing=True)]
    rows, _ = rule_matrix(kept, members[2:], [RuleRow(((1, 1), (1, 2), (1, 3)), 2, None, True, "r")])
    assert rows[-1].lo == 1.0  # the kept brace braces bay 1 already


def test_repair_reaches_a_layout_that_carries_every_case() -> None:
    case = LoadCase("wind", (0.0, 6.0, 6.0, 3.0), reverse=True)
    frame = wall(loads=(case,), allow=frozenset({MemberKind.TIE}))
    cands = candidates(frame, CostCatalogue(), frozenset({MemberKind.TIE}))
    checks = LoadChecks(frame, STRONG, (), cands.members)
    # a rigid but weak start: one pair of ties per lift in bay 1
    start = [k for k, m in enumerate(cands.members) if m.col == 1]
    assert checks.capacity_cuts(start)  # it does not carry the case
    fixed = checks.repair(start, cands.cents, cands.slot, time.monotonic() + 20)
    assert fixed is not None
    assert set(start) <= set(fixed)
    assert not checks.capacity_cuts(fixed)
    assert len({cands.slot[k] for k in fixed}) == len(fixed)  # one member per diagonal
