"""Project -> TOML text, and atomic file writing shared by every writer."""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import IO, Any

import tomli_w

from bracegrid.errors import ExportError
from bracegrid.model import CostRate, Frame, Project
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
    return out


def render_project(project: Project) -> str:
    """The project as TOML text that :func:`bracegrid.loading.parse_project` reads back.

    Example:
        >>> from bracegrid.model import Frame, Project
        >>> text = render_project(Project("p", (Frame("f", (3000,), (2000,)),)))
        >>> "widths = [\\n    3,\\n]" in text or "widths = [3]" in text
        True
    """
    costs: dict[str, Any] = {"brace": _rate(project.costs.brace), "tie": _rate(project.costs.tie)}
    if project.costs.contingency_pct:
        costs["contingency_pct"] = project.costs.contingency_pct
    head: dict[str, Any] = {"name": project.name}
    if project.length_unit != "m":
        head["length_unit"] = project.length_unit
    doc = {"project": head, "costs": costs, "frame": [_frame(f, project.length_unit) for f in project.frames]}
    return tomli_w.dumps(doc)


def _umask() -> int:
    current = os.umask(0)
    os.umask(current)
    return current


def write_atomic(path: str | Path, write: Callable[[IO[bytes]], None]) -> Path:
    """Write a file through a temporary file in the same folder, then rename.

    Either the whole file appears or nothing does: a failure part-way leaves
    any older file at ``path`` untouched.

    Args:
        path: Destination.
        write: Called with the open binary temporary file.

    Returns:
        The destination path.

    Raises:
        ExportError: If the folder cannot be written or ``write`` fails with OSError.
    """
    dest = Path(path)
    tmp_name = ""
    try:
        dest.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp_name = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".part", dir=dest.parent)
        with os.fdopen(fd, "wb") as handle:
            write(handle)
        os.chmod(tmp_name, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual mode
        os.replace(tmp_name, dest)
        tmp_name = ""
    except OSError as exc:
        msg = f"cannot write {dest}: {exc.strerror or exc}; check the folder exists and is writable"
        raise ExportError(msg) from None
    finally:
        if tmp_name and os.path.exists(tmp_name):
            os.unlink(tmp_name)
    return dest


def write_text_atomic(path: str | Path, text: str) -> Path:
    """Write UTF-8 text atomically (see :func:`write_atomic`)."""
    data = text.encode("utf-8")

    def put(handle: IO[bytes]) -> None:
        handle.write(data)

    return write_atomic(path, put)


def save_project(project: Project, path: str | Path) -> Path:
    """Write a project file atomically.

    Raises:
        ExportError: If it cannot be written.
    """
    return write_text_atomic(path, render_project(project))
