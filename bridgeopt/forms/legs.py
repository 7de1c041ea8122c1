"""Pylons without foundations: intermediate pylon tops carried by inclined legs from the piers.

The second meaning of a pylon count (issue 11): ``n`` pylons per span, one at
each pier on the pier's own foundation and ``n - 1`` inside the span with no
foundation of their own.  The tops of the intermediate pylons are joined to
the deck at the piers by straight compression legs, a polygon of struts above
the deck (an A-frame for two pylons per span, a strut arch with its apexes on
a parabola for more), so the structure itself carries them to the piers; a
single span's pier pylons are held by back stays to the back span's anchor
points (:mod:`bridgeopt.forms.backspan`).  Every pylon top (the pier pylon's
and the apexes of the legs) anchors a fan of stays to the deck on both sides;
a vertical member joins each apex (and the legs' crossing of mid-span) to the deck
below it.  The legs, stays,
pylons and deck are all members of the form, sized by the LP with their
self-weight, and the two heights (pier pylon, apexes) are free, optimized by
:func:`~bridgeopt.geometry.optimize.optimize_geometry` within the rise; the
result is never heavier than its starting geometry.  The crossing is the
plain span (no pier added): its reference is the plain reference optimum.

Not registered by default (with one pylon per span it is the plain fan, so the
span and height studies would show it twice): :func:`register_legs` adds it to
the study's form registry as :data:`NAME`, as the pylon study does.
"""

from __future__ import annotations

import logging
from typing import Any, Mapping


from bridgeopt.errors import InputError, SolveError
from bridgeopt.forms.backspan import with_back_spans
from bridgeopt.forms.builder import FrameBuilder, available_heights, deck_level
from bridgeopt.forms.registry import register_form
from bridgeopt.geometry.optimize import optimize_geometry
from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.solver.design import Design
from bridgeopt.solver.frame import size_frame

__all__ = ["NAME", "legs_frame", "solve_legs", "register_legs"]

log = logging.getLogger(__name__)

#: Study name of the form.
NAME = "cable-stayed fan, pylons on legs"

#: Starting pylon height over the deck length a pylon serves on each side (common
#: practice, from memory: span / pylon height about 4 to 5, with that span twice the reach). [-]
START_HEIGHT = 0.4


def legs_frame(bridge: BridgeScenario, pylons: int):
    """Frame and free heights of the form with ``pylons`` pylons per span.

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (its plain half-span problem is the form's).
    pylons : int
        Pylons per span, 1 to 4: one at the pier, the others on legs (1: the
        pier pylon's fan alone, no legs). [-]

    Returns
    -------
    Frame, NodeMoves
    """
    if not isinstance(pylons, int) or isinstance(pylons, bool) or not 1 <= pylons <= 4:
        raise InputError("form.pylons", pylons, "1 to 4 for pylons on legs (one at each pier, "
                         "the others carried by legs)")
    problem = bridge.to_problem()
    rise, _ = available_heights(problem)
    xs, xe, zd = deck_level(problem)
    reach = 0.5 * bridge.span / pylons
    h = min(START_HEIGHT * 2 * reach, rise)
    if rise < bridge.spacing * 0.999 or h <= 0:
        raise InputError("bridge.rise", bridge.rise, "> one grid step for pylons on legs")
    stays = max(1, round(reach / bridge.spacing))
    xp = [j * 2 * reach for j in range(pylons) if j * 2 * reach <= xe + 1e-9 * bridge.span]
    b = FrameBuilder(problem)
    tops = []
    def shape(x):   # the legs' apexes on a parabola through the pier's deck node
        t = (x - xs) / (xe - xs)
        return 1.0 if x == xs else 1.0 - (1.0 - t) ** 2

    for j, x in enumerate(xp):
        base = b.node(x, zd)
        if j == 0:
            b.foundation(x, base)
        top = b.node(x, zd + h * shape(x))
        b.member(base, top, "compression" if j == 0 else "either", "pylon")
        tops.append(top)
        for side in (-1.0, 1.0):
            for i in range(1, stays + 1):
                xd = x + side * i * reach / stays
                if xs - b.tol <= xd <= xe + b.tol:
                    b.member(top, b.node(min(max(xd, xs), xe), zd), "tension", "stay")
    # the legs: from the deck at the pier through the apexes to the mirror line
    chain = [b.node(xs, zd)] + tops[1:]
    if pylons > 1 and abs(xp[-1] - xe) > b.tol:   # the legs cross mid-span: a post there
        chain.append(b.node(xe, zd + h))
        b.member(b.node(xe, zd), chain[-1], "either", "leg")
    b.chain(chain, "compression", "leg")
    b.deck()
    b.parameter("pier pylon height", b.tol - h, rise - h, {(tops[0], 1): 1.0})
    if pylons > 1:
        apexes = {(i, 1): shape(b.nodes[i][0]) for i in chain[1:]}
        b.parameter("leg apex height", b.tol - h, rise - h, apexes)
    return with_back_spans(*b.build())


def solve_legs(bridge: BridgeScenario, options: Mapping[str, Any]) -> Design:
    """The form sized and its heights optimized (a form solver of the registry).

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing.
    options : mapping
        ``pylons``: pylons per span, 1 to 4 (default 2). [-]

    Returns
    -------
    Design
        Groups ``"stay"``, ``"pylon"``, ``"leg"``, ``"deck"`` (and ``"pier"``).
    """
    frame, moves = legs_frame(bridge, options.get("pylons", 2))
    start = size_frame(frame)
    try:
        design = optimize_geometry(frame, moves=moves)
    except SolveError as err:
        log.warning("geometry optimization of pylons on legs stopped: %s", err)
        return start
    return design if design.volume < start.volume else start


def register_legs() -> str:
    """Add the form to the study's form registry.

    Returns
    -------
    str
        Its name in the study, :data:`NAME`.
    """
    register_form(NAME, solve_legs)
    return NAME
