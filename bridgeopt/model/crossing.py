"""Full-span bridge models: traffic patterns, navigation channels, piers and anchorages.

:meth:`bridgeopt.model.bridge.BridgeScenario.to_problem` models half a span between
mirror lines, which is exact for a load symmetric about mid-span.  Traffic on
half the span is not symmetric, and a mirror line would impose its mirror
image on the other half; a navigation channel or a pier off the centre breaks
the symmetry too.  :func:`full_span_problem` therefore models the whole span,
x from 0 to ``span``, reported as one span (``copies = 1``):

* ``"single"``: abutment faces at x = 0 and x = span, held in both directions
  from the deck down to the bottom of the domain, and the back spans behind
  them with their anchor points at ground (deck) level, as in
  :meth:`~bridgeopt.model.bridge.BridgeScenario.to_problem`;
* ``"repeating"``: the pier lines at x = 0 and x = span are held horizontally
  and the pier foundations (at the foundation level, ``bridge.foundation_depth``
  below the deck) take the vertical reactions.  Holding a pier line horizontally assumes each
  neighbouring span carries the mirror image of this span's load (for half-span
  traffic: the adjacent half of the next span is loaded too); for the central
  span of a long run that is one of the patterns a designer would check.

``piers`` adds a foundation point (held in x and z) at the foundation level at
each given x (with a pier slot down to it when it lies below the envelope); ``anchorages`` adds a held point at each given (x, z).  Only
these points and the abutments or pier lines above carry reactions: the
engineer decides where foundations may go.  ``channels`` are excluded zones
(polygons): no node lies inside one and no member, curved centrelines
included, passes through one.
"""

from __future__ import annotations

import math

import numpy as np

from bridgeopt.model.bridge import BridgeScenario, crossing_outline
from bridgeopt.errors import InputError
from bridgeopt.model.plane import points_in_polygon
from bridgeopt.model.problem import Domain, LineLoad, Problem, Support

__all__ = ["full_span_problem", "deck_extent"]


def deck_extent(bridge: BridgeScenario) -> tuple[float, float]:
    """x-coordinates of the deck's ends in the full-span model. [m]

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing; only its span is used.

    Returns
    -------
    (float, float)
        x at the left and right deck ends, 0 and ``span``. [m]
    """
    return (0.0, float(bridge.span))


def _on_grid(field: str, value: float, step: float, lo: float, hi: float) -> float:
    if not (isinstance(value, (int, float)) and not isinstance(value, bool)
            and math.isfinite(value) and lo - 1e-9 * step <= value <= hi + 1e-9 * step):
        raise InputError(field, value, f"a number in [{lo:g}, {hi:g}] m")
    j = round((value - lo) / step)
    if abs(lo + j * step - value) > 1e-6 * step:
        raise InputError(field, value, f"a multiple of the grid step {step:.6g} m "
                         f"(span / divisions) from {lo:g} m")
    return lo + j * step


def _below_deck(i: int, outline, step: float):
    """A channel must lie below the deck: the deck is carried across it, never cut by it."""
    field = f"bridge.channel[{i}].outline"
    try:
        pts = [(float(x), float(z)) for x, z in outline]
    except (TypeError, ValueError):
        raise InputError(field, outline, "a list of points [x, z] in m") from None
    high = max(z for _, z in pts)
    if high > 1e-9 * step:
        raise InputError(field, [list(p) for p in pts], "a polygon below the deck: every point at z <= 0 m "
                         f"(the deck is at z = 0; this one reaches z = {high:g} m)")
    return tuple(pts)


def _clear_of_supports(channels, supports, step: float) -> None:
    """No support may lie inside a channel (it would have no grid node to stand on)."""
    for i, outline in enumerate(channels):
        xz = np.array([sup.at for sup in supports], dtype=float)
        inside = points_in_polygon(xz, outline, boundary=False, tol=1e-7 * step)
        if inside.any():
            x, z = xz[int(np.argmax(inside))]
            raise InputError(f"bridge.channel[{i}].outline", [list(p) for p in outline],
                             f"a channel clear of the supports (it covers the support at "
                             f"[{x:g}, {z:g}] m)")


def full_span_problem(bridge: BridgeScenario, *, piers=(), anchorages=(), channels=(),
                      deck_load: bool = True) -> Problem:
    """The whole span of ``bridge`` as a layout problem (no mirror line at mid-span).

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (span, rise, depth, divisions, deck load, materials, arrangement).
    piers : sequence of float
        x-coordinates of extra foundations at the foundation level. [m]
    anchorages : sequence of (x, z)
        Extra held points (grid nodes of the domain). [m]
    channels : sequence of polygons
        Clearance envelopes (navigation channels) no member may pass through. [m]
    deck_load : bool
        Put ``bridge.deck_load`` on the whole deck (the permanent load).

    Returns
    -------
    Problem
        Grid step span/divisions, ``copies = 1``.
    """
    s = bridge.spacing
    span = float(bridge.span)
    top, bottom = bridge.rise_cells * s, -bridge.depth_cells * s
    fz = bridge.foundation_level
    back = bridge.back_length
    channels = tuple(_below_deck(i, c, s) for i, c in enumerate(channels))
    if bridge.arrangement == "repeating":
        supports = [Support((0.0, fz), "z"), Support((span, fz), "z")]
        mirrors = (0.0, span)
        slots = [0.0, span - s]
    else:
        supports = [Support((x, -j * s), "xz") for x in (0.0, span)
                    for j in range(bridge.depth_cells + 1)]
        if back:
            supports += [Support((-back, 0.0), "xz"), Support((span + back, 0.0), "xz")]
        mirrors = ()
        slots = []
    for i, x in enumerate(piers):
        x = _on_grid(f"bridge.piers[{i}]", x, s, 0.0, span)
        supports.append(Support((x, fz), "xz"))
        slots.append(min(x, span - s))
    outline = crossing_outline(left=-back, right=span + back, deck_from=0.0, deck_to=span,
                               bottom=bottom, top=top, slots=slots, foundation=fz, step=s)
    domain = Domain(outline, tuple(channels))
    for i, pt in enumerate(anchorages):
        try:
            x, z = (float(v) for v in pt)
        except (TypeError, ValueError):
            raise InputError(f"bridge.anchorages[{i}]", pt, "a pair [x, z] in m") from None
        x = _on_grid(f"bridge.anchorages[{i}]", x, s, -back, span + back)
        z = _on_grid(f"bridge.anchorages[{i}]", z, s, bottom, top)
        supports.append(Support((x, z), "xz"))
    _clear_of_supports(channels, supports, s)
    loads = (LineLoad((0.0, 0.0), (span, 0.0), bridge.deck_load),) if deck_load else ()
    return Problem(domain=domain, spacing=s, material=bridge.material, supports=tuple(supports),
                   line_loads=loads, mirror_lines=mirrors,
                   compression_material=bridge.compression_material, copies=1.0,
                   name=bridge.name)
