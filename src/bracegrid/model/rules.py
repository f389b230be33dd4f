"""Spreading rules of a frame: where the user asks for bracing beyond what stability and strength need.

Each rule is optional (``None`` = not asked). The values are the user's; docs/strength.md says
which published guidance such values usually come from. Counts are over diagonal members of
either kind, kept members included; a blocked bay holds none, so it counts as unbraced.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True, slots=True)
class SpreadRules:
    """Bracing-spread rules of one frame.

    Attributes:
        max_unbraced_bays: In every lift (row), no run of more than this many consecutive bays
            without a diagonal member.
        end_bay_within: In every lift, a braced bay among the first this-many bays from each end.
        min_braced_bays: In every lift, at least this many braced bays.
        max_members_per_column: At most this many diagonal members in any one column of bays.
    """

    max_unbraced_bays: int | None = None
    end_bay_within: int | None = None
    min_braced_bays: int | None = None
    max_members_per_column: int | None = None

    @property
    def any(self) -> bool:
        """True when at least one rule is given.

        Example:
            >>> SpreadRules().any, SpreadRules(min_braced_bays=2).any
            (False, True)
        """
        return any(v is not None for v in self.values())

    def values(self) -> tuple[int | None, ...]:
        """The four values in field order."""
        return (self.max_unbraced_bays, self.end_bay_within, self.min_braced_bays, self.max_members_per_column)


#: The project-file field name of every rule, in field order (the names are the file's).
RULE_FIELDS: tuple[str, ...] = ("max_unbraced_bays", "end_bay_within", "min_braced_bays", "max_members_per_column")
