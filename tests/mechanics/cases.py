"""Shared pieces of the member-force tests: stiffness values and random frames with load cases (invented)."""

from __future__ import annotations

import random

from bracegrid.model import (
    Diagonal,
    Edge,
    Frame,
    GridStrength,
    LoadCase,
    Member,
    MemberKind,
    MemberStrength,
    StrengthCatalogue,
    Supports,
)

#: Stiffness values of the tests (kN), a spread like a tube grid with straps; no capacities.
STIFF = StrengthCatalogue(
    brace=MemberStrength(ea_kn=90000.0), tie=MemberStrength(ea_kn=20000.0), grid=GridStrength(ea_kn=300000.0)
)
EA = {MemberKind.BRACE: 90000.0, MemberKind.TIE: 20000.0}
GRID_EA = 300000.0


def random_layout(
    rng: random.Random, rows: int, cols: int, *, density: float, kinds: tuple[MemberKind, ...]
) -> tuple[Member, ...]:
    members = []
    for i in range(1, rows + 1):
        for j in range(1, cols + 1):
            for d in Diagonal:
                if rng.random() < density:
                    members.append(Member(i, j, rng.choice(kinds), d))
    return tuple(members)


def random_case(rng: random.Random, rows: int, cols: int, *, held: bool, name: str = "case") -> LoadCase:
    """Line loads on every line, plus a few point loads; vertical in-plane forces on plan grids."""
    horizontal = (rng.uniform(-2, 2) if held else 0.0, *(rng.uniform(-3, 3) for _ in range(rows)))
    vertical = tuple(rng.uniform(-2, 2) for _ in range(cols + 1)) if held or rng.random() < 0.3 else ()
    points = tuple(
        (rng.randint(1 if not held else 0, rows), rng.randint(0, cols), rng.uniform(-2, 2), rng.uniform(-2, 2))
        for _ in range(rng.randint(0, 2))
    )
    return LoadCase(name, horizontal, vertical, point_kn=points)


def random_frame(
    rng: random.Random,
    *,
    max_rows: int,
    max_cols: int,
    kinds: tuple[MemberKind, ...] = (MemberKind.BRACE, MemberKind.TIE),
    density: float | None = None,
    supports: str | None = None,
) -> Frame:
    """A frame with random sizes, layout, supports (pinned base or held edges) and one load case."""
    rows, cols = rng.randint(1, max_rows), rng.randint(1, max_cols)
    widths = tuple(rng.choice([900, 1300, 1800, 2500, 3000]) for _ in range(cols))
    heights = tuple(rng.choice([1500, 2000, 2700]) for _ in range(rows))
    kind = supports or rng.choice(["base", "held"])
    held: frozenset[Edge] = frozenset()
    if kind == "held":
        edges = list(Edge)
        rng.shuffle(edges)
        held = frozenset(edges[: rng.randint(3, 4)])
    dens = density if density is not None else rng.choice([0.3, 0.5, 0.7])
    return Frame(
        "random",
        widths,
        heights,
        supports=Supports.BASE if kind == "base" else Supports.FREE,
        held_edges=held,
        members=random_layout(rng, rows, cols, density=dens, kinds=kinds),
        loads=(random_case(rng, rows, cols, held=kind == "held"),),
    )
