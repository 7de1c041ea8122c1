"""Element models: LP coefficients and centrelines.

Three element kinds join two nodes P and Q:

* weightless bar (k = 0): straight, force constant;
* equal-strength curved element (k > 0, Lx > 0): a cable (tension) or arch
  (compression) whose area varies so that the stress is the design stress
  everywhere while it carries its own weight exactly;
* vertical uniform-strength bar (Lx = 0): force grows as exp(k h) along it.

Here k = rho*g/sigma [1/m].  All functions are vectorised and work in any
consistent length unit (the LP calls them with lengths divided by a reference
length and k multiplied by it).

For an element with horizontal force H (curved) or smaller end force F
(vertical), the forces the element applies to its end nodes are
``H * (pxf, pzf)`` on P and ``H * (qxf, qzf)`` on Q, and its volume is
``H * cost / sigma``.  The vertical components differ by the element's weight.

References
----------
.. [1] D. Gilbert (1826), "On the mathematical theory of suspension bridges",
   Phil. Trans. R. Soc. 116:202-218 (catenary of equal strength).
.. [2] H.E. Fairclough, M. Gilbert, A.V. Pichugin, A. Tyas, I. Firth (2018),
   "Theoretically optimal forms for very long-span bridges under gravity
   loading", Proc. R. Soc. A 474:20170726.
.. [3] S.P. Timoshenko, Strength of Materials, Part I (bar of uniform strength).
"""

from __future__ import annotations

import numpy as np

__all__ = ["PHI_LIMIT", "curved_coefficients", "vertical_coefficients",
           "element_coefficients", "bar_factors", "centreline", "centrelines", "sag", "sags",
           "SENSES"]

SENSES = ("tension", "compression")

#: Columns with k*Lx above this are not generated (the cost grows without bound
#: as k*Lx -> pi; a small margin keeps the LP well conditioned).
PHI_LIMIT = np.pi * (1.0 - 1e-6)


def curved_coefficients(lx, dz, k: float, sense: str):
    """LP coefficients of non-vertical elements.

    Parameters
    ----------
    lx : array_like
        Horizontal projection xQ - xP, > 0. [L]
    dz : array_like
        Rise zQ - zP. [L]
    k : float
        rho*g/sigma of the element's material, >= 0. [1/L]
    sense : {"tension", "compression"}
        A cable (tension) or an arch / strut (compression).

    Returns
    -------
    cost, pxf, pzf, qxf, qzf : ndarray
        ``cost`` is sigma*volume/H [L]; the others are the end-force factors.
        Entries with k*lx >= PHI_LIMIT are nan (no element can span them).
    """
    lx = np.asarray(lx, dtype=float)
    dz = np.asarray(dz, dtype=float)
    if k == 0.0:
        slope = dz / lx
        cost = (lx * lx + dz * dz) / lx
        low = high = slope
    else:
        phi = k * lx
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            s = np.where(phi < PHI_LIMIT, np.sin(phi), np.nan)
            half = 2.0 * np.sin(0.5 * phi) ** 2          # 1 - cos(phi), no cancellation
            low = (-half - np.expm1(-k * dz)) / s         # (cos phi - exp(-k dz)) / sin phi
            high = (np.expm1(k * dz) + half) / s          # (exp(k dz) - cos phi) / sin phi
            cost = 2.0 * (2.0 * np.sinh(0.5 * k * dz) ** 2 + half) / (k * s)
    one = np.ones_like(cost)
    if sense == "tension":      # P: H(1, tP), Q: H(-1, -tQ); tP = low, tQ = high
        return cost, one, low, -one, -high
    if sense == "compression":  # P: -H(1, aP), Q: H(1, aQ); aP = high, aQ = low
        return cost, -one, -high, one, low
    raise ValueError(f"sense must be 'tension' or 'compression', not {sense!r}")


def vertical_coefficients(h, k: float, sense: str):
    """LP coefficients of vertical elements from the lower node P to the upper node Q.

    Parameters
    ----------
    h : array_like
        Height zQ - zP, > 0. [L]
    k : float
        rho*g/sigma, >= 0. [1/L]
    sense : {"tension", "compression"}
        A cable (tension) or an arch / strut (compression).

    Returns
    -------
    cost, pzf, qzf : ndarray
        ``cost`` is sigma*volume/F [L] with F the smaller end force; ``pzf`` and
        ``qzf`` are the vertical end-force factors on P (lower) and Q (upper).
    """
    h = np.asarray(h, dtype=float)
    with np.errstate(over="ignore"):
        grow = np.exp(k * h)
        cost = h.copy() if k == 0.0 else np.expm1(k * h) / k
    if sense == "tension":      # hangs from Q: lower end force F, upper F e^{kh}
        return cost, np.ones_like(h), -grow
    if sense == "compression":  # stands on P: upper end force F, lower F e^{kh}
        return cost, -grow, np.ones_like(h)
    raise ValueError(f"sense must be 'tension' or 'compression', not {sense!r}")


def element_coefficients(lx, dz, k: float, sense: str, vertical) -> tuple[np.ndarray, np.ndarray]:
    """Cost (m,) and end-force factors (m, 4) of elements with reach ``lx`` and rise ``dz``.

    The one statement of an element's LP coefficients: curved elements (and
    straight bars, k = 0) by :func:`curved_coefficients`, ``vertical`` ones by the
    uniform-strength bar of :func:`vertical_coefficients` (their ``lx`` is
    ignored).

    Parameters
    ----------
    lx : (m,) array_like
        Horizontal projection xQ - xP (> 0 unless vertical). [L]
    dz : (m,) array_like
        Rise zQ - zP (> 0 for a vertical element). [L]
    k : float
        rho*g/sigma, >= 0. [1/L]
    sense : {"tension", "compression"}
        A cable (tension) or an arch / strut (compression).
    vertical : (m,) bool array
        Which elements are vertical.

    Returns
    -------
    cost : (m,) ndarray
        sigma*volume per unit H (or F); nan where no element can span. [L]
    vals : (m, 4) ndarray
        End-force factors (P x, P z, Q x, Q z); vertical elements have zero x
        factors. [-]
    """
    lx, dz = np.asarray(lx, dtype=float), np.asarray(dz, dtype=float)
    vertical = np.asarray(vertical, dtype=bool)
    cost = np.empty(len(lx))
    vals = np.zeros((len(lx), 4))
    curved = ~vertical
    if curved.any():
        c, pxf, pzf, qxf, qzf = curved_coefficients(lx[curved], dz[curved], k, sense)
        cost[curved] = c
        vals[curved] = np.column_stack([pxf, pzf, qxf, qzf])
    if vertical.any():
        c, pzf, qzf = vertical_coefficients(dz[vertical], k, sense)
        cost[vertical] = c
        vals[vertical, 1] = pzf
        vals[vertical, 3] = qzf
    return cost, vals


def bar_factors(unit: np.ndarray) -> np.ndarray:
    """End-force factors (P x, P z, Q x, Q z) of straight bars of axial force q, (m, 4).

    A bar from P to Q with tension q pulls P by q n and Q by -q n (n the unit
    vector from P to Q).

    Parameters
    ----------
    unit : (m, 2) float array
        Unit vectors from P to Q. [-]

    Returns
    -------
    (m, 4) float array
        Force on P and on Q per unit tension q: (nx, nz, -nx, -nz). [-]
    """
    unit = np.asarray(unit, dtype=float)
    return np.column_stack([unit[:, 0], unit[:, 1], -unit[:, 0], -unit[:, 1]])


def _end_slopes(lx, dz, k: float, sense: str) -> np.ndarray:
    """tan of the centreline's slope at P, for elements of projections ``lx`` > 0 and rises ``dz``."""
    _, _, pzf, _, _ = curved_coefficients(lx, dz, k, sense)
    # P's force factor is (1, tP) for a cable and -(1, aP) for an arch: slope = pzf/pxf
    return pzf if sense == "tension" else -pzf


def _rise_along(theta: float, x, kappa: float):
    """z(x) - zP of a curve whose slope angle turns from theta at rate kappa.

    z = ln(cos theta / cos(theta + kappa x)) / kappa, written with log1p and
    sin^2(t/2) so that it stays accurate for small kappa x.
    """
    t = kappa * np.asarray(x, dtype=float)
    return -np.log1p(-2.0 * np.sin(0.5 * t) ** 2 - np.tan(theta) * np.sin(t)) / kappa


def _ends(p, q, k: float):
    """(m, 2) end arrays, projections, rises and which elements are curved (k > 0, lx > 0)."""
    p = np.atleast_2d(np.asarray(p, dtype=float))
    q = np.atleast_2d(np.asarray(q, dtype=float))
    lx, dz = q[:, 0] - p[:, 0], q[:, 1] - p[:, 1]
    return p, q, lx, dz, (lx > 0.0) if k != 0.0 else np.zeros(len(p), dtype=bool)


def centrelines(p, q, k: float, sense: str, n: int = 33) -> list[np.ndarray]:
    """Points along the centrelines of elements of one material and sense, in one pass.

    The same points as :func:`centreline` for each element (which calls this).

    Parameters
    ----------
    p, q : (m, 2) float arrays
        End points, each P left of its Q. [L]
    k : float
        rho*g/sigma, >= 0. [1/L]
    sense : {"tension", "compression"}
        Cables (tension) or arches / struts (compression).
    n : int
        Number of points on a curved centreline. [-]

    Returns
    -------
    list of m float arrays
        (n, 2) points from P to Q for each curved element, (2, 2) for a straight or
        vertical one. [L]
    """
    p, q, lx, dz, curved = _ends(p, q, k)
    out = [np.vstack([p[i], q[i]]) for i in range(len(p))]
    c = np.flatnonzero(curved)
    if len(c):
        theta = np.arctan(_end_slopes(lx[c], dz[c], k, sense))
        x = np.linspace(0.0, lx[c], n, axis=1)
        z = p[c, 1, None] + _rise_along(theta[:, None], x, k if sense == "tension" else -k)
        z[:, -1] = q[c, 1]
        pts = np.stack([p[c, 0, None] + x, z], axis=2)
        for j, i in enumerate(c):
            out[i] = pts[j]
    return out


def sags(p, q, k: float, sense: str) -> np.ndarray:
    """Largest vertical distance between each centreline and its chord, in one pass. [L]

    The same values as :func:`sag` for each element (which calls this).

    Parameters
    ----------
    p, q : (m, 2) float arrays
        End points, each P left of its Q. [L]
    k : float
        rho*g/sigma, >= 0. [1/L]
    sense : {"tension", "compression"}
        Cables (sag below their chords) or arches (rise above them).

    Returns
    -------
    (m,) float array
        The sags, >= 0; zero for straight and vertical elements. [L]
    """
    p, q, lx, dz, curved = _ends(p, q, k)
    out = np.zeros(len(p))
    c = np.flatnonzero(curved)
    if len(c):
        lx, dz = lx[c], dz[c]
        theta = np.arctan(_end_slopes(lx, dz, k, sense))
        chord = np.arctan(dz / lx)
        x = (chord - theta) / k if sense == "tension" else (theta - chord) / k
        z = _rise_along(theta, x, k if sense == "tension" else -k)
        out[c] = np.abs(z - dz * x / lx)
    return out


def centreline(p, q, k: float, sense: str, n: int = 33) -> np.ndarray:
    """Points along an element's centreline, shape (n, 2) (2 points if straight).

    Cable: z(x) = zP + ln(cos tP / cos(tP + k x)) / k; arch: the mirror image
    with the curvature reversed (tP here the end angle at P).

    Parameters
    ----------
    p, q : (2,) float arrays
        End points, P left of Q. [L]
    k : float
        rho*g/sigma, >= 0. [1/L]
    sense : {"tension", "compression"}
        A cable (tension) or an arch / strut (compression).
    n : int
        Number of points on a curved centreline. [-]

    Returns
    -------
    (n, 2) float array
        Points from P to Q, or (2, 2) for a straight or vertical element. [L]
    """
    return centrelines(p, q, k, sense, n)[0]


def sag(p, q, k: float, sense: str) -> float:
    """Largest vertical distance between the centreline and its chord. [L]

    Zero for straight and vertical elements.  At the point of largest sag the
    centreline's slope equals the chord's.

    Parameters
    ----------
    p, q : (2,) float arrays
        End points, P left of Q, as :func:`centreline`. [L]
    k : float
        rho*g/sigma, >= 0. [1/L]
    sense : {"tension", "compression"}
        A cable (sags below its chord) or an arch (rises above it).

    Returns
    -------
    float
        The sag, >= 0. [L]
    """
    return float(sags(p, q, k, sense)[0])
