"""Suspension cable (and arch rib) of equal strength under a uniform deck load.

Source: statics derived here, after the equal-strength cable of D. Gilbert
(1826), "On the mathematical theory of suspension bridges", Phil. Trans. R. Soc.
116:202-218, which carries its own weight at a uniform stress sigma.

Continuous cable.  With horizontal force H and slope p = z', the cable's force
is H sqrt(1 + p^2) and its area that over sigma, so its weight per unit
horizontal length is rho g (H sqrt(1 + p^2)/sigma) sqrt(1 + p^2) = k H (1 + p^2),
k = rho g/sigma.  With the deck load w (hangers weightless here) vertical
balance gives

    H p' = w + k H (1 + p^2),   i.e.   p' = k (b^2 + p^2),   b^2 = 1 + w/(k H).

With the lowest point at mid-span x_e (p = 0 there) the solution is
p = -b tan(k b (x_e - x)), and integrating,

    z(x) = z_e + ln(1 / cos(k b (x_e - x))) / k,

so a sag f over the half span L/2 fixes b by cos(k b L/2) = exp(-k f), and
H = w / (k (b^2 - 1)).  An arch rib in compression is the mirror image (rising
to its crown by f).  As k -> 0 the curve tends to the parabola of the weightless
cable.

Discrete form.  bridgeopt's funicular polygon (equal-strength segments between
hanger nodes, the deck load lumped at the nodes, each node balanced) must put
its nodes on this curve.  They fall on it exactly for any hanger count, as the
polygon of a weightless parabolic cable does (lumped loads give the exact
moments at the nodes); the checks here use 1e-9 of the sag.
"""

from __future__ import annotations

import numpy as np
import pytest

from bridgeopt import PRESETS
from bridgeopt.forms.builder import funicular_heights

L = 3000.0       # span [m]
W = 2.0e5        # deck load [N/m]
STEEL = PRESETS["steel"]
K = STEEL.k("tension")   # rho g / sigma [1/m]


def continuous(x: np.ndarray, f: float, k: float) -> np.ndarray:
    """Height above the lowest point of the continuous equal-strength cable. [m]"""
    b = np.arccos(np.exp(-k * f)) / (k * L / 2)
    assert b > 1.0       # a real H: the sag exceeds the self-weight-only catenary's
    return np.log(1.0 / np.cos(k * b * (L / 2 - x))) / k


def lumped(n: int) -> np.ndarray:
    d = L / 2 / n
    loads = np.full(n, W * d)
    loads[-1] = W * d / 2      # the mirror node's share of the half model
    return loads


@pytest.mark.parametrize("f", [0.15 * L, 0.25 * L])
@pytest.mark.parametrize("n", [3, 10, 40])
def test_cable_nodes_lie_on_the_equal_strength_curve(f, n):
    x = np.linspace(0.0, L / 2, n + 1)
    z = funicular_heights(x, start=f, end=0.0, node_loads=lumped(n), k_line=K,
                          line_sense="tension", k_drop=0.0, drop_base=-50.0)
    assert z is not None
    np.testing.assert_allclose(z, continuous(x, f, K), rtol=0, atol=1e-9 * f)


@pytest.mark.parametrize("n", [4, 25])
def test_arch_rib_nodes_lie_on_the_mirrored_curve(n):
    f = 0.2 * L
    k = STEEL.k("compression")
    x = np.linspace(0.0, L / 2, n + 1)
    z = funicular_heights(x, start=0.0, end=f, node_loads=lumped(n), k_line=k,
                          line_sense="compression", k_drop=0.0, drop_base=0.0)
    assert z is not None
    np.testing.assert_allclose(z, f - continuous(x, f, k), rtol=0, atol=1e-9 * f)


def test_self_weight_deepens_the_cable_towards_the_supports():
    """Against the weightless parabola of the same sag, the heavy cable lies lower near
    the tower (its weight, growing with the slope, pulls the curve into a catenary-like
    shape); and the profile tends to the parabola as k -> 0."""
    n, f = 20, 0.2 * L
    x = np.linspace(0.0, L / 2, n + 1)
    t = x / (L / 2)
    parabola = f * (1 - t) ** 2          # height above mid-span of the weightless cable
    heavy = continuous(x, f, K)
    assert np.all(heavy[1:-1] < parabola[1:-1])
    light = funicular_heights(x, start=f, end=0.0, node_loads=lumped(n), k_line=K * 1e-6,
                              line_sense="tension", k_drop=0.0, drop_base=-50.0)
    np.testing.assert_allclose(light, parabola, rtol=0, atol=1e-5 * f)
