"""The free geometry of geometry optimization: :class:`NodeMoves` and the default rules.

Rules for the default moves (:func:`default_moves`): supports, point-loaded
nodes and the ends of line loads stay put; other nodes on a line load slide
along it only, at most ``deck_slide`` grid steps from where a deck node stood
at the start; nodes on a mirror line slide along it only; the two ends of a
vertical member share their x, so hangers and columns stay vertical.
:func:`keeps_rules` refuses moved nodes outside the domain or in an excluded
zone, and members that would become vertical or change their left/right order.

References
----------
.. [1] L. He, M. Gilbert (2015), "Rationalization of trusses generated via layout
   optimization", Struct. Multidisc. Optim. 52:677-694.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from bridgeopt.errors import InputError
from bridgeopt.geometry.topology import NodeRoles, groups, node_roles
from bridgeopt.model.plane import points_in_polygon
from bridgeopt.solver.frame import Frame, position_tolerance
from bridgeopt.solver.ground import Grid, members_clear_of_zones

__all__ = ["NodeMoves", "default_moves", "deck_homes", "keeps_rules", "MIN_REACH",
           "DECK_SLIDE"]

#: Smallest horizontal reach of a non-vertical member during node moves, as a
#: fraction of the reference length (the element formulas are singular at 0).
MIN_REACH = 1e-4
#: Largest slide of a loaded deck node along its line, in grid steps.
DECK_SLIDE = 0.25


@dataclass(frozen=True)
class NodeMoves:
    """Free geometry as a linear map of parameters.

    ``nodes = base + (T @ p).reshape(n, 2)`` with ``lower <= p <= upper``;
    row ``2*i`` of ``T`` moves x of node i and row ``2*i + 1`` its z.

    Parameters
    ----------
    T : (2n, k) array
        How each parameter moves the node coordinates. [-]
    lower, upper : (k,) arrays
        Bounds of the parameters (0 is the starting geometry). [m]
    names : tuple of str
        A label per parameter, for reports.
    """

    T: np.ndarray
    lower: np.ndarray
    upper: np.ndarray
    names: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        T = np.asarray(self.T, dtype=float)
        if T.ndim != 2:
            raise InputError("moves.T", T.shape, "a (2 * nodes, parameters) matrix")
        lo = np.broadcast_to(np.asarray(self.lower, dtype=float), (T.shape[1],)).copy()
        hi = np.broadcast_to(np.asarray(self.upper, dtype=float), (T.shape[1],)).copy()
        if np.any(lo > 0) or np.any(hi < 0):
            raise InputError("moves.lower", list(lo), "bounds with lower <= 0 <= upper "
                             "(the start geometry must be allowed)")
        names = tuple(self.names) or tuple(f"p{i}" for i in range(T.shape[1]))
        object.__setattr__(self, "T", T)
        object.__setattr__(self, "lower", lo)
        object.__setattr__(self, "upper", hi)
        object.__setattr__(self, "names", names)

    @property
    def size(self) -> int:
        return self.T.shape[1]


def deck_homes(frame: Frame, roles: NodeRoles | None = None) -> np.ndarray:
    """x of the frame's nodes on line loads: where deck nodes may slide from. [m]

    Parameters
    ----------
    frame : Frame
        The frame (nodes [m], problem).
    roles : NodeRoles, optional
        Its node roles (default: :func:`~bridgeopt.geometry.topology.node_roles`).

    Returns
    -------
    (d,) float array
        Sorted x of the nodes whose z is fixed by a line load. [m]
    """
    roles = roles or node_roles(frame)
    return np.sort(np.asarray(frame.nodes)[roles.z_fixed, 0])


def default_moves(frame: Frame, roles: NodeRoles | None = None, *,
                  deck_slide: float = DECK_SLIDE, homes: np.ndarray | None = None) -> NodeMoves:
    """The moves allowed by the rules in the module docstring, bounded by the domain's box.

    ``deck_slide`` is the largest slide of a loaded deck node, in grid steps, from
    the nearest of ``homes`` (default: :func:`deck_homes` of this frame). [-, m]

    Parameters
    ----------
    frame : Frame
        The frame whose nodes move (nodes [m], problem).
    roles : NodeRoles, optional
        Its node roles (default: :func:`~bridgeopt.geometry.topology.node_roles`).
    deck_slide : float
        Largest slide of a loaded deck node along its line. [grid steps]
    homes : float array, optional
        x of the deck nodes' starting places (default :func:`deck_homes`). [m]

    Returns
    -------
    NodeMoves
        One parameter per free coordinate (or group of coordinates moving together). [m]
    """
    roles = roles or node_roles(frame)
    homes = deck_homes(frame, roles) if homes is None else np.sort(np.asarray(homes, float))
    n = len(frame.nodes)
    x0, x1, z0, z1 = frame.problem.domain.bounds
    tol = position_tolerance(frame.problem)
    a, b = frame.start, frame.end
    vert = np.abs(frame.nodes[b, 0] - frame.nodes[a, 0]) <= tol
    # x: nodes joined by vertical members move together
    xgroup = groups(n, np.column_stack([a[vert], b[vert]]))
    cols, lower, upper, names = [], [], [], []
    for g in np.unique(xgroup):
        members_ = np.nonzero(xgroup == g)[0]
        if np.any(roles.x_fixed[members_]):
            continue
        col = np.zeros(2 * n)
        col[2 * members_] = 1.0
        x = frame.nodes[members_[0], 0]
        cols.append(col)
        # a deck node slides at most deck_slide grid steps, so that the line load is
        # never lumped over much longer intervals than the problem's spacing
        lo, hi = x0 - x, x1 - x
        if np.any(roles.z_fixed[members_]) and len(homes):
            home = homes[np.argmin(np.abs(homes - x))]
            reach = deck_slide * frame.problem.spacing
            lo, hi = max(lo, home - reach - x), min(hi, home + reach - x)
        lower.append(lo)
        upper.append(hi)
        names.append(f"x of node {members_[0]}" + (f" (+{len(members_) - 1} tied)"
                                                   if len(members_) > 1 else ""))
    for i in np.nonzero(~roles.z_fixed)[0]:
        col = np.zeros(2 * n)
        col[2 * i + 1] = 1.0
        cols.append(col)
        lower.append(z0 - frame.nodes[i, 1])
        upper.append(z1 - frame.nodes[i, 1])
        names.append(f"z of node {i}")
    T = np.column_stack(cols) if cols else np.zeros((2 * n, 0))
    return NodeMoves(T=T, lower=np.minimum(lower, 0.0), upper=np.maximum(upper, 0.0),
                     names=tuple(names))


def keeps_rules(frame: Frame, nodes: np.ndarray, vertical: np.ndarray, ref_len: float) -> bool:
    """True when ``nodes`` keep to the rules (left/right order, reach, domain, zones).

    Parameters
    ----------
    frame : Frame
        The frame whose nodes move (members, problem).
    nodes : (n, 2) float array
        The moved node coordinates. [m]
    vertical : (m,) bool array
        Members that are vertical (and stay so).
    ref_len : float
        Reference length of the problem. [m]

    Returns
    -------
    bool
        False when a non-vertical member's reach falls below ``MIN_REACH * ref_len``,
        or a node or member leaves the domain or enters an excluded zone.
    """
    a, b = frame.start, frame.end
    lx = nodes[b, 0] - nodes[a, 0]
    if np.any(lx[~vertical] < MIN_REACH * ref_len):
        return False
    x0, x1, z0, z1 = frame.problem.domain.bounds
    slack = 1e-9 * ref_len
    if (np.any(nodes[:, 0] < x0 - slack) or np.any(nodes[:, 0] > x1 + slack)
            or np.any(nodes[:, 1] < z0 - slack) or np.any(nodes[:, 1] > z1 + slack)):
        return False
    dom = frame.problem.domain
    if not dom.is_box:
        tol = 1e-7 * ref_len
        if not points_in_polygon(nodes, dom.outline, boundary=True, tol=tol).all():
            return False
        for zone in dom.excluded:
            if points_in_polygon(nodes, zone, boundary=False, tol=tol).any():
                return False
        grid = Grid(xz=nodes, ij=np.zeros((len(nodes), 2), dtype=np.int64),
                    step=(ref_len, ref_len), origin=(0.0, 0.0))
        if not members_clear_of_zones(frame.problem, grid, a, b).all():
            return False
    return True
