"""The layout-optimization LP, assembled column-wise in HiGHS, with member adding.

Variables are the member forces (horizontal force H of a curved element, or
the smaller end force F of a vertical one), all >= 0, one column per candidate
member and sense, plus free reaction variables on restrained directions.  Rows
are nodal equilibrium, two per node: ``B q + r = -f``.

Member adding runs by the shared driver of :mod:`bridgeopt.solver.adding`; the
pricing step (the dual check) is :func:`price_candidates`, the columns are
stated by :func:`lp_columns` (:mod:`bridgeopt.solver.highs`).

Everything here is dimensionless (see :mod:`bridgeopt.solver.layout`): HiGHS's
tolerances are absolute, so the LP must be stated with numbers of order one.

References
----------
.. [1] W.S. Dorn, R.E. Gomory, H.J. Greenberg (1964), "Automatic design of
   optimal structures", J. de Mecanique 3:25-52.
.. [2] M. Gilbert, A. Tyas (2003), "Layout optimization of large-scale
   pin-jointed frames", Engineering Computations 20(8):1044-1064.
.. [3] Q. Huangfu, J.A.J. Hall (2018), "Parallelizing the dual revised simplex
   method", Math. Prog. Comp. 10:119-142 (HiGHS).
"""

from __future__ import annotations

import time
from dataclasses import dataclass

import numpy as np

from bridgeopt.solver.adding import add_members
from bridgeopt.solver.elements import SENSES, element_coefficients
from bridgeopt.solver import lpmodel
from bridgeopt.solver.highs import entry_columns, node_rows, raise_for_status
from bridgeopt.solver.lpmodel import LayoutModel, vertex_solve
from bridgeopt.solver.pricing import on_lattice, predict_offsets, price_offsets

__all__ = ["LPData", "LPSolution", "solve_lp", "column_entries", "price_candidates",
           "predicted_pairs", "lp_columns", "PRICE_TOL", "PRICE_CHUNK"]

#: A column enters when u.a exceeds its cost by this fraction (dual check).
PRICE_TOL = 1e-7
#: Candidates priced per vectorised chunk.
PRICE_CHUNK = 1_000_000
#: A coarse-grid dual guess seeds the first LP with pairs whose u.a/c exceeds
#: this, at most PREDICT_PER_NODE per node.
PREDICT_RATIO = 0.98
PREDICT_PER_NODE = 4
#: LPs with more equality rows than this are solved by HiGHS's interior point
#: method without crossover: its time per solve is predictable, whereas warm
#: dual simplex re-solves of these highly degenerate LPs were seen to take
#: 100000+ iterations at 7442 rows.
IPM_ROWS = 4000
#: With mapped seed columns, the first LP also holds the pairs of at most this reach
#: (0, the seed alone, was measured infeasible at 60 divisions: docs/benchmarks.md).
SEED_REACH = 1
#: With a coarser grid's members mapped onto the grid, interior-point-sized LPs take at
#: most this many predicted pairs per node (smaller LPs, same rounds, docs/benchmarks.md).
PREDICT_PER_NODE_IPM = 2
#: With the interior point method (no exact vertex duals), member adding stops
#: once the proven optimality gap is below this.
IPM_GAP = 1e-5
#: Safety stop on member-adding rounds.
MAX_ROUNDS = 500


@dataclass(frozen=True)
class LPData:
    """Dimensionless LP input.

    Parameters
    ----------
    xz : (n, 2) float array
        Node coordinates, divided by the reference length. [-]
    a, b : (m,) int32 arrays
        Candidate member ends (a left, or lower if vertical). [-]
    k : dict
        Sense -> k times the reference length (self-weight parameter). [-]
    cost_scale : dict
        Sense -> sigma_ref / sigma_sense. [-]
    load : (2n,) float array
        Nodal loads divided by the reference force (x, z interleaved). [-]
    fixed : int array
        Restrained equilibrium rows (2*node + 0 for x, + 1 for z). [-]
    reach : (m,) int array
        Lattice reach max(|di|, |dj|) of each pair; member adding starts from
        reach 1 (nearest neighbours). [-]
    allowed : (m, 2) bool array, optional
        Which senses (tension, compression) each pair may take; both when None.
    """

    xz: np.ndarray
    a: np.ndarray
    b: np.ndarray
    k: dict
    cost_scale: dict
    load: np.ndarray
    fixed: np.ndarray
    reach: np.ndarray
    allowed: np.ndarray | None = None


@dataclass(frozen=True)
class LPSolution:
    """Dimensionless LP optimum.

    Parameters
    ----------
    objective : float
        Optimum of the dimensionless LP (volume over P L / sigma_ref). [-]
    pair : int array
        Candidate index of each active column. [-]
    sense : int array
        Sense of each active column, 0 tension, 1 compression. [-]
    force : float array
        H (curved) or F (straight) of each active column, over the reference force. [-]
    reactions : float array
        Reaction at each restrained row, over the reference force. [-]
    duals : (2n,) float array
        Equality-row duals (virtual nodal displacements). [-]
    rounds, columns, candidates : int
        LP solves, columns of the final LP, candidate columns. [-]
    seconds : float
        Wall time. [s]
    gap : float
        Proven relative optimality gap left (0 when no column violates the dual
        check). [-]
    vertex : bool
        Whether the answer is a basic (vertex) solution.
    dropped : int
        Columns removed at zero force during member adding. [-]
    start : str
        How the first LP was seeded: ``"reach 1"`` (nearest neighbours),
        ``"coarse duals"`` (plus pairs predicted by a coarser grid's duals),
        ``"multilevel"`` (plus a coarser grid's members mapped onto this one)
        or ``"full"`` (no member adding).
    """

    objective: float
    pair: np.ndarray
    sense: np.ndarray
    force: np.ndarray
    reactions: np.ndarray
    duals: np.ndarray
    rounds: int
    columns: int
    candidates: int
    seconds: float
    gap: float = 0.0
    vertex: bool = True
    dropped: int = 0
    start: str = "reach 1"


def column_entries(data: LPData, pair: np.ndarray, sense: str):
    """Cost and the 4 (row, value) entries of the columns ``pair`` of ``sense``.

    Parameters
    ----------
    data : LPData
        The dimensionless LP.
    pair : (m,) int array
        Candidate pairs (indices into ``data.a``, ``data.b``). [-]
    sense : {"tension", "compression"}
        The element's sense (cable or arch, tie or strut).

    Returns
    -------
    cost : (m,) float array
        Cost per unit force, nan where the element cannot span (k*Lx >= pi). [-]
    rows : (m, 4) int array
        Equilibrium rows of the end forces. [-]
    values : (m, 4) float array
        End-force entries per unit force; vertical members have zero x entries
        (dropped when the CSC matrix is built). [-]
    """
    a, b = data.a[pair], data.b[pair]
    p, q = data.xz[a], data.xz[b]
    lx, dz = q[:, 0] - p[:, 0], q[:, 1] - p[:, 1]
    cost, vals = element_coefficients(lx, dz, data.k[sense], sense, lx <= 1e-12)
    cost *= data.cost_scale[sense]
    return cost, node_rows(a, b), vals


def lp_columns(data: LPData, pair: np.ndarray, s: int):
    """Member columns of ``pair`` in sense ``s`` that can be built: (pairs kept, ColumnSet).

    Pairs whose sense is not allowed (``data.allowed``) or that no element can
    span (nan cost) are left out; the columns are H >= 0 (or F >= 0).

    Parameters
    ----------
    data : LPData
        The dimensionless LP.
    pair : (m,) int array
        Candidate pairs. [-]
    s : int
        Sense index into :data:`~bridgeopt.solver.elements.SENSES`. [-]

    Returns
    -------
    pair : int array
        The pairs kept. [-]
    columns : ColumnSet
        Their columns (cost, CSC entries).
    """
    if data.allowed is not None:
        pair = pair[data.allowed[pair, s]]
    cost, rows, vals = column_entries(data, pair, SENSES[s])
    ok = np.isfinite(cost)
    pair = pair[ok]
    return pair, entry_columns(cost[ok], rows[ok], vals[ok], 2 * len(data.xz))


def price_candidates(data: LPData, in_lp: np.ndarray, duals: np.ndarray):
    """The dual check of member adding: violated columns as (pair, sense, ratio u.a/c).

    Parameters
    ----------
    data : LPData
        The dimensionless LP.
    in_lp : (n_pairs, 2) bool array
        Columns (pair, sense) already in the LP (not priced).
    duals : (2n,) float array
        Equality-row duals u of the last solve. [-]

    Returns
    -------
    (pair, sense, ratio) or None
        Every column out of the LP whose virtual work u.a exceeds its cost c by
        more than :data:`PRICE_TOL`, with ratio u.a/c; None when there is none.
    """
    if on_lattice(data):  # the same columns from a table of lattice offsets
        return price_offsets(data, in_lp, duals, tol=PRICE_TOL, chunk=PRICE_CHUNK,
                             entries=column_entries)
    n_pairs = len(data.a)
    found = []
    for start in range(0, n_pairs, PRICE_CHUNK):
        pair = np.arange(start, min(n_pairs, start + PRICE_CHUNK))
        for s, sense in enumerate(SENSES):
            free = ~in_lp[pair, s]
            if data.allowed is not None:
                free &= data.allowed[pair, s]
            todo = pair[free]
            if len(todo) == 0:
                continue
            cost, rows, vals = column_entries(data, todo, sense)
            work = np.einsum("ij,ij->i", duals[rows], vals)
            with np.errstate(invalid="ignore"):
                bad = work > cost * (1.0 + PRICE_TOL)
            if bad.any():
                found.append((todo[bad], np.full(bad.sum(), s), work[bad] / cost[bad]))
    if not found:
        return None
    return tuple(np.concatenate(x) for x in zip(*found))


def predicted_pairs(data: LPData, guess: np.ndarray, limit: int) -> np.ndarray:
    """Pairs predicted active by a guess of the duals (e.g. from a coarser grid).

    Parameters
    ----------
    data : LPData
        The dimensionless LP.
    guess : (2n,) float array
        Estimated equality-row duals. [-]
    limit : int
        Most pairs returned (those of largest ratio u.a/c). [-]

    Returns
    -------
    ndarray of int
        The predicted pairs, sorted. [-]
    """
    if on_lattice(data):  # the same pairs from a table of lattice offsets
        return predict_offsets(data, guess, limit, ratio=PREDICT_RATIO, chunk=PRICE_CHUNK,
                               entries=column_entries)
    picks, ratios = [], []
    for start in range(0, len(data.a), PRICE_CHUNK):
        pair = np.arange(start, min(len(data.a), start + PRICE_CHUNK))
        for sense in SENSES:
            cost, rows, vals = column_entries(data, pair, sense)
            with np.errstate(invalid="ignore"):
                ratio = np.einsum("ij,ij->i", guess[rows], vals) / cost
            near = np.nonzero(ratio > PREDICT_RATIO)[0]
            picks.append(pair[near])
            ratios.append(ratio[near])
    pair, ratio = np.concatenate(picks), np.concatenate(ratios)
    if len(pair) > limit:
        pair = pair[np.argpartition(-ratio, limit)[:limit]]
    return np.unique(pair)


def solve_lp(data: LPData, *, member_adding: bool = True, batch: int | None = None,
             dual_guess: np.ndarray | None = None, seed_columns=None,
             first_drop: bool = True) -> LPSolution:
    """Minimum-volume member forces for the dimensionless problem ``data``.

    Parameters
    ----------
    data : LPData
        The dimensionless LP.
    member_adding : bool
        Start from the nearest-neighbour pairs and add violated columns round by
        round (Gilbert & Tyas 2003, :mod:`bridgeopt.solver.adding`); if False,
        solve the whole ground structure at once.
    batch : int, optional
        Most columns added per round (default: max(1000, 10% of columns in the LP)). [-]
    dual_guess : ndarray, optional
        Estimated equality-row duals (e.g. interpolated from a coarser grid); the
        pairs they predict to be active join the first LP. [-]
    seed_columns : (pair, sense) int arrays, optional
        Columns that join the first LP too (e.g. a coarser grid's optimum mapped
        onto this one, :mod:`bridgeopt.solver.multilevel`), with the pairs of
        reach at most :data:`SEED_REACH` (widened while the LP has no optimum). [-]
    first_drop : bool
        With ``seed_columns``, the first LP's columns far from entering leave after its
        solve (:data:`bridgeopt.solver.lpmodel.FIRST_DROP_RATIO`); off for the coarse
        levels of a multilevel start, whose vertex seeds the finer grid.

    Returns
    -------
    LPSolution
        The optimum: active columns, reactions, duals and statistics.

    Raises
    ------
    SolveError
        If the LP is infeasible (no structure in the ground structure can carry
        the loads to the supports) or HiGHS stops without a proven optimum.
    """
    t0 = time.perf_counter()
    n_nodes = len(data.xz)
    mapped = member_adding and seed_columns is not None
    ipm = 2 * n_nodes > IPM_ROWS
    # columns leave only between simplex solves: interior point rounds with removal
    # were measured to creep (40+ rounds of 3-8 s at 120 divisions, docs/benchmarks.md)
    # a first LP seeded from a coarser grid's optimum holds many columns far from entering:
    # they leave after its solve (lpmodel.FIRST_DROP_RATIO)
    model = LayoutModel(data, ipm=ipm, prune=member_adding and not ipm, columns=lp_columns,
                        price=price_candidates, first_drop=mapped and first_drop)
    seed, groups, reach = None, None, 1
    if member_adding and dual_guess is not None:
        per_node = PREDICT_PER_NODE_IPM if ipm and mapped else PREDICT_PER_NODE
        seed = predicted_pairs(data, dual_guess, int(per_node * n_nodes))
    if mapped:
        pair, sense = seed_columns
        seed = np.zeros(0, dtype=np.int64) if seed is None else seed
        groups = np.concatenate([np.zeros(len(seed), dtype=np.int64),
                                 np.ones(len(seed), dtype=np.int64), sense])
        seed = np.concatenate([seed, seed, pair])
        reach = SEED_REACH
    # simplex solves to the exact optimum; the interior point method (large LPs) stops
    # at a proven gap, as it has no exact vertex duals
    result = add_members(model, data.reach, member_adding=member_adding, batch=batch,
                         gap_tol=IPM_GAP if ipm else None, max_rounds=MAX_ROUNDS, seed=seed,
                         seed_groups=groups, seed_reach=reach)
    raise_for_status(result.status, "no structure in the ground structure can carry the "
                     "loads to the supports")
    objective = float(model.h.getInfo().objective_function_value)
    gap = result.gap
    if ipm and lpmodel.VERTEX:
        model, objective, gap = vertex_solve(model, objective, gap)
    h = model.h
    sol = h.getSolution()
    x = np.asarray(sol.col_value)
    pair, sense = model.arrays()
    nfix = len(data.fixed)
    force = x[nfix:]
    scale = float(np.max(force)) if len(force) else 0.0
    active = force > LayoutModel.active * scale
    return LPSolution(
        objective=objective,
        pair=pair[active], sense=sense[active], force=force[active],
        reactions=x[:nfix].copy(), duals=np.asarray(sol.row_dual).copy(),
        rounds=result.rounds, columns=int(model.in_lp.sum()), candidates=2 * len(data.a),
        seconds=time.perf_counter() - t0, gap=gap, vertex=model.vertex,
        dropped=model.dropped,
        start=("full" if not member_adding else "multilevel" if mapped
               else "coarse duals" if dual_guess is not None else "reach 1"))
