"""The compare stage: alternative bracing strategies solved, re-verified and costed side by side."""

from bracegrid.compare.baseline import DEFAULT_INTERVAL, rule_of_thumb_layout
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
    "DEFAULT_INTERVAL",
    "Comparison",
    "FrameComparison",
    "StrategyKey",
    "StrategyResult",
    "StrategyStatus",
    "compare_frame",
    "compare_project",
    "rule_of_thumb_layout",
]
