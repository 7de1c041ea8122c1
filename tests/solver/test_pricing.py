"""Pricing from a table of lattice offsets (bridgeopt.solver.pricing) against the general
pricing, and the member-adding optimum against the full ground structure.

Reference for the dual check: a column enters when u.a > c (member adding, M. Gilbert,
A. Tyas 2003, Engineering Computations 20(8):1044-1064); the optimum of member adding equals
the full ground structure's (same paper; W.S. Dorn, R.E. Gomory, H.J. Greenberg 1964,
J. de Mecanique 3:25-52).  The general pricing is recomputed here from
``column_entries``, one column at a time in vectorised form.
"""

import dataclasses

import numpy as np
import pytest

from bridgeopt import (PRESETS, BridgeScenario, Domain, Material, PointLoad, Problem, Support,
                       optimize_layout)
from bridgeopt.solver.elements import SENSES
from bridgeopt.solver.ground import build_grid, candidate_pairs
from bridgeopt.solver.layout import nodal_loads, restrained_rows, scales
from bridgeopt.solver.lp import LPData, column_entries
from bridgeopt.solver.pricing import (lattice_of, offset_coefficients, on_lattice,
                                      predict_offsets, price_offsets)

STEEL = PRESETS["steel"]
TOL = 1e-7


def _bridge(divisions=16, **kw):
    args = dict(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5, material=STEEL,
                divisions=divisions)
    args.update(kw)
    return BridgeScenario(**args).to_problem()


def _zone_problem(spacing=0.05, density=7850.0):
    zone = ((0.4, -0.01), (0.6, -0.01), (0.6, 0.3), (0.4, 0.3))
    return Problem(domain=Domain.rectangle((0.0, 1.0), (0.0, 0.5), excluded=(zone,)),
                   spacing=spacing, material=Material("m", 2e8, 2e8, density),
                   supports=(Support((0.0, 0.0)), Support((1.0, 0.0))),
                   loads=(PointLoad((0.5, 0.35), (0.0, -1e6)),))


def _lp_data(problem, allowed=None):
    """The dimensionless LP data that optimize_layout builds for ``problem``."""
    grid = build_grid(problem)
    a, b = candidate_pairs(problem, grid)
    ref_len, ref_force, ref_sigma = scales(problem)
    return LPData(xz=(grid.xz - np.array(grid.origin)) / ref_len, a=a, b=b,
                  k={s: problem.k(s) * ref_len for s in SENSES},
                  cost_scale={s: ref_sigma / problem.strength(s) for s in SENSES},
                  load=(nodal_loads(problem, grid) / ref_force).ravel(),
                  fixed=restrained_rows(problem, grid),
                  reach=np.abs(grid.ij[b] - grid.ij[a]).max(axis=1), allowed=allowed)


def _general(data, u, threshold, in_lp, use_allowed=True):
    """Every column with u.a > c * threshold, recomputed from column_entries: {(pair, sense): ratio}."""
    out = {}
    pairs = np.arange(len(data.a))
    for s, sense in enumerate(SENSES):
        cost, rows, vals = column_entries(data, pairs, sense)
        work = np.einsum("ij,ij->i", u[rows], vals)
        free = ~in_lp[:, s]
        if use_allowed and data.allowed is not None:
            free &= data.allowed[:, s]
        with np.errstate(invalid="ignore"):
            bad = free & (work > cost * threshold)
        out.update({(int(p), s): float(r) for p, r in zip(pairs[bad], work[bad] / cost[bad])})
    return out


def _duals(data, rng):
    """Dual-like row values: a smooth field (as optimal duals are) plus noise."""
    x, z = data.xz[:, 0], data.xz[:, 1]
    u = np.column_stack([np.sin(3 * x) * z, -np.cos(2 * x) - 0.5 * z]).ravel()
    return u + 0.05 * rng.standard_normal(u.shape)


CASES = {
    "repeating span, self-weight": lambda: _bridge(16),
    "single span with depth": lambda: _bridge(12, arrangement="single", rise=300.0,
                                              depth=150.0),
    "weightless": lambda: _bridge(10, material=Material("w", 3.55e8, 3.55e8, 0.0)),
    "excluded zone, self-weight": lambda: _zone_problem(),
    "span limit reached": lambda: _bridge(12, span=40000.0, rise=20000.0),
}


@pytest.mark.parametrize("case", list(CASES))
def test_offset_pricing_equals_general_pricing(case):
    """Same violated columns and the same ratios u.a/c (to 1e-9) as the general pricing, with
    columns already in the LP and forbidden columns left out."""
    rng = np.random.default_rng(7)
    data = _lp_data(CASES[case]())
    allowed = rng.random((len(data.a), 2)) > 0.1
    data = dataclasses.replace(data, allowed=allowed)
    assert on_lattice(data)
    in_lp = rng.random((len(data.a), 2)) < 0.2
    for trial in range(3):
        u = _duals(data, rng) * (1.0 + trial)
        want = _general(data, u, 1.0 + TOL, in_lp)
        got = price_offsets(data, in_lp, u, tol=TOL, chunk=1000, entries=column_entries)
        assert want, "the check needs some violated columns"
        pair, sense, ratio = got
        assert len(pair) == len(want)
        assert {(int(p), int(s)) for p, s in zip(pair, sense)} == set(want)
        ref = np.array([want[(int(p), int(s))] for p, s in zip(pair, sense)])
        np.testing.assert_allclose(ratio, ref, rtol=1e-9, atol=0.0)
        # order of the general pricing: by chunk of pairs, then sense, then pair
        key = np.column_stack([pair // 1000, sense, pair])
        assert all(tuple(key[i]) < tuple(key[i + 1]) for i in range(len(key) - 1))


def test_no_violated_column_gives_none():
    data = _lp_data(_bridge(8))
    in_lp = np.zeros((len(data.a), 2), dtype=bool)
    u = np.zeros(2 * len(data.xz))
    assert price_offsets(data, in_lp, u, tol=TOL, chunk=1000, entries=column_entries) is None


def test_prediction_equals_general_prediction():
    """Pairs with u.a/c > 0.98 in either sense, the most violated if more than the limit."""
    rng = np.random.default_rng(3)
    data = _lp_data(_bridge(16))
    u = _duals(data, rng)
    none = np.zeros((len(data.a), 2), dtype=bool)
    want = _general(data, u, 0.98, none, use_allowed=False)
    got = predict_offsets(data, u, 10 ** 9, ratio=0.98, chunk=1000, entries=column_entries)
    assert len(want) > 20
    np.testing.assert_array_equal(got, np.unique([p for p, _ in want]))
    limit = len(want) // 3
    top = sorted(want, key=want.get, reverse=True)[:limit]
    got = predict_offsets(data, u, limit, ratio=0.98, chunk=1000, entries=column_entries)
    np.testing.assert_array_equal(got, np.unique([p for p, _ in top]))


def test_offset_table_holds_each_candidate_once():
    data = _lp_data(_zone_problem())
    lat = lattice_of(data)
    held = np.concatenate([t[t >= 0] for _, _, t in lat.groups])
    np.testing.assert_array_equal(np.sort(held), np.arange(len(data.a)))
    assert lattice_of(data) is lat  # built once per LPData


def test_offset_coefficients_equal_column_entries():
    data = _lp_data(_bridge(12))
    lat = lattice_of(data)
    ij = lat.ij
    for s, sense in enumerate(SENSES):
        cost, px, pz, qz = offset_coefficients(lat.step[0], lat.step[1], lat.shape[0] - 1,
                                               lat.pad, data.k[sense], data.cost_scale[sense],
                                               sense)
        pairs = np.arange(len(data.a))
        c, _, vals = column_entries(data, pairs, sense)
        d = ij[data.b] - ij[data.a]
        at = (d[:, 0], d[:, 1] + lat.pad)
        np.testing.assert_allclose(cost[at], c, rtol=1e-12)
        np.testing.assert_allclose(np.column_stack([px[at], pz[at], -px[at], qz[at]]), vals,
                                   rtol=1e-12, atol=1e-15)


def test_non_uniform_nodes_use_the_general_path():
    data = _lp_data(_bridge(8))
    xz = data.xz.copy()
    xz[3, 0] += 1e-4
    assert not on_lattice(dataclasses.replace(data, xz=xz))
    swapped = dataclasses.replace(data, a=data.b, b=data.a)
    assert not on_lattice(swapped)


@pytest.mark.parametrize("make", [lambda: _bridge(24), lambda: _bridge(32, rise=300.0),
                                  lambda: _zone_problem()],
                         ids=["repeating 24", "repeating 32", "excluded zone"])
def test_member_adding_optimum_equals_full_ground_structure(make):
    problem = make()
    fast = optimize_layout(problem)
    full = optimize_layout(problem, member_adding=False)
    assert fast.stats["gap"] == 0.0
    assert fast.volume == pytest.approx(full.volume, rel=1e-6)
    assert fast.stats["columns"] < full.stats["columns"]


def _michell_half(divisions):
    """Weightless half model of a point load between two pins: many near-tied ratios u.a/c."""
    w = Material("weightless", 1.0, 1.0, 0.0)
    return Problem(domain=Domain.rectangle((0.0, 0.5), (0.0, 0.5)), spacing=1.0 / divisions,
                   material=w, supports=(Support((0.0, 0.0), "xz"),),
                   loads=(PointLoad((0.5, 0.0), (0.0, -0.5)),), mirror_lines=(0.5,),
                   copies=2.0)


@pytest.mark.parametrize("make", [lambda: _bridge(48), lambda: _michell_half(40)],
                         ids=["48 divisions, coarse start", "weightless, near-ties"])
def test_driver_gives_the_same_solve_as_the_general_path(monkeypatch, make):
    """Same optimum, rounds and columns as when every LP is priced by the general path (the
    coarse-grid start included; near-tied ratios ranked the same)."""
    import bridgeopt.solver.lp as lp

    problem = make()
    fast = optimize_layout(problem)
    monkeypatch.setattr(lp, "on_lattice", lambda data: False)
    general = optimize_layout(problem)
    assert fast.volume == pytest.approx(general.volume, rel=1e-9)
    assert (fast.stats["rounds"], fast.stats["columns"]) == (general.stats["rounds"],
                                                             general.stats["columns"])
