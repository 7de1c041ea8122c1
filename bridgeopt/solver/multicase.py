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
a relative 1e-7; the result is then the full ground-structure optimum.  The
LP is held in one live HiGHS instance (:mod:`bridgeopt.solver.casemodel`), its
first members being the nearest-neighbour pairs and the pairs of each case's
single-case optimum.

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
from bridgeopt.solver.casemodel import CaseModel, geometry
from bridgeopt.solver.ground import build_grid, candidate_pairs
from bridgeopt.solver.highs import raise_for_status
from bridgeopt.solver.lumping import nodal_loads, restrained_rows
from bridgeopt.solver.lp import PRICE_CHUNK, PRICE_TOL

__all__ = ["CaseDesign", "optimize_cases", "single_case_reference", "MAX_FULL_COLUMNS"]

#: Without member adding, the whole ground structure goes into one LP; refuse
#: more columns than this (about a 12 x 12 grid with 4 cases), as the LP's
#: memory and time grow with cases x candidates.
MAX_FULL_COLUMNS = 400_000
#: Safety stop on member-adding rounds.
MAX_ROUNDS = 200
#: Member adding (one live HiGHS instance, :class:`~bridgeopt.solver.casemodel.CaseModel`)
#: solves its first rounds by the interior point method without crossover (cold
#: dual simplex is much slower on these degenerate LPs), crosses over to a vertex
#: once a round adds few members and re-solves by warm dual simplex from there,
#: adds the members that violate the dual check, and stops once the proven
#: relative optimality gap 1 - 1/max(work/cost) is below GAP_TOL (the dual check
#: is homogeneous in the duals: dividing them by the largest ratio makes every
#: column dual feasible and bounds the optimum from below).  Should the rounds end
#: in the interior, the last solution is crossed over to a vertex for clean
#: member forces.
GAP_TOL = 1e-6
#: First rounds by interior point without crossover; False: every round by dual
#: simplex (the first LP by interior point with crossover, to a basis).
IPM_ROUNDS = True
#: Interior point rounds go over to warm dual simplex once few members are added
#: (:data:`bridgeopt.solver.casemodel.SWITCH`).
SWITCH = True
#: Take members that stayed at zero area out of the LP (:class:`~bridgeopt.solver.adding.Pruner`).
PRUNE = True
#: Start member adding from the pairs of the single-case optima of the cases
#: (their envelope) instead of the nearest-neighbour pairs.
ENVELOPE_SEED = True
#: Lattice reach of the pairs in the first LP besides the seed.
START_REACH = 1
#: Fewest members added per round without ``batch`` (the default is max(this, 10 % of
#: those in the LP)): at 30 divisions and 3 cases, 500 instead of the single-case 1000
#: keeps the second interior point LP smaller and the warm simplex rounds shorter
#: (docs/benchmarks.md). [-]
MIN_BATCH = 500


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
        a, b = d.a[pair], d.b[pair]
        length, unit = geometry(d.xz, a, b)
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
        Most members added per round (default max(:data:`MIN_BATCH`, 10 % of those in
        the LP)). [-]

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
    # one live HiGHS instance: first LP by ipm with crossover, then warm dual simplex, members
    # at zero area leave (CaseModel); member adding stops at a proven gap
    model = CaseModel(data, price=price_cases, prune=member_adding and PRUNE,
                      ipm=member_adding and IPM_ROUNDS, switch=SWITCH)
    seed = _envelope(study) if member_adding and ENVELOPE_SEED else None
    result = add_members(model, data.reach, member_adding=member_adding, batch=batch,
                         gap_tol=GAP_TOL, max_rounds=MAX_ROUNDS, seed=seed,
                         seed_reach=START_REACH, min_batch=MIN_BATCH)
    status, rounds, gap = result.status, result.rounds, result.gap
    if status == "optimal" and not model.vertex:
        before = model.out["objective"] * (1.0 - gap)   # proven lower bound of the rounds
        status = model.to_vertex()   # crossover from the interior point: clean forces
        if status == "optimal" and member_adding:
            # the vertex duals give their own bound: the proven gap is the better of the two
            value, found = model.out["objective"], model.price()
            bound = value if found is None else value / float(found[2].max())
            gap = max(0.0, 1.0 - max(before, bound) / value)
    raise_for_status(status, "no structure in the ground structure can carry every load case "
                     "to the supports")
    design = case_design(study, grid, f, data, model.out, ref_len, ref_force, ref_sigma,
                         rounds, time.perf_counter() - t0, int(model.in_lp.sum()), gap)
    design.stats.update(dropped=model.dropped, vertex=model.vertex)
    return design


def _envelope(study: CaseStudy) -> np.ndarray:
    """Pairs active in the single-case reference optimum of any case (first LP's members).

    The cases alone are solved on the same grid and candidates
    (:func:`~bridgeopt.solver.layout.solve_layout_lp`), so their pair indices are ours.
    """
    from bridgeopt.solver.layout import solve_layout_lp

    pairs = []
    for k in range(len(study.cases)):
        loads, lines = study.case_loads(k)
        try:
            sol = solve_layout_lp(dataclasses.replace(study.problem, loads=loads,
                                                      line_loads=lines))[3]
        except SolveError:
            continue        # the multi-case LP says why, or finds its own start
        pairs.append(sol.pair)
    return np.unique(np.concatenate(pairs)) if pairs else None


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
