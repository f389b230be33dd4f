"""bracegrid: minimum-cost, proven-stable diagonal bracing of rectangular frames.

The package follows the data flow: ``model`` (value types) -> ``io`` (project files) ->
``analysis`` (the row/column digraph and the stability check) -> ``optimize`` -> ``compare``
-> ``outputs``; ``cli`` is a thin shell over them. This module re-exports the public API.
"""

from bracegrid._version import __version__
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
