"""The optimization stage: minimum-cost stable (and, given loads, strong enough) layouts, proven or with a bound."""

from bracegrid.optimize.adequacy import strength_check
from bracegrid.optimize.dispatch import optimize_frame, optimize_project, repair_frame
from bracegrid.optimize.results import (
    MAX_REDUNDANCY,
    CaseCheck,
    FrameSolution,
    ProgressEvent,
    ProjectSolution,
    SolveMethod,
    SolveOptions,
    SolveStatus,
    StrengthCheck,
    method_words,
)

__all__ = [
    "MAX_REDUNDANCY",
    "CaseCheck",
    "FrameSolution",
    "ProgressEvent",
    "ProjectSolution",
    "SolveMethod",
    "SolveOptions",
    "SolveStatus",
    "StrengthCheck",
    "method_words",
    "optimize_frame",
    "optimize_project",
    "repair_frame",
    "strength_check",
]
