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
"""

from __future__ import annotations

import numpy as np

from bridgeopt.errors import InputError
from bridgeopt.forms.builder import FrameBuilder, deck_level

__all__ = ["cable_stayed_frame", "anchor_fractions"]


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
                       height_bounds: tuple[float, float] | None = None):
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

    Returns
    -------
    Frame, NodeMoves or None
    """
    b = FrameBuilder(problem)
    xs, xe, zd = deck_level(problem)
    frac = anchor_fractions(pattern, stays, anchor_zone)
    for xp in pylons_x:
        base = b.node(xp, zd)
        b.foundation(xp, base)
        anchors = [b.node(xp, zd + f * height) for f in frac]
        column = sorted({base, *anchors}, key=lambda i: b.nodes[i][1])
        b.chain(column, "compression", "pylon")
        for side in (-1.0, 1.0):
            for i in range(1, stays + 1):
                x = xp + side * i * reach / stays
                if xs - b.tol <= x <= xe + b.tol:
                    b.member(anchors[i - 1], b.node(min(max(x, xs), xe), zd), "tension", "stay")
    b.deck()
    if height_bounds is not None:
        moves = {}
        for xp in pylons_x:
            for f in frac:
                moves[(b.node(xp, zd + f * height), 1)] = f
        b.parameter("pylon height", height_bounds[0] - height, height_bounds[1] - height, moves)
    return b.build()
