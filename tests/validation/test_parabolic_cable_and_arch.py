"""Weightless parabolic suspension cable, and parabolic arch, under a uniform deck load.

Source: statics derived here; the results are the standard ones of
suspension-bridge design texts (common practice, e.g. N.J. Gimsing,
C.T. Georgakis, Cable Supported Bridges: Concept and Design, 3rd ed., Wiley
2012, from memory, not consulted).

Continuous cable.  A cable of span L between supports at equal height carries
a uniform load w [N/m] of horizontal length through vertical hangers.  Its
horizontal force H is constant, and moment balance of the half span about the
lowest point gives H f = w L^2/8, so H = w L^2/(8 f) for a sag f; the shape is
the parabola z = 4 f x (L - x)/L^2.  The cable force is H sqrt(1 + z'^2), its
area that over sigma, its length element sqrt(1 + z'^2) dx, so its volume is

    V = (H/sigma) int_0^L (1 + z'^2) dx = (H/sigma) L (1 + 16 f^2/(3 L^2)),

since int z'^2 dx = (16 f^2/L^4) int (L - 2x)^2 dx = 16 f^2/(3L).

Discrete cable.  With hangers at spacing d = L/m and the load lumped at them
(w d each), the polygon through the parabola's points at the hangers is
funicular with the same H (the moments of the lumped loads at the nodes equal
the beam moments of the uniform load there).  Each chord's slope equals the
parabola's slope at the chord's middle, so its volume is (H/sigma) times the
midpoint sum of (1 + z'^2); z'^2 is quadratic, so the midpoint rule errs by
exactly (d^2/24) L (z'^2)'' = 16 f^2 d^2/(3 L^3):

    V_m = (H/sigma) (L + (16 f^2/(3L)) (1 - d^2/L^2)),

which tends to V from below as the hanger count grows.

Arch.  Turned upside down the same statics hold for a parabolic arch rib of
rise f carrying the deck on hangers (through arch) or columns (deck arch): the
thrust is H = w L^2/(8 f) and the rib's volume is V_m (with the compression
design stress).
"""

from __future__ import annotations

import numpy as np
import pytest

from bridgeopt import BridgeScenario, Material
from bridgeopt.forms import ArchForm, SuspensionForm, solve_form
from helpers import assert_equilibrium

L = 800.0        # span [m]
W = 1.5e5        # deck load [N/m]
SIGMA = 800e6    # cable and tower design stress [Pa]
WEIGHTLESS = Material("weightless wire", SIGMA, SIGMA, 0.0)
TOWER = 160.0    # tower height above the deck [m]


def bridge(divisions: int = 10) -> BridgeScenario:
    return BridgeScenario(span=L, rise=TOWER, depth=0.0, deck_load=W, material=WEIGHTLESS,
                          arrangement="repeating", divisions=divisions)


def cable_volume(f: float) -> float:
    return W * L ** 2 / (8 * f) / SIGMA * L * (1 + 16 * f * f / (3 * L * L))


def polygon_volume(f: float, hangers_per_half: int) -> float:
    d = L / (2 * hangers_per_half)
    return W * L ** 2 / (8 * f) / SIGMA * (L + 16 * f * f / (3 * L) * (1 - d * d / (L * L)))


def solve(f: float, per_half: int, shape: str = "parabolic"):
    spec = SuspensionForm(spacing=L / (2 * per_half), sag_ratio=f / L, tower_height=TOWER,
                          shape=shape)
    return solve_form(bridge(), spec, compare=False)


@pytest.mark.parametrize("f", [0.08 * L, 0.125 * L])
@pytest.mark.parametrize("per_half", [2, 5, 12])
def test_horizontal_force_and_polygon_volume(f, per_half):
    """H = w L^2/(8f) in every cable segment; the cable's volume is V_m."""
    result = solve(f, per_half)
    design = result.design
    assert_equilibrium(design)
    cable = design.members.group == "cable"
    assert cable.sum() == per_half
    np.testing.assert_allclose(design.members.horizontal_force[cable], W * L ** 2 / (8 * f),
                               rtol=1e-9)
    assert result.quantities["cable"]["volume_m3"] == pytest.approx(
        polygon_volume(f, per_half), rel=1e-9)
    # towers: each carries the hanger loads of its half span, w (L/2 - d/2), over TOWER
    d = L / (2 * per_half)
    assert result.quantities["tower"]["volume_m3"] == pytest.approx(
        2 * W * (L / 2 - d / 2) * TOWER / SIGMA, rel=1e-9)


def test_cable_volume_converges_to_the_closed_form():
    """The error against (H/sigma) L (1 + 16 f^2/(3 L^2)) falls with the hanger count."""
    f = 0.1 * L
    errors = [abs(solve(f, n).quantities["cable"]["volume_m3"] / cable_volume(f) - 1)
              for n in (2, 4, 8, 16, 40)]
    assert all(e2 < e1 for e1, e2 in zip(errors, errors[1:]))
    assert errors[-1] < 1e-4


def test_funicular_shape_is_the_parabola_when_weightless():
    """The funicular profile of a weightless cable under a uniform load is the parabola."""
    f = 0.1 * L
    a = solve(f, 6, "parabolic").design
    b = solve(f, 6, "funicular").design
    assert b.volume == pytest.approx(a.volume, rel=1e-9)
    za = np.sort(a.nodes[:, 1])
    zb = np.sort(b.nodes[:, 1])
    np.testing.assert_allclose(zb, za, atol=1e-6 * L)


@pytest.mark.parametrize("variant", ["through-arch", "deck-arch"])
@pytest.mark.parametrize("per_half", [3, 10])
def test_parabolic_arch_thrust_and_rib_volume(variant, per_half):
    """H = w L^2/(8f) in every rib segment; the rib's volume is V_m; it tends to V."""
    f = 0.1 * L
    b = BridgeScenario(span=L, rise=TOWER, depth=TOWER, deck_load=W, material=WEIGHTLESS,
                       arrangement="single", divisions=10)
    spec = ArchForm(variant=variant, spacing=L / (2 * per_half), rise_ratio=f / L,
                    shape="parabolic")
    result = solve_form(b, spec, compare=False)
    design = result.design
    assert_equilibrium(design)
    rib = design.members.group == "arch rib"
    assert rib.sum() == per_half
    np.testing.assert_allclose(design.members.horizontal_force[rib], W * L ** 2 / (8 * f),
                               rtol=1e-9)
    vol = result.quantities["arch rib"]["volume_m3"]
    assert vol == pytest.approx(polygon_volume(f, per_half), rel=1e-9)
    assert abs(vol / cable_volume(f) - 1) < 1.0 / (4 * per_half ** 2)
