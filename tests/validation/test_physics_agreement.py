"""The graph check agrees with the physics of the real bar framework.

Reference: an independent first-order computation on the pin-jointed bar
framework (tests/physics.py: numpy SVD rank of the rigidity matrix, scipy
linprog for tension-only ties). The graph rule being checked is from
E. D. Bolker and H. Crapo, "Bracing rectangular frameworks. I", SIAM J. Appl.
Math. 36(3):473-490 (1979), doi:10.1137/0136036 (rigid braces: bipartite
connectivity) and J. A. Baglivo and J. E. Graver, *Incidence and Symmetry in
Design and Architecture*, Cambridge University Press (1983) (ties: strong
connectivity).
"""

from __future__ import annotations

import dataclasses

from hypothesis import given, settings
from hypothesis import strategies as st

from bracegrid.analysis import is_stable
from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports
from tests.physics import physically_rigid
from tests.strategies import frames_with_layouts, transpose


@settings(max_examples=300, deadline=None)
@given(frames_with_layouts())
def test_graph_check_agrees_with_bar_framework(frame: Frame) -> None:
    assert is_stable(frame) == physically_rigid(frame)


@settings(max_examples=60, deadline=None)
@given(frames_with_layouts(), st.lists(st.integers(300, 6000), min_size=8, max_size=8))
def test_bay_sizes_never_change_the_verdict(frame: Frame, sizes: list[int]) -> None:
    resized = dataclasses.replace(
        frame,
        widths=tuple(sizes[j % 8] for j in range(frame.cols)),
        heights=tuple(sizes[(i + 3) % 8] for i in range(frame.rows)),
    )
    assert physically_rigid(resized) == physically_rigid(frame) == is_stable(resized)


@settings(max_examples=200, deadline=None)
@given(frames_with_layouts(supports=Supports.FREE))
def test_transposing_never_changes_the_verdict(frame: Frame) -> None:
    assert is_stable(transpose(frame)) == is_stable(frame)
    assert physically_rigid(transpose(frame)) == physically_rigid(frame)


@settings(max_examples=200, deadline=None)
@given(frames_with_layouts(), st.data())
def test_adding_a_member_never_makes_a_stable_frame_unstable(frame: Frame, data: st.DataObject) -> None:
    i = data.draw(st.integers(1, frame.rows))
    j = data.draw(st.integers(1, frame.cols))
    extra = Member(i, j, data.draw(st.sampled_from(list(MemberKind))), data.draw(st.sampled_from(list(Diagonal))))
    bigger = (*[m for m in frame.members if (m.row, m.col, m.diagonal) != (i, j, extra.diagonal)], extra)
    # Replacing a diagonal is not "adding": only test when the slot was empty.
    if len(bigger) == len(frame.members) + 1 and is_stable(frame):
        assert is_stable(frame, bigger)
