"""Plane geometry shared by the rooms: points in polygons, crossing segments, areas.

Everything is vectorised over numpy arrays of points ``(..., 2)`` in the (x, z) plane. [m]
"""

from __future__ import annotations

import numpy as np

__all__ = ["points_in_polygon", "segments_cross", "polygon_area", "crossing_edges"]


def points_in_polygon(pts: np.ndarray, poly, *, boundary: bool, tol: float) -> np.ndarray:
    """Which points lie inside a polygon (even-odd rule).

    Parameters
    ----------
    pts : ndarray, shape (n, 2)
        Points (x, z). [m]
    poly : sequence of (x, z)
        Polygon vertices in order. [m]
    boundary : bool
        Whether points within ``tol`` of an edge count as inside.
    tol : float
        Distance within which a point lies on an edge. [m]

    Returns
    -------
    ndarray of bool, shape (n,)
    """
    poly = np.asarray(poly, dtype=float)
    x, z = pts[:, 0], pts[:, 1]
    inside = np.zeros(len(pts), dtype=bool)
    on_edge = np.zeros(len(pts), dtype=bool)
    for (xa, za), (xb, zb) in zip(poly, np.roll(poly, -1, axis=0)):
        crosses = (za > z) != (zb > z)
        with np.errstate(divide="ignore", invalid="ignore"):
            xc = xa + (z - za) * (xb - xa) / (zb - za)
        inside ^= crosses & (x < xc)
        ex, ez = xb - xa, zb - za
        t = np.clip(((x - xa) * ex + (z - za) * ez) / (ex * ex + ez * ez), 0.0, 1.0)
        on_edge |= np.hypot(x - xa - t * ex, z - za - t * ez) <= tol
    return (inside | on_edge) if boundary else (inside & ~on_edge)


def _orient(u, v, w):
    return ((v[..., 0] - u[..., 0]) * (w[..., 1] - u[..., 1])
            - (v[..., 1] - u[..., 1]) * (w[..., 0] - u[..., 0]))


def _within_box(a, b, c):
    """Point ``c`` inside the bounding box of segment a-b (for collinear points)."""
    return ((np.minimum(a[..., 0], b[..., 0]) <= c[..., 0])
            & (c[..., 0] <= np.maximum(a[..., 0], b[..., 0]))
            & (np.minimum(a[..., 1], b[..., 1]) <= c[..., 1])
            & (c[..., 1] <= np.maximum(a[..., 1], b[..., 1])))


def segments_cross(p, q, a, b, *, eps: float = 0.0, touching: bool = False) -> np.ndarray:
    """Whether segments p-q cross segment a-b (arrays broadcast against each other).

    Parameters
    ----------
    p, q, a, b : array_like, shape (..., 2)
        End points. [m]
    eps : float
        Area tolerance of the orientation tests. [m2]
    touching : bool
        Count touching (an end point on the other segment, collinear overlap) as
        crossing; otherwise only a proper crossing counts.

    Returns
    -------
    ndarray of bool
    """
    p, q, a, b = (np.asarray(v, dtype=float) for v in (p, q, a, b))
    d1, d2 = _orient(a, b, p), _orient(a, b, q)
    d3, d4 = _orient(p, q, a), _orient(p, q, b)
    proper = ((((d1 > eps) & (d2 < -eps)) | ((d1 < -eps) & (d2 > eps)))
              & (((d3 > eps) & (d4 < -eps)) | ((d3 < -eps) & (d4 > eps))))
    if not touching:
        return proper
    touch = ((np.abs(d1) <= eps) & _within_box(a, b, p)) | ((np.abs(d2) <= eps) & _within_box(a, b, q)) \
        | ((np.abs(d3) <= eps) & _within_box(p, q, a)) | ((np.abs(d4) <= eps) & _within_box(p, q, b))
    return proper | touch


def polygon_area(pts) -> float:
    """Signed area of a polygon (positive anticlockwise), shoelace formula. [m2]

    Parameters
    ----------
    pts : sequence of (x, z)
        Vertices in order. [m]

    Returns
    -------
    float
        Signed area; negative for a clockwise polygon. [m2]
    """
    v = np.asarray(pts, dtype=float)
    w = np.roll(v, -1, axis=0)
    return float(0.5 * np.sum(v[:, 0] * w[:, 1] - w[:, 0] * v[:, 1]))


def crossing_edges(pts) -> tuple[int, int] | None:
    """The first pair of non-neighbouring edges of a polygon that cross or touch, or None.

    Parameters
    ----------
    pts : sequence of (x, z)
        Vertices in order (edge ``i`` runs from vertex ``i`` to ``i + 1``). [m]

    Returns
    -------
    (int, int) or None
        Indices of the two edges, or None for a simple polygon.
    """
    v = np.asarray(pts, dtype=float)
    n = len(v)
    w = np.roll(v, -1, axis=0)
    for i in range(n):
        j = np.arange(i + 2, n)
        if i == 0:
            j = j[j != n - 1]  # neighbours through the closing vertex
        if len(j):
            hit = segments_cross(v[i], w[i], v[j], w[j], touching=True)
            if hit.any():
                return i, int(j[np.argmax(hit)])
    return None
