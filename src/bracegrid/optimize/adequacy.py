"""Both strength checks of a finished layout: the plastic LP and the elastic tension-only analysis.

Run on every layout the optimizer returns for a frame with load cases, whether or not the loads
were searched with, so that reports say which check passed and never claim more (the plastic
model alone assumes members share load; buckled braces and brittle terminations cannot).
"""

from __future__ import annotations

from collections.abc import Sequence

from bracegrid.errors import NumericalError
from bracegrid.mechanics import analyse_frame, missing_stiffness
from bracegrid.model import Frame, Member, StrengthCatalogue
from bracegrid.optimize.capacity import Candidate, min_utilisation, plastic_frame
from bracegrid.optimize.results import CaseCheck, StrengthCheck


def strength_check(
    frame: Frame, strength: StrengthCatalogue, members: Sequence[Member], *, searched: bool = True
) -> StrengthCheck | None:
    """The plastic and elastic check of one layout under each case (None: the frame has no cases).

    Example:
        >>> from bracegrid.model import (Diagonal, GridStrength, LoadCase, MemberKind, MemberStrength,
        ...     Supports)
        >>> s = StrengthCatalogue(tie=MemberStrength(tension_kn=12.0, ea_kn=2e4), grid=GridStrength(ea_kn=3e5))
        >>> f = Frame("bay", (3000,), (4000,), supports=Supports.BASE, loads=(LoadCase("push", (0.0, 6.0)),))
        >>> ties = [Member(1, 1, MemberKind.TIE, Diagonal.RISING)]
        >>> check = strength_check(f, s, ties)
        >>> round(check.cases[0].plastic, 6), round(check.cases[0].elastic, 6), check.elastic_ok
        (0.833333, 0.833333, True)
    """
    if not frame.loads:
        return None
    layout = tuple(members)
    pf = plastic_frame(frame, strength, [Candidate(m.row, m.col, m.diagonal, m.kind, kept=True) for m in layout])
    chosen = [True] * len(layout)
    plastic = [min_utilisation(pf, load, chosen) for load in pf.loads]
    missing = missing_stiffness(frame, strength, layout)
    note = ""
    elastic = None
    if missing:
        note = f"needs the stiffness {', '.join(missing)}"
    else:
        try:
            elastic = analyse_frame(frame, strength, members=layout)
        except NumericalError as exc:
            note = f"the solve failed its residual check: {exc}"
    cases = []
    for k, p in enumerate(plastic):
        if elastic is None:
            cases.append(CaseCheck(p.title, p.value, p.governing, None, "not run", None))
            continue
        c = elastic.cases[k]
        if c.is_mechanism:
            cases.append(CaseCheck(p.title, p.value, p.governing, None, "a mechanism", False))
            continue
        g = c.governing
        who = "nothing rated" if g is None or g.utilisation is None else g.label
        lifted = c.uplift_over
        if lifted:
            worst = max(lifted, key=lambda r: r.uplift_kn)
            who = f"base q{worst.q} uplift {worst.uplift_kn:.3g} kN over {worst.uplift_limit_kn:g} kN"
        cases.append(CaseCheck(p.title, p.value, p.governing, c.max_utilisation, who, c.ok))
    return StrengthCheck(tuple(cases), note, searched)
