"""Equilibrium of returned designs, and the failure paths.

Source: nodal equilibrium of pin-jointed structures, as stated for layout
optimization by W.S. Dorn, R.E. Gomory, H.J. Greenberg (1964), "Automatic design
of optimal structures", J. de Mecanique 3:25-52 (B q + r = -f); the span limit
pi sigma/(rho g) of an equal-strength element from H.E. Fairclough, M. Gilbert,
A.V. Pichugin, A. Tyas, I. Firth (2018), Proc. R. Soc. A 474:20170726 (re-derived
below).

Every design must balance at every node to 1e-8 of the total load,
recomputed in tests/helpers.py from the member end forces, loads and reactions
(not from Design.equilibrium_error).
"""

from __future__ import annotations

import math
import re

import pytest

from bridgeopt import (GRAVITY, PRESETS, BridgeScenario, Domain, InputError, LineLoad,
                       Material, PointLoad, Problem, SolveError, Support, optimize_layout)
from helpers import assert_equilibrium, assert_optimal_design, nodal_residual, total_load

STEEL = PRESETS["steel"]
CFRP = PRESETS["cfrp"]
WEIGHTLESS = Material("weightless", 355e6, 355e6, 0.0)


def _problems():
    """A handful of varied problems (ids, problem)."""
    yield "weightless-cantilever", Problem(
        domain=Domain.rectangle((0.0, 20.0), (-5.0, 5.0)), spacing=1.25, material=WEIGHTLESS,
        supports=(Support((0.0, -5.0), "xz"), Support((0.0, 5.0), "xz")),
        loads=(PointLoad((20.0, 0.0), (2e5, -1e6)),))
    yield "steel-cantilever-self-weight", Problem(
        domain=Domain.rectangle((0.0, 2000.0), (-500.0, 500.0)), spacing=125.0, material=STEEL,
        supports=tuple(Support((0.0, z), "xz") for z in (-500.0, -375.0, 0.0, 375.0, 500.0)),
        loads=(PointLoad((2000.0, 0.0), (0.0, -1e7)), PointLoad((1000.0, 500.0), (3e6, 0.0))))
    step = 2500.0 / 12
    yield "steel-span-self-weight-mirror", Problem(
        domain=Domain.rectangle((0.0, 2500.0), (-2 * step, 4 * step)), spacing=step,
        material=STEEL, supports=(Support((0.0, 0.0), "xz"), Support((0.0, -2 * step), "z")),
        line_loads=(LineLoad((0.0, 0.0), (2500.0, 0.0), 2e5),), mirror_lines=(2500.0,),
        copies=2.0)
    yield "two-materials-excluded-zone", Problem(
        domain=Domain.rectangle((0.0, 1000.0), (0.0, 500.0),
                                excluded=(((300.0, 0.0), (700.0, 0.0), (700.0, 200.0),
                                           (300.0, 200.0)),)),
        spacing=50.0, material=PRESETS["cable-wire"], compression_material=CFRP,
        supports=(Support((0.0, 0.0), "xz"), Support((1000.0, 0.0), "xz")),
        loads=(PointLoad((500.0, 250.0), (0.0, -5e6)), PointLoad((250.0, 0.0), (0.0, -2e6))))
    yield "repeating-bridge", BridgeScenario(
        span=3000.0, rise=600.0, depth=300.0, deck_load=2e5, material=STEEL,
        arrangement="repeating", divisions=20).to_problem()
    yield "single-bridge", BridgeScenario(
        span=2000.0, rise=500.0, depth=200.0, deck_load=1.5e5, material=PRESETS["cable-wire"],
        compression_material=STEEL, arrangement="single", divisions=20).to_problem()
    yield "weightless-single-bridge", BridgeScenario(
        span=400.0, rise=100.0, depth=40.0, deck_load=1e5, material=WEIGHTLESS,
        arrangement="single", divisions=20).to_problem()


PROBLEMS = dict(_problems())


@pytest.fixture(scope="module", params=sorted(PROBLEMS))
def design(request):
    return optimize_layout(PROBLEMS[request.param])


def test_every_design_is_in_equilibrium(design):
    """Nodal, member (own weight) and overall balance to 1e-8 of the total load (Dorn et al. 1964)."""
    assert_equilibrium(design, rtol=1e-8)
    assert_optimal_design(design)


def test_reported_equilibrium_error_is_honest(design):
    """Design.equilibrium_error is at least the recomputed out-of-balance (common practice).

    It is normalised by the total applied load; the recomputed one by applied
    load plus self-weight, so the reported figure may only be the larger.
    """
    worst = abs(nodal_residual(design)).max()
    applied = design.problem.total_applied_load()
    assert design.equilibrium_error >= 0.999 * worst / applied - 1e-15
    assert worst <= 1e-8 * total_load(design)


def test_self_weight_designs_weigh_something(design):
    """A design with density > 0 has weight = rho g V > 0; weightless ones weigh 0 (common practice)."""
    prob = design.problem
    if prob.weightless:
        assert design.weight == 0.0
    else:
        assert design.weight > 0.0
        rho_max = max(prob.density("tension"), prob.density("compression"))
        assert design.weight <= rho_max * GRAVITY * design.volume * (1 + 1e-12)


# ---------------------------------------------------------------- failure paths

def test_span_beyond_equal_strength_limit_raises():
    """Supports further apart than pi sigma/(rho g) on a shallow domain: SolveError naming the limit.

    Equal-strength element (Fairclough et al. 2018, re-derived in
    test_equal_strength_cable.py): the tangent angle turns at the rate
    d(theta)/dx = k = rho g / sigma, and it must stay within (-pi/2, pi/2), so
    one element reaches at most pi/k = pi sigma/(rho g) horizontally (14487 m
    for 355 MPa and 7850 kg/m3).  On a domain 1.2 pi/k wide and a tenth as deep
    no layout can carry a mid-span load, and the message must give the limit
    in m.
    """
    limit = math.pi * STEEL.tension_strength / (STEEL.density * GRAVITY)
    width = 1.2 * limit
    prob = Problem(domain=Domain.rectangle((0.0, width), (0.0, width / 10)), spacing=width / 10,
                   material=STEEL,
                   supports=(Support((0.0, 0.0), "xz"), Support((width, 0.0), "xz")),
                   loads=(PointLoad((width / 2, 0.0), (0.0, -1e6)),))
    with pytest.raises(SolveError) as err:
        optimize_layout(prob)
    msg = str(err.value)
    metres = [float(v) for v in re.findall(r"([0-9]+(?:\.[0-9]+)?(?:e[+-]?[0-9]+)?) m\b", msg)]
    assert any(abs(v / limit - 1) < 1e-5 for v in metres), msg
    assert "pi*sigma/(rho*g)" in msg.replace(" ", "") or "pi sigma/(rho g)" in msg


def test_unrestrained_direction_raises():
    """Supports free horizontally and a horizontal load: no equilibrium exists (SolveError).

    Common practice statics: the sum of horizontal forces on the structure is
    the load P, and no support can react horizontally.
    """
    prob = Problem(domain=Domain.rectangle((0.0, 10.0), (0.0, 5.0)), spacing=1.0,
                   material=WEIGHTLESS,
                   supports=(Support((0.0, 0.0), "z"), Support((10.0, 0.0), "z")),
                   loads=(PointLoad((5.0, 0.0), (1e6, 0.0)),))
    with pytest.raises(SolveError) as err:
        optimize_layout(prob)
    assert err.value.status == "infeasible"


def test_support_off_the_grid_raises_input_error():
    """A support between grid nodes: InputError naming the field (support[1].at)."""
    prob = Problem(domain=Domain.rectangle((0.0, 10.0), (0.0, 5.0)), spacing=1.0,
                   material=WEIGHTLESS,
                   supports=(Support((0.0, 0.0), "xz"), Support((9.5, 0.0), "xz")),
                   loads=(PointLoad((5.0, 0.0), (0.0, -1e6)),))
    with pytest.raises(InputError) as err:
        optimize_layout(prob)
    assert err.value.field == "support[1].at"
    assert "support[1].at" in str(err.value)
