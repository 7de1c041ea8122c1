"""Bar of uniform strength: a load hanging from a support, carrying its own weight.

Source: S.P. Timoshenko, *Strength of Materials*, Part I (the bar of uniform
strength under its own weight and an end load; closed form from memory,
re-derived below).

A load P hangs at (0, 0) from a point support at (0, h); the bar's area varies
so that the stress is sigma everywhere.  V = P (exp(k h) - 1) / (rho g) with
k = rho g / sigma.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from bridgeopt import GRAVITY, Domain, Material, PointLoad, Problem, Support, optimize_layout
from bridgeopt.solver.elements import vertical_coefficients
from helpers import assert_equilibrium, assert_optimal_design

#: steel-like values (common practice for structural steel: 355 MPa, 7850 kg/m3)
STEEL = Material("steel-like", 355e6, 355e6, 7850.0)
SIGMA, RHO, G = 355e6, 7850.0, 9.80665        # g: standard gravity (CGPM 1901)
K = RHO * G / SIGMA                            # [1/m]
P = 1.0e6                                      # [N]


def uniform_strength_volume(load: float, h: float) -> float:
    """V = P (exp(k h) - 1) / (rho g) (Timoshenko, Part I; derivation in the tests)."""
    return load * math.expm1(K * h) / (RHO * G)


def hanging_problem(h: float, cells: int = 10) -> Problem:
    """Support at (0, h), load at (0, 0), narrow domain x in [-h/10, h/10]."""
    return Problem(domain=Domain.rectangle((-h / 10, h / 10), (0.0, h)), spacing=h / cells,
                   material=STEEL, supports=(Support((0.0, h), "xz"),),
                   loads=(PointLoad((0.0, 0.0), (0.0, -P)),), name=f"hanging bar h={h:g} m")


def test_closed_form_against_integration():
    """The closed form solves the bar's differential equation.

    Derivation: force N(z) at height z above the load, N(0) = P; uniform stress
    means A = N/sigma; the slice dz adds its weight rho g A dz, so
    dN/dz = rho g N / sigma = k N, N = P exp(k z).  The volume is
    int_0^h N/sigma dz = P (exp(k h) - 1)/(k sigma) = P (exp(k h) - 1)/(rho g).
    Integrated here numerically (solve_ivp) to 1e-10.
    """
    h = 3000.0
    sol = solve_ivp(lambda z, y: [K * y[0], y[0] / SIGMA], (0.0, h), [P, 0.0],
                    method="DOP853", rtol=1e-12, atol=1e-14 * P)
    n_top, volume = sol.y[:, -1]
    assert volume == pytest.approx(uniform_strength_volume(P, h), rel=1e-10)
    assert n_top == pytest.approx(P * math.exp(K * h), rel=1e-10)


@pytest.mark.parametrize("h", [1000.0, 3000.0])
def test_vertical_element_coefficients(h):
    """vertical_coefficients gives the uniform-strength bar (Timoshenko, Part I).

    Tension bar from P (lower) to Q (upper) with lower end force F: cost
    sigma V / F = (exp(k h) - 1)/k; the bar pulls P up with F and Q down with
    F exp(k h).
    """
    cost, pzf, qzf = vertical_coefficients(np.array([h]), K, "tension")
    assert cost[0] == pytest.approx(math.expm1(K * h) / K, rel=1e-12)
    assert pzf[0] == pytest.approx(1.0, rel=1e-15)
    assert qzf[0] == pytest.approx(-math.exp(K * h), rel=1e-12)


@pytest.mark.parametrize("h", [1000.0, 3000.0])
def test_lp_finds_the_bar_of_uniform_strength(h):
    """Layout optimization on a narrow domain returns the uniform-strength bar.

    k h = 0.217 (h = 1000 m) and 0.650 (h = 3000 m): self-weight adds 24 % and
    92 % to the load.  Volume to 1e-6 relative (Timoshenko, Part I);
    weight = rho g V; the support reaction equals P + weight (vertical
    equilibrium, common practice) and has no horizontal part.
    """
    assert K * h > 0.2
    d = optimize_layout(hanging_problem(h))
    v = uniform_strength_volume(P, h)
    assert d.volume == pytest.approx(v, rel=1e-6)
    assert d.weight == pytest.approx(RHO * G * v, rel=1e-6)
    assert d.weight == pytest.approx(P * math.expm1(K * h), rel=1e-6)
    rz = d.reactions[:, 2].sum()
    rx = d.reactions[:, 1].sum()
    assert rz == pytest.approx(P + d.weight, rel=1e-9)
    assert abs(rx) <= 1e-9 * P
    assert G == GRAVITY
    assert_optimal_design(d)
    assert_equilibrium(d, rtol=1e-8)
    # every member lies on the bar's line x = 0
    m = d.members
    assert np.allclose(d.nodes[m.start, 0], 0.0, atol=1e-9 * h)
    assert np.allclose(d.nodes[m.end, 0], 0.0, atol=1e-9 * h)
