"""Clearance envelopes: curved members must stay out of excluded zones too.

:mod:`bridgeopt.solver.ground` drops candidate members whose *chord* crosses an
excluded zone (a navigation channel, say).  An equal-strength cable sags below
its chord and an arch rises above it (:func:`bridgeopt.solver.elements.sag`), so a
member whose chord passes just above a channel can still dip into it.  The
check here follows the curved centrelines: after a solve, the active curved
members whose centreline enters a zone are forbidden (``LPData.allowed``) and
the LP is solved again, until no active member enters a zone
(:func:`bridgeopt.solver.layout.optimize_layout` does this).  Forbidding a column
never makes the optimum lighter, and the columns left are exactly those whose
centrelines were never found in a zone, so the result is the optimum over the
members that respect the envelope among those ever tested.

A centreline is tested as a polyline of :data:`SAMPLES` points: a point
strictly inside a zone, or a polyline segment crossing a zone edge, counts as
entering it.  Touching a zone's edge does not.
"""

from __future__ import annotations

import numpy as np

from bridgeopt.solver.elements import centreline, sag
from bridgeopt.model.plane import points_in_polygon, segments_cross

__all__ = ["SAMPLES", "enters_zones", "curves_entering_zones"]

#: Points along a centreline for the clearance test.
SAMPLES = 129


def enters_zones(curve: np.ndarray, zones, *, tol: float) -> bool:
    """True when the polyline ``curve`` (k, 2) enters one of the polygons ``zones``. [m]

    ``tol`` is a length tolerance: points within it of a zone's edge are on the
    edge (not inside). [m]

    Parameters
    ----------
    curve : (k, 2) float array
        Points of the polyline. [m]
    zones : sequence of (p, 2) arrays
        Polygons of the excluded zones. [m]
    tol : float
        Length tolerance. [m]

    Returns
    -------
    bool
        Whether a point is strictly inside, or a segment crosses an edge of, a zone.
    """
    curve = np.asarray(curve, dtype=float)
    p, q = curve[:-1], curve[1:]
    for zone in zones:
        zone = np.asarray(zone, dtype=float)
        if points_in_polygon(curve, zone, boundary=False, tol=tol).any():
            return True
        mids = 0.5 * (p + q)
        if points_in_polygon(mids, zone, boundary=False, tol=tol).any():
            return True
        for ea, eb in zip(zone, np.roll(zone, -1, axis=0)):
            if segments_cross(p, q, ea, eb, eps=tol * tol).any():
                return True
    return False


def curves_entering_zones(problem, start: np.ndarray, end: np.ndarray, senses) -> np.ndarray:
    """Which members (start, end points (m, 2), senses) have a centreline in an excluded zone.

    Straight members (weightless or vertical) are skipped: their chords were
    already checked when the candidates were generated.  Only members whose
    chord's bounding box, widened by their sag, meets a zone's bounding box are
    traced.

    Parameters
    ----------
    problem : Problem
        Materials (for k = rho g / sigma) and the domain's excluded zones.
    start, end : (m, 2) float arrays
        Member end points. [m]
    senses : (m,) str array
        ``"tension"`` or ``"compression"`` per member.

    Returns
    -------
    (m,) bool array
        True for a member whose centreline enters a zone.
    """
    zones = problem.domain.excluded
    out = np.zeros(len(start), dtype=bool)
    if not zones:
        return out
    x0, x1, z0, z1 = problem.domain.bounds
    tol = 1e-7 * max(x1 - x0, z1 - z0)
    boxes = [(min(x for x, _ in z), max(x for x, _ in z), min(y for _, y in z),
              max(y for _, y in z)) for z in zones]
    for i in range(len(start)):
        sense = str(senses[i])
        k = problem.k(sense)
        p, q = np.asarray(start[i], float), np.asarray(end[i], float)
        if k == 0.0 or abs(q[0] - p[0]) <= tol:
            continue
        s = sag(p, q, k, sense)
        lo_x, hi_x = min(p[0], q[0]), max(p[0], q[0])
        lo_z, hi_z = min(p[1], q[1]) - s, max(p[1], q[1]) + s
        if not any(lo_x < bx1 and hi_x > bx0 and lo_z < bz1 and hi_z > bz0
                   for bx0, bx1, bz0, bz1 in boxes):
            continue
        out[i] = enters_zones(centreline(p, q, k, sense, SAMPLES), zones, tol=tol)
    return out
