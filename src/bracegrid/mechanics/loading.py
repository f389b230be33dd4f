"""Load cases turned into nodal forces: a line's load spread over its nodes by tributary length.

A horizontal grid line's load H_p (kN, + to the right) goes to its nodes in proportion to the
width each node collects: the node on vertical line q takes (w_q + w_{q+1}) / (2 W) of it, with
w_0 = w_{C+1} = 0 and W the frame's width. A vertical grid line's load G_q (kN, + upwards) goes to
its nodes by tributary height in the same way. The total on each line is kept exactly. Point
loads go to their node as given. Reversing a case reverses every force but the weight
(``gravity``), which acts downwards in both senses.

On a general frame (docs/general-frames.md) only nodes that exist take load: along a line, a span
counts when both its end nodes exist (a missing bar segment between them still collects load from
the cladding or deck it borders; a span into an absent region does not), each node takes half of
every counted span beside it, and the shares are scaled so the line's total is kept exactly. A
line with one node gives it all; a loaded line without nodes, or a point load at a node the frame
does not have, is an input error. On a complete grid this is the rule above.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from bracegrid.errors import InputError
from bracegrid.mechanics.framework import FloatArray, node_index
from bracegrid.model import Frame, LoadCase, LoadSense, present_nodes


def tributary_shares(sizes: Sequence[int]) -> FloatArray:
    """Share of a line load taken by each of the len(sizes) + 1 nodes along it.

    Example:
        >>> tributary_shares([2000, 2000]).tolist()
        [0.25, 0.5, 0.25]
    """
    s = np.array([0, *sizes, 0], dtype=np.float64)
    out: FloatArray = (s[:-1] + s[1:]) / (2.0 * float(sum(sizes)))
    return out


def present_shares(sizes: Sequence[int], present: Sequence[bool]) -> FloatArray:
    """Shares of a line load over the line's nodes when only the ``present`` ones exist (all zero if none).

    Example:
        >>> present_shares([2000, 2000, 2000], [True, True, True, False]).tolist()
        [0.25, 0.5, 0.25, 0.0]
    """
    on = np.array(present, dtype=bool)
    counted = np.array(sizes, dtype=np.float64) * (on[:-1] & on[1:])
    s = np.concatenate([[0.0], counted, [0.0]])
    raw = (s[:-1] + s[1:]) / 2.0
    total = float(raw.sum())
    if total > 0:
        out: FloatArray = raw / total
        return out
    lone = on.astype(np.float64)  # no counted span: the line's only node(s) share it
    return lone / max(float(lone.sum()), 1.0)


def _general_loads(frame: Frame, case: LoadCase, sense: LoadSense) -> FloatArray:
    """:func:`nodal_loads` on a frame with an outline or missing bars: only existing nodes are loaded."""
    nodes = present_nodes(frame)
    out = np.zeros(2 * (frame.rows + 1) * (frame.cols + 1))
    factor = sense.factor

    def shares(along_x: bool, line: int, what: str) -> FloatArray:
        if along_x:
            got = present_shares(frame.widths, [(line, q) in nodes for q in range(frame.cols + 1)])
        else:
            got = present_shares(frame.heights, [(p, line) in nodes for p in range(frame.rows + 1)])
        if not got.any():
            name = "horizontal grid line p" if along_x else "vertical grid line q"
            msg = (
                f"frame {frame.name!r}, load case {case.name!r}: the {what} load on {name}{line} has no node of the "
                "frame to act on (the line lies outside the outline); set it to 0 or move it to a line the frame has"
            )
            raise InputError(msg)
        return got

    for p, load in enumerate(case.horizontal_kn):
        if load:
            for q, share in enumerate(shares(True, p, "horizontal")):
                out[2 * node_index(frame, p, q)] += factor * load * share
    for q, load in enumerate(case.vertical_kn):
        if load:
            for p, share in enumerate(shares(False, q, "vertical")):
                out[2 * node_index(frame, p, q) + 1] += factor * load * share
    for q, load in enumerate(case.gravity_kn):
        if load:
            for p, share in enumerate(shares(False, q, "gravity")):
                out[2 * node_index(frame, p, q) + 1] -= load * share
    for p, q, fx, fy in case.point_kn:
        if (p, q) not in nodes:
            msg = (
                f"frame {frame.name!r}, load case {case.name!r}: the point load at node p{p}q{q} acts where the frame "
                "has no node (outside its outline, or no grid bar reaches it); move it to a node of the frame"
            )
            raise InputError(msg)
        n = node_index(frame, p, q)
        out[2 * n] += factor * fx
        out[2 * n + 1] += factor * fy
    return out


def nodal_loads(frame: Frame, case: LoadCase, sense: LoadSense = LoadSense.PLUS) -> FloatArray:
    """Nodal forces of a load case (kN, two per node in the framework's node order).

    Example:
        >>> f = Frame("f", (3000, 1000), (2000,))
        >>> nodal_loads(f, LoadCase("w", (0.0, 4.0))).reshape(-1, 2)[3:, 0].tolist()
        [1.5, 2.0, 0.5]
    """
    if not frame.is_complete:
        return _general_loads(frame, case, sense)
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
