"""Writing project files: a :class:`~bracegrid.model.Project` -> TOML text, saved atomically.

Two ways: :func:`render_project` writes a fresh file in our own layout; :func:`update_project_text`
edits the user's own file (tomlkit keeps every comment, blank line and quoting style) and changes
only what differs: each frame's members, and the frame fields the editor can change.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Any

import tomli_w
import tomlkit
import tomlkit.exceptions
from tomlkit.items import AoT, Table

from bracegrid.errors import InputError
from bracegrid.io.atomic import write_text_atomic
from bracegrid.io.general import frame_general_fields, missing_as_tables
from bracegrid.io.loads import frame_load_fields, grid_table, strength_fields
from bracegrid.io.reading import parse_project
from bracegrid.io.robustness import TABLE as ROBUSTNESS_TABLE
from bracegrid.io.robustness import robustness_table
from bracegrid.io.rules import frame_rule_fields
from bracegrid.model import CostRate, Diagonal, Frame, Member, MemberKind, Project
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
        out["member"] = [_member(m) for m in frame.members]  # in the frame's own order: it reads back equal
    out.update(frame_rule_fields(frame))
    out.update(frame_load_fields(frame))
    out.update(frame_general_fields(frame))
    return out


def _member(m: Member) -> dict[str, Any]:
    return {
        "row": m.row,
        "col": m.col,
        "kind": m.kind.value,
        "diagonal": m.diagonal.value,
        "status": "existing" if m.existing else "proposed",
    }


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
    return missing_as_tables(tomli_w.dumps(doc))


#: Frame fields :func:`update_project_text` writes into the user's table when they changed (members apart).
_EDITABLE = ("widths", "heights", "supports", "blocked", "allow", "opening_overlap", "redundancy", "openings")
_FIELD_KEY = {"openings": "opening"}


def _sorted_members(frame: Frame) -> Frame:
    return dataclasses.replace(frame, members=tuple(sorted(frame.members, key=lambda m: m.sort_key)))


def _same_content(a: Project, b: Project) -> bool:
    """Equal but for member order and the source name."""
    return dataclasses.replace(a, frames=tuple(map(_sorted_members, a.frames)), source="") == dataclasses.replace(
        b, frames=tuple(map(_sorted_members, b.frames)), source=""
    )


def update_project_text(original_text: str, project: Project) -> str:
    """The user's project file with ``project``'s members (and edited frame fields) written into it.

    Comments, blank lines, table order and the way values are written (``"2400 mm"``, inline
    tables) are kept; each member table in the file stays where it is if that diagonal still holds
    that member, is updated in place if its kind or status changed, and is removed if the member
    is gone; new members are added as ``[[frame.member]]`` tables after the frame's others. A frame
    field the editor can change (widths, heights, supports, blocked, allow, ...) is rewritten only
    if its value changed. If the project differs in anything else (names, costs, loads) or the
    edit would not read back as ``project``, the whole file is written afresh (:func:`render_project`).

    Args:
        original_text: The project file as the user wrote it.
        project: The project to write (e.g. the optimizer's answer for that file).

    Returns:
        TOML text that reads back as ``project`` (members in the file's order, new ones after).

    Example:
        >>> text = '''# my site
        ... [project]
        ... name = "p"
        ... [costs]
        ... brace = {per_piece = 25.0, per_metre = 8.0}
        ... tie = {per_piece = 9.0, per_metre = 3.0}
        ... [[frame]]  # keep me
        ... name = "f"
        ... widths = ["3000 mm"]
        ... heights = [2.0]
        ... '''
        >>> p = parse_project(text)
        >>> braced = dataclasses.replace(p.frames[0], members=(Member(1, 1, MemberKind.BRACE, Diagonal.RISING),))
        >>> new = update_project_text(text, dataclasses.replace(p, frames=(braced,)))
        >>> print(new[new.index("[[frame]]"):])
        [[frame]]  # keep me
        name = "f"
        widths = ["3000 mm"]
        heights = [2.0]
        <BLANKLINE>
        [[frame.member]]
        row = 1
        col = 1
        kind = "brace"
        diagonal = "rising"
        status = "existing"
        <BLANKLINE>
    """
    try:
        before = parse_project(original_text, source=project.source)
        doc = tomlkit.parse(original_text)
    except (InputError, tomlkit.exceptions.TOMLKitError):
        return render_project(project)
    tables = doc.get("frame")
    names = [f.name for f in project.frames]
    if not isinstance(tables, AoT) or [f.name for f in before.frames] != names or len(tables) != len(names):
        return render_project(project)
    keep = {f: getattr(before, f) for f in ("name", "costs", "length_unit", "strength", "loss_likelihood")}
    if dataclasses.replace(project, **keep, source="") != dataclasses.replace(project, source=""):
        return render_project(project)
    for table, old, new in zip(tables, before.frames, project.frames, strict=True):
        fixed = {f: getattr(old, f) for f in (*_EDITABLE, "members")}
        if dataclasses.replace(new, **fixed) != old:  # loads or the name changed: not ours to merge
            return render_project(project)
        _update_fields(table, old, new, project.length_unit)
        _update_members(table, new)
    text = tomlkit.dumps(doc)
    try:
        again = parse_project(text, source=project.source)
    except InputError:
        return render_project(project)
    return text if _same_content(again, project) else render_project(project)


def _update_fields(table: Table, old: Frame, new: Frame, unit: str) -> None:
    fresh = _frame(new, unit)
    for name in _EDITABLE:
        if getattr(old, name) == getattr(new, name):
            continue
        key = _FIELD_KEY.get(name, name)
        if key in fresh:
            table[key] = fresh[key]
        elif key in table:
            del table[key]


def _member_key(raw: Any) -> tuple[int, int, Diagonal] | None:
    try:
        return (int(raw["row"]), int(raw["col"]), Diagonal(str(raw["diagonal"]).strip().lower()))
    except (KeyError, TypeError, ValueError):
        return None


def _update_members(table: Table, frame: Frame) -> None:
    wanted = {(m.row, m.col, m.diagonal): m for m in frame.members}
    raw = table.get("member")
    if raw is not None and not isinstance(raw, AoT):  # `member = [{...}]`: rewritten as [[frame.member]] tables
        del table["member"]
        raw = None
    kept = tomlkit.aot() if raw is None else raw
    placed: set[tuple[int, int, Diagonal]] = set()
    for k in reversed(range(len(kept))):
        item = kept[k]
        key = _member_key(item)
        if key is None or key not in wanted or key in placed:
            del kept[k]
            continue
        placed.add(key)
        fields = _member(wanted[key])
        if str(item["kind"]).strip().lower() != fields["kind"]:
            item["kind"] = fields["kind"]
        if item.get("status", "existing") != fields["status"]:
            item["status"] = fields["status"]
    for m in frame.members:
        if (m.row, m.col, m.diagonal) not in placed:
            fresh = tomlkit.table()
            fresh.update(_member(m))
            kept.append(fresh)
    if raw is None and len(kept):
        table["member"] = kept
    elif raw is not None and not len(kept):
        del table["member"]


def save_project(project: Project, path: str | Path, *, original: str | None = None) -> Path:
    """Write a project file atomically.

    Args:
        project: The project.
        path: Where to write it.
        original: The user's own text of this project, if any: then it is updated in place
            (:func:`update_project_text`), keeping its comments and layout.

    Raises:
        ExportError: If it cannot be written.
    """
    text = render_project(project) if original is None else update_project_text(original, project)
    return write_text_atomic(path, text)
