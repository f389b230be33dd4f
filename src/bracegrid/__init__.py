"""bracegrid: minimum-cost, proven-stable diagonal bracing of rectangular frames.

The package follows the data flow: ``model`` (value types) -> ``io`` (project files) ->
``analysis`` (the row/column digraph and the stability check) -> ``optimize`` -> ``compare``
-> ``outputs``; ``cli`` is a thin shell over them. This module re-exports the public API
lazily (PEP 562): ``import bracegrid`` costs nothing until a name is used, so the script installs
its signal handling before any library loads.
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

from bracegrid._version import __version__

if TYPE_CHECKING:  # the names as the type checker sees them; at run time they load on first use
    from bracegrid.analysis import (
        LoosePart,
        Verdict,
        check_frame,
        check_layout,
        find_critical_members,
        is_stable,
    )
    from bracegrid.errors import BraceGridError, ExportError, InfeasibleError, InputError, SolverLimitError
    from bracegrid.io import load_project, parse_member_refs, parse_project, render_project, save_project
    from bracegrid.model import (
        CostCatalogue,
        CostRate,
        Diagonal,
        Frame,
        Member,
        MemberKind,
        Opening,
        Project,
        Racking,
        Supports,
        blocked_bays,
    )
    from bracegrid.optimize import (
        FrameSolution,
        ProgressEvent,
        ProjectSolution,
        SolveOptions,
        SolveStatus,
        optimize_frame,
        optimize_project,
    )
    from bracegrid.outputs import (
        Bom,
        DrawnSheet,
        PreviewFormat,
        build_bom,
        build_drawing,
        render_bom_csv,
        render_preview,
        write_dxf,
        write_preview,
    )

_SOURCES: dict[str, str] = {
    "Bom": "bracegrid.outputs",
    "BraceGridError": "bracegrid.errors",
    "CostCatalogue": "bracegrid.model",
    "CostRate": "bracegrid.model",
    "Diagonal": "bracegrid.model",
    "DrawnSheet": "bracegrid.outputs",
    "ExportError": "bracegrid.errors",
    "Frame": "bracegrid.model",
    "FrameSolution": "bracegrid.optimize",
    "InfeasibleError": "bracegrid.errors",
    "InputError": "bracegrid.errors",
    "LoosePart": "bracegrid.analysis",
    "Member": "bracegrid.model",
    "MemberKind": "bracegrid.model",
    "Opening": "bracegrid.model",
    "PreviewFormat": "bracegrid.outputs",
    "ProgressEvent": "bracegrid.optimize",
    "Project": "bracegrid.model",
    "ProjectSolution": "bracegrid.optimize",
    "Racking": "bracegrid.model",
    "SolveOptions": "bracegrid.optimize",
    "SolveStatus": "bracegrid.optimize",
    "SolverLimitError": "bracegrid.errors",
    "Supports": "bracegrid.model",
    "Verdict": "bracegrid.analysis",
    "blocked_bays": "bracegrid.model",
    "build_bom": "bracegrid.outputs",
    "build_drawing": "bracegrid.outputs",
    "check_frame": "bracegrid.analysis",
    "check_layout": "bracegrid.analysis",
    "find_critical_members": "bracegrid.analysis",
    "is_stable": "bracegrid.analysis",
    "load_project": "bracegrid.io",
    "optimize_frame": "bracegrid.optimize",
    "optimize_project": "bracegrid.optimize",
    "parse_member_refs": "bracegrid.io",
    "parse_project": "bracegrid.io",
    "render_bom_csv": "bracegrid.outputs",
    "render_preview": "bracegrid.outputs",
    "render_project": "bracegrid.io",
    "save_project": "bracegrid.io",
    "write_dxf": "bracegrid.outputs",
    "write_preview": "bracegrid.outputs",
}


def __getattr__(name: str) -> Any:
    """Load a public name from the module that defines it, on first use (PEP 562)."""
    source = _SOURCES.get(name)
    if source is None:
        msg = f"module 'bracegrid' has no attribute {name!r}"
        raise AttributeError(msg)
    value = getattr(importlib.import_module(source), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(__all__)


__all__ = [
    "Bom",
    "BraceGridError",
    "CostCatalogue",
    "CostRate",
    "Diagonal",
    "DrawnSheet",
    "ExportError",
    "Frame",
    "FrameSolution",
    "InfeasibleError",
    "InputError",
    "LoosePart",
    "Member",
    "MemberKind",
    "Opening",
    "PreviewFormat",
    "ProgressEvent",
    "Project",
    "ProjectSolution",
    "Racking",
    "SolveOptions",
    "SolveStatus",
    "SolverLimitError",
    "Supports",
    "Verdict",
    "__version__",
    "blocked_bays",
    "build_bom",
    "build_drawing",
    "check_frame",
    "check_layout",
    "find_critical_members",
    "is_stable",
    "load_project",
    "optimize_frame",
    "optimize_project",
    "parse_member_refs",
    "parse_project",
    "render_bom_csv",
    "render_preview",
    "render_project",
    "save_project",
    "write_dxf",
    "write_preview",
]
