"""Suspension topology: main cable, hangers, tower, deck (half span).

The tower stands at the pier or abutment line x = x_s and carries the main
cable at height ``tower`` above the deck; the cable sags by ``sag`` to its
lowest point on the mid-span line x = x_e.  Hangers at ``panels`` equal
spacings join each deck node to the cable node above it.  With the parabolic
shape the cable node at t = (x - x_s)/(x_e - x_s) hangs at
``tower - sag (2t - t^2)`` (a parabola with its vertex at mid-span), so a free
sag is one parameter; with the free shape every cable node's height is its own
parameter, and with ``lean`` the hangers incline towards the tower, each cable
node's x free within ``lean`` panels of its deck point (the deck points stay on
the grid).  With ``legs`` the tower is V-shaped in elevation: an inclined leg
from its foot meets the cable a few panels into the span.  The tower top's
horizontal force is balanced by the next span
(mirror line, repeating spans) or by an anchorage behind the abutment.
"""

from __future__ import annotations

import numpy as np

from bridgeopt.forms.builder import FrameBuilder, deck_level
from bridgeopt.geometry.moves import MIN_REACH
from bridgeopt.solver.layout import scales

__all__ = ["suspension_frame", "parabola", "least_lean", "LEAN_START", "LEAN_GAP"]

#: Starting lean of an inclined hanger: its cable node's offset towards the tower from its
#: deck point, as a part of the panel (small, since the start is the vertical-hanger
#: funicular; not vertical, since a vertical element's formulas are singular in x). [-]
LEAN_START = 0.002
#: Least lean of an inclined hanger, and least distance of a cable node from the tower
#: line, as a part of the panel (no hanger turns vertical). [-]
LEAN_GAP = 0.001


def least_lean(problem, panel: float) -> float:
    """Least lean of an inclined hanger, and least x distance of a cable node from the tower. [m]

    :data:`LEAN_GAP` of the panel, or twice the least reach the node moves accept for an
    inclined member (:data:`~bridgeopt.geometry.moves.MIN_REACH` of the problem's length
    scale), if more.

    Parameters
    ----------
    problem : Problem
        The bridge problem (its length scale). [m]
    panel : float
        Hanger spacing along the deck. [m]

    Returns
    -------
    float
        [m]
    """
    return max(LEAN_GAP * panel, 2 * MIN_REACH * scales(problem)[0])


def parabola(t) -> np.ndarray:
    """2t - t^2: the shape of a half parabola from its end (t = 0) to its vertex (t = 1). [-]

    Parameters
    ----------
    t : array_like
        Position along the half span over its length, 0 at the end, 1 at the vertex. [-]

    Returns
    -------
    ndarray
        Rise (or drop) over the total rise (or sag), 0 at the end, 1 at the vertex. [-]
    """
    t = np.asarray(t, dtype=float)
    return 2.0 * t - t * t


def suspension_frame(problem, *, panels: int, tower: float, sag: float, shape: str = "parabolic",
                     profile=None, sag_bounds: tuple[float, float] | None = None,
                     tower_bounds: tuple[float, float] | None = None,
                     height_bounds: tuple[float, float] | None = None, lean: float = 0.0,
                     legs: int = 0):
    """Frame (and free sag or cable heights, if any) of a suspension form on ``problem``.

    Parameters
    ----------
    problem : Problem
        The form's half-span problem; its line load is the deck, and a support
        below the tower line holds the tower vertically.
    panels : int
        Hanger panels across the half span. [-]
    tower : float
        Height of the tower top above the deck. [m]
    sag : float
        Cable sag (tower top to mid-span cable node). [m]
    shape : {"parabolic", "funicular", "free"}
        With "free", each cable node's height is a parameter; otherwise the sag is.
    profile : (panels + 1,) array, optional
        Cable drop below the tower top over the sag, 0 at the tower and 1 at
        mid-span (default: the parabola 2t - t^2). [-]
    sag_bounds : (float, float), optional
        Parabolic shape: least and largest sag when the sag is free. [m]
    tower_bounds : (float, float), optional
        Least and largest tower height when it is free.  With a parabolic or
        funicular cable this parameter lifts the whole cable (the cable's
        clearance above the deck at mid-span, tower - sag); with a free shape
        it moves the tower top only. [m]
    height_bounds : (float, float), optional
        Free shape: least and largest height of a cable node above the deck; the
        mid-span node moves only when ``sag_bounds`` is also given. [m]
    lean : float
        Free shape: 0 keeps the hangers vertical; > 0 inclines them towards the
        tower, each cable node between the tower and the mirror line starting
        :data:`LEAN_START` of a panel towards the tower from its deck point (or
        twice the least reach the node moves accept, if more), its x free up to ``lean`` panels from it (the deck points stay on their grid;
        a move that would put a cable node past its neighbour, or past the tower
        line, is refused by the geometry optimization). [-]
    legs : int
        0: a vertical tower only; from 1 to ``panels - 1``: a V-shaped tower in
        elevation, an inclined compression leg from the tower foot to the cable
        node of the ``legs``-th hanger from the tower (its mirror image on the
        other side of a pier line), beside the vertical tower. [-]
    Returns
    -------
    Frame, NodeMoves or None
    """
    b = FrameBuilder(problem)
    xs, xe, zd = deck_level(problem)
    x = xs + (xe - xs) * np.arange(panels + 1) / panels
    shape_t = parabola((x - xs) / (xe - xs)) if profile is None else np.asarray(profile)
    cable_z = zd + tower - sag * shape_t
    base = b.node(xs, zd)
    b.foundation(xs, base)
    cable = [b.node(x[0], cable_z[0])]
    b.member(base, cable[0], "compression", "tower")
    lean = float(lean) if shape == "free" else 0.0
    if not (np.isfinite(lean) and lean >= 0):
        raise ValueError(f"lean must be a number of panels >= 0, not {lean!r}")
    panel = (xe - xs) / panels
    gap = least_lean(problem, panel)
    start = max(LEAN_START * panel, 2 * gap)
    for j, (xi, zi) in enumerate(zip(x[1:], cable_z[1:]), start=1):
        deck = b.node(xi, zd)
        if lean and j < panels:     # the mirror-line hanger stays vertical
            node = b.node(xi - start, zi)
            b.member(node, deck, "tension", "hanger")
            reach = min(lean * panel, xi - xs - gap)   # not past the tower line
            b.parameter(f"hanger lean {j}", start - reach, start - gap, {(node, 0): 1.0})
        else:
            node = b.node(xi, zi)
            b.member(deck, node, "tension", "hanger")
        cable.append(node)
    b.chain(cable, "tension", "cable")
    if not 0 <= legs < panels:
        raise ValueError(f"legs must be a whole number from 0 to {panels - 1}, not {legs!r}")
    if legs:
        b.member(base, cable[legs], "compression", "tower")
    b.deck()
    if shape != "free":
        if sag_bounds is not None:
            # with a free tower the sag parameter keeps the mid-span clearance and lifts the
            # tower top; with a fixed tower it lowers the cable
            lift = 1.0 if tower_bounds is not None else 0.0
            b.parameter("sag", sag_bounds[0] - sag, sag_bounds[1] - sag,
                        {(n, 1): lift - s for n, s in zip(cable, shape_t)})
        if tower_bounds is not None:
            b.parameter("cable clearance", tower_bounds[0] - tower, tower_bounds[1] - tower,
                        {(n, 1): 1.0 for n in cable})
    elif height_bounds is not None:
        if tower_bounds is not None:
            b.parameter("tower height", tower_bounds[0] - tower, tower_bounds[1] - tower,
                        {(cable[0], 1): 1.0})
        last = len(cable) if sag_bounds is not None else len(cable) - 1
        for j in range(1, last):
            h = cable_z[j] - zd
            b.parameter(f"cable height {j}", height_bounds[0] - h, height_bounds[1] - h,
                        {(cable[j], 1): 1.0})
    return b.build()
