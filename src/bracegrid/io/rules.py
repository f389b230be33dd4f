"""Project-file fields of the spreading rules: four optional integers per ``[[frame]]``.

Read through one hook line in :mod:`bracegrid.io.reading` (with its problem collector) and written
back through one in :mod:`bracegrid.io.writing`. docs/project-file.md documents each field.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from typing import Any

from bracegrid.io.loads import Problems
from bracegrid.model import RULE_FIELDS, Frame, SpreadRules

#: Fields a ``[[frame]]`` table may hold for the spreading rules.
FRAME_KEYS = set(RULE_FIELDS)

#: Smallest value of each rule: a run of 0 unbraced bays means every bay braced; the others count bays.
_MINIMUM = {"max_unbraced_bays": 0, "end_bay_within": 1, "min_braced_bays": 1, "max_members_per_column": 1}
_MEANING = {
    "max_unbraced_bays": "the longest run of bays without a diagonal in any lift",
    "end_bay_within": "a braced bay among the first N bays from each end of every lift",
    "min_braced_bays": "the fewest braced bays in any lift",
    "max_members_per_column": "the most diagonal members in any one column of bays",
}


def read_rules(col: Problems, where: str, table: Mapping[str, Any], frame: Frame) -> SpreadRules | None:
    """The frame's spreading rules, every problem recorded with its field (None if any is wrong).

    Example:
        >>> class C:
        ...     def __init__(self): self.problems = []
        ...     def add(self, where, what): self.problems.append(f"{where}: {what}")
        ...     def unknown_keys(self, where, table, known): pass
        >>> c = C()
        >>> read_rules(c, "frame 'f'", {"max_unbraced_bays": 3}, Frame("f", (1000,) * 5, (2000,)))
        SpreadRules(max_unbraced_bays=3, end_bay_within=None, min_braced_bays=None, max_members_per_column=None)
        >>> read_rules(c, "frame 'f'", {"min_braced_bays": 9}, Frame("f", (1000,) * 5, (2000,))) is None
        True
        >>> c.problems[0]
        "frame 'f'.min_braced_bays: 9 is more than the frame's 5 bays per lift; give at most 5"
    """
    values: dict[str, int | None] = {}
    ok = True
    for key in RULE_FIELDS:
        raw = table.get(key)
        if raw is None:
            values[key] = None
            continue
        here = f"{where}.{key}"
        low = _MINIMUM[key]
        if isinstance(raw, bool) or not isinstance(raw, int) or raw < low:
            col.add(here, f"expected a whole number of at least {low} ({_MEANING[key]}), got {raw!r}")
            ok = False
            continue
        limit = frame.rows if key == "max_members_per_column" else frame.cols
        if key in ("end_bay_within", "min_braced_bays") and raw > limit:
            col.add(here, f"{raw} is more than the frame's {limit} bays per lift; give at most {limit}")
            ok = False
            continue
        values[key] = raw
    return SpreadRules(**values) if ok else None


def add_frame_rules(col: Problems, frame: Frame, raw: object, *, where: str) -> Frame:
    """The frame with its spreading rules read from its ``[[frame]]`` table (unchanged if none)."""
    if not isinstance(raw, Mapping) or not any(k in raw for k in FRAME_KEYS):
        return frame
    rules = read_rules(col, where, raw, frame)
    return frame if rules is None else dataclasses.replace(frame, rules=rules)


def frame_rule_fields(frame: Frame) -> dict[str, int]:
    """The rule fields of a frame for writing back (empty when it has none).

    Example:
        >>> frame_rule_fields(Frame("f", (1000,), (2000,), rules=SpreadRules(end_bay_within=1)))
        {'end_bay_within': 1}
    """
    return {k: v for k, v in zip(RULE_FIELDS, frame.rules.values(), strict=True) if v is not None}
