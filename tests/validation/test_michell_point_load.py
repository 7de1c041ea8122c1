"""Weightless point load at mid-span between two pinned supports (Michell structure).

Source: T. Lewinski, T. Sokol, C. Graczykowski, *Michell Structures*, Springer 2019
(the closed form V = (1/2 + pi/4) P L / sigma for equal stress limits, with the
design domain on one side of the support line, is quoted from memory; its layout
is re-derived and its volume recomputed from the geometry below).

The member-adding check uses the method of M. Gilbert, A. Tyas (2003), Engineering
Computations 20(8):1044-1064: member adding must reach the full ground-structure
optimum.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from bridgeopt import Domain, Material, PointLoad, Problem, Support, optimize_layout
from helpers import assert_equilibrium, assert_optimal_design

L = 1.0          # span between the supports [m]
P = 1.0          # load [N]
SIGMA = 1.0      # equal tension and compression limits [Pa]
WEIGHTLESS = Material("weightless", SIGMA, SIGMA, 0.0)

#: (1/2 + pi/4) P L / sigma -- Lewinski, Sokol, Graczykowski (2019), from memory.
V_MICHELL = (0.5 + math.pi / 4.0) * P * L / SIGMA


def half_model(divisions: int) -> Problem:
    """Half span x in [0, L/2], z in [0, L/2]; pinned support at (0, 0); P/2 on the mirror line."""
    return Problem(domain=Domain.rectangle((0.0, L / 2), (0.0, L / 2)), spacing=L / divisions,
                   material=WEIGHTLESS, supports=(Support((0.0, 0.0), "xz"),),
                   loads=(PointLoad((L / 2, 0.0), (0.0, -P / 2)),),
                   mirror_lines=(L / 2,), copies=2.0, name=f"michell L/{divisions}")


def fan_layout_volume(n_arc: int) -> tuple[float, float, float]:
    """Volume of the Michell layout from its geometry, with the arc as an n_arc-gon.

    Nodes: supports A = (-L/2, 0), B = (L/2, 0), load C = (0, 0), and n_arc + 1
    points on the circle of radius r = L/(2 sqrt 2) about C between the tangent
    points of the lines from A and B.  Members: struts A-T_A and B-T_B, the arc
    chords, and a radial tie from C to every arc point.  The member forces are
    solved from nodal equilibrium alone (the structure is statically
    determinate for this load), so nothing of the closed form is assumed.

    Returns (volume, strut force, largest equilibrium residual).
    """
    r = L / (2.0 * math.sqrt(2.0))
    # tangent point from A: |AC| = L/2, sin(angle at A) = r/|AC| -> the tangent
    # point lies at polar angle pi - acos(r/|AC|) about C.
    a_tan = math.acos(r / (L / 2))
    th = np.linspace(a_tan, math.pi - a_tan, n_arc + 1)
    arc = np.column_stack([r * np.cos(th), r * np.sin(th)])
    A, B, C = np.array([-L / 2, 0.0]), np.array([L / 2, 0.0]), np.array([0.0, 0.0])
    nodes = np.vstack([A, B, C, arc])           # 0 A, 1 B, 2 C, 3.. arc
    iarc = np.arange(3, 3 + n_arc + 1)
    bars = [(0, iarc[-1]), (1, iarc[0])]         # A to the left tangent point, B to the right one
    bars += [(int(i), int(j)) for i, j in zip(iarc[:-1], iarc[1:])]
    bars += [(2, int(i)) for i in iarc]
    bars = np.array(bars)
    d = nodes[bars[:, 1]] - nodes[bars[:, 0]]
    length = np.hypot(*d.T)
    e = d / length[:, None]
    n = len(nodes)
    # unknowns: bar tensions t (positive = tension), reactions at A and B (x, z)
    mat = np.zeros((2 * n, len(bars) + 4))
    for m, (i, j) in enumerate(bars):
        mat[2 * i:2 * i + 2, m] += e[m]        # a tension t pulls i towards j
        mat[2 * j:2 * j + 2, m] -= e[m]
    for c, row in enumerate((0, 1, 2, 3)):     # Ax, Az, Bx, Bz
        mat[row, len(bars) + c] = 1.0
    f = np.zeros(2 * n)
    f[2 * 2 + 1] = -P                           # the load at C
    sol, *_ = np.linalg.lstsq(mat, -f, rcond=None)
    resid = float(np.abs(mat @ sol + f).max())
    t = sol[:len(bars)]
    return float((np.abs(t) * length).sum() / SIGMA), float(-t[0]), resid


@pytest.mark.slow
def test_michell_layout_volume_from_geometry():
    """The fan layout's volume, summed from its pieces, is (1/2 + pi/4) P L / sigma.

    Derivation (Lewinski, Sokol, Graczykowski 2019, from memory): supports at
    (+-L/2, 0), load P at C = (0, 0).  A circular fan of radius r = L/(2 sqrt 2)
    centred on C; the tangents from the supports meet the circle at polar angles
    45 and 135 degrees, so the struts are inclined at 45 degrees and have length
    sqrt((L/2)^2 - r^2) = L/(2 sqrt 2).  The arc carries a constant compression F
    (tangent continuity with the struts); a circular arc under constant force F
    needs a radial pull of F per radian, supplied by the fan of ties from C.  The
    ties pull C upwards by int_{pi/4}^{3pi/4} F sin(theta) dtheta = sqrt(2) F = P,
    so F = P/sqrt 2, and each support reacts (P/2, P/2).
        struts: 2 F L/(2 sqrt 2) / sigma = P L / (2 sigma)
        arc:    F r (pi/2) / sigma      = pi P L / (8 sigma)
        ties:   (F per radian)(pi/2) r / sigma = pi P L / (8 sigma)
    Total V = (1/2 + pi/4) P L / sigma.
    """
    v_coarse, _, _ = fan_layout_volume(64)
    v, strut, resid = fan_layout_volume(512)
    assert resid <= 1e-10 * P                              # equilibrium of the discrete fan
    assert strut == pytest.approx(P / math.sqrt(2.0), rel=1e-9)   # F = P/sqrt 2 (derived above)
    # the polygonal arc converges to the circle like 1/n^2 (common practice)
    assert abs(v - V_MICHELL) < abs(v_coarse - V_MICHELL)
    assert v == pytest.approx(V_MICHELL, rel=1e-6)


@pytest.fixture(scope="module")
def refinement():
    """LP optima at spacings L/20, L/40, L/60 (half models)."""
    return {n: optimize_layout(half_model(n)) for n in (20, 40, 60)}


@pytest.mark.slow
def test_lp_volume_converges_to_michell_from_above(refinement):
    """Ground-structure optima are upper bounds that approach V_MICHELL as the grid refines.

    V_MICHELL = (1/2 + pi/4) P L / sigma (Lewinski, Sokol, Graczykowski 2019, from
    memory).  A grid layout is a feasible structure of the continuum problem, so
    its volume cannot be below the exact optimum.  The L/20 nodes are nodes of
    both finer grids, so V(L/40) and V(L/60) cannot exceed V(L/20); V(L/60) <
    V(L/40) is expected from the finer resolution though not implied by nesting.
    Within 1 % at L/60 (common practice for a grid of this size).
    """
    v = [refinement[n].volume for n in (20, 40, 60)]
    for vol in v:
        assert vol > V_MICHELL * (1 - 1e-9)
    assert v[0] > v[1] > v[2]
    assert v[2] <= 1.01 * V_MICHELL
    for d in refinement.values():
        assert_optimal_design(d)
        assert_equilibrium(d, rtol=1e-8)


@pytest.mark.slow
def test_lp_reactions_match_michell_layout(refinement):
    """Support reactions of the half model approach (P/2, P/2).

    Vertical equilibrium of the half model (common practice): the one support
    carries the whole P/2.  Its horizontal reaction is P/2, pointing towards
    mid-span, in the exact layout (45-degree strut with force P/sqrt 2, derived
    in the first test; Lewinski, Sokol, Graczykowski 2019, from memory); the
    L/60 grid layout is close to it (5 %, common practice), and the mirror-line
    nodes balance it.
    """
    d = refinement[60]
    sup = np.nonzero(np.all(np.isclose(d.nodes, [0.0, 0.0], atol=1e-12), axis=1))[0][0]
    rows = d.reactions[d.reactions[:, 0] == sup]
    assert rows[:, 2].sum() == pytest.approx(P / 2, rel=1e-9)
    rx = rows[:, 1].sum()
    assert rx == pytest.approx(P / 2, rel=0.05)
    on_mirror = np.isclose(d.nodes[d.reactions[:, 0].astype(int), 0], L / 2, atol=1e-12)
    assert d.reactions[on_mirror, 1].sum() == pytest.approx(-rx, rel=1e-9)


def test_member_adding_equals_full_ground_structure():
    """Member adding reaches the full ground-structure optimum (Gilbert & Tyas 2003).

    Coarse grid L/16 (8 x 8 cells), where the full LP is small; relative 1e-7.
    """
    prob = half_model(16)
    full = optimize_layout(prob, member_adding=False)
    added = optimize_layout(prob, member_adding=True)
    assert added.volume == pytest.approx(full.volume, rel=1e-7)
    assert added.stats["columns"] < full.stats["columns"]
    assert full.volume > V_MICHELL
    assert_optimal_design(full)
    assert_optimal_design(added)
