"""Fixed-topology structures: a given set of nodes and members, sized by the LP.

A :class:`Frame` is what geometry optimization moves and what the bridge forms
build: nodes anywhere in the design domain (not only on a grid), members
between them, and for each member the senses it may take and an element-group
label.  :func:`size_frame` finds the member forces of least volume with the same
LP and the same element models (weightless bars, equal-strength cables and
arches, vertical uniform-strength bars) as layout optimization, over exactly
these members.

Supports, mirror-line restraints and loads are read from the frame's
:class:`~bridgeopt.model.problem.Problem` by position: a support or point load acts on
the node at its point, nodes on a mirror line get a free horizontal reaction,
and a line load is shared between the nodes on its line (its two end points
must be nodes).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from bridgeopt.solver.design import Design
from bridgeopt.solver.elements import PHI_LIMIT, SENSES
from bridgeopt.errors import InputError, SolveError
from bridgeopt.solver.ground import Grid
from bridgeopt.solver.layout import design_from_lp, scaled_lp_data, scales
from bridgeopt.solver.lumping import lump_loads, restraint_rows
from bridgeopt.solver.lp import LPData, solve_lp
from bridgeopt.model.problem import Problem

__all__ = ["Frame", "size_frame", "frame_loads", "frame_restraints", "frame_from_design",
           "position_tolerance", "frame_lp_data", "nodes_on_line_load"]

_SENSE_CHOICES = ("tension", "compression", "either")


def position_tolerance(problem: Problem) -> float:
    """Distance within which two points count as the same node. [m]

    Parameters
    ----------
    problem : Problem
        Its domain gives the reference length.

    Returns
    -------
    float
        A millionth of the reference length. [m]
    """
    return 1e-6 * scales(problem)[0]


def _node_at(nodes: np.ndarray, point, tol: float, field: str) -> int:
    d = np.hypot(*(nodes - np.asarray(point, dtype=float)).T)
    i = int(np.argmin(d))
    if d[i] > tol:
        raise InputError(field, [float(v) for v in point],
                         f"a node of the frame (nearest node at [{nodes[i, 0]:.6g}, "
                         f"{nodes[i, 1]:.6g}] m)")
    return i


def nodes_on_line_load(nodes: np.ndarray, q, tol: float) -> tuple[np.ndarray, np.ndarray]:
    """The nodes on line load ``q``, sorted along it, and their x clipped to its ends.

    Parameters
    ----------
    nodes : (n, 2) float array
        Node coordinates. [m]
    q : LineLoad
        A horizontal line load.
    tol : float
        Distance within which a node lies on the load. [m]

    Returns
    -------
    on : (k,) int array
        Indices of the nodes on the load, in order of x. [-]
    x : (k,) float array
        Their x-coordinates, clipped to the load's extent. [m]
    """
    (xs, z), (xe, _) = q.start, q.end
    on = np.nonzero((np.abs(nodes[:, 1] - z) <= tol) & (nodes[:, 0] >= xs - tol)
                    & (nodes[:, 0] <= xe + tol))[0]
    on = on[np.argsort(nodes[on, 0], kind="stable")]
    return on, np.clip(nodes[on, 0], xs, xe)


def frame_loads(problem: Problem, nodes: np.ndarray) -> np.ndarray:
    """Applied loads lumped at ``nodes``, (n, 2). [N]

    Parameters
    ----------
    problem : Problem
        Its point and line loads (a line load's two ends must be nodes).
    nodes : (n, 2) float array
        Node coordinates. [m]

    Returns
    -------
    (n, 2) float array
        Nodal loads (x, z), z upwards. [N]

    Raises
    ------
    InputError
        A point load is not at a node, or a line load's ends are not nodes.
    """
    nodes = np.asarray(nodes, dtype=float)
    tol = position_tolerance(problem)

    def node_of(point, field):
        return _node_at(nodes, point, tol, field)

    def line_nodes(i, q):
        node_of(q.start, f"line_load[{i}].from")
        node_of(q.end, f"line_load[{i}].to")
        return nodes_on_line_load(nodes, q, tol)

    return lump_loads(problem, len(nodes), node_of, line_nodes)


def frame_restraints(problem: Problem, nodes: np.ndarray) -> np.ndarray:
    """Equilibrium rows (2*node + direction) that carry a free reaction.

    Parameters
    ----------
    problem : Problem
        Its supports (at nodes) and mirror lines.
    nodes : (n, 2) float array
        Node coordinates. [m]

    Returns
    -------
    (r,) int array
        Sorted equilibrium-row indices 2*node + (0 for x, 1 for z). [-]
    """
    nodes = np.asarray(nodes, dtype=float)
    tol = position_tolerance(problem)
    return restraint_rows(problem, nodes, lambda p, field: _node_at(nodes, p, tol, field), tol)


@dataclass(frozen=True)
class Frame:
    """A fixed-topology structure to size with the layout-optimization LP.

    Parameters
    ----------
    problem : Problem
        Domain, supports, mirror lines, loads, materials and copies.
    nodes : (n, 2) array
        Node coordinates; they need not lie on a grid. [m]
    start, end : (m,) int arrays
        Member end nodes, in any order (stored left end first, or lower end
        first for a vertical member). [-]
    senses : (m,) str array, optional
        ``"tension"``, ``"compression"`` or ``"either"`` (default) per member.
    group : (m,) str array, optional
        Element-group label per member (``"member"`` by default; forms use
        ``"stay"``, ``"pylon"``, ``"deck"``, ``"cable"``, ``"hanger"`` ...).
    """

    problem: Problem
    nodes: np.ndarray
    start: np.ndarray
    end: np.ndarray
    senses: np.ndarray | None = None
    group: np.ndarray | None = None

    def __post_init__(self) -> None:
        nodes = np.array(self.nodes, dtype=float).reshape(-1, 2)
        a = np.array(self.start, dtype=np.int64).ravel()
        b = np.array(self.end, dtype=np.int64).ravel()
        m = len(a)
        if len(b) != m:
            raise InputError("frame.end", len(b), f"as many member ends as starts ({m})")
        if m and (min(a.min(), b.min()) < 0 or max(a.max(), b.max()) >= len(nodes)):
            raise InputError("frame.members", "out of range", f"node indices 0 to {len(nodes) - 1}")
        if np.any(a == b):
            raise InputError("frame.members", int(np.nonzero(a == b)[0][0]),
                             "members joining two different nodes")
        if not np.all(np.isfinite(nodes)):
            raise InputError("frame.nodes", "not finite", "finite coordinates in m")
        senses = np.full(m, "either") if self.senses is None else np.array(self.senses, dtype=str)
        group = np.full(m, "member") if self.group is None else np.array(self.group, dtype=str)
        bad = ~np.isin(senses, _SENSE_CHOICES)
        if bad.any() or len(senses) != m:
            raise InputError("frame.senses", senses[bad][0] if bad.any() else len(senses),
                             "one of 'tension', 'compression', 'either' per member")
        if len(group) != m:
            raise InputError("frame.group", len(group), f"one label per member ({m})")
        # left end first; the lower end first for a vertical member
        tol = position_tolerance(self.problem)
        dx = nodes[b, 0] - nodes[a, 0]
        flip = (dx < -tol) | ((np.abs(dx) <= tol) & (nodes[b, 1] < nodes[a, 1]))
        a, b = np.where(flip, b, a), np.where(flip, a, b)
        for name, value in (("nodes", nodes), ("start", a), ("end", b), ("senses", senses),
                            ("group", group)):
            value.setflags(write=False)
            object.__setattr__(self, name, value)

    def __len__(self) -> int:
        return len(self.start)

    def moved(self, nodes: np.ndarray) -> "Frame":
        """The same members on other node coordinates.

        Parameters
        ----------
        nodes : (n, 2) float array
            The new node coordinates. [m]
        """
        return Frame(problem=self.problem, nodes=nodes, start=self.start, end=self.end,
                     senses=self.senses, group=self.group)


def frame_lp_data(frame: Frame) -> tuple[LPData, np.ndarray, tuple[float, float, float]]:
    """The dimensionless LP over exactly the frame's members.

    Parameters
    ----------
    frame : Frame
        Nodes [m], members and their allowed senses.

    Returns
    -------
    data : LPData
        The dimensionless LP (nodes divided by the reference length).
    f : (n, 2) float array
        Lumped nodal loads. [N]
    refs : (float, float, float)
        Reference length [m], force [N] and stress [Pa].
    """
    problem = frame.problem
    refs = scales(problem)
    f = frame_loads(problem, frame.nodes)
    a, b = frame.start, frame.end
    allowed = np.column_stack([frame.senses != "compression", frame.senses != "tension"])
    data = scaled_lp_data(problem, frame.nodes, a.astype(np.int32), b.astype(np.int32), f,
                          frame_restraints(problem, frame.nodes),
                          np.zeros(len(a), dtype=np.int64), allowed)
    # a member whose ends share x within the tolerance is vertical: make it exactly so
    # (data.xz is this call's own array)
    xz = data.xz
    vert = np.abs(xz[b, 0] - xz[a, 0]) <= position_tolerance(problem) / refs[0]
    xz[b[vert], 0] = xz[a[vert], 0]
    return data, f, refs


def _check_reach(frame: Frame) -> None:
    """A clear error for members that no equal-strength element can span."""
    problem = frame.problem
    lx = np.abs(frame.nodes[frame.end, 0] - frame.nodes[frame.start, 0])
    for s, sense in enumerate(SENSES):
        k = problem.k(sense)
        if k == 0:
            continue
        may = frame.senses != SENSES[1 - s]
        too_far = may & (k * lx >= PHI_LIMIT)
        only = too_far & (frame.senses == sense)
        if only.any():
            i = int(np.nonzero(only)[0][0])
            raise SolveError("span-limit",
                             f"the {frame.group[i]} member from [{frame.nodes[frame.start[i], 0]:.6g}, "
                             f"{frame.nodes[frame.start[i], 1]:.6g}] m reaches {lx[i]:.6g} m "
                             f"horizontally, but an equal-strength {sense} element carrying its "
                             f"own weight cannot reach further than pi*sigma/(rho*g) = "
                             f"{np.pi / k:.6g} m")


def size_frame(frame: Frame) -> Design:
    """Least-volume member forces of ``frame`` (one LP over exactly its members).

    Parameters
    ----------
    frame : Frame
        Nodes [m], members, their allowed senses and groups, and the problem.

    Returns
    -------
    Design
        With ``members.group`` from the frame; nodes that carry no member, load
        or support are left out.

    Raises
    ------
    InputError
        A support, point load or line-load end is not at a node.
    SolveError
        The members cannot carry the loads to the supports (a mechanism, or a
        member beyond the equal-strength reach pi*sigma/(rho*g)).

    References
    ----------
    .. [1] W.S. Dorn, R.E. Gomory, H.J. Greenberg (1964), J. de Mecanique 3:25-52.
    .. [2] H.E. Fairclough et al. (2018), Proc. R. Soc. A 474:20170726.
    """
    if len(frame) == 0:
        raise SolveError("infeasible", "the frame has no members to carry the loads")
    _check_reach(frame)
    data, f, refs = frame_lp_data(frame)
    try:
        sol = solve_lp(data, member_adding=False)
    except SolveError as err:
        if err.status == "infeasible":
            raise SolveError("infeasible", "these members cannot carry the loads to the "
                             "supports (the frame is a mechanism for this load, or a member "
                             "would need a sense it is not allowed)") from None
        raise
    grid = Grid(xz=data.xz * refs[0] + np.array(frame.problem.domain.bounds)[[0, 2]],
                ij=np.zeros((len(data.xz), 2), dtype=np.int64),
                step=(refs[0], refs[0]), origin=(0.0, 0.0))
    design = design_from_lp(frame.problem, grid, data, sol, f, *refs,
                            group=frame.group[sol.pair])
    return design


def frame_from_design(design: Design, *, senses: str = "either") -> Frame:
    """The members of ``design`` as a frame (each member free to take ``senses``).

    Parameters
    ----------
    design : Design
        A solved design with its problem.
    senses : {"either", "tension", "compression"}
        The sense every member may take.

    Returns
    -------
    Frame
        On the design's nodes, with its members' groups.
    """
    m = design.members
    return Frame(problem=design.problem, nodes=np.array(design.nodes), start=np.array(m.start),
                 end=np.array(m.end), senses=np.full(len(m), senses),
                 group=np.array(m.group))
