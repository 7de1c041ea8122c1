"""Cable-stayed topology: vertical pylons, straight stays to the deck, deck.

Each pylon stands at ``x_p`` on a pier (or an abutment) and carries ``stays``
stays on each side, anchored on the deck at ``x_p +- i a / stays``
(i = 1 ... stays), ``a`` being the deck length a pylon serves on one side.  On
the pylon the stays anchor

* fan: all at the top, height h;
* semi-fan: evenly over the top ``anchor_zone`` of the pylon, the farthest stay
  highest: ``h (1 - zone + zone (i - 1)/(stays - 1))``;
* harp: evenly up the pylon, ``h i / stays``, so every stay has the slope h/a.

Every anchor height is proportional to the pylon height h, so a free height is
one parameter moving every anchor by (anchor height / h) per metre.

With free anchors (``anchor_bounds``) the pattern is only the start: each
anchor is its own node on the pylon (a fan's anchors start spread over the top
:data:`FAN_SPREAD` of the pylon so that each can move), and the free parameters
are the gaps between consecutive anchors up the pylon (gap j lifts the j-th
lowest anchor and every anchor above it) and the lifts of the anchors below each
gap (closing the gap above anchor j lifts it and those below it, so that an
anchor can rise while the top is held by the envelope); a gap never closes below
:data:`LEAST_GAP` of a grid step, so the anchors keep their order and the pylon
stays one column, plus, with
``deck_slide`` > 0, each stay's point on the deck, which slides along it by at
most ``deck_slide`` grid steps (the deck load is shared between the moved nodes).  By default the deck points stay on the
grid (:data:`DECK_SLIDE` = 0), where the reference is loaded too: a slid point
lengthens a deck panel beyond a grid step, and the deck is not sized for bending
over it, which would favour the form.
"""

from __future__ import annotations

import numpy as np

from bridgeopt.errors import InputError
from bridgeopt.forms.builder import FrameBuilder, deck_level

__all__ = ["cable_stayed_frame", "anchor_fractions", "free_anchors", "FAN_SPREAD", "LEAST_GAP",
           "DECK_SLIDE"]

#: Free anchors of a fan start spread over this top part of the pylon height. [-]
FAN_SPREAD = 0.02
#: Least gap between neighbouring free anchors, as a part of the grid step. [-]
LEAST_GAP = 0.01
#: Largest slide of a stay's deck point from where the pattern puts it, in grid steps:
#: 0 by default, so that the stays hold the deck at the reference's grid points and no
#: deck panel is longer than a grid step (a longer unsized panel would favour the form). [-]
DECK_SLIDE = 0.0


def anchor_fractions(pattern: str, stays: int, anchor_zone: float = 0.25) -> np.ndarray:
    """Anchor heights on the pylon over the pylon height, stay 1 (nearest) to ``stays``. [-]

    Parameters
    ----------
    pattern : {"fan", "semi-fan", "harp"}
        Stay arrangement (module docstring).
    stays : int
        Stays on one side of the pylon. [-]
    anchor_zone : float
        Semi-fan only: part of the pylon height, from the top, holding the anchors. [-]

    Returns
    -------
    ndarray, shape (stays,)
        Anchor height over pylon height, in (0, 1]. [-]
    """
    i = np.arange(1, stays + 1, dtype=float)
    if pattern == "fan":
        return np.ones(stays)
    if pattern == "harp":
        return i / stays
    if pattern == "semi-fan":
        if stays == 1:
            return np.ones(1)
        return 1.0 - anchor_zone + anchor_zone * (i - 1) / (stays - 1)
    raise InputError("form.pattern", pattern, "one of 'fan', 'semi-fan', 'harp'")


def cable_stayed_frame(problem, *, pylons_x, reach: float, pattern: str, stays: int,
                       height: float, anchor_zone: float = 0.25,
                       height_bounds: tuple[float, float] | None = None,
                       anchor_bounds: tuple[float, float] | None = None,
                       deck_slide: float = DECK_SLIDE):
    """Frame (and free height, if any) of a cable-stayed form on ``problem``.

    Parameters
    ----------
    problem : Problem
        Its line load is the deck; every pylon position needs a support that
        holds it vertically at or below the deck.
    pylons_x : sequence of float
        Pylon positions. [m]
    reach : float
        Deck length served by a pylon on each side, ``a``. [m]
    pattern : {"fan", "semi-fan", "harp"}
        Stay arrangement: all at the top, over the top ``anchor_zone``, or evenly
        up the pylon.
    stays : int
        Stays per side of each pylon. [-]
    height : float
        Pylon height above the deck (top anchor). [m]
    anchor_zone : float
        Semi-fan anchorage zone over the pylon height. [-]
    height_bounds : (float, float), optional
        Smallest and largest pylon height when the height is free. [m]
    anchor_bounds : (float, float), optional
        Lowest and highest anchor height above the deck when every anchor is
        free (module docstring); None keeps the pattern. [m]
    deck_slide : float
        Free anchors only: largest slide of a stay's deck point, in grid steps. [-]

    Returns
    -------
    Frame, NodeMoves or None
    """
    b = FrameBuilder(problem)
    xs, xe, zd = deck_level(problem)
    frac = anchor_fractions(pattern, stays, anchor_zone)
    free = anchor_bounds is not None
    if free and pattern == "fan" and stays > 1:
        frac = anchor_fractions("semi-fan", stays, FAN_SPREAD)
    columns, deck_points = [], []
    for xp in pylons_x:
        base = b.node(xp, zd)
        b.foundation(xp, base)
        anchors = [b.node(xp, zd + f * height) for f in frac]
        column = sorted({base, *anchors}, key=lambda i: b.nodes[i][1])
        columns.append(column)
        b.chain(column, "compression", "pylon")
        for side in (-1.0, 1.0):
            for i in range(1, stays + 1):
                x = xp + side * i * reach / stays
                if xs - b.tol <= x <= xe + b.tol:
                    d = b.node(min(max(x, xs), xe), zd)
                    b.member(anchors[i - 1], d, "tension", "stay")
                    deck_points.append(d)
    b.deck()
    if height_bounds is not None:
        moves = {}
        for xp in pylons_x:
            for f in frac:
                moves[(b.node(xp, zd + f * height), 1)] = f
        b.parameter("pylon height", height_bounds[0] - height, height_bounds[1] - height, moves)
    if free:
        free_anchors(b, columns, deck_points, pylons_x, zd, anchor_bounds, deck_slide)
    return b.build()


def free_anchors(b: FrameBuilder, columns, deck_points, pylons_x, zd: float,
                 anchor_bounds, deck_slide: float) -> None:
    """Top and gap parameters on each pylon, and a slide parameter per stay's deck point.

    Parameters
    ----------
    b : FrameBuilder
        The form's builder (parameters are added to it).
    columns : list of list of int
        Each pylon's nodes from its foot (at the deck) up. [-]
    deck_points : sequence of int
        Stays' deck nodes that may slide (none when ``deck_slide`` is 0). [-]
    pylons_x : sequence of float
        x of each pylon. [m]
    zd : float
        Deck height. [m]
    anchor_bounds : (float, float)
        Lowest and highest anchor height above the deck. [m]
    deck_slide : float
        Largest slide of a deck point, in grid steps. [-]
    """
    gap = LEAST_GAP * b.problem.spacing
    low, high = anchor_bounds
    for k, column in enumerate(columns):
        z = [b.nodes[i][1] - zd for i in column]      # column[0]: the pylon's foot, at the deck
        top = z[-1]
        for j in range(1, len(column)):
            # gap j (between the j-th lowest anchor and the node below it) lifts that anchor
            # and every one above it: the lowest stays at or above ``low``, the others
            # ``gap`` above the one below; the top's bound is the envelope's room above it
            least = low if j == 1 else gap
            b.parameter(f"anchor gap {j} on pylon {k + 1}", least - (z[j] - z[j - 1]),
                        high - top, {(i, 1): 1.0 for i in column[j:]})
        for j in range(1, len(column) - 1):
            # closing the gap above anchor j lifts it and those below it and keeps the ones
            # above: with the top against the envelope, an anchor can still rise
            b.parameter(f"anchor lift {j} on pylon {k + 1}", 0.0,
                        (z[j + 1] - z[j]) - gap, {(i, 1): 1.0 for i in column[1:j + 1]})
    pylon_x = np.asarray(pylons_x, dtype=float)
    xs, xe, _ = deck_level(b.problem)
    reach = deck_slide * b.problem.spacing
    for d in dict.fromkeys(deck_points) if reach > 0 else ():
        x = b.nodes[d][0]
        if min(abs(x - xs), abs(x - xe), np.abs(pylon_x - x).min()) <= b.tol:
            continue
        b.parameter(f"deck point of stay at x = {x:.6g} m", -reach, reach, {(d, 0): 1.0})
