"""How likely each member kind is to go missing on site: the relative loss likelihoods of a project."""

from __future__ import annotations

from dataclasses import dataclass

from bracegrid.model.kinds import MemberKind


@dataclass(frozen=True, slots=True)
class LossLikelihood:
    """Relative likelihood that a member of each kind is the next one taken out.

    Members go missing one at a time; each next loss falls on one of the members still in
    place with probability proportional to its kind's value here. Equal values (the default)
    make every member equally likely; 0 means a kind is never taken out. Only ratios matter.

    Attributes:
        brace: Rigid diagonals.
        tie: Tension-only diagonals.
    """

    brace: float = 1.0
    tie: float = 1.0

    def weight(self, kind: MemberKind) -> float:
        """The value for one member kind (the field named after the kind's value).

        Example:
            >>> LossLikelihood(tie=3.0).weight(MemberKind.TIE)
            3.0
        """
        value: float = getattr(self, kind.value)
        return value

    @property
    def uniform(self) -> bool:
        """True when every kind has the same positive value (every member equally likely).

        Example:
            >>> LossLikelihood().uniform, LossLikelihood(tie=2.0).uniform
            (True, False)
        """
        values = {self.weight(k) for k in MemberKind}
        return len(values) == 1 and next(iter(values)) > 0
