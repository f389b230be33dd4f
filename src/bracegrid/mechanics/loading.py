"""Load cases turned into nodal forces: a line's load spread over its nodes by tributary length.

A horizontal grid line's load H_p (kN, + to the right) goes to its nodes in proportion to the
width each node collects: the node on vertical line q takes (w_q + w_{q+1}) / (2 W) of it, with
w_0 = w_{C+1} = 0 and W the frame's width. A vertical grid line's load G_q (kN, + upwards) goes to
its nodes by tributary height in the same way. The total on each line is kept exactly. Point
loads go to their node as given. Reversing a case reverses every force but the weight
(``gravity``), which acts downwards in both senses.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from bracegrid.mechanics.framework import FloatArray, node_index
from bracegrid.model import Frame, LoadCase, LoadSense


def tributary_shares(sizes: Sequence[int]) -> FloatArray:
    """Share of a line load taken by each of the len(sizes) + 1 nodes along it.

    Example:
        >>> tributary_shares([2000, 2000]).tolist()
        [0.25, 0.5, 0.25]
    """
    s = np.array([0, *sizes, 0], dtype=np.float64)
    out: FloatArray = (s[:-1] + s[1:]) / (2.0 * float(sum(sizes)))
    return out


def nodal_loads(frame: Frame, case: LoadCase, sense: LoadSense = LoadSense.PLUS) -> FloatArray:
    """Nodal forces of a load case (kN, two per node in the framework's node order).

    Example:
        >>> f = Frame("f", (3000, 1000), (2000,))
        >>> nodal_loads(f, LoadCase("w", (0.0, 4.0))).reshape(-1, 2)[3:, 0].tolist()
        [1.5, 2.0, 0.5]
    """
    out = np.zeros(2 * (frame.rows + 1) * (frame.cols + 1))
    along_x = tributary_shares(frame.widths)
    along_y = tributary_shares(frame.heights)
    factor = sense.factor
    for p, load in enumerate(case.horizontal_kn):
        if load:
            for q in range(frame.cols + 1):
                out[2 * node_index(frame, p, q)] += factor * load * along_x[q]
    for q, load in enumerate(case.vertical_kn):
        if load:
            for p in range(frame.rows + 1):
                out[2 * node_index(frame, p, q) + 1] += factor * load * along_y[p]
    for q, load in enumerate(case.gravity_kn):
        if load:
            for p in range(frame.rows + 1):
                out[2 * node_index(frame, p, q) + 1] -= load * along_y[p]  # weight: down in either sense
    for p, q, fx, fy in case.point_kn:
        n = node_index(frame, p, q)
        out[2 * n] += factor * fx
        out[2 * n + 1] += factor * fy
    return out
