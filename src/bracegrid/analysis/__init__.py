"""The analysis stage: the row/column digraph, stability, loose parts, critical members, redundancy, words."""

from bracegrid.analysis.critical import find_critical_members, strong_bridges
from bracegrid.analysis.digraph import ArcSet, build_arcs, frame_digraph
from bracegrid.analysis.redundancy import redundancy_of
from bracegrid.analysis.stability import check_frame, check_layout, count_racking_modes, is_stable, remove_members
from bracegrid.analysis.verdict import LoosePart, Verdict
from bracegrid.analysis.words import CAUTION, anchor_words, describe_part, format_numbers, redundancy_words

__all__ = [
    "CAUTION",
    "ArcSet",
    "LoosePart",
    "Verdict",
    "anchor_words",
    "build_arcs",
    "check_frame",
    "check_layout",
    "count_racking_modes",
    "describe_part",
    "find_critical_members",
    "format_numbers",
    "frame_digraph",
    "is_stable",
    "redundancy_of",
    "redundancy_words",
    "remove_members",
    "strong_bridges",
]
