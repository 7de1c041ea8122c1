"""How the layout LP changes when nodes move: derivatives for geometry optimization.

For the dimensionless LP ``min c(X).q  s.t.  A(X) q + E r = rhs(X)`` at node
coordinates X (divided by the reference length), :func:`linearise` returns, at
an optimum q0,

* ``gc = q0 . dc/dX`` (2n,) -- how the cost of the optimal forces changes;
* ``G = d(A q0)/dX`` (2n, 2n) -- how their nodal end forces change;
* ``R = d(rhs)/dX`` (2n, 2n) -- how the lumped line loads change as deck nodes
  slide (a line load is shared between the nodes on its line by linear shape
  functions, so each share is half the distance between its neighbours).

Each member's cost and end-force factors depend only on its reach lx and rise
dz; they are differentiated by central differences of the same coefficient
function the LP is built from (:func:`~bridgeopt.solver.elements.element_coefficients`).  By the envelope theorem of linear programming the
gradient of the optimum volume is ``gc - G^T u + R^T u`` with u the equality
duals (:func:`volume_gradient`); the sequential linear programs of
:mod:`bridgeopt.geometry.optimize` use ``G`` and ``R`` directly.

References
----------
.. [1] L. He, M. Gilbert (2015), "Rationalization of trusses generated via layout
   optimization", Struct. Multidisc. Optim. 52:677-694.
"""

from __future__ import annotations

import numpy as np
from scipy import sparse

from bridgeopt.model.problem import Problem
from bridgeopt.solver.elements import SENSES, element_coefficients
from bridgeopt.solver.frame import nodes_on_line_load, position_tolerance
from bridgeopt.solver.highs import node_rows
from bridgeopt.solver.layout import scales
from bridgeopt.solver.lp import LPData, LPSolution

__all__ = ["linearise", "volume_gradient"]

#: Relative step of the central differences.
STEP = 1e-6


def _member_derivatives(data: LPData, pair, sense: str):
    """d(cost, vals)/d(lx) and /d(dz) by central differences; vertical members have 0 in lx."""
    a, b = data.a[pair], data.b[pair]
    lx = data.xz[b, 0] - data.xz[a, 0]
    dz = data.xz[b, 1] - data.xz[a, 1]
    vert = lx <= 1e-12
    k = data.k[sense]
    hx = STEP * np.maximum(np.abs(lx), 1e-3)
    hz = STEP * np.maximum(np.abs(dz), 1e-3)
    lx_c = np.where(vert, 1.0, lx)
    c1, v1 = element_coefficients(lx_c + hx, dz, k, sense, vert)
    c0, v0 = element_coefficients(lx_c - hx, dz, k, sense, vert)
    dc_lx = np.where(vert, 0.0, (c1 - c0) / (2 * hx))
    dv_lx = np.where(vert[:, None], 0.0, (v1 - v0) / (2 * hx)[:, None])
    c1, v1 = element_coefficients(lx_c, dz + hz, k, sense, vert)
    c0, v0 = element_coefficients(lx_c, dz - hz, k, sense, vert)
    dc_dz = (c1 - c0) / (2 * hz)
    dv_dz = (v1 - v0) / (2 * hz)[:, None]
    return a, b, dc_lx, dc_dz, dv_lx, dv_dz


def _load_derivatives(problem: Problem, data: LPData) -> sparse.csr_matrix:
    """d(rhs)/dX of the lumped line loads (dimensionless), (2n, 2n)."""
    ref_len, ref_force, _ = scales(problem)
    x0, _, z0, _ = problem.domain.bounds
    xz = data.xz * ref_len + (x0, z0)
    tol = position_tolerance(problem)
    rows, cols, vals = [], [], []
    for q in problem.line_loads:
        on, _ = nodes_on_line_load(xz, q, tol)
        scale = q.intensity * ref_len / ref_force   # rhs_z = +w share / P
        last = len(on) - 1
        for i, node in enumerate(on):
            # (column, value) entries of row 2 node + 1: the neighbours' x and its own
            entries = []
            if i < last:
                entries.append((2 * on[i + 1], 0.5 * scale))
            if i > 0:
                entries.append((2 * on[i - 1], -0.5 * scale))
            if i == 0:
                entries.append((2 * node, -0.5 * scale))
            if i == last:
                entries.append((2 * node, 0.5 * scale))
            for col, val in entries:
                rows.append(2 * node + 1)
                cols.append(col)
                vals.append(val)
    n2 = 2 * len(xz)
    return sparse.csr_matrix((vals, (rows, cols)), shape=(n2, n2))


def linearise(problem: Problem, data: LPData, sol: LPSolution):
    """``gc``, ``G`` and ``R`` of the module docstring at the optimum ``sol``.

    Parameters
    ----------
    problem : Problem
        The frame's problem (line loads, scales).
    data : LPData
        The dimensionless LP at the current nodes.
    sol : LPSolution
        Its optimum.

    Returns
    -------
    gc : (2n,) float array
        ``q0 . dc/dX``, x and z interleaved (dimensionless). [-]
    G : (2n, 2n) scipy.sparse.csr_matrix
        ``d(A q0)/dX`` (dimensionless). [-]
    R : (2n, 2n) scipy.sparse.csr_matrix
        ``d(rhs)/dX`` of the lumped line loads (dimensionless). [-]
    """
    n2 = 2 * len(data.xz)
    gc = np.zeros(n2)
    g_rows, g_cols, g_vals = [], [], []
    for s, sense in enumerate(SENSES):
        sel = sol.sense == s
        if not sel.any():
            continue
        q = sol.force[sel]
        a, b, dc_lx, dc_dz, dv_lx, dv_dz = _member_derivatives(data, sol.pair[sel], sense)
        cs = data.cost_scale[sense]
        # coordinates (xa, za, xb, zb): d/dxa = -d/dlx, d/dxb = +d/dlx, likewise z with dz
        coords = node_rows(a, b)
        dcoord_c = np.column_stack([-dc_lx, -dc_dz, dc_lx, dc_dz]) * cs
        np.add.at(gc, coords, q[:, None] * dcoord_c)
        dcoord_v = np.stack([-dv_lx, -dv_dz, dv_lx, dv_dz], axis=2)   # (m, row, coord)
        g_rows.append(np.repeat(coords, 4, axis=1).ravel())
        g_cols.append(np.tile(coords, (1, 4)).ravel())
        g_vals.append((q[:, None, None] * dcoord_v).ravel())
    if g_rows:
        G = sparse.csr_matrix((np.concatenate(g_vals), (np.concatenate(g_rows),
                                                        np.concatenate(g_cols))), shape=(n2, n2))
    else:
        G = sparse.csr_matrix((n2, n2))
    return gc, G, _load_derivatives(problem, data)


def volume_gradient(problem: Problem, data: LPData, sol: LPSolution) -> np.ndarray:
    """dV*/dX of the dimensionless LP optimum, (2n,), x and z interleaved.

    Envelope theorem: gc - G^T u + R^T u, with u the equality-row duals.

    Parameters
    ----------
    problem : Problem
        The frame's problem (line loads, scales).
    data : LPData
        The dimensionless LP at the current nodes.
    sol : LPSolution
        Its optimum (forces and duals).

    Returns
    -------
    (2n,) float array
        Derivative of the dimensionless optimum volume by the dimensionless node
        coordinates, x and z interleaved. [-]
    """
    gc, G, R = linearise(problem, data, sol)
    u = sol.duals
    return gc - G.T @ u + R.T @ u
