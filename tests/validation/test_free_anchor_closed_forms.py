"""Cable-stayed forms with free stay anchors against weightless closed forms.

Source: statics derived here (common practice), the same steps as in
``test_cable_stayed_closed_forms.py``.  A stay from the pylon (height z of its
anchor) to a deck point at x from the pylon carries the deck load P lumped
there: its force P sqrt(x^2 + z^2)/z over sqrt(x^2 + z^2) gives the volume
P (x^2 + z^2)/(z sigma); its horizontal pull P x/z compresses the deck over
the length x (volume P x^2/(z sigma)); its vertical pull P goes down the
pylon over z (volume P z/sigma).  Each stay adds

    (P/sigma) (2 x^2/z + 2 z),  least at z = x (a 45-degree stay): 4 P x/sigma,

and the stays do not interact, so with every anchor free the best layout is
the 45-degree harp, whatever the starting pattern.  With the hat-function
lumped loads, sum P_i x_i = w a^2/2 over a pylon's reach a on one side, so one
side costs 2 w a^2/sigma and a repeating span L (a = L/2 each side of its two
half pylons) w L^2/sigma, for every stay count.  The fan is one of the layouts
free anchors can take, so a fan with free anchors is never heavier than the
best-height fan, V_n(h_n) of ``test_cable_stayed_closed_forms.py``.

Repeating spans hold the deck horizontally at mid-span too (the mirror line),
so a stay's pull may go along the deck to the nearer held end: with the deck's
force changing sign at s, a stay at x < s costs (P/sigma)((x^2 + z^2)/z + z +
x^2/z), least 4 P x/sigma at z = x, and one at x > s costs (P/sigma)((x^2 +
z^2)/z + z + x (a - x)/z), least 2 P sqrt(2 x a)/sigma at z = sqrt(x a/2).
Each stay takes the cheaper, which fixes s = a/2, so that

    V_span = (2/sigma) sum_i P_i c(x_i),  c = 4x (x <= a/2), 2 sqrt(2 x a) (x > a/2)

(two half models); continuous: (0.5 + (4/3)(sqrt 2 - 1/2)) (2 w a^2/sigma),
0.8595 times the cantilever harp.
"""

from __future__ import annotations

import numpy as np
import pytest

from bridgeopt import PRESETS, BridgeScenario
from bridgeopt.forms import CableStayedForm, solve_form
from bridgeopt.forms.cable_stayed import cable_stayed_frame
from bridgeopt.geometry.optimize import optimize_geometry
from bridgeopt.solver.frame import size_frame
from helpers import assert_equilibrium
from validation.test_cable_stayed_closed_forms import A, best_height, cantilever, discrete

W = 2.0e5                                  # deck load [N/m]
STEEL = PRESETS["weightless-steel"]        # 355 MPa, no self-weight


def repeating_span_volume(span: float, n: int, w: float, sigma: float) -> float:
    """V_span of the module docstring, n stays per side at x_i = i a/n, a = span/2. [m3]"""
    a = 0.5 * span
    x = a * np.arange(1, n + 1) / n
    p = np.full(n, w * a / n)
    p[-1] *= 0.5
    c = np.where(x <= 0.5 * a, 4 * x, 2 * np.sqrt(2 * x * a))
    return 2.0 / sigma * float(np.sum(p * c))


@pytest.mark.parametrize("pattern", ["harp", "fan", "semi-fan"])
def test_free_anchors_on_a_cantilever_reach_the_45_degree_harp(pattern):
    """Deck end free (the closed-form cantilever): V = 2 w a^2/sigma, i.e. w L^2/sigma per
    repeating span of L = 2a (two half pylons, each side), whatever the start."""
    problem = cantilever(top=1.5 * A)
    frame, moves = cable_stayed_frame(problem, pylons_x=[0.0], reach=A, pattern=pattern,
                                      stays=6, height=0.5 * A, height_bounds=(0.05 * A, 1.5 * A),
                                      anchor_bounds=(0.01 * A, 1.5 * A))
    start = size_frame(frame)
    design = optimize_geometry(frame, moves=moves)
    assert_equilibrium(design)
    assert design.volume <= start.volume * (1 + 1e-12)
    sigma = problem.material.tension_strength
    w = problem.line_loads[0].intensity
    span = 2 * A
    assert 2 * design.volume == pytest.approx(w * span ** 2 / sigma, rel=2e-3)


@pytest.mark.parametrize("pattern", ["harp", "fan", "semi-fan"])
def test_free_anchors_on_repeating_spans_reach_the_closed_form(pattern):
    """Repeating spans, envelope taller than half the span: V_span of the module docstring."""
    span, n = 600.0, 10
    b = BridgeScenario(span=span, rise=0.6 * span, depth=0.0, deck_load=W, material=STEEL,
                       divisions=2 * n)
    result = solve_form(b, CableStayedForm(pattern=pattern), compare=False)
    assert_equilibrium(result.design)
    exact = repeating_span_volume(span, n, W, STEEL.tension_strength)
    assert result.volume == pytest.approx(exact, rel=1e-3)
    assert result.volume >= exact * (1 - 1e-9)
    assert result.volume <= result.start_volume * (1 + 1e-12)
    # the stays on the pylon's half of the reach at 45 degrees (anchor height = deck x)
    d = result.dimensions
    x, z = np.array(d["stay_deck_x_m"]), np.array(d["anchor_heights_m"])
    near = x < 0.5 * (0.5 * span) - 1.0
    # the volume is flat near its least, so the positions converge more slowly than it
    np.testing.assert_allclose(z[near], x[near], rtol=0.1)
    far = x > 0.5 * (0.5 * span) + 1.0
    np.testing.assert_allclose(z[far], np.sqrt(x[far] * 0.5 * span / 2), rtol=0.1)
    assert d["start_pattern"] == pattern and d["anchor_move_largest_m"] > 0.0


def test_the_repeating_span_sum_tends_to_its_continuous_value():
    """A check of the derivation: the sum tends to (0.5 + (4/3)(sqrt 2 - 1/2)) 2 w a^2/sigma."""
    span, sigma = 600.0, 355e6
    a = span / 2
    continuous = (0.5 + 4 / 3 * (np.sqrt(2) - 0.5)) * 2 * W * a * a / sigma
    gaps = [abs(repeating_span_volume(span, n, W, sigma) / continuous - 1) for n in (4, 16, 64)]
    assert gaps[0] > gaps[1] > gaps[2] and gaps[2] < 1e-3


@pytest.mark.parametrize("n", [4, 8])
def test_a_fan_with_free_anchors_is_never_heavier_than_the_best_fan(n):
    """Cantilever of the closed-form tests: free anchors <= V_n at the best fan height h_n."""
    problem = cantilever(top=1.5 * A)
    frame, moves = cable_stayed_frame(problem, pylons_x=[0.0], reach=A, pattern="fan",
                                      stays=n, height=0.4 * A, height_bounds=(0.05 * A, 1.5 * A),
                                      anchor_bounds=(0.01 * A, 1.5 * A))
    start = size_frame(frame)
    design = optimize_geometry(frame, moves=moves)
    assert design.volume <= start.volume * (1 + 1e-12)
    assert design.volume <= discrete(best_height(n), n) * (1 + 1e-9)
    # and it reaches the 45-degree harp of the module docstring: 2 w a^2 / sigma
    sigma = problem.material.tension_strength
    w = problem.line_loads[0].intensity
    assert design.volume == pytest.approx(2 * w * A * A / sigma, rel=2e-3)
