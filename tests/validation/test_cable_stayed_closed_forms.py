"""Weightless fan and harp cable-stayed cantilevers: closed forms and best pylon heights.

Source: statics derived here (common practice; the continuous result is the
textbook fan estimate, e.g. M.S. Troitsky, Cable-Stayed Bridges: Theory and
Design, 2nd ed., BSP Professional Books 1988, from memory, not consulted).

Continuous fan.  A pylon of height h stands at x = 0 and carries a deck of
length a with a uniform load w [N/m] by stays from its top to every deck point
x in (0, a]; the pylon's other side is the mirror image (so the stays'
horizontal pulls at the top balance), and the deck end x = a is free to slide.
A stay to x carries the load w dx: its vertical component is w dx, its force
w dx L/h with L = sqrt(x^2 + h^2), its volume w dx L^2/(h sigma).  Its
horizontal component w dx x/h pulls the deck towards the pylon, so the deck is a
strut whose force at xi is N(xi) = int_xi^a w x/h dx.  Hence

    stays  V_s = (w/sigma) int_0^a (x^2 + h^2)/h dx = (w/sigma)(a^3/(3h) + h a)
    deck   V_d = (1/sigma) int_0^a N dxi = (w/sigma) int_0^a x^2/h dx = (w/sigma) a^3/(3h)
    pylon  V_p = (w a) h / sigma
    total  V   = (w/sigma)(2 a^3/(3h) + 2 h a),  least at h = a/sqrt(3).

Discrete fan with n stays at x_i = i a/n.  The deck load lumped with hat
functions puts P_i = w a/n on x_1 ... x_{n-1}, w a/(2n) on x_n and on x_0
(which sits on the support).  The same steps with sums (deck strut force
between x_{j-1} and x_j is sum_{i>=j} P_i x_i/h, and x_i is counted i times)
give

    V_n = (2/(h sigma)) sum P_i x_i^2 + (2h/sigma) sum P_i
        = (w/sigma) [ (2a^3/(3h)) (1 + 1/(2n^2)) + 2 h a (1 - 1/(2n)) ]

using sum_{i<n} i^2 + n^2/2 = n(2n^2 + 1)/6.  V_n tends to V as n grows; its
least value is at h_n = a sqrt((1 + 1/(2n^2)) / (3 (1 - 1/(2n)))).

Harp with n parallel stays, stay i from the pylon at height h i/n to the deck
at a i/n (same slope h/a for all; the pylon line is the mirror line, so each
anchor's horizontal pull is balanced by the other side).  Stay i carries P_i
up with force P_i sqrt(a^2 + h^2)/h over a length (i/n) sqrt(a^2 + h^2): volume
P_i (i/n)(a^2 + h^2)/(h sigma).  The pylon segment below anchor j carries
sum_{i>=j} P_i over h/n, and the deck segment j the horizontal pulls
sum_{i>=j} P_i a/h over a/n, so each adds (sum_i i P_i/n) (h or a^2/h)/sigma.
With the lumped loads, sum_i i P_i / n = (w a/n^2)((n - 1)n/2 + n/2) = w a/2
for every n, so

    V_harp = (w/sigma) a (a^2 + h^2)/h   (exact for every n),

least at h = a, where V = 2 w a^2/sigma.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from bridgeopt import Domain, LineLoad, Material, Problem, Support
from bridgeopt.forms.cable_stayed import cable_stayed_frame
from bridgeopt.solver.frame import size_frame
from bridgeopt.geometry.optimize import optimize_geometry
from helpers import assert_equilibrium

A = 120.0        # deck length served by the pylon [m]
W = 2.0e5        # deck load [N/m]
SIGMA = 300e6    # design stress, tension and compression [Pa]
WEIGHTLESS = Material("weightless", SIGMA, SIGMA, 0.0)
H_BEST = A / math.sqrt(3.0)


def continuous(h: float) -> float:
    """V of the continuous fan (module docstring). [m3]"""
    return W / SIGMA * (2 * A ** 3 / (3 * h) + 2 * h * A)


def discrete(h: float, n: int) -> float:
    """V_n of the fan with n stays (module docstring). [m3]"""
    return W / SIGMA * (2 * A ** 3 / (3 * h) * (1 + 1 / (2 * n * n))
                        + 2 * h * A * (1 - 1 / (2 * n)))


def best_height(n: int) -> float:
    return A * math.sqrt((1 + 1 / (2 * n * n)) / (3 * (1 - 1 / (2 * n))))


def cantilever(top: float = A) -> Problem:
    """Pylon line x = 0 a mirror line, pylon foot held vertically, deck end x = a free."""
    return Problem(domain=Domain.rectangle((0.0, A), (0.0, top)), spacing=A / 10,
                   material=WEIGHTLESS, supports=(Support((0.0, 0.0), "z"),),
                   line_loads=(LineLoad((0.0, 0.0), (A, 0.0), W),), mirror_lines=(0.0,))


def fan(n: int, h: float, bounds=None):
    return cable_stayed_frame(cantilever(), pylons_x=[0.0], reach=A, pattern="fan", stays=n,
                              height=h, height_bounds=bounds)


@pytest.mark.parametrize("h", [H_BEST, 0.3 * A, 0.9 * A])
@pytest.mark.parametrize("n", [1, 3, 8, 20])
def test_discrete_fan_volume(n, h):
    """The sized fan matches V_n (exact statics of the discrete fan)."""
    design = size_frame(fan(n, h)[0])
    assert_equilibrium(design)
    assert design.volume == pytest.approx(discrete(h, n), rel=1e-9)
    groups = {g: design.members.volume[design.members.group == g].sum()
              for g in ("stay", "pylon", "deck")}
    # pylon: carries sum P_i = w a (1 - 1/(2n)) over its height
    assert groups["pylon"] == pytest.approx(W * A * (1 - 1 / (2 * n)) * h / SIGMA, rel=1e-9)
    # the deck strut and the x^2 part of the stays are equal (module docstring)
    stay_x2 = groups["stay"] - W * A * (1 - 1 / (2 * n)) * h / SIGMA
    assert groups["deck"] == pytest.approx(stay_x2, rel=1e-9)


def test_fan_converges_to_the_closed_form():
    """The error against the continuous fan falls as the stay count grows, to < 0.5 %."""
    volumes = [size_frame(fan(n, H_BEST)[0]).volume for n in (4, 8, 16, 32, 64)]
    errors = [abs(v / continuous(H_BEST) - 1) for v in volumes]
    assert all(e2 < e1 for e1, e2 in zip(errors, errors[1:]))
    assert errors[-1] < 5e-3
    # at h = a/sqrt(3) the continuous fan has V = 4 w a^2 / (sqrt(3) sigma): the package's
    # 64-stay fan against that value, written out apart from the helper continuous()
    assert volumes[-1] == pytest.approx(4 * W * A ** 2 / (math.sqrt(3) * SIGMA), rel=5e-3)


@pytest.mark.parametrize("n", [4, 16])
def test_geometry_optimization_finds_the_best_pylon_height(n):
    """Starting from a low pylon, the free height goes to h_n -> a/sqrt(3)."""
    h0 = 0.25 * A
    frame, moves = fan(n, h0, bounds=(0.05 * A, A))
    start = size_frame(frame)
    design = optimize_geometry(frame, moves=moves)
    assert design.volume <= start.volume
    top = design.nodes[:, 1].max()
    assert top == pytest.approx(best_height(n), rel=2e-3)
    assert design.volume == pytest.approx(discrete(best_height(n), n), rel=1e-5)
    # h_n / (a/sqrt(3)) - 1 = 1/(4n) + O(1/n^2) (module docstring): the height the package
    # finds lies within 1/(2n) of the continuous fan's a/sqrt(3)
    assert abs(top / H_BEST - 1) < 0.5 / n


def harp(n: int, h: float, bounds=None):
    return cable_stayed_frame(cantilever(top=1.5 * A), pylons_x=[0.0], reach=A, pattern="harp",
                              stays=n, height=h, height_bounds=bounds)


@pytest.mark.parametrize("h", [0.4 * A, A, 1.3 * A])
@pytest.mark.parametrize("n", [1, 4, 15])
def test_harp_volume_is_exact_for_every_stay_count(n, h):
    design = size_frame(harp(n, h)[0])
    assert_equilibrium(design)
    assert design.volume == pytest.approx(W / SIGMA * A * (A * A + h * h) / h, rel=1e-9)
    stays = design.members.group == "stay"
    assert stays.sum() == n
    # parallel stays: one slope h/a
    m = design.members
    dz = design.nodes[m.end[stays], 1] - design.nodes[m.start[stays], 1]
    dx = design.nodes[m.end[stays], 0] - design.nodes[m.start[stays], 0]
    np.testing.assert_allclose(np.abs(dz / dx), h / A, rtol=1e-12)


def test_geometry_optimization_finds_the_best_harp_height():
    """One parameter scales every anchor height; the optimum is h = a, V = 2 w a^2/sigma."""
    frame, moves = harp(6, 0.5 * A, bounds=(0.05 * A, 1.5 * A))
    design = optimize_geometry(frame, moves=moves)
    assert design.nodes[:, 1].max() == pytest.approx(A, rel=2e-3)
    assert design.volume == pytest.approx(2 * W * A * A / SIGMA, rel=1e-5)


@pytest.mark.parametrize("n", [2, 8, 32])
def test_sized_fan_is_least_at_the_derived_height(n):
    """The package's sized fan is lighter at h_n (derived) than 1 % either side of it and
    than at the continuous fan's a/sqrt(3)."""
    h = best_height(n)
    at = {k: size_frame(fan(n, k * h)[0]).volume for k in (0.99, 1.0, 1.01)}
    assert at[1.0] < at[0.99] and at[1.0] < at[1.01]
    assert at[1.0] < size_frame(fan(n, H_BEST)[0]).volume
    assert at[1.0] == pytest.approx(discrete(h, n), rel=1e-9)
