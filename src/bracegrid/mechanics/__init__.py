"""The mechanics stage: the real bar framework, direct stiffness, tension-only ties, member forces."""

from bracegrid.mechanics.checking import (
    GENERAL_REDUNDANCY_CAP,
    check_any,
    check_frame_any,
    critical_any,
    flex_of,
    redundancy_any,
    stable_any,
    without_bars,
)
from bracegrid.mechanics.forces import LayoutModel, analyse_frame, analyse_project, envelope, prepare_layout
from bracegrid.mechanics.framework import BarFramework, BarKind, GridBarRef, build_framework, missing_stiffness
from bracegrid.mechanics.loading import nodal_loads, tributary_shares
from bracegrid.mechanics.motions import FreeMotions, driven_motion, free_motions
from bracegrid.mechanics.results import (
    MODEL_LIMITS,
    CaseForces,
    CaseOutcome,
    EnvelopeEntry,
    FrameForces,
    Mechanism,
    MechanismKind,
    MemberForce,
    Reaction,
)
from bracegrid.mechanics.rigidity import Reduced, Rigidity, exact_rigidity, member_rank, rank_target, reduce_frame
from bracegrid.mechanics.tension import Equilibrium, exact_step, solve_tension_only

__all__ = [
    "GENERAL_REDUNDANCY_CAP",
    "MODEL_LIMITS",
    "BarFramework",
    "BarKind",
    "CaseForces",
    "CaseOutcome",
    "EnvelopeEntry",
    "Equilibrium",
    "FrameForces",
    "FreeMotions",
    "GridBarRef",
    "LayoutModel",
    "Mechanism",
    "MechanismKind",
    "MemberForce",
    "Reaction",
    "Reduced",
    "Rigidity",
    "analyse_frame",
    "analyse_project",
    "build_framework",
    "check_any",
    "check_frame_any",
    "critical_any",
    "driven_motion",
    "envelope",
    "exact_rigidity",
    "exact_step",
    "flex_of",
    "free_motions",
    "member_rank",
    "missing_stiffness",
    "nodal_loads",
    "prepare_layout",
    "rank_target",
    "reduce_frame",
    "redundancy_any",
    "solve_tension_only",
    "stable_any",
    "tributary_shares",
    "without_bars",
]
