"""Shared pieces of the form builders: nodes, members, free parameters, deck, piers.

A builder collects nodes (merged by position), members with their sense and
element group, and free geometric parameters (each a column of the linear node
map of :class:`~bridgeopt.geometry.optimize.NodeMoves`), then returns the
:class:`~bridgeopt.solver.frame.Frame` and its moves.
"""

from __future__ import annotations

import numpy as np

from bridgeopt.errors import InputError
from bridgeopt.solver.frame import Frame, position_tolerance
from bridgeopt.geometry.optimize import NodeMoves
from bridgeopt.model.problem import Problem

__all__ = ["FrameBuilder", "deck_level", "available_heights"]


def deck_level(problem: Problem) -> tuple[float, float, float]:
    """(x start, x end, z) of the deck: the problem's line load. [m]

    Parameters
    ----------
    problem : Problem
        A bridge problem with exactly one line load, the deck.

    Returns
    -------
    (float, float, float)
        x of the deck's start and end, and its height z. [m]
    """
    if len(problem.line_loads) != 1:
        raise InputError("line_load", len(problem.line_loads), "one deck line load for a form")
    (xs, z), (xe, _) = problem.line_loads[0].start, problem.line_loads[0].end
    return xs, xe, z


def available_heights(problem: Problem) -> tuple[float, float]:
    """(rise above, depth below) the deck within the design domain. [m]

    Parameters
    ----------
    problem : Problem
        A bridge problem: its domain, and one line load at deck level.

    Returns
    -------
    (float, float)
        Height of the domain's top above the deck and of the deck above the
        domain's bottom. [m]
    """
    _, _, z0, z1 = problem.domain.bounds
    z = deck_level(problem)[2]
    return z1 - z, z - z0


class FrameBuilder:
    """Collects nodes, members and free parameters of a form on ``problem``.

    Parameters
    ----------
    problem : Problem
        The form's half-span problem (:func:`~bridgeopt.forms.build.form_problem`);
        nodes closer than its position tolerance are merged.
    """

    def __init__(self, problem: Problem) -> None:
        self.problem = problem
        self.tol = position_tolerance(problem)
        self.nodes: list[tuple[float, float]] = []
        self.members: list[tuple[int, int, str, str]] = []
        self.params: list[tuple[str, float, float, dict]] = []
        self._index: dict[tuple[int, int], int] = {}

    def node(self, x: float, z: float) -> int:
        """Index of the node at (x, z), created if new.

        Parameters
        ----------
        x, z : float
            Position; a node within the position tolerance is re-used. [m]

        Returns
        -------
        int
        """
        kx, kz = round(x / self.tol), round(z / self.tol)
        for dx in (-1, 0, 1):
            for dz in (-1, 0, 1):
                i = self._index.get((kx + dx, kz + dz))
                if i is not None:
                    return i
        self.nodes.append((float(x), float(z)))
        self._index[(kx, kz)] = len(self.nodes) - 1
        return len(self.nodes) - 1

    def member(self, a: int, b: int, sense: str, group: str) -> None:
        """A member from node ``a`` to node ``b`` (none when they are the same node).

        Parameters
        ----------
        a, b : int
            End node indices. [-]
        sense : {"tension", "compression", "either"}
            What the member may carry.
        group : str
            Element-group label (``"stay"``, ``"pylon"``, ``"deck"`` ...).
        """
        if a != b:
            self.members.append((a, b, sense, group))

    def chain(self, indices, sense: str, group: str) -> None:
        """Members joining consecutive nodes of ``indices``.

        Parameters
        ----------
        indices : sequence of int
            Node indices in order along the chain. [-]
        sense : {"tension", "compression", "either"}
            Sense of every member of the chain.
        group : str
            Element-group label of every member of the chain.
        """
        for a, b in zip(indices[:-1], indices[1:]):
            self.member(a, b, sense, group)

    def parameter(self, name: str, lower: float, upper: float, moves: dict) -> None:
        """A free parameter; ``moves`` maps (node, 0 for x / 1 for z) to metres per metre.

        Parameters
        ----------
        name : str
            Label of the parameter (``"pylon height"``, ``"sag"`` ...).
        lower, upper : float
            Bounds of the move from the starting geometry. [m]
        moves : dict
            ``{(node, 0 or 1): rate}``: how far each node coordinate moves per metre
            of the parameter. [m/m]
        """
        # a bound a rounding error past the start (e.g. a node starting on its bound) is the start
        self.params.append((name, min(float(lower), 0.0), max(float(upper), 0.0), dict(moves)))

    def deck(self, extra_x=()) -> list[int]:
        """Deck nodes (every node at deck level, the deck's ends and ``extra_x``), joined.

        Parameters
        ----------
        extra_x : sequence of float
            More deck nodes to create at these x. [m]

        Returns
        -------
        list of int
            The deck nodes from left to right.
        """
        xs, xe, z = deck_level(self.problem)
        for x in (xs, xe, *extra_x):
            self.node(x, z)
        on = [i for i, (x, zi) in enumerate(self.nodes)
              if abs(zi - z) <= self.tol and xs - self.tol <= x <= xe + self.tol]
        on.sort(key=lambda i: self.nodes[i][0])
        self.chain(on, "either", "deck")
        return on

    def foundation(self, x: float, top: int) -> None:
        """A pier from node ``top`` (at deck level) down to the support below it, if needed.

        Nothing when a support holds the deck node vertically (an abutment);
        otherwise a compression member to the highest support on the line x
        that holds vertically.

        Parameters
        ----------
        x : float
            The pier's line. [m]
        top : int
            The deck node on that line. [-]
        """
        z_deck = self.nodes[top][1]
        below = [s for s in self.problem.supports if "z" in s.fix
                 and abs(s.at[0] - x) <= self.tol and s.at[1] <= z_deck + self.tol]
        if not below:
            raise InputError("form", "no support", f"a support below x = {x:.6g} m "
                             "(a pylon, tower or arch springing needs a foundation)")
        s = max(below, key=lambda s: s.at[1])
        if s.at[1] < z_deck - self.tol:
            self.member(self.node(x, s.at[1]), top, "compression", "pier")

    def build(self) -> tuple[Frame, NodeMoves | None]:
        """The frame of the collected nodes and members, and its free geometry.

        Every support of the problem becomes a node, so that ``size_frame`` finds it.

        Returns
        -------
        Frame
        NodeMoves or None
            None when no parameter was added.
        """
        for s in self.problem.supports:   # size_frame looks every support up among the nodes
            self.node(*s.at)
        nodes = np.array(self.nodes, dtype=float)
        a, b, senses, group = (np.array(v) for v in zip(*self.members))
        frame = Frame(problem=self.problem, nodes=nodes, start=a.astype(np.int64),
                      end=b.astype(np.int64), senses=senses, group=group)
        if not self.params:
            return frame, None
        T = np.zeros((2 * len(nodes), len(self.params)))
        for j, (_, _, _, moves) in enumerate(self.params):
            for (i, d), c in moves.items():
                T[2 * i + d, j] = c
        names, lower, upper, _ = zip(*self.params)
        return frame, NodeMoves(T=T, lower=np.array(lower), upper=np.array(upper),
                                names=tuple(names))


def funicular_profile(x, loads) -> np.ndarray:
    """Shape of the funicular polygon of a symmetric half span, 0 at x[0] and 1 at x[-1]. [-]

    ``loads`` (len(x) - 1 values, downwards) act at the nodes x[1:]; the last
    node lies on the mirror line and carries the half model's share.  With
    horizontal force H the segment slopes follow from nodal balance,
    H (s_right - s_left) = P, and the mirror condition (zero slope across
    mid-span gives s_last = -P_last / H), so the drop from the first node is
    c_j / H with c_j = sum_{l <= j} dx_l sum_{i >= l} P_i.  Dividing by the drop
    at mid-span removes H: the result is the profile for any sag or rise (a
    hanging cable drops by it, an arch rises by it).  A uniform load gives the
    parabola 2t - t^2 exactly (common practice statics).
    """
    x = np.asarray(x, dtype=float)
    p = np.asarray(loads, dtype=float)
    carried = np.cumsum(p[::-1])[::-1]          # sum_{i >= l} P_i for segment l
    c = np.concatenate([[0.0], np.cumsum(np.diff(x) * carried)])
    if not c[-1] > 0:
        raise ValueError("the loads must push the funicular one way (positive total)")
    return c / c[-1]


def funicular_heights(x, *, start: float, end: float, node_loads, k_line: float,
                      line_sense: str, k_drop: float, drop_base: float):
    """Heights of the nodes of a symmetric half cable or arch that is exactly funicular.

    The line runs from a fixed node (x[0], ``start``) to the node on the mirror
    line (x[-1], ``end``).  Each node x[1:] carries a vertical member (hanger or
    column) to the deck at height ``drop_base``, whose bottom force is the
    deck-load share ``node_loads`` (the last one the half model's share); such a
    member delivers ``F exp(k_drop h)`` to the line node (bar of uniform
    strength, h its length).  The segments are equal-strength elements of the
    line's material and sense, with a common horizontal force H; every node
    balances vertically, the mirror node with the mirror image of its segment.
    Unknowns: the inner heights and H; solved with scipy.optimize.root
    (MINPACK's hybrid Powell method) starting from the funicular of the deck
    loads alone (:func:`funicular_profile`).

    Returns
    -------
    ndarray or None
        Heights z of all nodes [m], or None when no funicular is found (e.g. an
        element beyond the equal-strength reach).
    """
    from scipy.optimize import root

    from bridgeopt.solver.elements import curved_coefficients

    x = np.asarray(x, dtype=float)
    f = np.asarray(node_loads, dtype=float)
    n = len(x) - 1
    scale_l = x[-1] - x[0]
    scale_f = float(f.sum())
    guess_shape = funicular_profile(x, f)
    z0 = start + (end - start) * guess_shape
    # H of the weightless funicular: total drop = c_n / H
    c_n = float(np.sum(np.diff(x) * np.cumsum(f[::-1])[::-1]))
    h0 = c_n / max(abs(end - start), 1e-12 * scale_l)

    def heights(v):
        return np.concatenate([[start], start + (v[:-1]) * scale_l, [end]]) if n > 1 else \
            np.array([start, end])

    def residual(v):
        z = heights(v)
        H = np.exp(v[-1]) * scale_f
        _, _, pzf, _, qzf = curved_coefficients(np.diff(x), np.diff(z), k_line, line_sense)
        drop = f * np.exp(k_drop * np.abs(z[1:] - drop_base))
        up = H * qzf.copy()
        up[:-1] += H * pzf[1:]
        return (up - drop) / scale_f

    v0 = np.concatenate([(z0[1:-1] - start) / scale_l, [np.log(h0 / scale_f)]])
    with np.errstate(all="ignore"):
        sol = root(residual, v0, method="hybr", options={"xtol": 1e-12})
        # judged by the residual: near round-off the solver may stop with a "no progress"
        # flag at a solution that is as good as it gets
        ok = np.all(np.isfinite(sol.x)) and np.abs(residual(sol.x)).max() < 1e-9
    if not ok:
        return None
    return heights(sol.x)
