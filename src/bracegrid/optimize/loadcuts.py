"""Loads and spreading rules for the general-frame master: linear rows over its candidates.

The general-frame optimizer (:mod:`bracegrid.optimize.general`) proves stability with mechanism
cuts; this module adds what a frame with load cases, capacities or spreading rules asks for, in the
same form (rows over the candidate members, valid for every acceptable layout):

* rule rows: the spreading rules of :mod:`bracegrid.optimize.rules` (a braced-bay count gets one
  0/1 helper variable per bay, at most the members in that bay);
* capacity cuts: a rigid answer that does not carry a case gets the Benders (Farkas) cut of the
  plastic model (:func:`bracegrid.optimize.capacity.farkas_cut`) and its rounded form, both valid
  for every layout that carries the case;
* no-good cuts: a layout that carries every case plastically but fails the elastic tension-only
  analysis is excluded exactly (that one layout), as on complete frames.

The plastic model is built on the frame's own bar framework, missing bars and absent bays
included, so the cuts are those of the general frame (the same code as on complete frames).
"""

from __future__ import annotations

import time
from collections.abc import Sequence
from dataclasses import dataclass

from bracegrid.mechanics import analyse_frame, missing_stiffness
from bracegrid.model import Frame, Member, StrengthCatalogue
from bracegrid.optimize.capacity import (
    Candidate,
    CapacityCut,
    PlasticFrame,
    farkas_cut,
    plastic_frame,
    rounded_cut,
)
from bracegrid.optimize.rules import RuleRow


@dataclass(frozen=True, slots=True)
class Row:
    """One linear row over the master's variables: ``lo <= sum coefs . x[cols] <= hi``.

    Variables 0..n-1 are the candidates, n.. the rule helpers (braced-bay marks).
    """

    cols: tuple[int, ...]
    coefs: tuple[float, ...]
    lo: float
    hi: float


def rule_matrix(kept: Sequence[Member], members: Sequence[Member], rows: Sequence[RuleRow]) -> tuple[list[Row], int]:
    """The spreading rules as rows over the candidates (``members``), and the number of helpers.

    Kept members count towards each rule. A braced-bay count uses one helper z per bay without a
    kept member, with ``z <= members added in that bay``; the count of z plus the bays braced
    already must reach the limit.

    Example:
        >>> from bracegrid.model import Diagonal, MemberKind
        >>> cands = [Member(1, j, MemberKind.TIE, Diagonal.RISING) for j in (1, 2, 3)]
        >>> rows, helpers = rule_matrix([], cands, [RuleRow(((1, 1), (1, 2)), 1, None, False, "r")])
        >>> rows[0].cols, rows[0].lo, helpers
        ((0, 1), 1.0, 0)
    """
    n = len(members)
    kept_in: dict[tuple[int, int], int] = {}
    for m in kept:
        kept_in[m.bay] = kept_in.get(m.bay, 0) + 1
    out: list[Row] = []
    helpers = 0
    for row in rows:
        bays = set(row.bays)
        if row.braced_bays:
            marks: list[int] = []
            for bay in row.bays:
                if kept_in.get(bay, 0):
                    continue
                inside = [k for k, m in enumerate(members) if m.bay == bay]
                if not inside:
                    continue
                z = n + helpers
                helpers += 1
                marks.append(z)
                out.append(Row((z, *inside), (1.0, *(-1.0,) * len(inside)), -float("inf"), 0.0))
            braced = sum(1 for bay in row.bays if kept_in.get(bay, 0))
            if row.at_least is not None:
                out.append(Row(tuple(marks), (1.0,) * len(marks), float(row.at_least - braced), float("inf")))
            continue
        cols = tuple(k for k, m in enumerate(members) if m.bay in bays)
        kept_here = sum(kept_in.get(b, 0) for b in bays)
        lo = -float("inf") if row.at_least is None else float(row.at_least - kept_here)
        hi = float("inf") if row.at_most is None else float(row.at_most - kept_here)
        out.append(Row(cols, (1.0,) * len(cols), lo, hi))
    return out, helpers


class LoadChecks:
    """The plastic and elastic checks of a general frame's layouts, and the cuts they give.

    Candidates are numbered as the master's (0..n-1); the plastic model holds the kept members
    first, so a master index k is model index ``k + len(kept)``.
    """

    def __init__(
        self, frame: Frame, strength: StrengthCatalogue, kept: Sequence[Member], members: Sequence[Member]
    ) -> None:
        self.frame = frame
        self.strength = strength
        self.kept = tuple(kept)
        self.members = tuple(members)
        self.offset = len(self.kept)
        model = [Candidate(m.row, m.col, m.diagonal, m.kind, kept=True) for m in self.kept]
        model += [Candidate(m.row, m.col, m.diagonal, m.kind) for m in self.members]
        self.pf: PlasticFrame = plastic_frame(frame, strength, model)
        self.elastic_needed = not missing_stiffness(frame, strength, [*self.kept, *self.members])

    def _flags(self, trial: Sequence[int]) -> list[bool]:
        chosen = [True] * self.offset + [False] * len(self.members)
        for k in trial:
            chosen[self.offset + k] = True
        return chosen

    def _row(self, cut: CapacityCut) -> Row:
        """The cut divided by its right-hand side (coefficients at most 1: HiGHS's tolerances and
        scaling suit that better than CP-SAT's whole numbers up to 10^6; the answers are re-checked)."""
        cols = tuple(k - self.offset for k, _ in cut.terms)
        return Row(cols, tuple(c / cut.need for _, c in cut.terms), 1.0, float("inf"))

    def capacity_cuts(self, trial: Sequence[int]) -> list[Row]:
        """Cuts from each case the layout does not carry plastically (empty: it carries them all)."""
        chosen = self._flags(trial)
        out: list[Row] = []
        for load in self.pf.loads:
            cut = farkas_cut(self.pf, load, chosen)
            if cut is None:
                continue
            out.append(self._row(cut))
            fewest = rounded_cut(cut)
            if fewest is not None:
                out.append(self._row(fewest))
        return out

    def elastic_ok(self, trial: Sequence[int]) -> bool:
        """The elastic tension-only analysis finds every member within capacity (True when it cannot run)."""
        if not self.elastic_needed:
            return True
        layout = [*self.kept, *(self.members[k] for k in trial)]
        return analyse_frame(self.frame, self.strength, members=layout).ok

    def repair(
        self, trial: Sequence[int], cents: Sequence[int], slot: Sequence[int], deadline: float
    ) -> list[int] | None:
        """Greedy additions until every case is carried plastically (None when stuck or out of time).

        Each step meets the first violated cut with the candidates it values most per cent, one
        member per diagonal. More members never lose capacity nor stability (heuristic: only the
        master proves anything).
        """
        chosen = list(trial)
        used = {slot[k] for k in chosen}
        while time.monotonic() < deadline:
            cuts = self.capacity_cuts(chosen)
            if not cuts:
                return chosen
            worth = dict(zip(cuts[0].cols, cuts[0].coefs, strict=True))
            inside = set(chosen)
            have = sum(c for k, c in worth.items() if k in inside)
            added = False
            for k in sorted((k for k in worth if k not in inside), key=lambda k: -worth[k] / max(1, cents[k])):
                if have >= cuts[0].lo:
                    break
                if slot[k] in used:
                    continue
                chosen.append(k)
                used.add(slot[k])
                have += worth[k]
                added = True
            if not added:
                return None
        return None


def no_good(trial: Sequence[int], n: int) -> Row:
    """Exactly this layout (the candidates in ``trial``, no others) is no answer."""
    inside = set(trial)
    cols = tuple(range(n))
    coefs = tuple(-1.0 if k in inside else 1.0 for k in cols)
    return Row(cols, coefs, 1.0 - len(inside), float("inf"))
