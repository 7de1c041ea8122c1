"""The layout-optimization LP, assembled column-wise in HiGHS, with member adding.

Variables are the member forces (horizontal force H of a curved element, or
the smaller end force F of a vertical one), all >= 0, one column per candidate
member and sense, plus free reaction variables on restrained directions.  Rows
are nodal equilibrium, two per node: ``B q + r = -f``.

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

import logging
import os
import time
from dataclasses import dataclass

import highspy
import numpy as np

from bridgeopt.solver.elements import SENSES, curved_coefficients, vertical_coefficients
from bridgeopt.errors import SolveError

__all__ = ["LPData", "LPSolution", "solve_lp", "column_entries"]

log = logging.getLogger(__name__)

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
#: With the interior point method (no exact vertex duals), member adding stops
#: once the proven optimality gap is below this.
IPM_GAP = 1e-5
#: Safety stop on member-adding rounds.
MAX_ROUNDS = 500


@dataclass(frozen=True)
class LPData:
    """Dimensionless LP input.

    Attributes
    ----------
    xz : (n, 2) node coordinates, divided by the reference length.
    a, b : int32 candidate member ends (a left, or lower if vertical).
    k : dict sense -> k * reference length.
    cost_scale : dict sense -> sigma_ref / sigma_sense.
    load : (2n,) nodal loads divided by the reference force (x, z interleaved).
    fixed : int array of restrained equilibrium rows (2*node + 0 for x, + 1 for z).
    reach : int (n_pairs,) lattice reach max(|di|, |dj|) of each pair; member
        adding starts from reach 1 (nearest neighbours).
    allowed : bool (n_pairs, 2), optional: which senses (tension, compression)
        each pair may take; both when None.
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

    Attributes
    ----------
    objective : float
    pair : int array, candidate index of each active column.
    sense : int array, 0 tension, 1 compression.
    force : float array, H or F of each active column.
    reactions : (len(fixed),) reaction at each restrained row.
    duals : (2n,) equality-row duals (virtual nodal displacements).
    rounds, columns, candidates : solve statistics.
    gap : proven relative optimality gap left by member adding (0 when no
        column violates the dual check).
    seconds : wall time.
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


def column_entries(data: LPData, pair: np.ndarray, sense: str):
    """Cost and the 4 (row, value) entries of the columns ``pair`` of ``sense``.

    Returns
    -------
    cost : (m,) float, nan where the element cannot span (k*Lx >= pi).
    rows : (m, 4) int, values : (m, 4) float.  Vertical members have zero x
    entries (dropped when the CSC matrix is built).
    """
    a, b = data.a[pair], data.b[pair]
    p, q = data.xz[a], data.xz[b]
    lx, dz = q[:, 0] - p[:, 0], q[:, 1] - p[:, 1]
    k = data.k[sense]
    vert = lx <= 1e-12
    m = len(pair)
    cost = np.empty(m)
    vals = np.zeros((m, 4))
    if (~vert).any():
        c, pxf, pzf, qxf, qzf = curved_coefficients(lx[~vert], dz[~vert], k, sense)
        cost[~vert] = c
        vals[~vert] = np.column_stack([pxf, pzf, qxf, qzf])
    if vert.any():
        c, pzf, qzf = vertical_coefficients(dz[vert], k, sense)
        cost[vert] = c
        vals[vert, 1] = pzf
        vals[vert, 3] = qzf
    cost *= data.cost_scale[sense]
    rows = np.column_stack([2 * a, 2 * a + 1, 2 * b, 2 * b + 1])
    return cost, rows, vals


def _silent_highs(rows: int) -> highspy.Highs:
    """A Highs instance whose start-up banner does not reach stdout."""
    fd = os.dup(1)
    try:
        with open(os.devnull, "w") as null:
            os.dup2(null.fileno(), 1)
            h = highspy.Highs()
    finally:
        os.dup2(fd, 1)
        os.close(fd)
    h.setOptionValue("output_flag", False)
    if rows > IPM_ROWS:
        h.setOptionValue("solver", "ipm")
        h.setOptionValue("run_crossover", "off")
    else:
        h.setOptionValue("solver", "simplex")
    h.setOptionValue("primal_feasibility_tolerance", 1e-9)
    h.setOptionValue("dual_feasibility_tolerance", 1e-9)
    return h


def _add_columns(h: highspy.Highs, cost, rows, vals) -> None:
    nz = vals != 0.0
    counts = nz.sum(axis=1)
    starts = np.zeros(len(cost), dtype=np.int32)
    np.cumsum(counts[:-1], out=starts[1:])
    h.addCols(len(cost), cost, np.zeros(len(cost)), np.full(len(cost), highspy.kHighsInf),
              int(counts.sum()), starts, rows[nz].astype(np.int32), vals[nz])


class _Columns:
    """Book-keeping of which (pair, sense) columns are in the LP."""

    def __init__(self, n_pairs: int):
        self.in_lp = np.zeros((n_pairs, 2), dtype=bool)
        self.pair: list[np.ndarray] = []
        self.sense: list[np.ndarray] = []

    def add(self, h, data: LPData, pair: np.ndarray, s: int) -> int:
        pair = pair[~self.in_lp[pair, s]]
        if data.allowed is not None:
            pair = pair[data.allowed[pair, s]]
        if len(pair) == 0:
            return 0
        cost, rows, vals = column_entries(data, pair, SENSES[s])
        ok = np.isfinite(cost)
        pair, cost, rows, vals = pair[ok], cost[ok], rows[ok], vals[ok]
        self.in_lp[pair, s] = True
        if len(pair):
            _add_columns(h, cost, rows, vals)
            self.pair.append(pair)
            self.sense.append(np.full(len(pair), s, dtype=np.int8))
        return len(pair)

    def arrays(self):
        return np.concatenate(self.pair), np.concatenate(self.sense)


def _run(h: highspy.Highs) -> str:
    h.run()
    status = h.getModelStatus()
    if status == highspy.HighsModelStatus.kOptimal:
        return "optimal"
    if status in (highspy.HighsModelStatus.kInfeasible,
                  highspy.HighsModelStatus.kUnboundedOrInfeasible):
        return "infeasible"
    return h.modelStatusToString(status)


def _price(data: LPData, cols: _Columns, u: np.ndarray, n_pairs: int):
    """Violated columns as (pair, sense, ratio u.a/c), all chunks."""
    found = []
    for start in range(0, n_pairs, PRICE_CHUNK):
        pair = np.arange(start, min(n_pairs, start + PRICE_CHUNK))
        for s, sense in enumerate(SENSES):
            free = ~cols.in_lp[pair, s]
            if data.allowed is not None:
                free &= data.allowed[pair, s]
            todo = pair[free]
            if len(todo) == 0:
                continue
            cost, rows, vals = column_entries(data, todo, sense)
            work = np.einsum("ij,ij->i", u[rows], vals)
            with np.errstate(invalid="ignore"):
                bad = work > cost * (1.0 + PRICE_TOL)
            if bad.any():
                found.append((todo[bad], np.full(bad.sum(), s), work[bad] / cost[bad]))
    if not found:
        return None
    return tuple(np.concatenate(x) for x in zip(*found))


def _gap(ratio_max: float) -> float:
    """Proven relative optimality gap when the worst column has u.a/c = ratio_max.

    Dividing the duals by ratio_max makes every column dual feasible (reaction
    columns have zero cost and rows with reactions have zero duals), so the dual
    objective, hence the optimum, is at least objective / ratio_max.
    """
    return max(0.0, 1.0 - 1.0 / ratio_max)


def _predicted(data: LPData, guess: np.ndarray, limit: int) -> np.ndarray:
    """Pairs predicted active by a guess of the duals (from a coarser grid)."""
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
             dual_guess: np.ndarray | None = None) -> LPSolution:
    """Minimum-volume member forces for the dimensionless problem ``data``.

    Parameters
    ----------
    data : LPData
    member_adding : bool
        Start from ``data.initial`` and add violated columns round by round
        (Gilbert & Tyas 2003); if False, solve the whole ground structure at once.
    batch : int, optional
        Most columns added per round (default: max(1000, 10% of columns in the LP)).
    dual_guess : ndarray, optional
        Estimated equality-row duals (e.g. interpolated from a coarser grid); the
        pairs they predict to be active join the first LP.

    Raises
    ------
    SolveError
        If the LP is infeasible (no structure in the ground structure can carry
        the loads to the supports) or HiGHS stops without a proven optimum.
    """
    t0 = time.perf_counter()
    n_nodes = len(data.xz)
    n_pairs = len(data.a)
    h = _silent_highs(2 * n_nodes)
    rhs = -np.asarray(data.load, dtype=float)
    h.addRows(2 * n_nodes, rhs, rhs, 0, np.zeros(2 * n_nodes, dtype=np.int32),
              np.zeros(0, dtype=np.int32), np.zeros(0))
    nfix = len(data.fixed)
    if nfix:
        h.addCols(nfix, np.zeros(nfix), np.full(nfix, -highspy.kHighsInf),
                  np.full(nfix, highspy.kHighsInf), nfix, np.arange(nfix, dtype=np.int32),
                  np.asarray(data.fixed, dtype=np.int32), np.ones(nfix))
    cols = _Columns(n_pairs)
    reach = 1 if member_adding else np.inf
    rounds = 0
    gap = 0.0
    if member_adding and dual_guess is not None:
        for s in range(2):
            cols.add(h, data, _predicted(data, dual_guess, int(PREDICT_PER_NODE * n_nodes)), s)
    while True:
        start = np.nonzero(data.reach <= reach)[0]
        for s in range(2):
            cols.add(h, data, start, s)
        rounds += 1
        status = _run(h)
        if status == "optimal" or len(start) == n_pairs:
            break
        # the start cannot carry the loads (infeasible), or only with forces so large that
        # HiGHS gives up (status unknown): widen it
        reach *= 2
    while status == "optimal" and member_adding and rounds < MAX_ROUNDS:
        u = np.asarray(h.getSolution().row_dual)
        found = _price(data, cols, u, n_pairs)
        if found is None:
            gap = 0.0
            break
        pair, sense, ratio = found
        gap = _gap(float(ratio.max()))
        if 2 * n_nodes > IPM_ROWS and gap <= IPM_GAP:
            break
        limit = batch or max(1000, int(0.1 * cols.in_lp.sum()))
        if len(pair) > limit:
            top = np.argpartition(-ratio, limit)[:limit]
            pair, sense = pair[top], sense[top]
        for s in range(2):
            cols.add(h, data, pair[sense == s], s)
        rounds += 1
        status = _run(h)
    if rounds >= MAX_ROUNDS and member_adding:
        log.warning("member adding stopped after %d rounds; proven gap %.2e", rounds, gap)
    if status == "infeasible":
        raise SolveError("infeasible", "no structure in the ground structure can carry the loads "
                         "to the supports")
    if status != "optimal":
        raise SolveError("solver", f"HiGHS stopped without a proven optimum: {status}")
    sol = h.getSolution()
    x = np.asarray(sol.col_value)
    pair, sense = cols.arrays()
    force = x[nfix:]
    scale = float(np.max(force)) if len(force) else 0.0
    active = force > 1e-9 * scale
    return LPSolution(
        objective=float(h.getInfo().objective_function_value),
        pair=pair[active], sense=sense[active], force=force[active],
        reactions=x[:nfix].copy(), duals=np.asarray(sol.row_dual).copy(),
        rounds=rounds, columns=int(cols.in_lp.sum()), candidates=2 * n_pairs,
        seconds=time.perf_counter() - t0, gap=gap)
