"""Back spans of a single-span form: back stays or the main cable's back span, sized.

A single span's cable-stayed pylons and suspension towers stand on the
abutments; the horizontal pull of the main span at their tops is taken to the
anchor point at the far end of the back span
(:attr:`~bridgeopt.model.bridge.BridgeScenario.back_span`) by straight tension
members: the back stays (group ``"back stay"``) from every stay anchor on the
pylon, or the main cable's back span (group ``"back-span cable"``) from the tower
top.  They are members of the form, sized by the LP with their self-weight like
any other (equal-strength elements), and they move with the free geometry of
the pylon or tower top.  The reference optimum of the crossing has the same
anchor points and no other support behind the abutment.
"""

from __future__ import annotations

import numpy as np

from bridgeopt.forms.builder import deck_level
from bridgeopt.solver.frame import Frame, position_tolerance

__all__ = ["anchor_points", "with_back_spans"]

#: Main-span member group -> group of the back-span members that anchor its top.
BACK_GROUPS = {"stay": "back stay", "cable": "back-span cable"}


def anchor_points(problem) -> list[tuple[float, float]]:
    """Supports behind the deck's start (the back span's anchor points). [m]

    Parameters
    ----------
    problem : Problem
        A half-span bridge problem (its one line load is the deck).

    Returns
    -------
    list of (x, z)
        Positions of the supports with x before the deck's start. [m]
    """
    xs, _, _ = deck_level(problem)
    tol = position_tolerance(problem)
    return [s.at for s in problem.supports if s.at[0] < xs - tol]


def with_back_spans(frame: Frame, moves):
    """``frame`` with back stays or a back-span cable to each anchor point (if any).

    Parameters
    ----------
    frame : Frame
        A cable-stayed or suspension frame on its form problem.
    moves : NodeMoves or None
        Its free geometry (unchanged: the new members join existing nodes).

    Returns
    -------
    Frame, NodeMoves or None
    """
    problem = frame.problem
    anchors = anchor_points(problem)
    if not anchors:
        return frame, moves
    xs, _, zd = deck_level(problem)
    tol = position_tolerance(problem)
    nodes = frame.nodes
    starts, ends, groups = [], [], []
    for group, back in BACK_GROUPS.items():
        sel = frame.group == group
        ends_of = np.unique(np.concatenate([frame.start[sel], frame.end[sel]]))
        tops = [int(i) for i in ends_of
                if abs(nodes[i, 0] - xs) <= tol and nodes[i, 1] > zd + tol]
        for top in tops:
            for at in anchors:
                d = np.hypot(*(nodes - np.asarray(at)).T)
                starts.append(int(np.argmin(d)))
                ends.append(top)
                groups.append(back)
    if not starts:
        return frame, moves
    m = len(starts)
    senses = frame.senses if frame.senses is not None else np.full(len(frame), "either")
    return Frame(problem=problem, nodes=nodes,
                 start=np.concatenate([frame.start, starts]),
                 end=np.concatenate([frame.end, ends]),
                 senses=np.concatenate([senses, np.full(m, "tension")]),
                 group=np.concatenate([frame.group, groups])), moves
