"""The analysis stage: the row/column digraph, stability, loose parts, critical members, redundancy, robustness."""

from bracegrid.analysis.additions import Addition, AdditionAdvice, candidate_additions, rank_additions
from bracegrid.analysis.critical import find_critical_members, strong_bridges
from bracegrid.analysis.digraph import ArcSet, build_arcs, frame_digraph
from bracegrid.analysis.redundancy import redundancy_of
from bracegrid.analysis.robustness import (
    CONFIDENCE,
    CurvePoint,
    Estimate,
    MemberDrop,
    Robustness,
    RobustnessOptions,
    estimate_kept_stable,
    losses_to_mechanism,
    project_robustness,
    robustness_of,
    stable_without,
)
from bracegrid.analysis.stability import (
    check_frame,
    check_layout,
    count_racking_modes,
    is_stable,
    remove_members,
    require_complete,
)
from bracegrid.analysis.verdict import BayRack, CheckMethod, Flex, LoosePart, NodeMove, Verdict
from bracegrid.analysis.words import (
    CAUTION,
    ROBUSTNESS_LIMITS,
    addition_words,
    anchor_words,
    describe_part,
    flex_words,
    format_numbers,
    redundancy_words,
)

__all__ = [
    "CAUTION",
    "CONFIDENCE",
    "ROBUSTNESS_LIMITS",
    "Addition",
    "AdditionAdvice",
    "ArcSet",
    "BayRack",
    "CheckMethod",
    "CurvePoint",
    "Estimate",
    "Flex",
    "LoosePart",
    "MemberDrop",
    "NodeMove",
    "Robustness",
    "RobustnessOptions",
    "Verdict",
    "addition_words",
    "anchor_words",
    "build_arcs",
    "candidate_additions",
    "check_frame",
    "check_layout",
    "count_racking_modes",
    "describe_part",
    "estimate_kept_stable",
    "find_critical_members",
    "flex_words",
    "format_numbers",
    "frame_digraph",
    "is_stable",
    "losses_to_mechanism",
    "project_robustness",
    "rank_additions",
    "redundancy_of",
    "redundancy_words",
    "remove_members",
    "require_complete",
    "robustness_of",
    "stable_without",
    "strong_bridges",
]
