"""Loads and restraints at nodes: the one lumping rule for the grid and for frames.

A point load acts on the node at its point; a uniform line load is shared
between the nodes on its line with linear (hat) shape functions
(:func:`interval_shares`), so the lumped loads have the load's resultant and
moment (common practice of the finite element method); a support restrains the
equilibrium rows of its node, and every node on a mirror line gets a free
horizontal reaction.  :func:`lump_loads` and :func:`restraint_rows` take the
way nodes are found as arguments; :func:`nodal_loads` and
:func:`restrained_rows` apply them to a ground-structure grid, and
:mod:`bridgeopt.solver.frame` to a frame's nodes.
"""

from __future__ import annotations

import numpy as np

from bridgeopt.errors import InputError
from bridgeopt.model.problem import Problem
from bridgeopt.solver.ground import Grid

__all__ = ["interval_shares", "line_load_shares", "lump_loads", "nodal_loads", "restraint_rows", "restrained_rows"]


def interval_shares(x: np.ndarray, start: float | None = None,
                    end: float | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Shares of a unit uniform line load on [start, end] sent to each interval's two ends. [m]

    The one lumping rule of line loads: the load on the part [lo, hi] of the
    interval [x0, x1] under it goes to its ends by linear (hat) shape functions,
    ``(x1 (hi - lo) - (hi^2 - lo^2) / 2) / (x1 - x0)`` to x0 and the rest to x1,
    so the shares have the load's resultant and moment.

    Parameters
    ----------
    x : (p,) float array
        Sorted positions along the line of the nodes on it, covering the load. [m]
    start, end : float, optional
        Ends of the load (default: the first and last node). [m]

    Returns
    -------
    share0, share1 : (p - 1,) float arrays
        Load sent to the left and the right end of each interval. [m]
    """
    x = np.asarray(x, dtype=float)
    xs = x[0] if start is None else start
    xe = x[-1] if end is None else end
    x0, x1 = x[:-1], x[1:]
    lo, hi = np.maximum(x0, xs), np.minimum(x1, xe)
    under = hi > lo
    with np.errstate(invalid="ignore", divide="ignore"):
        share0 = np.where(under, (x1 * (hi - lo) - 0.5 * (hi * hi - lo * lo)) / (x1 - x0), 0.0)
    share1 = np.where(under, (hi - lo) - share0, 0.0)
    return share0, share1


def line_load_shares(x: np.ndarray, start: float | None = None,
                     end: float | None = None) -> np.ndarray:
    """Share of a unit uniform line load on [start, end] taken by each node at ``x``. [m]

    The sums of :func:`interval_shares` at each node.

    Parameters
    ----------
    x : (p,) float array
        Sorted node positions along the line, as :func:`interval_shares`. [m]
    start, end : float, optional
        Ends of the load (default: the first and last node). [m]

    Returns
    -------
    (p,) float array
        Length of unit load taken by each node; they sum to ``end - start``. [m]
    """
    share0, share1 = interval_shares(x, start, end)
    share = np.zeros(len(share0) + 1)
    share[1:] += share1
    share[:-1] += share0
    return share


def lump_loads(problem: Problem, n: int, node_of, line_nodes) -> np.ndarray:
    """Point and line loads of ``problem`` lumped at ``n`` nodes, (n, 2). [N]

    Parameters
    ----------
    problem : Problem
        Its ``loads`` and ``line_loads`` are lumped.
    n : int
        Number of nodes. [-]
    node_of : callable
        ``node_of(point, field) -> int``: the node at a point load (raising
        :class:`InputError` naming ``field`` if none).
    line_nodes : callable
        ``line_nodes(i, line_load) -> (nodes, x)``: the nodes on line load i,
        sorted along it, and their positions along it [m].

    Returns
    -------
    (n, 2) float array
        Nodal loads (x, z), z upwards; line loads act downwards. [N]
    """
    f = np.zeros((n, 2))
    for i, load in enumerate(problem.loads):
        f[node_of(load.at, f"load[{i}].at")] += load.force
    for i, q in enumerate(problem.line_loads):
        on, x = line_nodes(i, q)
        share0, share1 = interval_shares(x, q.start[0], q.end[0])
        f[on[1:], 1] -= q.intensity * share1   # from the interval on the left, then
        f[on[:-1], 1] -= q.intensity * share0  # from the one on the right
    return f


def nodal_loads(problem: Problem, grid: Grid) -> np.ndarray:
    """Applied loads lumped at grid nodes, (n, 2). [N]

    A line load is shared between the nodes on its line with linear (hat)
    shape functions (:func:`interval_shares`), so the lumped loads have the
    same resultant and moment; its ends may lie between nodes.

    Parameters
    ----------
    problem : Problem
        Loads and line loads to lump.
    grid : Grid
        The ground structure's nodes. [m]

    Returns
    -------
    (n, 2) float array
        Nodal loads (x, z) at the grid's nodes. [N]

    Raises
    ------
    InputError
        A point load is not at a grid node, or a line load does not run along
        grid nodes.
    """
    tol = 1e-6 * max(grid.step)

    def line_nodes(i, q):
        (xs, z), (xe, _) = q.start, q.end
        on = np.nonzero((np.abs(grid.xz[:, 1] - z) <= tol)
                        & (grid.xz[:, 0] >= xs - grid.step[0] + tol)
                        & (grid.xz[:, 0] <= xe + grid.step[0] - tol))[0]
        on = on[np.argsort(grid.xz[on, 0])]
        x = grid.xz[on, 0]
        if len(on) < 2 or x[0] > xs + tol or x[-1] < xe - tol:
            raise InputError(f"line_load[{i}].from", [xs, z],
                             "a horizontal line through grid nodes of the domain, "
                             "from one node to another")
        return on, x

    return lump_loads(problem, grid.n, grid.node_at, line_nodes)


def restraint_rows(problem: Problem, xz: np.ndarray, node_of, tol: float) -> np.ndarray:
    """Equilibrium rows (2*node + direction) that carry a free reaction.

    Parameters
    ----------
    problem : Problem
        Its supports and mirror lines.
    xz : (n, 2) float array
        Node coordinates. [m]
    node_of : callable
        ``node_of(point, field) -> int``: the node at a support.
    tol : float
        Distance within which a node lies on a mirror line. [m]

    Returns
    -------
    (r,) int array
        Sorted row indices 2*node + (0 for x, 1 for z). [-]
    """
    rows = set()
    for i, s in enumerate(problem.supports):
        node = node_of(s.at, f"support[{i}].at")
        if "x" in s.fix:
            rows.add(2 * node)
        if "z" in s.fix:
            rows.add(2 * node + 1)
    for m in problem.mirror_lines:
        for node in np.nonzero(np.abs(xz[:, 0] - m) <= tol)[0]:
            rows.add(2 * int(node))
    return np.array(sorted(rows), dtype=np.int64)


def restrained_rows(problem: Problem, grid: Grid) -> np.ndarray:
    """Equilibrium rows (2*node + direction) of the grid that carry a free reaction.

    Parameters
    ----------
    problem : Problem
        Its supports and mirror lines.
    grid : Grid
        The ground structure's nodes. [m]

    Returns
    -------
    (r,) int array
        Sorted row indices 2*node + (0 for x, 1 for z). [-]
    """
    return restraint_rows(problem, grid.xz, grid.node_at, 1e-6 * max(grid.step))
