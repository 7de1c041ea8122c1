"""Topology tidying for geometry optimization: node roles, merging, pruning, joining.

* :func:`node_roles` says which coordinates of each node the rules hold:
  supports, point-loaded nodes and the ends of line loads are pinned; nodes on
  a line load keep their z (they slide along the deck); nodes on a mirror line
  keep their x.
* :func:`simplify` turns a sized design into a smaller frame: members whose
  force vanishes are dropped, nodes closer than a tolerance merge, and the two
  members of an unloaded, unsupported node that only passes force through are
  joined into one (a pin joint between two straight bars in line, or between
  two equal-strength elements with the same horizontal force and a common
  tangent, is the same element as the single member between the outer ends).

References
----------
.. [1] L. He, M. Gilbert (2015), "Rationalization of trusses generated via layout
   optimization", Struct. Multidisc. Optim. 52:677-694.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import sparse
from scipy.sparse.csgraph import connected_components
from scipy.spatial import cKDTree

from bridgeopt.solver.design import Design
from bridgeopt.solver.frame import Frame, frame_from_design, position_tolerance

__all__ = ["NodeRoles", "node_roles", "simplify", "groups"]


@dataclass(frozen=True)
class NodeRoles:
    """What the rules hold of each node (boolean arrays, one entry per node).

    Parameters
    ----------
    pinned : (n,) bool array
        A support, point load or line-load end is there: the node does not move.
    x_fixed : (n,) bool array
        Pinned, or on a mirror line: x does not move.
    z_fixed : (n,) bool array
        Pinned, or on a line load (slides along the deck): z does not move.
    loaded : (n,) bool array
        Carries an applied load or a restraint: never joined away.
    """

    pinned: np.ndarray      # support, point load or line-load end: does not move
    x_fixed: np.ndarray     # pinned or on a mirror line
    z_fixed: np.ndarray     # pinned or on a line load (slides along the deck)
    loaded: np.ndarray      # carries an applied load or a restraint: never joined away


def node_roles(frame: Frame) -> NodeRoles:
    """Roles of the nodes of ``frame`` from its problem (by position).

    Parameters
    ----------
    frame : Frame
        Nodes [m] and the problem whose supports, loads and mirror lines give the roles.

    Returns
    -------
    NodeRoles
        One entry per node of the frame.
    """
    problem, nodes = frame.problem, np.asarray(frame.nodes)
    tol = position_tolerance(problem)
    n = len(nodes)

    def at(point) -> np.ndarray:
        return np.hypot(*(nodes - np.asarray(point, dtype=float)).T) <= tol

    pinned = np.zeros(n, dtype=bool)
    for s in problem.supports:
        pinned |= at(s.at)
    for load in problem.loads:
        pinned |= at(load.at)
    on_line = np.zeros(n, dtype=bool)
    for q in problem.line_loads:
        pinned |= at(q.start) | at(q.end)
        on_line |= ((np.abs(nodes[:, 1] - q.start[1]) <= tol) & (nodes[:, 0] >= q.start[0] - tol)
                    & (nodes[:, 0] <= q.end[0] + tol))
    mirror = np.zeros(n, dtype=bool)
    for m in problem.mirror_lines:
        mirror |= np.abs(nodes[:, 0] - m) <= tol
    return NodeRoles(pinned=pinned, x_fixed=pinned | mirror, z_fixed=pinned | on_line,
                     loaded=pinned | on_line | mirror)


def groups(n: int, pairs: np.ndarray) -> np.ndarray:
    """Label of each of ``n`` nodes; nodes linked through ``pairs`` (m, 2) share one.

    Parameters
    ----------
    n : int
        Number of nodes. [-]
    pairs : (m, 2) int array
        Linked node pairs. [-]

    Returns
    -------
    (n,) int array
        Connected-component label of each node, 0 to (components - 1). [-]
    """
    pairs = np.asarray(pairs, dtype=np.int64).reshape(-1, 2)
    graph = sparse.coo_matrix((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])), shape=(n, n))
    return connected_components(graph, directed=False)[1]


def _clusters(nodes: np.ndarray, roles: NodeRoles, tol: float) -> np.ndarray:
    """Cluster of each node, named by its lowest node index.

    Nodes closer than ``tol`` share one; pinned nodes never pair.
    """
    n = len(nodes)
    if tol <= 0 or n < 2:
        return np.arange(n)
    pairs = np.array(sorted(cKDTree(nodes).query_pairs(tol)), dtype=np.int64).reshape(-1, 2)
    pairs = pairs[~(roles.pinned[pairs[:, 0]] & roles.pinned[pairs[:, 1]])]
    component = groups(n, pairs)
    first = np.full(component.max() + 1, n)
    np.minimum.at(first, component, np.arange(n))
    label = first[component]    # each cluster is named by its lowest node
    for c in np.unique(label):  # a chain that links two pinned nodes does not merge
        members = np.nonzero(label == c)[0]
        if roles.pinned[members].sum() > 1:
            label[members] = members
    return label


def _merged_positions(nodes, roles: NodeRoles, label):
    out = np.array(nodes, dtype=float)
    for c in np.unique(label):
        members = np.nonzero(label == c)[0]
        if len(members) == 1:
            continue
        for axis, fixed in ((0, roles.x_fixed), (1, roles.z_fixed)):
            held = members[fixed[members]]
            out[members, axis] = (nodes[held[0], axis] if len(held)
                                  else nodes[members, axis].mean())
    return out


def _join_pass_through(a, b, sense, roles: NodeRoles, vertical) -> tuple:
    """Join members meeting two at a time at unloaded nodes; returns new (a, b, sense)."""
    a, b, sense = list(a), list(b), list(sense)
    changed = True
    while changed:
        changed = False
        ends = np.array(a + b)
        degree = np.bincount(ends, minlength=len(roles.loaded))
        for node in np.nonzero((degree == 2) & ~roles.loaded)[0]:
            at = [m for m in range(len(a)) if a[m] == node or b[m] == node]
            if len(at) != 2 or sense[at[0]] != sense[at[1]]:
                continue
            m0, m1 = at
            if vertical(a[m0], b[m0]) != vertical(a[m1], b[m1]):
                continue
            p = a[m0] if b[m0] == node else b[m0]
            q = a[m1] if b[m1] == node else b[m1]
            if p == q:
                continue
            joined = sense[m0]
            for m in sorted(at, reverse=True):
                del a[m], b[m], sense[m]
            a.append(p)
            b.append(q)
            sense.append(joined)
            changed = True
            break
    return a, b, sense


def simplify(design: Design, *, merge_tolerance: float,
             slack_tolerance: float = 1e-6) -> Frame | None:
    """A smaller frame for ``design``, or None when nothing would change.

    Parameters
    ----------
    design : Design
        A sized layout (from :func:`~bridgeopt.solver.frame.size_frame` or layout
        optimization).
    merge_tolerance : float
        Nodes closer than this merge. [m]
    slack_tolerance : float
        Members whose largest end force is below this fraction of the largest
        in the design are dropped. [-]

    Returns
    -------
    Frame or None
        The merged, pruned and joined frame (every member free in sense), or None
        when no member is dropped, no nodes merge and none are joined.
    """
    frame = frame_from_design(design)
    roles = node_roles(frame)
    nodes = np.asarray(frame.nodes, dtype=float)
    force = design.members.axial_force
    keep = force >= slack_tolerance * force.max()
    label = _clusters(nodes, roles, merge_tolerance)
    merged = _merged_positions(nodes, roles, label)
    a, b = label[frame.start[keep]], label[frame.end[keep]]
    sense = np.array(design.members.sense)[keep]
    ok = a != b
    a, b, sense = a[ok], b[ok], sense[ok]
    # one member per node pair
    key = np.sort(np.column_stack([a, b]), axis=1)
    _, first = np.unique(key, axis=0, return_index=True)
    first = np.sort(first)
    a, b, sense = a[first], b[first], sense[first]
    tol = position_tolerance(design.problem)

    def vertical(i, j) -> bool:
        return abs(merged[i, 0] - merged[j, 0]) <= tol

    a2, b2, _ = _join_pass_through(a, b, sense, roles, vertical)
    if keep.all() and len(np.unique(label)) == len(label) and len(a2) == len(a):
        return None
    a2, b2 = np.asarray(a2, dtype=np.int64), np.asarray(b2, dtype=np.int64)
    used = np.unique(np.concatenate([a2, b2, np.nonzero(roles.pinned)[0]]))
    index = -np.ones(len(nodes), dtype=np.int64)
    index[used] = np.arange(len(used))
    return Frame(problem=design.problem, nodes=merged[used], start=index[a2], end=index[b2],
                 senses=np.full(len(a2), "either"))
