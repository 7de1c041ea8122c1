"""Equal-strength (uniform-stress) cable and arch between two nodes.

Source: D. Gilbert (1826), "On the mathematical theory of suspension bridges",
Phil. Trans. R. Soc. 116:202-218 (the catenary of equal strength; its
differential equation is re-derived below and integrated numerically, so no
closed form from the paper is assumed).

Cable: the area A(x) varies so that the stress is sigma everywhere, T = sigma A.
The horizontal component H of the force is constant (no horizontal load), and
the vertical component V = H z' changes by the weight of the cable, rho g A per
unit arc length:
    d(H z')/dx = rho g A ds/dx = k T sec(theta) = k H sec^2(theta) = k H (1 + z'^2),
with k = rho g / sigma and T = H sec(theta), so z'' = k (1 + z'^2).  For an arch
(compression, the weight pushes the curve the other way) z'' = -k (1 + z'^2).
Volume: int A ds = int (T/sigma) sec(theta) dx = (H/sigma) int (1 + z'^2) dx.

The tests solve these equations with scipy.integrate.solve_ivp (DOP853,
rtol 1e-12, atol 1e-14) and a shooting method (scipy.optimize.brentq) for the
start slope, and compare with bridgeopt.solver.elements.
"""

from __future__ import annotations

import functools

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from bridgeopt.solver.elements import centreline, curved_coefficients, sag

SIGN = {"tension": 1.0, "compression": -1.0}


@functools.lru_cache(maxsize=None)
def _shoot(lx: float, dz: float, k: float, sense: str):
    """Solution of z'' = +-k (1 + z'^2), z(0) = 0, z(lx) = dz, as a solve_ivp result.

    State (z, z', c) with c' = 1 + z'^2 (so c(lx) = sigma V / H).
    """
    sgn = SIGN[sense]

    def rhs(x, y):
        return [y[1], sgn * k * (1.0 + y[1] ** 2), 1.0 + y[1] ** 2]

    def blow_up(x, y):      # the tangent turns past vertical: no element for this slope
        return abs(y[1]) - 1e6
    blow_up.terminal = True

    def run(s, dense=False):
        return solve_ivp(rhs, (0.0, lx), [0.0, s, 0.0], method="DOP853", rtol=1e-12,
                         atol=1e-14, events=blow_up, dense_output=dense)

    def miss(s):
        sol = run(s)
        if sol.status == 1:      # stopped by the event: the curve went vertical
            return sgn * 1e12
        return sol.y[0, -1] - dz

    chord = dz / lx
    # cable (z'' > 0): starting along the chord overshoots; steeper downwards undershoots
    near, step = chord, -sgn * 1.0
    far = near + step
    while np.sign(miss(far)) == np.sign(miss(near)):
        step *= 2.0
        far = near + step
    lo, hi = sorted((near, far))
    s0 = brentq(miss, lo, hi, xtol=1e-15, rtol=4 * np.finfo(float).eps, maxiter=500)
    sol = run(s0, dense=True)
    assert sol.status == 0 and abs(sol.y[0, -1] - dz) <= 1e-11 * max(1.0, lx)
    return sol


#: (lx, dz, k): level, rising and falling chords; k*lx from 0.05 up to 2.5.
CASES = [
    (1.0, 0.0, 0.05),
    (2.0, 0.7, 0.5),
    (2.0, -1.5, 0.5),
    (1.0, 0.0, 1.5),
    (1.5, 2.0, 1.0),
    (1.0, -0.6, 2.0),
    (1.0, 0.0, 2.5),
    (1.0, 0.8, 2.5),
    (1.0, -1.2, 2.5),
    (5000.0, 800.0, 7850 * 9.80665 / 355e6),   # steel, SI units: k lx = 1.08
]


@pytest.mark.parametrize("sense", ["tension", "compression"])
@pytest.mark.parametrize("lx,dz,k", CASES)
def test_end_slopes_volume_and_sag(lx, dz, k, sense):
    """End slopes, volume per unit H and sag agree with the integrated ODE to 1e-8.

    Slopes: the element pushes/pulls P with H (pxf, pzf) along its tangent, so
    z'(0) = pzf/pxf and z'(lx) = qzf/qxf (for a cable (1, tP) and (-1, -tQ), for an
    arch -(1, aP) and (1, aQ)).  Volume: sigma V/H = int (1 + z'^2) dx = cost.
    Sag: the largest |z(x) - chord(x)|, where z'(x) equals the chord slope.
    """
    sol = _shoot(lx, dz, k, sense)
    z0p = sol.y[1, 0]
    z1p = sol.y[1, -1]
    cost_ode = sol.y[2, -1]
    cost, pxf, pzf, qxf, qzf = (float(c[0]) for c in
                                curved_coefficients(np.array([lx]), np.array([dz]), k, sense))
    assert pzf / pxf == pytest.approx(z0p, rel=1e-8, abs=1e-10)
    assert qzf / qxf == pytest.approx(z1p, rel=1e-8, abs=1e-10)
    assert cost == pytest.approx(cost_ode, rel=1e-8)

    chord = dz / lx
    xs = brentq(lambda x: sol.sol(x)[1] - chord, 0.0, lx, xtol=1e-14 * lx)
    sag_ode = abs(sol.sol(xs)[0] - chord * xs)
    assert sag((0.0, 0.0), (lx, dz), k, sense) == pytest.approx(sag_ode, rel=1e-8,
                                                                 abs=1e-12 * lx)
    # the same answer anywhere along a translated element
    p, q = (3.0 * lx, -7.0 * lx), (4.0 * lx, -7.0 * lx + dz)
    assert sag(p, q, k, sense) == pytest.approx(sag_ode, rel=1e-7, abs=1e-11 * lx)


@pytest.mark.parametrize("sense", ["tension", "compression"])
@pytest.mark.parametrize("lx,dz,k", CASES)
def test_centreline_points(lx, dz, k, sense):
    """centreline() lies on the integrated curve (1e-8 of lx) and joins P to Q."""
    sol = _shoot(lx, dz, k, sense)
    p = np.array([10.0, 2.0])
    pts = centreline(p, p + (lx, dz), k, sense, n=17)
    assert np.allclose(pts[0], p, rtol=0, atol=1e-12 * lx)
    assert np.allclose(pts[-1], p + (lx, dz), rtol=0, atol=1e-12 * lx)
    x = pts[:, 0] - p[0]
    assert np.all(np.diff(x) > 0)
    assert np.allclose(pts[:, 1] - p[1], sol.sol(x)[0], rtol=0, atol=1e-8 * lx)


def test_cable_sags_arch_hogs():
    """A cable hangs below its chord and an arch stands above it (common practice)."""
    lx, dz, k = 2.0, 0.5, 0.8
    for sense, below in (("tension", True), ("compression", False)):
        pts = centreline((0.0, 0.0), (lx, dz), k, sense, n=33)
        offset = pts[1:-1, 1] - dz * pts[1:-1, 0] / lx
        assert np.all(offset < 0) if below else np.all(offset > 0)


@pytest.mark.parametrize("sense", ["tension", "compression"])
@pytest.mark.parametrize("k", [1e-10, 1e-11, 1e-12])
@pytest.mark.parametrize("lx,dz", [(1.0, 0.0), (2.0, 0.7), (3.0, -2.5)])
def test_small_k_tends_to_straight_bar(lx, dz, k, sense):
    """As k -> 0 the element becomes the weightless straight bar (to 1e-9).

    Weightless bar (common practice): force T along the chord, H = T lx/l, volume
    T l/sigma = H l^2/(lx sigma), so cost -> l^2/lx, both end slopes -> dz/lx.
    """
    cost, pxf, pzf, qxf, qzf = (float(c[0]) for c in
                                curved_coefficients(np.array([lx]), np.array([dz]), k, sense))
    length2 = lx * lx + dz * dz
    assert cost == pytest.approx(length2 / lx, rel=1e-9)
    assert pzf / pxf == pytest.approx(dz / lx, rel=1e-9, abs=1e-9)
    assert qzf / qxf == pytest.approx(dz / lx, rel=1e-9, abs=1e-9)
    assert abs(pxf) == pytest.approx(1.0) and abs(qxf) == pytest.approx(1.0)
    # equal and opposite end forces
    assert pxf + qxf == pytest.approx(0.0, abs=1e-12)
    assert pzf + qzf == pytest.approx(0.0, abs=1e-9)


@pytest.mark.parametrize("sense", ["tension", "compression"])
@pytest.mark.parametrize("k", [1e-4, 1e-6, 1e-8])
def test_small_k_sag_is_the_shallow_parabola(k, sense):
    """For small k the sag is the shallow parabola's, k (1 + m^2) lx^2 / 8.

    Derivation: with k lx << 1, z'' = +-k (1 + z'^2) ~ +-k (1 + m^2) (m = chord
    slope) is constant, a parabola whose mid-chord offset is
    |z''| lx^2 / 8 (common practice).  The neglected terms are O(k lx) relative,
    so the check is to 1e-3 relative.  This guards the precision of sag() when
    k lx is small (e.g. a short member of a light material).
    """
    lx, dz = 2.0, 0.7
    m = dz / lx
    expected = k * (1.0 + m * m) * lx * lx / 8.0
    assert sag((0.0, 0.0), (lx, dz), k, sense) == pytest.approx(expected, rel=1e-3)
