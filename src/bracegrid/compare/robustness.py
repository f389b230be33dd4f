"""Robustness of the compared strategies: each stable layout's curve of P(stable) against members lost."""

from __future__ import annotations

import dataclasses
from collections.abc import Callable
from dataclasses import dataclass

from bracegrid.analysis import Robustness, RobustnessOptions, robustness_of
from bracegrid.compare.strategies import Comparison, StrategyKey

#: Samples per strategy curve in a comparison: enough for intervals about +-0.02 wide.
COMPARE_SAMPLES = 2000


@dataclass(frozen=True, slots=True)
class StrategyRobustness:
    """One strategy's robustness for one frame.

    Attributes:
        frame: Frame name.
        key: The strategy.
        result: Its robustness statistics (the strategy's full layout, with the project's likelihoods).
    """

    frame: str
    key: StrategyKey
    result: Robustness


def compare_robustness(
    comparison: Comparison,
    *,
    options: RobustnessOptions = RobustnessOptions(samples=COMPARE_SAMPLES, rank_members=False),
    on_progress: Callable[[str, StrategyKey], None] | None = None,
) -> tuple[StrategyRobustness, ...]:
    """The robustness curve of every stable strategy layout, frame by frame, in table order.

    Members are not ranked (``rank_members`` is turned off): the curves are what a comparison shows.

    Args:
        comparison: The strategies solved.
        options: Samples, seed, losses on the curve, processes.
        on_progress: Called with (frame name, strategy) as each curve starts.

    Returns:
        One entry per stable strategy layout (infeasible strategies have none).
    """
    opts = dataclasses.replace(options, rank_members=False)
    likelihood = comparison.project.loss_likelihood
    out = []
    for fc in comparison.frames:
        for s in fc.strategies:
            if s.frame is None or not s.stable or not s.frame.is_complete:  # general frames: no digraph curves
                continue
            if on_progress is not None:
                on_progress(fc.frame.name, s.key)
            out.append(
                StrategyRobustness(fc.frame.name, s.key, robustness_of(s.frame, likelihood=likelihood, options=opts))
            )
    return tuple(out)
