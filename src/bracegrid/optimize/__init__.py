"""The optimization stage: minimum-cost stable layouts, proven or with a bound, and repairs."""

from bracegrid.optimize.dispatch import optimize_frame, optimize_project, repair_frame
from bracegrid.optimize.results import (
    MAX_REDUNDANCY,
    FrameSolution,
    ProgressEvent,
    ProjectSolution,
    SolveMethod,
    SolveOptions,
    SolveStatus,
    method_words,
)

__all__ = [
    "MAX_REDUNDANCY",
    "FrameSolution",
    "ProgressEvent",
    "ProjectSolution",
    "SolveMethod",
    "SolveOptions",
    "SolveStatus",
    "method_words",
    "optimize_frame",
    "optimize_project",
    "repair_frame",
]
