"""Core behaviour: immutability, input errors, member adding = full ground structure,
excluded zones, the equal-strength span limit."""

import dataclasses
import math

import numpy as np
import pytest

from bridgeopt import (GRAVITY, PRESETS, BridgeScenario, Domain, InputError, LineLoad, Material,
                       PointLoad, Problem, SolveError, Support, optimize_layout)
from bridgeopt.solver.ground import build_grid, candidate_pairs

STEEL = PRESETS["steel"]


def _bridge(**kw):
    args = dict(span=1000.0, rise=250.0, depth=100.0, deck_load=2e5, material=STEEL,
                arrangement="repeating", divisions=16)
    args.update(kw)
    return BridgeScenario(**args)


@pytest.mark.parametrize("arrangement", ["repeating", "single"])
def test_member_adding_equals_full_ground_structure(arrangement):
    """Member adding stops only when no column violates the dual check, so its optimum is the
    full ground structure's (M. Gilbert, A. Tyas 2003, Eng. Comput. 20(8):1044-1064)."""
    problem = _bridge(arrangement=arrangement).to_problem()
    fast = optimize_layout(problem)
    full = optimize_layout(problem, member_adding=False)
    assert fast.volume == pytest.approx(full.volume, rel=1e-7)
    assert fast.stats["columns"] < full.stats["columns"]


@pytest.mark.slow
def test_coarse_start_does_not_change_the_optimum():
    problem = _bridge(divisions=48, rise=250.0, depth=0.0).to_problem()
    seeded = optimize_layout(problem)
    plain = optimize_layout(problem, coarse_start=False)
    assert seeded.volume == pytest.approx(plain.volume, rel=1e-7)


def test_inputs_are_not_mutated_and_results_are_read_only():
    problem = _bridge().to_problem()
    before = repr(problem)
    design = optimize_layout(problem)
    assert repr(problem) == before
    with pytest.raises(dataclasses.FrozenInstanceError, match="cannot assign to field 'spacing'"):
        problem.spacing = 1.0  # frozen dataclass
    with pytest.raises(ValueError):
        design.nodes[0, 0] = 1.0
    with pytest.raises(ValueError):
        design.members.volume[0] = 0.0


def test_to_frame_matches_design_totals():
    design = optimize_layout(_bridge().to_problem())
    frame = design.to_frame()
    assert len(frame) == len(design.members)
    assert set(frame["sense"]) <= {"tension", "compression"}
    # copies = 2: the half-span model is reported as one whole span
    assert 2 * frame["volume_m3"].sum() == pytest.approx(design.volume, rel=1e-12)
    assert design.weight == pytest.approx(design.volume * STEEL.density * GRAVITY, rel=1e-9)


def test_self_weight_makes_the_bridge_heavier():
    """Common practice: self-weight can only add material."""
    weightless = Material("weightless", 355e6, 355e6, 0.0)
    heavy = optimize_layout(_bridge().to_problem()).volume
    light = optimize_layout(_bridge(material=weightless).to_problem()).volume
    assert heavy > light * 1.01


def test_excluded_zone_is_respected():
    zone = ((0.4, -0.01), (0.6, -0.01), (0.6, 0.3), (0.4, 0.3))
    problem = Problem(domain=Domain.rectangle((0.0, 1.0), (0.0, 0.5), excluded=(zone,)),
                      spacing=0.05, material=Material("w", 1.0, 1.0, 0.0),
                      supports=(Support((0.0, 0.0)), Support((1.0, 0.0))),
                      loads=(PointLoad((0.5, 0.35), (0.0, -1.0)),))
    grid = build_grid(problem)
    inside = ((grid.xz[:, 0] > 0.4 + 1e-9) & (grid.xz[:, 0] < 0.6 - 1e-9)
              & (grid.xz[:, 1] < 0.3 - 1e-9))
    assert not inside.any()
    a, b = candidate_pairs(problem, grid)
    t = np.linspace(0.0, 1.0, 41)[:, None, None]
    pts = grid.xz[a][None] * (1 - t) + grid.xz[b][None] * t
    hit = ((pts[..., 0] > 0.4 + 1e-9) & (pts[..., 0] < 0.6 - 1e-9) & (pts[..., 1] < 0.3 - 1e-9))
    assert not hit.any()
    design = optimize_layout(problem)
    for curve in design.members.curves:
        assert not ((curve[:, 0] > 0.4 + 1e-9) & (curve[:, 0] < 0.6 - 1e-9)
                    & (curve[:, 1] < 0.3 - 1e-9)).any()


def test_span_limit_error_names_the_limiting_reach():
    """An equal-strength element cannot reach further than pi*sigma/(rho*g) horizontally
    (H.E. Fairclough et al. 2018, Proc. R. Soc. A 474:20170726): a single span wider than
    that, with no room to build intermediate supports, has no solution."""
    mat = Material("soft", 1e6, 1e6, 1000.0)  # limit pi*1e6/(1000 g) = 320.4 m
    limit = math.pi * 1e6 / (1000.0 * GRAVITY)
    span = 1.5 * limit
    problem = Problem(domain=Domain.rectangle((0.0, span), (0.0, span / 8)), spacing=span / 8,
                      material=mat, supports=(Support((0.0, 0.0)), Support((span, 0.0))),
                      loads=(PointLoad((span / 2, span / 8), (0.0, -1e5)),))
    with pytest.raises(SolveError) as err:
        optimize_layout(problem)
    assert err.value.status == "span-limit"
    assert f"{limit:.6g} m" in str(err.value)


def test_support_off_grid_is_an_input_error():
    problem = Problem(domain=Domain.rectangle((0.0, 1.0), (0.0, 1.0)), spacing=0.25,
                      material=STEEL, supports=(Support((0.1, 0.0)),),
                      loads=(PointLoad((0.5, 0.5), (0.0, -1.0)),))
    with pytest.raises(InputError, match=r"support\[0\]\.at"):
        optimize_layout(problem)


def test_line_load_is_lumped_with_its_resultant():
    """Lumping with linear shape functions keeps the resultant (statics)."""
    from bridgeopt.solver.layout import nodal_loads
    problem = Problem(domain=Domain.rectangle((0.0, 10.0), (0.0, 2.0)), spacing=1.0,
                      material=STEEL, supports=(Support((0.0, 0.0)),),
                      line_loads=(LineLoad((0.0, 0.0), (10.0, 0.0), 3.0),))
    f = nodal_loads(problem, build_grid(problem))
    assert f[:, 1].sum() == pytest.approx(-30.0, rel=1e-12)
    assert f[:, 0].sum() == 0.0


def test_candidate_pairs_match_a_brute_force_gcd_enumeration():
    """Every pair of nodes with no third lattice node between them, once each, left end first:
    checked against a plain double loop with Python's math.gcd (stdlib reference)."""
    problem = _bridge(divisions=8, depth=0.0).to_problem()
    grid = build_grid(problem)
    a, b = candidate_pairs(problem, grid)
    got = {(int(p), int(q)) for p, q in zip(a, b)}
    assert len(got) == len(a)
    want = set()
    for p in range(grid.n):
        for q in range(grid.n):
            d = grid.ij[q] - grid.ij[p]
            if (d[0] > 0 or (d[0] == 0 and d[1] > 0)) and math.gcd(int(d[0]), int(d[1])) == 1:
                want.add((p, q))
    assert got == want
