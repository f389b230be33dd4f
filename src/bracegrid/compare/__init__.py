"""The compare stage: alternative bracing strategies solved, re-verified, costed and their robustness, side by side."""

from bracegrid.compare.baseline import DEFAULT_INTERVAL, rule_of_thumb_layout
from bracegrid.compare.robustness import COMPARE_SAMPLES, StrategyRobustness, compare_robustness
from bracegrid.compare.strategies import (
    Comparison,
    FrameComparison,
    StrategyKey,
    StrategyResult,
    StrategyStatus,
    compare_frame,
    compare_project,
)

__all__ = [
    "COMPARE_SAMPLES",
    "DEFAULT_INTERVAL",
    "Comparison",
    "FrameComparison",
    "StrategyKey",
    "StrategyResult",
    "StrategyRobustness",
    "StrategyStatus",
    "compare_frame",
    "compare_project",
    "compare_robustness",
    "rule_of_thumb_layout",
]
