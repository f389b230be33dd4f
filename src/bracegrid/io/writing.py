"""Writing project files: a :class:`~bracegrid.model.Project` -> TOML text, saved atomically."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import tomli_w

from bracegrid.io.atomic import write_text_atomic
from bracegrid.io.loads import frame_load_fields, grid_table, strength_fields
from bracegrid.io.robustness import TABLE as ROBUSTNESS_TABLE
from bracegrid.io.robustness import robustness_table
from bracegrid.io.rules import frame_rule_fields
from bracegrid.model import CostRate, Frame, MemberKind, Project
from bracegrid.units import MM_PER_UNIT


def _length(mm: int, unit: str) -> float | int:
    value = mm / MM_PER_UNIT[unit]
    return int(value) if float(value).is_integer() else round(value, 6)


def _rate(rate: CostRate) -> dict[str, float]:
    out = {"per_piece": rate.per_piece, "per_metre": rate.per_metre}
    if rate.labour_per_piece:
        out["labour_per_piece"] = rate.labour_per_piece
    return out


def _frame(frame: Frame, unit: str) -> dict[str, Any]:
    out: dict[str, Any] = {
        "name": frame.name,
        "widths": [_length(w, unit) for w in frame.widths],
        "heights": [_length(h, unit) for h in frame.heights],
        "supports": frame.supports.value,
        "allow": sorted(k.value for k in frame.allow),
    }
    if frame.blocked:
        out["blocked"] = [list(b) for b in sorted(frame.blocked)]
    if frame.opening_overlap:
        out["opening_overlap"] = frame.opening_overlap
    if frame.redundancy:
        out["redundancy"] = frame.redundancy
    if frame.openings:
        out["opening"] = [
            {"name": o.name, "polygon": [[_length(x, unit), _length(y, unit)] for x, y in o.polygon]}
            for o in frame.openings
        ]
    if frame.members:
        out["member"] = [
            {
                "row": m.row,
                "col": m.col,
                "kind": m.kind.value,
                "diagonal": m.diagonal.value,
                "status": "existing" if m.existing else "proposed",
            }
            for m in sorted(frame.members, key=lambda m: m.sort_key)
        ]
    out.update(frame_rule_fields(frame))
    out.update(frame_load_fields(frame))
    return out


def render_project(project: Project) -> str:
    """The project as TOML text that :func:`bracegrid.io.reading.parse_project` reads back.

    Example:
        >>> from bracegrid.model import Frame, Project
        >>> text = render_project(Project("p", (Frame("f", (3000,), (2000,)),)))
        >>> "widths = [\\n    3,\\n]" in text or "widths = [3]" in text
        True
    """
    costs: dict[str, Any] = {
        k.value: _rate(project.costs.rate(k)) | strength_fields(project.strength.of(k)) for k in MemberKind
    }
    if project.costs.contingency_pct:
        costs["contingency_pct"] = project.costs.contingency_pct
    head: dict[str, Any] = {"name": project.name}
    if project.length_unit != "m":
        head["length_unit"] = project.length_unit
    doc: dict[str, Any] = {"project": head, "costs": costs}
    if grid := grid_table(project.strength):
        doc["grid"] = grid
    robustness = robustness_table(project.loss_likelihood)
    if robustness is not None:
        doc[ROBUSTNESS_TABLE] = robustness
    doc["frame"] = [_frame(f, project.length_unit) for f in project.frames]
    return tomli_w.dumps(doc)


def save_project(project: Project, path: str | Path) -> Path:
    """Write a project file atomically.

    Raises:
        ExportError: If it cannot be written.
    """
    return write_text_atomic(path, render_project(project))
