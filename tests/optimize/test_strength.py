"""Strength-aware layouts: capacity cuts, Benders cuts, rules, the demo scaffold, the words and keys."""

from __future__ import annotations

import dataclasses
import itertools
import json
from pathlib import Path

import numpy as np
import pytest

from bracegrid.cli import main
from bracegrid.errors import InfeasibleError, InputError
from bracegrid.io import load_project, parse_project, render_project
from bracegrid.model import (
    CostCatalogue,
    Diagonal,
    Frame,
    GridStrength,
    LoadCase,
    MemberKind,
    MemberStrength,
    SpreadRules,
    StrengthCatalogue,
    Supports,
)
from bracegrid.optimize import SolveOptions, optimize_frame, optimize_project
from bracegrid.optimize.bays import bay_table
from bracegrid.optimize.benders import candidates_of
from bracegrid.optimize.capacity import carries, farkas_cut, flow_cut, lift_cuts, plastic_frame
from tests.common import project_head

DEMO = Path(__file__).resolve().parents[2] / "projects" / "quayside-scaffold.toml"
FAST = SolveOptions(time_limit=30, workers=2)


def _strength(**grid: float) -> StrengthCatalogue:
    return StrengthCatalogue(
        brace=MemberStrength(tension_kn=12.0, compression_kn=9.0, ea_kn=1e5),
        tie=MemberStrength(tension_kn=12.0, ea_kn=1e4),
        grid=GridStrength(ea_kn=1e5, **grid),
    )


def test_demo_spreads_bracing_and_costs_little_more_than_stable_only() -> None:
    project = load_project(DEMO)
    aware = optimize_project(project, options=FAST, frame_names=["street face"]).frames[0]
    alone = optimize_project(
        project, options=dataclasses.replace(FAST, stability_only=True), frame_names=["street face"]
    ).frames[0]
    assert aware.strength is not None
    assert alone.strength is not None
    assert aware.strength.plastic_ok
    assert aware.strength.elastic_ok
    assert not alone.strength.plastic_ok  # every tie stacked in one bay overloads a ledger connection
    columns = {m.col for m in aware.members}
    assert len(columns) > 1
    # the price of strength: measured 252.20 against 248.12 (+1.6%)
    assert alone.cost < aware.cost <= 1.05 * alone.cost
    assert "carries the loads" in aware.strength.words
    assert "carries the loads" not in alone.strength.words


def test_words_never_claim_loads_on_the_plastic_check_alone() -> None:
    """A layout that passes plastically but whose stiffness is unknown is not called adequate."""
    frame = Frame("bay", (3000,), (4000,), supports=Supports.BASE, loads=(LoadCase("push", (0.0, 6.0)),))
    strength = StrengthCatalogue(tie=MemberStrength(tension_kn=12.0))  # no ea_kn anywhere
    sol = optimize_frame(frame, CostCatalogue(), strength=strength, options=FAST)
    assert sol.strength is not None
    assert sol.strength.plastic_ok
    assert not sol.strength.elastic_ok
    assert "carries the loads" not in sol.strength.words
    assert "not run" in sol.strength.words


def test_lift_capacity_shortfall_is_explained_in_words() -> None:
    # 4 bays, 2 blocked in lift 1: two free bays, ties of 3 kN tension, 2.5 x 2 m bays
    frame = Frame(
        "f", (2500,) * 4, (2000,), supports=Supports.BASE, blocked=frozenset({(1, 1), (1, 2)}),
        allow=frozenset({MemberKind.TIE}), loads=(LoadCase("w", (0.0, 38.0)),),
    )  # fmt: skip
    strength = StrengthCatalogue(tie=MemberStrength(tension_kn=3.0, ea_kn=1e4), grid=GridStrength(ea_kn=1e5))
    with pytest.raises(InfeasibleError) as got:
        optimize_frame(frame, CostCatalogue(), strength=strength, options=FAST)
    words = " ".join(got.value.reasons)
    # two rising ties, each 3 kN x 2.5 / 3.2016 = 2.3426 kN horizontal: 4.685 kN at most
    assert "lift 1 needs 38 kN of horizontal capacity" in words
    assert "2 bays blocked the most it can hold is 4.69 kN" in words


def test_farkas_cuts_are_met_by_every_layout_that_carries() -> None:
    """Validity: each Benders cut found on one layout holds on every layout that carries the case."""
    frame = Frame("f", (2000, 2500), (2000, 1800), supports=Supports.BASE,
                  loads=(LoadCase("w", (0.0, 3.0, 2.0), gravity_kn=(4.0, 4.0, 4.0)),))  # fmt: skip
    strength = _strength(standard_kn=9.0, ledger_kn=3.0, uplift_kn=1.0)
    table = bay_table(frame, CostCatalogue(), (), frame.allow)
    cands = [c for c in candidates_of(frame, table, frame.allow) if c.kind is MemberKind.TIE]
    pf = plastic_frame(frame, strength, cands)
    load = pf.loads[0]
    layouts = [list(bits) for bits in itertools.product([False, True], repeat=len(cands))]
    ok = [bits for bits in layouts if carries(pf, load, bits)]
    assert ok
    assert len(ok) < len(layouts)
    rng = np.random.default_rng(1)
    short = [bits for bits in layouts if bits not in ok]
    for k in rng.choice(len(short), size=min(25, len(short)), replace=False):
        cut = farkas_cut(pf, load, short[k])
        assert cut is not None
        assert not cut.holds(short[k])
        assert all(cut.holds(bits) for bits in ok)


def test_lift_cuts_are_exact_for_the_flow_model_on_a_pinned_base() -> None:
    """Without grid-bar limits the lift cut-sets alone decide the plastic check (and the rounded ones agree)."""
    frame = Frame("f", (2500, 2500, 2500), (2000,), supports=Supports.BASE, loads=(LoadCase("w", (0.0, 20.0)),))
    strength = _strength()
    table = bay_table(frame, CostCatalogue(), (), frame.allow)
    cands = candidates_of(frame, table, frame.allow)
    pf = plastic_frame(frame, strength, cands)
    cuts = lift_cuts(pf)
    assert any(c.reason.endswith("(rounded)") for c in cuts)
    for bits in itertools.product([False, True], repeat=len(cands)):
        if any(bits[k] and bits[k + 1] for k in range(0, len(cands), 2)):
            continue  # brace and tie on one diagonal: not a layout
        assert carries(pf, pf.loads[0], list(bits)) == all(c.holds(bits) for c in cuts)


def test_flow_cut_on_a_free_frame() -> None:
    """A free bay pulled apart along its rising diagonal: only a rising member carries it (5 kN)."""
    frame = Frame("f", (3000,), (4000,), loads=(LoadCase("pull", (0.0, 0.0), point_kn=((0, 0, -3.0, -4.0),
                  (1, 1, 3.0, 4.0))),))  # fmt: skip
    table = bay_table(frame, CostCatalogue(), (), frame.allow)
    cands = candidates_of(frame, table, frame.allow)
    pf = plastic_frame(frame, _strength(), cands)
    load = pf.loads[0]
    labels = [c.label for c in cands]
    rising_tie = [lab == "tie r1c1:rising" for lab in labels]
    falling_tie = [lab == "tie r1c1:falling" for lab in labels]
    assert flow_cut(pf, load, [False] * len(cands))
    assert flow_cut(pf, load, falling_tie)
    assert not flow_cut(pf, load, rising_tie)
    assert carries(pf, load, rising_tie)
    sol = optimize_frame(frame, CostCatalogue(), strength=_strength(), options=FAST)
    assert any(m.diagonal is Diagonal.RISING for m in sol.members)


@pytest.mark.parametrize(
    "rules",
    [
        SpreadRules(max_unbraced_bays=2),
        SpreadRules(end_bay_within=1),
        SpreadRules(min_braced_bays=3),
        SpreadRules(max_members_per_column=3, max_unbraced_bays=3),
    ],
)
def test_rules_hold_on_the_layout(rules: SpreadRules) -> None:
    frame = Frame("f", (2500,) * 8, (2000,) * 4, supports=Supports.BASE, blocked=frozenset({(2, 4)}), rules=rules)
    sol = optimize_frame(frame, CostCatalogue(), options=FAST)
    assert sol.status.value == "optimal"
    for i in range(1, 5):
        braced = sorted({m.col for m in sol.members if m.row == i})
        if rules.max_unbraced_bays is not None:
            gaps = np.diff([0, *braced, 9]) - 1
            assert gaps.max() <= rules.max_unbraced_bays
        if rules.end_bay_within is not None:
            assert braced[0] <= rules.end_bay_within
            assert braced[-1] >= 9 - rules.end_bay_within
        if rules.min_braced_bays is not None:
            assert len(braced) >= rules.min_braced_bays
    if rules.max_members_per_column is not None:
        for j in range(1, 9):
            assert sum(1 for m in sol.members if m.col == j) <= rules.max_members_per_column
    plain = optimize_frame(frame, CostCatalogue(), options=dataclasses.replace(FAST, stability_only=True))
    assert plain.cost <= sol.cost


def test_impossible_rule_is_explained_before_solving() -> None:
    frame = Frame("f", (2500,) * 6, (2000,) * 2, supports=Supports.BASE,
                  blocked=frozenset({(1, 2), (1, 3), (1, 4)}), rules=SpreadRules(max_unbraced_bays=2))  # fmt: skip
    with pytest.raises(InfeasibleError) as got:
        optimize_frame(frame, CostCatalogue(), options=FAST)
    assert "max_unbraced_bays = 2: lift 1, bays 2-4 need a diagonal, but only 0 members fit there" in str(got.value)


def test_rule_fields_read_write_and_errors() -> None:
    text = project_head("p") + (
        '[[frame]]\nname = "f"\nwidths = [2.5, 2.5, 2.5]\nheights = [2.0]\nsupports = "base"\n'
        "max_unbraced_bays = 1\nend_bay_within = 2\nmin_braced_bays = 1\nmax_members_per_column = 4\n"
    )
    project = parse_project(text)
    assert project.frames[0].rules == SpreadRules(1, 2, 1, 4)
    assert parse_project(render_project(project)).frames[0].rules == project.frames[0].rules
    bad = text.replace("min_braced_bays = 1", "min_braced_bays = 5").replace("end_bay_within = 2", "end_bay_within = 0")
    with pytest.raises(InputError) as got:
        parse_project(bad)
    message = str(got.value)
    assert "end_bay_within: expected a whole number of at least 1" in message
    assert "min_braced_bays: 5 is more than the frame's 3 bays per lift" in message


def test_optimize_json_keys(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    plain = tmp_path / "plain.toml"
    plain.write_text(project_head("p") + '[[frame]]\nname = "f"\nwidths = [2.5, 2.5]\nheights = [2.0]\n')
    assert main(["optimize", str(plain), "--json", "--time-limit", "10"]) == 0
    frame = json.loads(capsys.readouterr().out)["frames"][0]
    assert frame["carries_loads"] is None
    assert frame["utilisation"] is None
    assert main(["optimize", str(DEMO), "--json", "--time-limit", "20", "--frame", "west end frame"]) == 0
    frame = json.loads(capsys.readouterr().out)["frames"][0]
    assert frame["carries_loads"] == {"plastic": True, "elastic": True}
    assert set(frame["utilisation"]) == {"plastic", "elastic"}
    assert 0 < frame["utilisation"]["plastic"] <= 1.0
    assert main(["optimize", str(DEMO), "--time-limit", "20", "--stability-only", "--frame", "street face"]) == 0
    out = capsys.readouterr().out
    assert "plastic check FAILS" in out
    assert "layout found for stability alone" in out
    assert "wind (+): plastic" in out


def test_compare_prices_strength_and_checks_the_baseline() -> None:
    """Beside the strength-aware optimum, stable-only is cheaper and fails; the baseline says how it fares."""
    from bracegrid.compare import StrategyKey, compare_frame
    from bracegrid.compare.strategies import shortfall_words

    frame = Frame(
        "face", (2500,) * 6, (2000,) * 3, supports=Supports.BASE,
        loads=(LoadCase("wind", (0.0, 3.0, 3.0, 2.0), reverse=True, gravity_kn=(6.0,) * 7),),
    )  # fmt: skip
    strength = _strength(standard_kn=30.0, ledger_kn=3.0, uplift_kn=5.0)
    fc = compare_frame(frame, CostCatalogue(), options=FAST, strength=strength)
    mixed, alone = fc.result(StrategyKey.MIXED), fc.result(StrategyKey.STABLE_ONLY)
    base = fc.result(StrategyKey.BASELINE)
    assert mixed.check is not None
    assert alone.check is not None
    assert base.check is not None
    assert mixed.check.plastic_ok
    assert not alone.check.plastic_ok
    assert alone.cost is not None
    assert mixed.cost is not None
    assert alone.cost <= mixed.cost  # here an equal-cost layout carries the loads; stable-only found another
    assert not alone.check.searched
    assert mixed.check.searched
    assert "against the loads:" in base.note
    assert shortfall_words(base.check) in base.note
    if not (base.check.plastic_ok and base.check.elastic_ok):
        assert "fails" in base.note


def test_web_request_passes_stability_only() -> None:
    from bracegrid.web.requests import RequestError, job_request

    got = job_request({"frame": {"name": "f"}, "stability_only": True})
    assert got.options.stability_only is True
    assert job_request({"frame": {"name": "f"}}).options.stability_only is False
    with pytest.raises(RequestError):
        job_request({"frame": {"name": "f"}, "stability_only": "yes"})
