"""Layout optimization for several load cases at once, with lumped self-weight and costs.

Formulation (plastic, Hemp 1973 ch. 4; Pritchard, Gilbert & Tyas 2005).  For
every candidate pair of nodes and element group g (one group for a single
material; a tension group and a compression group when the materials or the
prices differ) the variables are the cross-section area a_m >= 0 and, for every
load case k, the axial force q_km (free; tension positive, constant along the
straight prismatic member).  With l_m the length and p_g the price per m3::

    minimise    sum_m p_g l_m a_m                         (volume when p_g = 1)
    subject to  B_k q_k + R r_k + W a = -f_k              for every case k
                q_km - sigma_t a_m <= 0,  q_km + sigma_c a_m >= 0

B holds the unit vectors of the members (force q on end P is q n, on end Q
-q n, n the unit vector from P to Q); R puts a free reaction on every
restrained direction; W a lumps each member's weight rho g l_m a_m half at each
end node (downwards), the same in every case.  A tension-only group has
q_km >= 0, a compression-only group q_km <= 0.

The weight is *lumped*: the members are straight and prismatic, their force
is taken as constant, and the weight is carried to the nodes without bending
or axial variation.  It differs slightly from the equal-strength elements of
the single-case reference (:mod:`bridgeopt.solver.elements`), see docs/method.md.

Member adding (dual check)
--------------------------
Let y_k be the duals of case k's equilibrium rows (HiGHS convention: the
reduced cost of a column is its cost minus its column dotted with the row
duals).  A pair m not yet in the LP brings a column a_m (cost p l) and free
columns q_km (cost 0), and rows t_k (<= 0, dual lambda_k <= 0) and c_k (>= 0,
dual mu_k >= 0).  The current duals stay optimal for the larger LP if there
are lambda, mu with

* q_km free, zero reduced cost: -e_k - lambda_k - mu_k = 0, where
  e_k = y_k . b_m is the virtual elongation of m in case k;
* a_m: p l - sum_k g_k - sum_k (-sigma_t lambda_k + sigma_c mu_k) >= 0, where
  g_k = y_k . w_m is the virtual work of m's lumped weight in case k.

The smallest admissible sum_k (-sigma_t lambda_k + sigma_c mu_k) is
sum_k max(sigma_t e_k, -sigma_c e_k) (put all of -e_k on the one multiplier
whose sign allows it), so the pair **violates** the dual check when::

    sum_k [ max(sigma_t e_k, -sigma_c e_k) + g_k ]  >  p l

(for a tension-only group the max is max(sigma_t e_k, 0), for a
compression-only group max(-sigma_c e_k, 0)).  Members are added, most
violated first by the ratio of the two sides, until none violates by more than
a relative 1e-7; the result is then the full ground-structure optimum.

Everything is dimensionless as in :mod:`bridgeopt.solver.layout`: lengths over the
reference length L, forces over the largest case's total load P, stresses over
the tension design stress sigma, areas over P/sigma, prices over the tension
price.

References
----------
.. [1] W.S. Dorn, R.E. Gomory, H.J. Greenberg (1964), "Automatic design of
   optimal structures", J. de Mecanique 3:25-52.
.. [2] W.S. Hemp (1973), Optimum Structures, Clarendon Press, Oxford (ch. 4,
   alternative loads).
.. [3] J.C. Nagtegaal, W. Prager (1973), "Optimal layout of a truss for
   alternative loads", Int. J. Mech. Sci. 15:583-592.
.. [4] M. Gilbert, A. Tyas (2003), "Layout optimization of large-scale
   pin-jointed frames", Engineering Computations 20(8):1044-1064.
.. [5] T.J. Pritchard, M. Gilbert, A. Tyas (2005), "Plastic layout optimization
   of large-scale frameworks subject to multiple load cases, member
   self-weight and with joint length penalties", 6th World Congress of
   Structural and Multidisciplinary Optimization, Rio de Janeiro.
.. [6] Q. Huangfu, J.A.J. Hall (2018), Math. Prog. Comp. 10:119-142 (HiGHS).
"""

from __future__ import annotations

import dataclasses
import time
from dataclasses import dataclass

import numpy as np

from bridgeopt.errors import SolveError
from bridgeopt.model.loads import CaseStudy, UnitCosts
from bridgeopt.model.materials import GRAVITY
from bridgeopt.solver.adding import add_members, check_options
from bridgeopt.solver.budget import check_fits
from bridgeopt.solver.casedesign import CaseDesign, case_design
from bridgeopt.solver.ground import build_grid, candidate_pairs
from bridgeopt.solver.elements import bar_factors
from bridgeopt.solver.highs import (INF, node_rows, raise_for_status, solve_columns,
                                    triplet_columns)
from bridgeopt.solver.lumping import nodal_loads, restrained_rows
from bridgeopt.solver.lp import PRICE_CHUNK, PRICE_TOL

__all__ = ["CaseDesign", "optimize_cases", "single_case_reference", "MAX_FULL_COLUMNS"]

#: Without member adding, the whole ground structure goes into one LP; refuse
#: more columns than this (about a 12 x 12 grid with 4 cases), as the LP's
#: memory and time grow with cases x candidates.
MAX_FULL_COLUMNS = 400_000
#: Safety stop on member-adding rounds.
MAX_ROUNDS = 200
#: Member adding solves each round by the interior point method without
#: crossover (seen 20 times faster than simplex on these degenerate LPs), adds
#: the members that violate the dual check, and stops once the proven relative
#: optimality gap 1 - 1/max(work/cost) is below GAP_TOL (the dual check is
#: homogeneous in the duals: dividing them by the largest ratio makes every
#: column dual feasible and bounds the optimum from below).  The last LP is then
#: solved again with crossover, to a vertex, for clean member forces.
GAP_TOL = 1e-6


@dataclass(frozen=True)
class _Data:
    """Dimensionless multi-case LP input."""

    xz: np.ndarray            # (n, 2) / L
    a: np.ndarray             # pair ends
    b: np.ndarray
    reach: np.ndarray
    loads: np.ndarray         # (K, 2n) / P
    fixed: np.ndarray         # restrained rows (per case)
    groups: tuple             # per group: (name, sigma_t', sigma_c', k', price')


def _groups(study: CaseStudy, sigma_ref: float, ref_len: float) -> tuple:
    """Element groups: (name, sigma_t, sigma_c, rho g L / sigma_ref, price), dimensionless.

    sigma_t = 0 (or sigma_c = 0) makes a compression-only (tension-only) group.
    """
    p = study.problem
    costs = study.costs or UnitCosts()
    one = p.compression_material is None and costs.tension == costs.compression
    kk = lambda rho: rho * GRAVITY * ref_len / sigma_ref  # noqa: E731
    if one:
        m = p.material
        return (("member", m.tension_strength / sigma_ref, m.compression_strength / sigma_ref,
                 kk(m.density), 1.0),)
    return (("tension", p.strength("tension") / sigma_ref, 0.0, kk(p.density("tension")), 1.0),
            ("compression", 0.0, p.strength("compression") / sigma_ref,
             kk(p.density("compression")), costs.compression / costs.tension))


def _geometry(data: _Data, pair: np.ndarray):
    """Length and unit vector (P to Q) of the pairs."""
    d = data.xz[data.b[pair]] - data.xz[data.a[pair]]
    length = np.hypot(d[:, 0], d[:, 1])
    return length, d / length[:, None]


class _Model:
    """The LP over a set of (pair, group) members, for :func:`~bridgeopt.solver.adding.add_members`.

    Unlike the single-case LP (:mod:`bridgeopt.solver.lp`), which appends columns
    to a live HiGHS instance so that dual simplex restarts from the last basis,
    this model is rebuilt from scratch each round: a member brings rows (its 2K
    stress rows) as well as columns, and the interior point method used here has
    no warm start to keep.
    """

    def __init__(self, data: _Data, exact: bool):
        self.data = data
        self.exact = exact
        self.out: dict | None = None
        self.K = data.loads.shape[0]
        self.n2 = data.loads.shape[1]
        self.in_lp = np.zeros((len(data.a), len(data.groups)), dtype=bool)

    def add(self, pair: np.ndarray, group: np.ndarray) -> None:
        self.in_lp[pair, group] = True

    def solve(self, exact: bool | None = None) -> str:
        """Solve the LP over the members in it; the optimum goes to ``self.out``.

        Interior point, with crossover to a vertex when ``exact`` (default
        ``self.exact``).
        """
        exact = self.exact if exact is None else exact
        d, K, n2 = self.data, self.K, self.n2
        pair, grp = np.nonzero(self.in_lp)
        m = len(pair)
        length, unit = _geometry(d, pair)
        g = np.array([d.groups[i][1:] for i in range(len(d.groups))])  # (G, 4)
        st, sc, kw, price = (g[grp, j] for j in range(4))
        nfix = len(d.fixed)
        # columns: [a (m)] [q case 0 (m)] ... [q case K-1 (m)] [r case 0 (nfix)] ...
        n_eq = K * n2
        # rows: [eq case 0 (n2)] ... [t rows case k (m)] ... [c rows case k (m)]
        rows_t = n_eq + np.arange(K)[:, None] * m + np.arange(m)[None, :]
        rows_c = n_eq + K * m + np.arange(K)[:, None] * m + np.arange(m)[None, :]
        ea, eb = d.a[pair], d.b[pair]
        ri, ci, vi = [], [], []
        col = np.arange(m)
        half_w = -0.5 * kw * length
        # force columns: straight bars of free axial force, plus their stress rows
        bar_rows, bar = node_rows(ea, eb), bar_factors(unit)
        for k in range(K):
            off = k * n2
            # a columns: lumped weight in z rows, stress rows
            ri += [off + 2 * ea + 1, off + 2 * eb + 1, rows_t[k], rows_c[k]]
            ci += [col, col, col, col]
            vi += [half_w, half_w, -st, sc]
            qc = m * (1 + k) + col
            ri += [*(off + bar_rows).T, rows_t[k], rows_c[k]]
            ci += [qc] * 6
            vi += [*bar.T, np.ones(m), np.ones(m)]
            rc = m * (1 + K) + k * nfix + np.arange(nfix)
            ri.append(off + d.fixed)
            ci.append(rc)
            vi.append(np.ones(nfix))
        n_col = m * (1 + K) + K * nfix
        n_row = n_eq + 2 * K * m
        columns = triplet_columns(
            np.concatenate(ri), np.concatenate(ci), np.concatenate(vi), shape=(n_row, n_col),
            cost=np.concatenate([price * length, np.zeros(n_col - m)]),
            lower=np.concatenate([np.zeros(m)] + [np.where(sc == 0, 0.0, -INF)] * K
                                 + [np.full(K * nfix, -INF)]),
            upper=np.concatenate([np.full(m, INF)] + [np.where(st == 0, 0.0, INF)] * K
                                 + [np.full(K * nfix, INF)]))
        rhs = -d.loads.ravel()
        res = solve_columns(columns, np.concatenate([rhs, np.full(K * m, -INF), np.zeros(K * m)]),
                            np.concatenate([rhs, np.zeros(K * m), np.full(K * m, INF)]),
                            ipm=True, crossover=exact)
        self.out = None
        if res.status != "optimal":
            return res.status
        x = res.x
        self.out = {"pair": pair, "group": grp, "area": x[:m],
                    "force": x[m:m * (1 + K)].reshape(K, m).T,
                    "reactions": x[m * (1 + K):].reshape(K, nfix),
                    "duals": res.row_dual[:n_eq].reshape(K, n2), "objective": res.objective,
                    "length": length, "unit": unit}
        return "optimal"

    def price(self):
        """Violating (pair, group, ratio) at the last solve's duals."""
        return price_cases(self.data, self.in_lp, self.out["duals"])


def price_cases(data: _Data, in_lp: np.ndarray, y: np.ndarray, tol: float = PRICE_TOL):
    """The multi-case dual check (module docstring): violating (pair, group, ratio), or None.

    Parameters
    ----------
    data : _Data
        The dimensionless multi-case LP.
    in_lp : (n_pairs, groups) bool array
        Members in the LP (not priced).
    y : (K, 2n) float array
        Equality-row duals of each case. [-]
    tol : float
        Relative violation needed. [-]
    """
    d = data
    found = []
    n_pairs = len(d.a)
    yx, yz = y[:, 0::2], y[:, 1::2]            # (K, n)
    for s0 in range(0, n_pairs, PRICE_CHUNK):
        pair = np.arange(s0, min(n_pairs, s0 + PRICE_CHUNK))
        length, unit = _geometry(d, pair)
        a, b = d.a[pair], d.b[pair]
        # e_k = y_k . b_m: (m, K)
        e = ((yx[:, a] - yx[:, b]) * unit[:, 0] + (yz[:, a] - yz[:, b]) * unit[:, 1]).T
        zsum = (yz[:, a] + yz[:, b]).T                 # (m, K)
        for gi, (_, st, sc, kw, price) in enumerate(d.groups):
            free = ~in_lp[pair, gi]
            if not free.any():
                continue
            gain = np.maximum(st * e, -sc * e).clip(min=0.0) if (st and sc) else (
                np.maximum(st * e, 0.0) if st else np.maximum(-sc * e, 0.0))
            work = gain.sum(axis=1) - 0.5 * kw * length * zsum.sum(axis=1)
            cost = price * length
            bad = free & (work > cost * (1.0 + tol))
            if bad.any():
                found.append((pair[bad], np.full(bad.sum(), gi), work[bad] / cost[bad]))
    if not found:
        return None
    return tuple(np.concatenate(x) for x in zip(*found))


def _data(study: CaseStudy):
    problem = study.problem
    check_fits(problem, copies_of_pairs=2)  # areas and forces per case: more per pair
    grid = build_grid(problem)
    fixed = restrained_rows(problem, grid)
    a, b = candidate_pairs(problem, grid)
    x0, x1, z0, z1 = problem.domain.bounds
    ref_len = max(x1 - x0, z1 - z0)
    ref_force = max(study.total_load(k) for k in range(len(study.cases)))
    ref_sigma = problem.strength("tension")
    f = []
    for k in range(len(study.cases)):
        loads, lines = study.case_loads(k)
        f.append(nodal_loads(dataclasses.replace(problem, loads=loads, line_loads=lines), grid))
    f = np.array(f)                                          # (K, n, 2) [N]
    data = _Data(xz=(grid.xz - np.array(grid.origin)) / ref_len, a=a, b=b,
                 reach=np.abs(grid.ij[b] - grid.ij[a]).max(axis=1),
                 loads=(f / ref_force).reshape(len(study.cases), -1), fixed=fixed,
                 groups=_groups(study, ref_sigma, ref_len))
    return grid, f, data, (ref_len, ref_force, ref_sigma)


def optimize_cases(study: CaseStudy, *, member_adding: bool = True,
                   batch: int | None = None) -> CaseDesign:
    """Least-volume (or least-cost) structure carrying every load case of ``study``.

    Parameters
    ----------
    study : CaseStudy
        The problem, its load cases and (optionally) unit costs.
    member_adding : bool
        Add members by the dual check of the module docstring (default); False
        solves the whole ground structure in one LP (at most
        :data:`MAX_FULL_COLUMNS` columns).
    batch : int, optional
        Most members added per round (default max(1000, 10 % of those in the LP)). [-]

    Returns
    -------
    CaseDesign
        In SI units, members sized by their governing case.

    Raises
    ------
    InputError
        A load or support off the grid.
    SolveError
        No structure can carry every case, the full ground structure is too
        large, or HiGHS failed.

    References
    ----------
    .. [1] W.S. Hemp (1973), Optimum Structures, Clarendon Press (ch. 4).
    .. [2] T.J. Pritchard, M. Gilbert, A. Tyas (2005), 6th World Congress of
       Structural and Multidisciplinary Optimization.
    .. [3] M. Gilbert, A. Tyas (2003), Engineering Computations 20(8):1044-1064.
    """
    check_options(member_adding=member_adding, batch=batch)
    t0 = time.perf_counter()
    grid, f, data, (ref_len, ref_force, ref_sigma) = _data(study)
    K = len(study.cases)
    n_pairs, n_groups = len(data.a), len(data.groups)
    if not member_adding:
        cols = n_pairs * n_groups * (1 + K)
        if cols > MAX_FULL_COLUMNS:
            raise SolveError("too-large", f"the full ground structure has {cols} columns "
                             f"(> {MAX_FULL_COLUMNS}); use member adding or a coarser grid")
    # member adding solves by the interior point method without crossover and stops at a
    # proven gap; the full ground structure is solved to a vertex at once
    model = _Model(data, exact=not member_adding)
    result = add_members(model, data.reach, member_adding=member_adding, batch=batch,
                         gap_tol=GAP_TOL, max_rounds=MAX_ROUNDS)
    status, rounds, gap = result.status, result.rounds, result.gap
    if status == "optimal" and not model.exact:
        status = model.solve(exact=True)   # same members, solved to a vertex: clean forces
    raise_for_status(status, "no structure in the ground structure can carry every load case "
                     "to the supports")
    out = model.out
    return case_design(study, grid, f, data, out, ref_len, ref_force, ref_sigma, rounds,
                   time.perf_counter() - t0, int(model.in_lp.sum()), gap)


def single_case_reference(study: CaseStudy, case: int | None = None):
    """The single-case reference optimum (equal-strength elements) for one case of ``study``.

    Parameters
    ----------
    study : CaseStudy
        The problem and its load cases.
    case : int, optional
        Which case (default: the one with the largest total applied load, the
        first on a tie). [-]


    Returns
    -------
    (int, Design)
        The case's index and :func:`~bridgeopt.solver.layout.optimize_layout`'s design
        for that case alone.  A structure for every case is at least about as
        heavy (exactly at least as heavy when weightless; with self-weight the
        lumped and equal-strength models differ slightly, see docs/method.md).
    """
    from bridgeopt.solver.layout import optimize_layout

    if case is None:
        totals = [study.total_load(k) for k in range(len(study.cases))]
        case = int(np.argmax(totals))
    loads, lines = study.case_loads(case)
    return case, optimize_layout(dataclasses.replace(study.problem, loads=loads, line_loads=lines))
