"""Member prices (src/bracegrid/model/costs.py) and a layout's price (layout_cost in model/frame.py).

References: every expected price is written out by hand from the rule in CostCatalogue.member_cost,
(per piece + labour per piece + per metre x diagonal length in m) x (1 + contingency / 100), with
diagonals from the 3-4-5 triangle or a square's side x sqrt(2) = 1.41421356...
"""

from __future__ import annotations

import pytest

from bracegrid.model import CostCatalogue, CostRate, Diagonal, Frame, Member, MemberKind, layout_cost

B, T = MemberKind.BRACE, MemberKind.TIE
R, F = Diagonal.RISING, Diagonal.FALLING


def test_default_catalogue() -> None:
    c = CostCatalogue()
    assert c.rate(B) == CostRate(25.0, 8.0, 0.0)
    assert c.rate(T) == CostRate(9.0, 3.0, 0.0)
    assert c.contingency_pct == 0.0


def test_rate_picks_the_kind() -> None:
    c = CostCatalogue(brace=CostRate(1.0, 2.0, 3.0), tie=CostRate(4.0, 5.0, 6.0))
    assert c.rate(B) is c.brace
    assert c.rate(T) is c.tie


def test_member_cost_without_labour_or_contingency() -> None:
    c = CostCatalogue()
    # Hand: a 5 m diagonal (3-4-5). Brace 25 + 8 x 5 = 65; tie 9 + 3 x 5 = 24.
    assert c.member_cost(B, 5000.0) == 65.0
    assert c.member_cost(T, 5000.0) == 24.0
    # Zero length leaves the per-piece price.
    assert c.member_cost(B, 0.0) == 25.0


def test_member_cost_with_labour_and_contingency() -> None:
    c = CostCatalogue(brace=CostRate(40.0, 11.0, 15.0), tie=CostRate(22.0, 4.5, 10.0), contingency_pct=10.0)
    # Hand: brace (40 + 15 + 11 x 5) x 1.10 = 110 x 1.1 = 121.0.
    assert c.member_cost(B, 5000.0) == pytest.approx(121.0, abs=1e-9)
    # Hand: tie (22 + 10 + 4.5 x 5) x 1.10 = 54.5 x 1.1 = 59.95.
    assert c.member_cost(T, 5000.0) == pytest.approx(59.95, abs=1e-9)
    # Hand: contingency applies to labour too: labour only (0 + 15 + 0) x 1.1 = 16.5.
    labour_only = CostCatalogue(brace=CostRate(0.0, 0.0, 15.0), contingency_pct=10.0)
    assert labour_only.member_cost(B, 7000.0) == pytest.approx(16.5, abs=1e-9)


def test_labour_and_contingency_each_matter() -> None:
    plain = CostCatalogue(brace=CostRate(40.0, 11.0))
    labour = CostCatalogue(brace=CostRate(40.0, 11.0, 15.0))
    both = CostCatalogue(brace=CostRate(40.0, 11.0, 15.0), contingency_pct=25.0)
    # Hand: 40 + 11 x 5 = 95; + 15 labour = 110; x 1.25 = 137.5.
    assert plain.member_cost(B, 5000.0) == pytest.approx(95.0)
    assert labour.member_cost(B, 5000.0) == pytest.approx(110.0)
    assert both.member_cost(B, 5000.0) == pytest.approx(137.5)


def test_layout_cost_sums_members_in_their_own_bays() -> None:
    # Columns 3000 and 5000 wide, row 4000 high: diagonals 5000 mm and sqrt(5^2 + 4^2) m = 6.4031242 m.
    f = Frame("f", (3000, 5000), (4000,))
    members = [Member(1, 1, B, R), Member(1, 1, T, F), Member(1, 2, B, F)]
    # Hand: 65 (brace, 5 m) + 24 (tie, 5 m) + 25 + 8 x 6.4031242 = 76.2249939 -> 165.2249939 -> 165.22.
    assert layout_cost(f, CostCatalogue(), members) == 165.22
    assert layout_cost(f, CostCatalogue(), []) == 0.0


def test_layout_cost_is_the_sum_of_member_prices_to_the_cent() -> None:
    # The bill's one rounding rule (issue 10: every total equals the sum of the printed rows).
    # Three braces on 1 m x 1 m bays: cut hypot(1000, 1000) = 1414.2 -> 1414 mm; each
    # 25 + 8 x 1.414 = 36.312 -> 36.31; the layout 3 x 36.31 = 108.93 (summing exact prices
    # and rounding once would print 108.94 under rows that add up to 108.93).
    f = Frame("f", (1000,) * 3, (1000,))
    members = [Member(1, j, B, R) for j in (1, 2, 3)]
    assert layout_cost(f, CostCatalogue(), members) == 108.93


def test_layout_cost_ignores_status_and_applies_the_catalogue() -> None:
    f = Frame("f", (3000,), (4000,))
    existing = [Member(1, 1, B, R, existing=True)]
    proposed = [Member(1, 1, B, R, existing=False)]
    assert layout_cost(f, CostCatalogue(), existing) == layout_cost(f, CostCatalogue(), proposed) == 65.0
    dear = CostCatalogue(brace=CostRate(40.0, 11.0, 15.0), contingency_pct=10.0)
    assert layout_cost(f, dear, existing) == 121.0  # as in test_member_cost_with_labour_and_contingency
