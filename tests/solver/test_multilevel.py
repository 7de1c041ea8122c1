"""Multilevel start of member adding (bridgeopt.solver.multilevel) against the full ground structure.

Reference for the optimum: member adding ends at the full ground structure's optimum when no
candidate out of the LP violates the dual check u.a > c, whatever the first LP held (M. Gilbert,
A. Tyas 2003, Engineering Computations 20(8):1044-1064; W.S. Dorn, R.E. Gomory, H.J. Greenberg
1964, J. de Mecanique 3:25-52), so a start mapped from a coarser grid must give the full ground
structure's volume.  Reference for the interpolation: bilinear interpolation reproduces a
linear field exactly (any numerical analysis text, e.g. W.H. Press et al., Numerical Recipes,
3rd ed. 2007, section 3.6).
"""

import numpy as np
import pytest

from bridgeopt import PRESETS, BridgeScenario, Domain, Material, PointLoad, Problem, Support
from bridgeopt import optimize_layout
from bridgeopt.solver import lp, multilevel
from bridgeopt.solver.ground import build_grid, candidate_pairs
from bridgeopt.solver.layout import nodal_loads, restrained_rows, scaled_lp_data
from bridgeopt.solver.pricing import lattice_of

REL = 1e-6  # same optimum as the full ground structure (issue 12)


def _bridge(divisions):
    return BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                          material=PRESETS["steel"], divisions=divisions).to_problem()


def _zone_problem():
    """A 2:1 domain with an excluded zone reaching the bottom edge (invented)."""
    zone = ((0.4, -0.01), (0.6, -0.01), (0.6, 0.3), (0.4, 0.3))
    return Problem(domain=Domain.rectangle((0.0, 1.0), (0.0, 0.5), excluded=(zone,)),
                   spacing=0.05, material=Material("m", 2e8, 2e8, 7850.0),
                   supports=(Support((0.0, 0.0)), Support((1.0, 0.0))),
                   loads=(PointLoad((0.5, 0.4), (0.0, -1e6)),))


def _lp_data(problem):
    grid = build_grid(problem)
    a, b = candidate_pairs(problem, grid)
    data = scaled_lp_data(problem, grid.xz, a, b, nodal_loads(problem, grid),
                          restrained_rows(problem, grid),
                          np.abs(grid.ij[b] - grid.ij[a]).max(axis=1))
    return grid, data


@pytest.fixture
def small_coarse(monkeypatch):
    """Start from a coarser grid already at 8 cells across (the default is 24)."""
    monkeypatch.setattr(multilevel, "COARSE_MIN", 4)


CASES = {
    "repeating 16": (lambda: _bridge(16), "multilevel"),
    "repeating 24": (lambda: _bridge(24), "multilevel"),
    "excluded zone, 2:1 domain": (_zone_problem, "multilevel"),
    # 9 x 9 cells: the coarse grid (4 or 5 cells) is no sub-lattice, so its duals only
    "repeating 18, odd cells": (lambda: _bridge(18), "coarse duals"),
}


@pytest.mark.parametrize("case", list(CASES))
def test_multilevel_start_gives_the_full_ground_structure_optimum(small_coarse, case):
    make, path = CASES[case]
    p = make()
    full = optimize_layout(p, member_adding=False)
    d = optimize_layout(p)
    assert d.stats["start"] == path
    assert full.stats["start"] == "full"
    assert d.stats["gap"] == 0.0 and d.stats["vertex"] is True
    assert d.volume == pytest.approx(full.volume, rel=REL)


def test_interior_point_rounds_from_a_mapped_start(small_coarse, monkeypatch):
    """The large-grid scheme at a small size: interior point rounds from the mapped start with
    fewer predicted pairs per node, then the vertex re-solve."""
    p = _bridge(16)
    full = optimize_layout(p, member_adding=False)
    monkeypatch.setattr(lp, "IPM_ROWS", 0)
    d = optimize_layout(p)
    assert d.stats["start"] == "multilevel"
    assert d.stats["vertex"] is True and d.stats["gap"] <= lp.IPM_GAP
    assert d.volume == pytest.approx(full.volume, rel=max(REL, lp.IPM_GAP))


def test_seed_alone_gives_the_same_optimum(small_coarse, monkeypatch):
    """A first LP of the mapped seed alone (widened to reach 1, 2, ... should it have no
    optimum; at 16 divisions it has one) ends at the full ground structure's optimum."""
    p = _bridge(16)
    full = optimize_layout(p, member_adding=False)
    monkeypatch.setattr(lp, "SEED_REACH", 0)
    d = optimize_layout(p)
    assert d.stats["start"] == "multilevel" and d.stats["gap"] == 0.0
    assert d.volume == pytest.approx(full.volume, rel=REL)


def test_start_labels_without_a_coarse_grid():
    p = _bridge(16)  # 8 cells across: below twice COARSE_MIN, no coarse start
    assert optimize_layout(p).stats["start"] == "reach 1"
    assert optimize_layout(p, coarse_start=False).stats["start"] == "reach 1"


def test_mapped_members_lie_along_the_coarse_members(small_coarse):
    """Without the neighbours, every mapped fine member is half of a coarse optimum member."""
    p = _bridge(16)
    grid, data = _lp_data(p)
    seen = {}

    def solve(coarse):
        from bridgeopt.solver.layout import solve_layout_lp
        out = solve_layout_lp(coarse, coarse_start=False)
        seen["out"] = out
        return out

    old = multilevel.NEIGHBOURS
    multilevel.NEIGHBOURS = False
    try:
        start = multilevel.coarse_start(p, grid, data, solve)
    finally:
        multilevel.NEIGHBOURS = old
    cgrid, _, cdata, sol, _ = seen["out"]
    halves = set()
    for a, b, s in zip(cdata.a[sol.pair], cdata.b[sol.pair], sol.sense):
        pa, pb = cgrid.xz[a], cgrid.xz[b]
        m = 0.5 * (pa + pb)
        for u, v in ((pa, m), (m, pb)):
            halves.add((tuple(np.round(u, 6)), tuple(np.round(v, 6)), int(s)))
    got = {(tuple(np.round(grid.xz[data.a[k]], 6)), tuple(np.round(grid.xz[data.b[k]], 6)),
            int(s)) for k, s in zip(start.pair, start.sense)}
    assert start.path == "multilevel"
    assert got == halves


def test_lattice_pairs_finds_candidates_and_nothing_else():
    p = _bridge(8)
    grid, data = _lp_data(p)
    lat = lattice_of(data)
    pos = lat.ij
    k = np.arange(0, len(data.a), 7)
    # either order of the ends finds the same pair
    assert (multilevel.lattice_pairs(lat, pos[data.a[k]], pos[data.b[k]]) == k).all()
    assert (multilevel.lattice_pairs(lat, pos[data.b[k]], pos[data.a[k]]) == k).all()
    # offset (2, 0) has a node half way (gcd filter), a point off the lattice has no node
    p0 = pos[:1]
    assert multilevel.lattice_pairs(lat, p0, p0 + [[2, 0]])[0] == -1
    assert multilevel.lattice_pairs(lat, p0, p0 - [[1, 0]])[0] == -1
    assert multilevel.lattice_pairs(lat, p0, p0)[0] == -1


def test_sub_lattice_interpolation_is_exact_for_a_linear_field():
    i, j = np.meshgrid(np.arange(0, 9, 2), np.arange(0, 7, 2), indexing="ij")
    cpos = np.column_stack([i.ravel(), j.ravel()])

    def field(q):
        return np.column_stack([1.0 + 2.0 * q[:, 0] - 0.5 * q[:, 1], 3.0 * q[:, 1]])

    fi, fj = np.meshgrid(np.arange(9), np.arange(7), indexing="ij")
    fpos = np.column_stack([fi.ravel(), fj.ravel()])
    np.testing.assert_allclose(multilevel.sub_lattice_interpolate(cpos, field(cpos), fpos),
                               field(fpos), rtol=0, atol=1e-12)
    # a missing coarse node: its fine neighbours still get the mean of the coarse ones left
    keep = ~((cpos[:, 0] == 4) & (cpos[:, 1] == 2))
    out = multilevel.sub_lattice_interpolate(cpos[keep], field(cpos[keep]), fpos)
    assert np.isfinite(out).all()
    at = (fpos[:, 0] == 4) & (fpos[:, 1] == 2)
    np.testing.assert_allclose(out[at], field(fpos[at]), atol=1e-12)  # symmetric ring
