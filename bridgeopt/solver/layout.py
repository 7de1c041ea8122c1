"""Reference layout optimization: problem -> ground structure -> LP -> design.

The LP is solved in dimensionless form: lengths divided by the reference length
L (largest side of the domain's bounding box), forces by the total applied load
P, stresses by the tension design stress sigma; k = rho*g/sigma is multiplied
by L, and the volume is converted back with P*L/sigma.  HiGHS's tolerances are
absolute, so an LP stated in SI units (costs near 1e-8 m3/N) would be accepted
as optimal far from the optimum.
"""

from __future__ import annotations

import math

import numpy as np

from bridgeopt.solver import multilevel
from bridgeopt.solver.adding import check_options
from bridgeopt.solver.budget import check_fits
from bridgeopt.solver.design import Design, Members, accepted, equilibrium_residual
from bridgeopt.solver.elements import PHI_LIMIT, SENSES, centrelines, sags
from bridgeopt.errors import InputError, SolveError
from bridgeopt.solver.ground import Grid, build_grid, candidate_pairs
from bridgeopt.solver.lp import LPData, LPSolution, column_entries, solve_lp
from bridgeopt.solver.lumping import nodal_loads, restrained_rows  # also for files/
from bridgeopt.model.materials import GRAVITY
from bridgeopt.model.problem import Problem

__all__ = ["optimize_layout", "nodal_loads", "restrained_rows", "design_from_lp", "scales",
           "scaled_lp_data", "solve_layout_lp"]


def _span_limit_message(problem: Problem, grid: Grid, a, b) -> str | None:
    """Sentence about members no equal-strength element can span, if any were dropped."""
    lx = grid.xz[b, 0] - grid.xz[a, 0]
    parts = []
    for sense in SENSES:
        k = problem.k(sense)
        if k > 0 and np.any(k * lx >= PHI_LIMIT):
            limit = math.pi / k
            parts.append(f"{sense} elements cannot reach further than pi*sigma/(rho*g) = "
                         f"{limit:.6g} m horizontally")
    if not parts:
        return None
    return ("; ".join(parts) + " (equal-strength elements carrying their own weight), and the "
            "members that would have to are not generated")


def _check_restraints(problem: Problem, f: np.ndarray, fixed: np.ndarray) -> None:
    """Name the cause when no support can take the vertical (or horizontal) reaction."""
    heavy = not problem.weightless
    for axis, name in ((1, "z"), (0, "x")):
        held = np.any(fixed % 2 == axis)
        pushed = abs(float(f[:, axis].sum())) > 0 or (axis == 1 and heavy)
        if pushed and not held:
            raise SolveError("infeasible", f"no structure can carry the loads: no support (or "
                             f"mirror line) holds the structure in {name}, and the loads"
                             + (" and self-weight" if axis == 1 and heavy else "")
                             + f" have a {name} component; fix {name} at one support at least")


def _solve_coarse(problem: Problem):
    """The coarse problem of a multilevel start, itself started from a coarser one."""
    return solve_layout_lp(problem, coarse_start=True, first_drop=False)


def scales(problem: Problem) -> tuple[float, float, float]:
    """Reference length [m], force [N] and stress [Pa] of the dimensionless LP.

    Parameters
    ----------
    problem : Problem
        Its domain, loads and tension strength.

    Returns
    -------
    (float, float, float)
        Largest side of the domain's bounding box [m], total applied load [N] and
        tension design stress [Pa].
    """
    x0, x1, z0, z1 = problem.domain.bounds
    return max(x1 - x0, z1 - z0), problem.total_applied_load(), problem.strength("tension")


def scaled_lp_data(problem: Problem, xz: np.ndarray, a: np.ndarray, b: np.ndarray,
                   f: np.ndarray, fixed: np.ndarray, reach: np.ndarray,
                   allowed: np.ndarray | None = None) -> LPData:
    """The dimensionless LP of ``problem`` over nodes ``xz`` and candidate pairs ``a``-``b``.

    Parameters
    ----------
    problem : Problem
        Materials and domain (for the reference scales, :func:`scales`).
    xz : (n, 2) float array
        Node coordinates. [m]
    a, b : (m,) int arrays
        Candidate member ends (left, or lower if vertical, first). [-]
    f : (n, 2) float array
        Lumped nodal loads. [N]
    fixed : int array
        Restrained equilibrium rows. [-]
    reach : (m,) int array
        Lattice reach of each pair (member adding starts from 1). [-]
    allowed : (m, 2) bool array, optional
        Senses each pair may take. [-]

    Returns
    -------
    LPData
        Nodes, loads and k in the LP's reference units; cost scales per sense. [-]
    """
    ref_len, ref_force, ref_sigma = scales(problem)
    x0, _, z0, _ = problem.domain.bounds
    return LPData(
        xz=(np.asarray(xz, dtype=float) - (x0, z0)) / ref_len, a=a, b=b,
        k={s: problem.k(s) * ref_len for s in SENSES},
        cost_scale={s: ref_sigma / problem.strength(s) for s in SENSES},
        load=(f / ref_force).ravel(), fixed=fixed, reach=reach, allowed=allowed)


def solve_layout_lp(problem: Problem, *, member_adding: bool = True, batch: int | None = None,
                    coarse_start: bool = True, allowed: np.ndarray | None = None,
                    first_drop: bool = True):
    """Grid, loads, LP data, LP optimum and scales of ``problem``.

    Parameters
    ----------
    problem : Problem
        The layout problem.
    member_adding, batch, coarse_start
        As :func:`optimize_layout`.
    allowed : (n_pairs, 2) bool array, optional
        Senses each candidate pair may take (see :class:`LPData`).
    first_drop : bool
        As :func:`bridgeopt.solver.lp.solve_lp` (False for a coarse level).

    Returns
    -------
    grid : Grid
    f : (n, 2) float array
        Lumped nodal loads. [N]
    data : LPData
    sol : LPSolution
    refs : (float, float, float)
        Reference length [m], force [N] and stress [Pa].
    """
    check_fits(problem)  # before the grid and its candidates are built
    grid = build_grid(problem)
    f = nodal_loads(problem, grid)
    fixed = restrained_rows(problem, grid)
    _check_restraints(problem, f, fixed)
    a, b = candidate_pairs(problem, grid)
    data = scaled_lp_data(problem, grid.xz, a, b, f, fixed,
                          np.abs(grid.ij[b] - grid.ij[a]).max(axis=1), allowed)
    guess = columns = None
    if member_adding and coarse_start and min(problem.grid_shape()) >= 2 * multilevel.COARSE_MIN:
        start = multilevel.coarse_start(problem, grid, data, _solve_coarse)
        if start is not None:
            guess = start.duals
            columns = None if start.pair is None else (start.pair, start.sense)
    try:
        sol = solve_lp(data, member_adding=member_adding, batch=batch, dual_guess=guess,
                       seed_columns=columns, first_drop=first_drop)
    except SolveError as err:
        why = _span_limit_message(problem, grid, a, b) if err.status == "infeasible" else None
        if why:
            raise SolveError("span-limit", f"{err.message}: {why}.") from None
        raise
    return grid, f, data, sol, scales(problem)


def optimize_layout(problem: Problem, *, member_adding: bool = True,
                    batch: int | None = None, coarse_start: bool = True) -> Design:
    """Minimum-volume layout of ``problem`` (the reference optimum).

    Parameters
    ----------
    problem : Problem
        Domain, supports, loads, materials and grid spacing.
    member_adding : bool
        Use member adding (default); False solves the full ground structure in
        one LP (same optimum; for checks and benchmarks).
    batch : int, optional
        Most members added per member-adding round. [-]
    coarse_start : bool
        On fine grids, seed member adding from the optimum of a grid twice as
        coarse: its members mapped onto the fine grid and the members its duals
        predict to be active (:mod:`bridgeopt.solver.multilevel`; fewer rounds,
        same optimum).

    Returns
    -------
    Design
        The proven optimum, in SI units.

    Raises
    ------
    InputError
        A support, load or line load is not on a grid node of the domain.
    SolveError
        No structure can carry the loads (the message says why when the
        equal-strength span limit is the cause), or HiGHS failed.

    References
    ----------
    .. [1] W.S. Dorn, R.E. Gomory, H.J. Greenberg (1964), J. de Mecanique 3:25-52.
    .. [2] M. Gilbert, A. Tyas (2003), Engineering Computations 20(8):1044-1064.
    .. [3] H.E. Fairclough et al. (2018), Proc. R. Soc. A 474:20170726.
    """
    if not isinstance(problem, Problem):
        raise InputError("problem", type(problem).__name__, "a bridgeopt Problem (for a bridge, "
                         "BridgeScenario.to_problem())")
    check_options(member_adding=member_adding, batch=batch, coarse_start=coarse_start)
    grid, f, data, sol, refs = solve_layout_lp(problem, member_adding=member_adding, batch=batch,
                                               coarse_start=coarse_start)
    if problem.domain.excluded and not problem.weightless:
        grid, f, data, sol, refs = _keep_curves_clear(
            problem, grid, data, sol, member_adding=member_adding, batch=batch,
            coarse_start=coarse_start)
    return design_from_lp(problem, grid, data, sol, f, *refs)


#: Most re-solves that forbid curved members entering an excluded zone.
CLEARANCE_ROUNDS = 50


def _keep_curves_clear(problem: Problem, grid: Grid, data: LPData, sol: LPSolution, **how):
    """Re-solve, forbidding active curved members whose centreline enters an excluded zone.

    See :mod:`bridgeopt.solver.clearance`.  Raises :class:`SolveError` when no structure is
    left that keeps clear of the zones.
    """
    from bridgeopt.solver.clearance import curves_entering_zones

    allowed = np.ones((len(data.a), 2), dtype=bool)
    for _ in range(CLEARANCE_ROUNDS):
        a, b = data.a[sol.pair], data.b[sol.pair]
        senses = np.array(SENSES)[sol.sense]
        bad = curves_entering_zones(problem, grid.xz[a], grid.xz[b], senses)
        if not bad.any():
            return grid, nodal_loads(problem, grid), data, sol, scales(problem)
        allowed[sol.pair[bad], sol.sense[bad]] = False
        try:
            grid, _, data, sol, _ = solve_layout_lp(problem, allowed=allowed, **how)
        except SolveError as err:
            if err.status != "infeasible":
                raise
            raise SolveError("infeasible", f"{err.message} with every member, curved "
                             "centrelines included, clear of the excluded zones") from None
    raise SolveError("clearance", f"curved members still entered an excluded zone after "
                     f"{CLEARANCE_ROUNDS} re-solves")


def design_from_lp(problem: Problem, grid: Grid, data: LPData, sol: LPSolution,
                   f: np.ndarray, ref_len: float, ref_force: float, ref_sigma: float,
                   group: np.ndarray | None = None) -> Design:
    """Turn a dimensionless LP optimum into a :class:`Design` in SI units.

    Parameters
    ----------
    problem : Problem
        The problem solved.
    grid : Grid
        Node coordinates of the LP. [m]
    data : LPData
        The dimensionless LP.
    sol : LPSolution
        Its optimum.
    f : (n, 2) float array
        Lumped nodal loads. [N]
    ref_len, ref_force, ref_sigma : float
        Reference length, force and stress of the LP. [m, N, Pa]
    group : (m,) str array, optional
        Element-group label of each active member (default ``"member"``).

    Returns
    -------
    Design
        Checked by :func:`bridgeopt.solver.design.accepted`.
    """
    n_members = len(sol.pair)
    a, b = data.a[sol.pair], data.b[sol.pair]
    start_f = np.zeros((n_members, 2))
    end_f = np.zeros((n_members, 2))
    cost = np.zeros(n_members)
    for s, sense in enumerate(SENSES):
        sel = sol.sense == s
        c, rows, vals = column_entries(data, sol.pair[sel], sense)
        cost[sel] = c
        start_f[sel] = vals[:, :2]
        end_f[sel] = vals[:, 2:]
    force = sol.force * ref_force
    start_f *= force[:, None]
    end_f *= force[:, None]
    # dimensionless cost * force -> volume: times P*L/sigma_ref
    volume = cost * sol.force * ref_force * ref_len / ref_sigma
    vertical = np.abs(grid.xz[b, 0] - grid.xz[a, 0]) <= 1e-9 * ref_len
    horizontal = np.where(vertical, 0.0, np.abs(start_f[:, 0]))

    # compact node numbering: member ends, loaded and supported nodes
    loaded = np.nonzero(np.any(f != 0, axis=1))[0]
    used = np.unique(np.concatenate([a, b, loaded, data.fixed // 2]))
    index = -np.ones(grid.n, dtype=np.int64)
    index[used] = np.arange(len(used))
    nodes = grid.xz[used]
    senses = np.array([SENSES[s] for s in sol.sense], dtype=object).astype(str)
    p, q = grid.xz[a], grid.xz[b]
    curve_list: list = [None] * n_members
    sag_of = np.zeros(n_members)
    for s, sense in enumerate(SENSES):   # one pass per sense (one k each)
        sel = np.flatnonzero(sol.sense == s)
        k = problem.k(sense)
        for i, points in zip(sel, centrelines(p[sel], q[sel], k, sense)):
            curve_list[i] = points
        sag_of[sel] = sags(p[sel], q[sel], k, sense)
    curves = tuple(curve_list)
    members = Members(start=index[a], end=index[b], sense=senses, horizontal_force=horizontal,
                      force_start=start_f, force_end=end_f, volume=volume, sag=sag_of,
                      curves=curves,
                      group=np.full(n_members, "member") if group is None else group)
    reactions = np.column_stack([index[data.fixed // 2], np.zeros(len(data.fixed)),
                                 np.zeros(len(data.fixed))])
    reactions[np.arange(len(data.fixed)), 1 + data.fixed % 2] = sol.reactions * ref_force
    loads = f[used]
    resid = equilibrium_residual(nodes, members, loads, reactions)
    weights = np.array([problem.density(s) for s in senses]) * GRAVITY * volume
    model_volume = float(volume.sum())
    duals = sol.duals.reshape(-1, 2)[used] * ref_len / ref_sigma
    model_error = float(np.abs(resid).max() / ref_force)
    accepted(problem.copies * model_volume, model_error)
    return Design(
        status="optimal",
        message=("proven optimum of the layout-optimization LP" if sol.gap == 0 else
                 f"optimum of the layout-optimization LP within a proven gap of {sol.gap:.1e}"),
        volume=problem.copies * model_volume, weight=problem.copies * float(weights.sum()),
        nodes=nodes, members=members, loads=loads, reactions=reactions, duals=duals,
        stats={"rounds": sol.rounds, "columns": sol.columns, "candidates": sol.candidates,
               "seconds": sol.seconds, "grid_nodes": grid.n, "gap": sol.gap,
               "vertex": sol.vertex, "dropped": sol.dropped, "start": sol.start,
               "lp_volume": problem.copies * sol.objective * ref_force * ref_len / ref_sigma},
        copies=problem.copies, model_volume=model_volume,
        equilibrium_error=model_error, problem=problem)
