"""The ``[robustness]`` table of a project file: per-kind loss likelihoods, read and written.

```toml
[robustness.loss_likelihood]   # relative likelihood that a member of each kind goes missing
brace = 1.0
tie = 3.0                      # ties are cut three times as often as braces
```

Kinds left out keep 1.0; 0 means never taken out; at least one kind must be above 0. The
reading module calls :func:`read_robustness` with the parsed table and the file's positions (for
the line numbers, :mod:`bracegrid.io.positions`) and adds the problems it returns to its own list.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Mapping
from typing import Any

from bracegrid.io.positions import Positions, cite
from bracegrid.model import LossLikelihood, MemberKind

#: The key of the table at the top level of a project file.
TABLE = "robustness"
_KEYS = {"loss_likelihood"}
_KINDS = {k.value for k in MemberKind}


def _unknown(where: str, table: Mapping[str, Any], known: set[str]) -> list[str]:
    out = []
    for key in table:
        if key not in known:
            guess = difflib.get_close_matches(str(key), sorted(known), n=1)
            hint = f"; did you mean {guess[0]!r}?" if guess else f"; known fields: {', '.join(sorted(known))}"
            out.append(f"{where}: unknown field {key!r}{hint}")
    return out


def read_robustness(raw: object, *, lines: Positions | None = None) -> tuple[LossLikelihood, list[str]]:
    """Read the ``[robustness]`` table.

    Args:
        raw: The parsed table (None when the file has none).
        lines: Where the file's tables are (:func:`bracegrid.io.positions.locate`), to name the line
            of the table in messages: its header, or the key of the inline table (None: no lines).

    Returns:
        The loss likelihoods (defaults where the file says nothing) and the problems found, each
        naming the line, field and value and how to fix it.

    Example:
        >>> read_robustness({"loss_likelihood": {"tie": 3.0}})
        (LossLikelihood(brace=1.0, tie=3.0), [])
        >>> read_robustness({"loss_likelihood": {"tie": -1}})[1]
        ['[robustness.loss_likelihood].tie: expected a number 0 or above (0 = never lost), got -1']
    """
    if raw is None:
        return LossLikelihood(), []
    found = lines or Positions()
    where = f"{cite(found.within(TABLE))}[{TABLE}]"
    if not isinstance(raw, Mapping):
        return LossLikelihood(), [f"{where}: expected a table, got {type(raw).__name__}"]
    problems = _unknown(where, raw, _KEYS)
    given = raw.get("loss_likelihood", {})
    line = found.within(TABLE, "loss_likelihood")
    where = f"{cite(found.within(TABLE) if line is None else line)}[{TABLE}.loss_likelihood]"
    if not isinstance(given, Mapping):
        problems.append(f"{where}: expected a table of kind = likelihood, e.g. {{ brace = 1.0, tie = 3.0 }}")
        return LossLikelihood(), problems
    problems += _unknown(where, given, _KINDS)
    values: dict[str, float] = {}
    for kind in sorted(_KINDS & set(given)):
        value = given[kind]
        ok = isinstance(value, int | float) and not isinstance(value, bool) and math.isfinite(value) and value >= 0
        if not ok:
            problems.append(f"{where}.{kind}: expected a number 0 or above (0 = never lost), got {value!r}")
            continue
        values[kind] = float(value)
    likelihood = LossLikelihood(**values)
    if not problems and all(likelihood.weight(k) == 0 for k in MemberKind):
        problems.append(f"{where}: every kind is 0, so nothing is ever lost; give at least one kind a value above 0")
    return likelihood, problems


def robustness_table(likelihood: LossLikelihood) -> dict[str, Any] | None:
    """The ``[robustness]`` table to write back, or None when everything is at its default.

    Example:
        >>> robustness_table(LossLikelihood(tie=3.0))
        {'loss_likelihood': {'brace': 1.0, 'tie': 3.0}}
        >>> robustness_table(LossLikelihood()) is None
        True
    """
    if likelihood == LossLikelihood():
        return None
    return {"loss_likelihood": {k.value: likelihood.weight(k) for k in MemberKind}}
