"""Cable-stayed form with a forked pylon and stays chosen by the LP.

The pylon forks in the bridge's own plane: a vertical mast from the pier's
pylon foot, and on each side an inclined leg, springing from the same foot and
leaning over that side's deck; a head tie runs from each leg's head back to
the mast top, so that the pull of the stays on the leg head is carried across
the pylon instead of down the deck.  Longitudinal A- and Y-shaped pylons that
spread over the deck are built on multi-span cable-stayed viaducts (common
practice, from memory).  Everything stands on the crossing's own supports: the
legs share the mast's foot, no new foundation.

The stays are chosen by the frame LP (:func:`~bridgeopt.solver.frame.size_frame`):
candidate straight stays run from every mast level (one per grid step up the
mast, and the mast top) and from the leg head to every deck grid point the
pylon serves, several per deck point allowed; the stays that carry force in
the least-volume solution are kept, the others dropped, and the kept frame is
returned with its free geometry (every used mast anchor's height, kept in
order as in :mod:`bridgeopt.forms.cable_stayed`, the mast top and each leg
head's position), which :func:`~bridgeopt.forms.solve.solve_form` then
optimizes.  Measured (docs/benchmarks.md): a fork above the foot is heavier
than legs springing from the foot, and a Y without the head tie leaves the legs
unused, so the legs spring from the foot and are tied back.

Straight stays end at the deck's grid points (no deck slide: an unsized longer
deck panel would favour the form).  The legs are single straight members: an
inclined chain of equal-strength compression segments kinks at its inner
nodes under its own weight, which downward stays cannot hold.
"""

from __future__ import annotations

import numpy as np

from bridgeopt.errors import SolveError
from bridgeopt.forms.backspan import with_back_spans
from bridgeopt.forms.builder import FrameBuilder, deck_level
from bridgeopt.forms.cable_stayed import LEAST_GAP, free_anchors
from bridgeopt.geometry.optimize import NodeMoves
from bridgeopt.model.problem import Problem
from bridgeopt.solver.frame import Frame, size_frame

__all__ = ["forked_frame", "candidate_frame", "forked_start", "START_LEAN", "START_HEAD"]

#: Starting lean of a leg head from the mast, as a part of the pylon's reach. [-]
START_LEAN = 0.4
#: Starting height of a leg head, as a part of the mast height. [-]
START_HEAD = 0.77
#: A candidate member is kept when its volume exceeds this part of the total. [-]
KEEP = 1e-9

_SENSE = {"stay": "tension", "back stay": "tension", "head tie": "tension",
          "pylon leg": "compression"}


def _sides(problem: Problem, xp: float, reach: float, tol: float):
    """The sides (-1, +1) of a pylon at ``xp`` that have deck in the half model."""
    xs, xe, _ = deck_level(problem)
    return [side for side in (-1.0, 1.0) if xs - tol <= xp + side * 0.5 * reach <= xe + tol]


def candidate_frame(problem: Problem, *, pylons_x, reach: float, height: float,
                    lean: float, head: float) -> Frame:
    """Mast, legs, head ties, deck and every candidate stay (the LP chooses among them).

    Parameters
    ----------
    problem : Problem
        The form's half-span problem.
    pylons_x : sequence of float
        x of each pylon (its foot at the deck, on a support or a pier). [m]
    reach : float
        Deck length each pylon serves on each side. [m]
    height : float
        Mast height above the deck (the mast top holds the head ties). [m]
    lean : float
        Horizontal distance of each leg head from the mast. [m]
    head : float
        Height of the leg heads above the deck. [m]

    Returns
    -------
    Frame
        With back stays to a single span's anchor points (:func:`with_back_spans`).
    """
    b = FrameBuilder(problem)
    xs, xe, zd = deck_level(problem)
    s = problem.spacing
    for xp in pylons_x:
        base = b.node(xp, zd)
        b.foundation(xp, base)
        levels = [j * s for j in range(1, int(height / s + 1e-9) + 1) if j * s < height - b.tol]
        mast = [base] + [b.node(xp, zd + z) for z in levels] + [b.node(xp, zd + height)]
        b.chain(mast, "compression", "pylon")
        for side in _sides(problem, xp, reach, b.tol):
            leg = b.node(xp + side * lean, zd + head)
            b.member(base, leg, "compression", "pylon leg")
            b.member(leg, mast[-1], "tension", "head tie")
            for i in range(1, round(reach / s) + 1):
                x = xp + side * i * s
                if not xs - b.tol <= x <= xe + b.tol:
                    continue
                d = b.node(min(max(x, xs), xe), zd)
                for a in mast[1:] + [leg]:
                    if abs(b.nodes[a][0] - b.nodes[d][0]) > b.tol:
                        b.member(a, d, "tension", "stay")
    b.deck()
    return with_back_spans(*b.build())[0]


def forked_start(problem: Problem, *, pylons_x, reach: float, rise: float,
                 height: float | None = None) -> tuple[float, float, float]:
    """(mast height, lean, head height) of the lightest candidate frame on a coarse scan. [m]

    Each trial is one LP over the candidate frame (:func:`candidate_frame`): leg
    heads in the middle between two deck grid points (a leg head cannot pass a
    deck point it has a stay to), mast heights of 0.5, 0.65 and 0.8 of the reach
    (or ``height``) within ``rise``, leg heads at 0.6, 0.77 and 0.9 of the mast.

    Parameters
    ----------
    problem : Problem
        The form's half-span problem.
    pylons_x : sequence of float
        x of each pylon. [m]
    reach : float
        Deck length each pylon serves on each side. [m]
    rise : float
        Room above the deck. [m]
    height : float, optional
        A given mast height (only the legs are scanned). [m]

    Returns
    -------
    (float, float, float)
    """
    s = problem.spacing
    heights = [height] if height is not None else sorted({min(f * reach, rise)
                                                         for f in (0.5, 0.65, 0.8)})
    best = None
    for h in heights:
        for k in range(max(1, round(reach / s))):
            lean = (k + 0.5) * s
            for f in (0.6, START_HEAD, 0.9):
                try:
                    v = size_frame(candidate_frame(problem, pylons_x=pylons_x, reach=reach,
                                                   height=h, lean=lean, head=f * h)).volume
                except SolveError:
                    continue
                if best is None or v < best[0]:
                    best = (v, h, lean, f * h)
    if best is None:
        raise SolveError("infeasible", "no forked-pylon frame carries the loads")
    return best[1:]


def forked_frame(problem: Problem, *, pylons_x, reach: float, height: float,
                 anchor_bounds: tuple[float, float], lean: float | None = None,
                 head: float | None = None) -> tuple[Frame, NodeMoves]:
    """The forked-pylon form with the stays the LP chose, and its free geometry.

    Parameters
    ----------
    problem : Problem
        The form's half-span problem.
    pylons_x : sequence of float
        x of each pylon. [m]
    reach : float
        Deck length each pylon serves on each side. [m]
    height : float
        Starting mast height above the deck. [m]
    anchor_bounds : (float, float)
        Lowest and highest anchor (and leg head) height above the deck. [m]
    lean : float, optional
        Starting lean of the leg heads; default :data:`START_LEAN` of the reach,
        moved to the middle between two deck grid points. [m]
    head : float, optional
        Starting height of the leg heads; default :data:`START_HEAD` of ``height``. [m]

    Returns
    -------
    Frame, NodeMoves

    Raises
    ------
    SolveError
        The candidate frame cannot carry the loads.
    """
    s = problem.spacing
    if lean is None:
        lean = (np.floor(START_LEAN * reach / s) + 0.5) * s
    head = START_HEAD * height if head is None else head
    cand = candidate_frame(problem, pylons_x=pylons_x, reach=reach, height=height, lean=lean,
                           head=head)
    design = size_frame(cand)
    m, xz = design.members, design.nodes
    kept = m.volume > KEEP * design.volume
    b = FrameBuilder(problem)
    xs, xe, zd = deck_level(problem)
    for i in np.nonzero(kept)[0]:
        g = str(m.group[i])
        if g in _SENSE:
            b.member(b.node(*xz[m.start[i]]), b.node(*xz[m.end[i]]), _SENSE[g], g)
    columns, heads = [], []
    for xp in pylons_x:
        base = b.node(xp, zd)
        b.foundation(xp, base)
        top = b.node(xp, zd + height)
        on = [i for i, (x, z) in enumerate(b.nodes) if abs(x - xp) <= b.tol and z > zd + b.tol]
        column = sorted({base, top, *on}, key=lambda i: b.nodes[i][1])
        b.chain(column, "compression", "pylon")
        columns.append(column)
        for side in _sides(problem, xp, reach, b.tol):
            leg = b.node(xp + side * lean, zd + head)
            if any(leg in (a, c) for a, c, _, g in b.members if g == "pylon leg"):
                heads.append((xp, side, leg))
    b.deck()
    if not any(g == "stay" for *_, g in b.members):
        raise SolveError("infeasible", "the forked pylon's LP kept no stays")
    free_anchors(b, columns, [], pylons_x, zd, anchor_bounds, 0.0)
    low, high = anchor_bounds
    least = LEAST_GAP * s
    for xp, side, leg in heads:
        x, z = b.nodes[leg]
        out = side * (x - xp)
        b.parameter(f"leg lean on pylon at x = {xp:.6g} m, side {side:+.0f}", least - out,
                    reach - least - out, {(leg, 0): side})
        b.parameter(f"leg head height on pylon at x = {xp:.6g} m, side {side:+.0f}",
                    zd + low - z, zd + high - z, {(leg, 1): 1.0})
    frame, moves = b.build()
    return frame, moves
