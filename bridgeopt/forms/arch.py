"""Arch topology: arch rib, spandrel columns (deck arch) or hangers (through arch), deck.

Half span from the springing line x = x_s to the crown on the mid-span line
x = x_e.  A deck arch springs at the bottom of the design domain and carries
the deck on compression columns; a through arch springs at deck level and
carries it on tension hangers.  With the parabolic shape the rib node at
t = (x - x_s)/(x_e - x_s) lies at ``springing + rise (2t - t^2)``, so a free
rise is one parameter; with the free shape every rib node's height is its own
parameter.  The thrust goes to the springing support (abutment) or, for
repeating spans, is balanced by the next span's arch (mirror line).
"""

from __future__ import annotations

import numpy as np

from bridgeopt.forms.builder import FrameBuilder, deck_level
from bridgeopt.forms.suspension import parabola

__all__ = ["arch_frame"]


def arch_frame(problem, *, panels: int, variant: str, springing: float, rise: float,
               shape: str = "parabolic", profile=None,
               rise_bounds: tuple[float, float] | None = None,
               height_bounds: tuple[float, float] | None = None):
    """Frame (and free rise or rib heights, if any) of an arch form on ``problem``.

    Parameters
    ----------
    problem : Problem
        The form's half-span problem; its line load is the deck, and a support
        at the springing line holds the rib.
    panels : int
        Column or hanger panels across the half span. [-]
    variant : {"deck-arch", "through-arch"}
        Rib below the deck on compression columns, or above it on tension hangers.
    springing : float
        Height of the springing node (bottom of the domain for a deck arch, the
        deck for a through arch). [m]
    rise : float
        Springing to crown. [m]
    shape : {"parabolic", "funicular", "free"}
        With "free", each rib node's height is a parameter; otherwise the rise is.
    profile : (panels + 1,) array, optional
        Rib height above the springing over the rise, 0 at the springing and 1
        at the crown (default: the parabola 2t - t^2). [-]
    rise_bounds : (float, float), optional
        Parabolic shape: least and largest rise when the rise is free. [m]
    height_bounds : (float, float), optional
        Free shape: lowest and highest z of a rib node; the crown moves only
        when ``rise_bounds`` is also given. [m]

    Returns
    -------
    Frame, NodeMoves or None
    """
    b = FrameBuilder(problem)
    xs, xe, zd = deck_level(problem)
    x = xs + (xe - xs) * np.arange(panels + 1) / panels
    shape_t = parabola((x - xs) / (xe - xs)) if profile is None else np.asarray(profile)
    rib_z = springing + rise * shape_t
    base = b.node(xs, zd)
    rib = [b.node(xs, springing)]
    through = variant == "through-arch"
    if through or rib[0] != base:
        b.foundation(xs, base)
    for xi, zi in zip(x[1:], rib_z[1:]):
        node = b.node(xi, zi)
        rib.append(node)
        if through:
            b.member(b.node(xi, zd), node, "tension", "hanger")
        else:
            b.member(node, b.node(xi, zd), "compression", "column")
    b.chain(rib, "compression", "arch rib")
    b.deck()
    if shape != "free" and rise_bounds is not None:
        b.parameter("rise", rise_bounds[0] - rise, rise_bounds[1] - rise,
                    {(n, 1): s for n, s in zip(rib[1:], shape_t[1:])})
    elif shape == "free" and height_bounds is not None:
        last = len(rib) if rise_bounds is not None else len(rib) - 1
        for j in range(1, last):
            b.parameter(f"rib height {j}", height_bounds[0] - rib_z[j],
                        height_bounds[1] - rib_z[j], {(rib[j], 1): 1.0})
    return b.build()
