"""bracegrid: minimum-cost, proven-stable diagonal bracing of rectangular frames."""

from bracegrid._version import __version__
from bracegrid.bom import Bom, build_bom, render_bom_csv
from bracegrid.drawing import DrawnSheet, build_drawing, write_dxf
from bracegrid.errors import BraceGridError, ExportError, InfeasibleError, InputError, SolverLimitError
from bracegrid.geometry import blocked_bays
from bracegrid.loading import load_project, parse_member_refs, parse_project
from bracegrid.model import (
    CostCatalogue,
    CostRate,
    Diagonal,
    Frame,
    LoosePart,
    Member,
    MemberKind,
    Opening,
    Project,
    Racking,
    Supports,
    Verdict,
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
from bracegrid.preview import PreviewFormat, render_preview, write_preview
from bracegrid.rigidity import check_frame, check_layout, find_critical_members, is_stable
from bracegrid.saving import render_project, save_project

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
