"""Geometry optimization: move the nodes of a layout to lower its volume, then tidy it.

A layout straight from a grid is accurate but busy.  Starting from a design (or
any :class:`~bridgeopt.solver.frame.Frame`), :func:`optimize_geometry`

1. keeps the members that carry force, and joins the two members of an
   unloaded node that only passes force through;
2. re-chooses the members among all pairs of the current nodes (a small full
   ground structure: the volume can only fall);
3. moves the free node coordinates to lower the LP optimum V*(X), topology
   fixed, by sequential linear programming with a move limit: each step solves
   the LP linearised in the forces and the node moves together (the
   coefficient derivatives come from :mod:`bridgeopt.geometry.sensitivity`), and is kept
   only if the re-solved volume is lower;
4. merges nodes closer than a tolerance, drops members whose force vanishes,
   re-sizes, and repeats from 2 until nothing changes.

Rules for the default moves: supports, point-loaded nodes and the ends of line
loads stay put; other nodes on a line load slide along it only (its load is
re-shared between them), at most ``deck_slide`` grid steps from where a deck
node stood at the start, so that the load is never lumped over much longer
intervals than the problem's spacing;
nodes on a mirror line slide along it only; the two
ends of a vertical member share their x, so hangers and columns stay vertical;
nodes stay inside the domain and out of excluded zones, and no member may
become vertical or change its left/right order (a move that would is refused).

References
----------
.. [1] L. He, M. Gilbert (2015), "Rationalization of trusses generated via layout
   optimization", Struct. Multidisc. Optim. 52:677-694.
.. [2] H.E. Fairclough, M. Gilbert, A.V. Pichugin, A. Tyas, I. Firth (2018),
   Proc. R. Soc. A 474:20170726 (equal-strength self-weight elements).
"""

from __future__ import annotations

import time

import numpy as np
from scipy import sparse

from bridgeopt.errors import InputError, SolveError
from bridgeopt.geometry.moves import DECK_SLIDE, NodeMoves, deck_homes, default_moves, keeps_rules
from bridgeopt.geometry.sensitivity import linearise
from bridgeopt.geometry.topology import node_roles, simplify
from bridgeopt.solver.design import Design
from bridgeopt.solver.frame import (Frame, frame_from_design, frame_lp_data, position_tolerance,
                                    size_frame)
from bridgeopt.solver.ground import Grid, members_clear_of_zones
from bridgeopt.solver.highs import (DEFAULT_TOL, ColumnSet, solve_columns, stack_columns,
                                    unit_columns)
from bridgeopt.solver.layout import scales
from bridgeopt.solver.lp import lp_columns, solve_lp

__all__ = ["NodeMoves", "default_moves", "optimize_geometry"]


#: Members within this many grid steps of vertical are made vertical between rounds
#: (their ends then move together), since the element formulas are singular as a
#: curved member turns vertical.
SNAP = 0.02
#: Stop rule for the node moves: relative volume gain of a kept step.
FTOL = 1e-7


class _Geometry:
    """The LP optimum of a frame as its nodes move: nodes = base + T p (p in reference lengths)."""

    def __init__(self, frame: Frame, moves: NodeMoves) -> None:
        self.frame = frame
        self.T = moves.T
        self.ref_len = scales(frame.problem)[0]
        self.base = np.asarray(frame.nodes, dtype=float)
        tol = position_tolerance(frame.problem)
        self.vertical = np.abs(self.base[frame.end, 0] - self.base[frame.start, 0]) <= tol

    def nodes(self, p: np.ndarray) -> np.ndarray:
        return self.base + (self.T @ (np.asarray(p) * self.ref_len)).reshape(-1, 2)

    def solve(self, p):
        """(LP data, LP optimum) at ``p``, or None where the geometry is refused or fails."""
        nodes = self.nodes(p)
        if not keeps_rules(self.frame, nodes, self.vertical, self.ref_len):
            return None
        data, _, _ = frame_lp_data(self.frame.moved(nodes))
        try:
            return data, solve_lp(data, member_adding=False)
        except SolveError:
            return None


def _slp_step(problem, data, sol, T: np.ndarray, lower, upper):
    """Parameter step of the linearised problem within [lower, upper], or None.

    Variables: member forces q (every allowed column at the current geometry),
    free reactions, and the step dp.  Rows: A q + E r + (G - R) T dp = rhs, the
    linearised equilibrium; cost c.q + (gc T).dp.
    """
    gc, G, R = linearise(problem, data, sol)
    n2 = 2 * len(data.xz)
    pair = np.arange(len(data.a))
    members = [lp_columns(data, pair, s)[1] for s in range(2)]
    moves = sparse.csc_matrix(T)
    step = ColumnSet(cost=np.asarray(moves.T @ gc).ravel(), lower=np.asarray(lower, dtype=float),
                     upper=np.asarray(upper, dtype=float),
                     matrix=sparse.csc_matrix((G - R) @ moves))
    rhs = -np.asarray(data.load, dtype=float)
    # HiGHS's default tolerance (the step's LP always had it): the step is only a proposal,
    # kept or refused by the exact LP re-solved at the moved nodes
    res = solve_columns(stack_columns(*members, unit_columns(data.fixed, n2), step), rhs, rhs,
                        tolerance=DEFAULT_TOL)
    if res.status != "optimal":
        return None
    return res.x[-T.shape[1]:]


def _move(frame: Frame, moves: NodeMoves, max_iterations: int) -> Frame:
    """The frame with its nodes moved to a local minimum of the volume.

    Sequential linear programming with a move limit (trust region): a step is
    kept only if the re-solved volume is lower; the limit grows after a kept
    step and halves after a refused one.
    """
    if moves.size == 0:
        return frame
    geo = _Geometry(frame, moves)
    lo, hi = moves.lower / geo.ref_len, moves.upper / geo.ref_len
    p = np.zeros(moves.size)
    state = geo.solve(p)
    if state is None:  # e.g. a member left nearly vertical by a merge: leave the nodes be
        return frame
    spacing = frame.problem.spacing / geo.ref_len
    limit, smallest = 0.5 * spacing, 1e-7 * spacing
    for _ in range(max_iterations):
        data, sol = state
        dp = _slp_step(frame.problem, data, sol, moves.T, np.maximum(lo - p, -limit),
                       np.minimum(hi - p, limit))
        trial = None if dp is None or not np.any(dp) else geo.solve(p + dp)
        if trial is not None and trial[1].objective < sol.objective * (1 - 1e-13):
            gain = 1 - trial[1].objective / sol.objective
            p, state = p + dp, trial
            limit = min(2 * limit, 2 * spacing)
            if gain < FTOL:
                break
        else:
            limit *= 0.5
            if limit < smallest:
                break
    return frame.moved(geo.nodes(p))


def optimize_geometry(start: Design | Frame, *, moves: NodeMoves | None = None,
                      merge: bool | None = None, merge_tolerance: float | None = None,
                      slack_tolerance: float = 1e-6, deck_slide: float = DECK_SLIDE,
                      max_rounds: int = 6, max_iterations: int = 100) -> Design:
    """Move, merge and prune the nodes of a layout to lower its volume.

    Parameters
    ----------
    start : Design or Frame
        A layout-optimization result, or a frame (e.g. a bridge form).
    moves : NodeMoves, optional
        The free geometry.  Default: :func:`default_moves` (the rules in the
        module docstring).  When given, the topology is kept exactly.
    merge : bool, optional
        Merge close nodes, drop slack members and join pass-through members
        between rounds.  Default: True without ``moves``, False with.
    merge_tolerance : float, optional
        Nodes closer than this merge.  Default: a quarter of the problem's
        grid spacing. [m]
    slack_tolerance : float
        Members whose end force is below this fraction of the largest are
        dropped. [-]
    max_rounds : int
        Most move-and-merge rounds. [-]
    deck_slide : float
        Largest slide of a loaded deck node along its line, in grid steps. [-]
    max_iterations : int
        Most sequential-LP steps per round. [-]


    Returns
    -------
    Design
        Sized by the LP on the final geometry, never heavier than the start;
        ``stats["history"]`` lists each stage's volume [m3], node and member
        count.

    Raises
    ------
    SolveError
        The starting layout cannot carry its loads.

    References
    ----------
    .. [1] L. He, M. Gilbert (2015), Struct. Multidisc. Optim. 52:677-694.
    """
    t0 = time.perf_counter()
    if isinstance(start, Design):
        if start.problem is None:
            raise InputError("start", "a design without its problem", "a design from "
                             "optimize_layout or size_frame")
        frame = frame_from_design(start)
        first = start
    else:
        frame = start
        first = size_frame(frame)
        frame = frame_from_design(first) if moves is None else frame
    merge = (moves is None) if merge is None else merge
    if merge_tolerance is None:
        merge_tolerance = 0.25 * frame.problem.spacing
    if not (np.isfinite(merge_tolerance) and merge_tolerance >= 0):
        raise InputError("merge_tolerance", merge_tolerance, "a number >= 0 m")
    if not (np.isfinite(deck_slide) and deck_slide >= 0):
        raise InputError("deck_slide", deck_slide, "a number >= 0 grid steps")
    for name, value in (("max_rounds", max_rounds), ("max_iterations", max_iterations)):
        if isinstance(value, bool) or not isinstance(value, int) or value < 1:
            raise InputError(name, value, "a whole number >= 1")
    history = [_record("start", first)]
    best = current = first
    homes = deck_homes(frame)
    if merge:
        current = _tidy(current, merge_tolerance, slack_tolerance, history, "start") or current
        frame = frame_from_design(current)
    for round_ in range(1, max_rounds + 1):
        if merge:  # members between any two of the current nodes may join the layout
            wider = _relayout(frame)
            try:
                relaid = size_frame(wider)
            except SolveError:  # HiGHS trouble on a nearly degenerate LP: keep the members
                relaid = current
            if relaid.volume < current.volume * (1 - 1e-9):
                current, frame = relaid, wider
                history.append(_record(f"round {round_}: members re-chosen", current))
        step = (moves if moves is not None
                else default_moves(frame, deck_slide=deck_slide, homes=homes))
        before = current.volume
        moved = _move(frame, step, max_iterations)
        snapped = _snap_vertical(moved, SNAP * frame.problem.spacing) if merge else moved
        try:
            current = size_frame(snapped)
        except SolveError:  # a snap left a mechanism: keep the unsnapped moves
            try:
                current = size_frame(moved)
            except SolveError:  # pragma: no cover - _move keeps only solved geometries
                break
        history.append(_record(f"round {round_}: nodes moved", current))
        if current.volume <= best.volume * (1 + 1e-12):
            best = current
        if not merge:
            break
        tidy = _tidy(current, merge_tolerance, slack_tolerance, history, f"round {round_}")
        if tidy is None and current.volume > before * (1 - 1e-6):
            break
        current = tidy or current
        frame = frame_from_design(current)
        if current.volume <= best.volume * (1 + 1e-12):
            best = current
    # prefer the tidiest design that is no heavier than the start
    final = current if current.volume <= first.volume * (1 + 1e-12) else best
    stats = dict(first.stats)
    stats.update(history=history, start_volume=first.volume,
                 geometry_seconds=time.perf_counter() - t0)
    return Design(status=final.status,
                  message=("geometry-optimized layout; member sizes are the proven LP optimum "
                           "on its final geometry"),
                  volume=final.volume, weight=final.weight, nodes=final.nodes,
                  members=final.members, loads=final.loads, reactions=final.reactions,
                  duals=final.duals, stats=stats, copies=final.copies,
                  model_volume=final.model_volume, equilibrium_error=final.equilibrium_error,
                  problem=final.problem)


def _tidy(design: Design, merge_tolerance: float, slack_tolerance: float, history: list,
          label: str) -> Design | None:
    """Merge, prune and join (repeatedly); the re-sized design, or None if nothing changed."""
    out = None
    for _ in range(20):
        tidy = simplify(out or design, merge_tolerance=merge_tolerance,
                        slack_tolerance=slack_tolerance)
        if tidy is None:
            break
        try:
            out = size_frame(tidy)
        except SolveError:
            break
    if out is not None:
        history.append(_record(f"{label}: merged and pruned", out))
    return out


def _relayout(frame: Frame) -> Frame:
    """The frame's members plus those that layout optimization over every pair of its nodes uses.

    The union can carry anything either can, so the node moves that follow start
    from the lighter of the two and may use both.
    """
    n = len(frame.nodes)
    a, b = np.triu_indices(n, 1)
    if not frame.problem.domain.is_box:
        grid = Grid(xz=np.asarray(frame.nodes), ij=np.zeros((n, 2), dtype=np.int64),
                    step=(1.0, 1.0), origin=(0.0, 0.0))
        keep = members_clear_of_zones(frame.problem, grid, a, b)
        a, b = a[keep], b[keep]
    data, _, _ = frame_lp_data(Frame(problem=frame.problem, nodes=frame.nodes, start=a, end=b))
    try:
        sol = solve_lp(data, member_adding=False)
    except SolveError:  # pragma: no cover - contains the frame's own members
        return frame
    pairs = np.vstack([np.column_stack([frame.start, frame.end]),
                       np.column_stack([data.a[sol.pair], data.b[sol.pair]])])
    pairs = np.unique(np.sort(pairs, axis=1), axis=0)
    return Frame(problem=frame.problem, nodes=frame.nodes, start=pairs[:, 0], end=pairs[:, 1])


def _snap_vertical(frame: Frame, tol: float) -> Frame:
    """Make members that are within ``tol`` of vertical exactly vertical. [m]

    The free end moves (the lower one's x is kept when both are free); a member
    whose two ends are both held in x is left as it is.
    """
    roles = node_roles(frame)
    nodes = np.array(frame.nodes, dtype=float)
    lx = np.abs(nodes[frame.end, 0] - nodes[frame.start, 0])
    near = np.nonzero((lx > position_tolerance(frame.problem)) & (lx <= tol))[0]
    if len(near) == 0:
        return frame
    for m in near:
        i, j = frame.start[m], frame.end[m]
        if roles.x_fixed[j] and not roles.x_fixed[i]:
            i, j = j, i
        if not roles.x_fixed[j]:
            nodes[j, 0] = nodes[i, 0]
    return frame.moved(nodes)


def _record(stage: str, design: Design) -> dict:
    return {"stage": stage, "volume": design.volume, "nodes": len(design.nodes),
            "members": len(design.members)}
