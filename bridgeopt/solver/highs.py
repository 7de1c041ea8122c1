"""One way to state an LP for HiGHS: sparse column sets, the solver set-up and its status.

Every LP of the package -- the single-case layout LP (:mod:`bridgeopt.solver.lp`),
the multi-case LP (:mod:`bridgeopt.solver.multicase`), the sequential LP of
geometry optimization (:mod:`bridgeopt.geometry.optimize`) and the balance check
of a proposed layout (:mod:`bridgeopt.study.judge`) -- is a set of columns: a
cost, bounds and a sparse block of constraint coefficients.  A
:class:`ColumnSet` holds them as a scipy CSC matrix built from COO triplets
(row, column, value) or from a few (row, value) entries per column; sets are
stacked side by side and either solved whole (:func:`solve_columns`) or added to
a running HiGHS instance (:func:`add_columns`: member adding's warm start).
No dense constraint matrix is ever formed.

References
----------
.. [1] Q. Huangfu, J.A.J. Hall (2018), "Parallelizing the dual revised simplex
   method", Math. Prog. Comp. 10:119-142 (HiGHS).
"""

from __future__ import annotations

import os
from dataclasses import dataclass

import highspy
import numpy as np
from scipy import sparse

from bridgeopt.errors import SolveError

__all__ = ["INF", "FEASIBILITY_TOL", "DEFAULT_TOL", "ColumnSet", "entry_columns", "triplet_columns", "unit_columns",
           "stack_columns", "node_rows", "new_highs", "add_columns", "model_status",
           "solve_columns", "LPResult", "raise_for_status", "basic_columns"]

#: HiGHS's infinite bound.
INF = highspy.kHighsInf
#: Primal and dual feasibility tolerance of the layout LPs (they are dimensionless).
FEASIBILITY_TOL = 1e-9
#: HiGHS's own default feasibility tolerance.
DEFAULT_TOL = 1e-7


@dataclass(frozen=True)
class ColumnSet:
    """LP columns: cost, bounds and their coefficients in the constraint rows.

    Parameters
    ----------
    cost : (m,) float array
        Objective coefficient of each column. [-]
    lower, upper : (m,) float arrays
        Column bounds (:data:`INF` for none). [-]
    matrix : scipy.sparse.csc_matrix, shape (rows, m)
        Constraint coefficients. [-]
    """

    cost: np.ndarray
    lower: np.ndarray
    upper: np.ndarray
    matrix: sparse.csc_matrix

    @property
    def size(self) -> int:
        """Number of columns."""
        return self.matrix.shape[1]


def _bounds(value, m: int) -> np.ndarray:
    return np.broadcast_to(np.asarray(value, dtype=float), (m,)).astype(float)


def node_rows(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Equilibrium rows (x of a, z of a, x of b, z of b) of members from ``a`` to ``b``, (m, 4).

    Parameters
    ----------
    a, b : (m,) int arrays
        Member end nodes; node i has rows 2i (x) and 2i + 1 (z). [-]

    Returns
    -------
    (m, 4) int array
        Columns 2a, 2a + 1, 2b, 2b + 1. [-]
    """
    a, b = np.asarray(a), np.asarray(b)
    return np.column_stack([2 * a, 2 * a + 1, 2 * b, 2 * b + 1])


def entry_columns(cost, rows: np.ndarray, vals: np.ndarray, n_rows: int, *,
                  lower=0.0, upper=INF) -> ColumnSet:
    """Columns with (at most) r entries each, given as (m, r) rows and values.

    Zero values are dropped; the entries keep their order within a column.

    Parameters
    ----------
    cost : (m,) float array
        Column costs. [-]
    rows, vals : (m, r) arrays
        Row index and coefficient of each entry. [-]
    n_rows : int
        Rows of the LP. [-]
    lower, upper : float or (m,) array
        Column bounds. [-]

    Returns
    -------
    ColumnSet
        m columns over ``n_rows`` rows.
    """
    cost = np.asarray(cost, dtype=float)
    m = len(cost)
    nz = vals != 0.0
    indptr = np.zeros(m + 1, dtype=np.int64)
    np.cumsum(nz.sum(axis=1), out=indptr[1:])
    matrix = sparse.csc_matrix((vals[nz].astype(float), rows[nz].astype(np.int32), indptr),
                               shape=(n_rows, m))
    return ColumnSet(cost, _bounds(lower, m), _bounds(upper, m), matrix)


def triplet_columns(rows, cols, vals, *, shape: tuple[int, int], cost, lower=0.0,
                    upper=INF) -> ColumnSet:
    """Columns from COO triplets (row, column, value); zeros dropped, rows sorted per column.

    Parameters
    ----------
    rows, cols, vals : 1-d arrays
        One entry each (no repeated (row, column) pair). [-]
    shape : (int, int)
        Rows of the LP and number of columns. [-]
    cost : float or (m,) array
        Column costs. [-]
    lower, upper : float or (m,) array
        Column bounds. [-]

    Returns
    -------
    ColumnSet
        ``shape[1]`` columns over ``shape[0]`` rows.
    """
    vals = np.asarray(vals, dtype=float)
    keep = vals != 0.0
    matrix = sparse.coo_matrix((vals[keep], (np.asarray(rows)[keep], np.asarray(cols)[keep])),
                               shape=shape).tocsc()
    m = shape[1]
    return ColumnSet(_bounds(cost, m), _bounds(lower, m), _bounds(upper, m), matrix)


def unit_columns(rows, n_rows: int, *, cost=0.0, lower=-INF, upper=INF,
                 value: float = 1.0) -> ColumnSet:
    """One column per row in ``rows`` with the single entry ``value`` there (reactions, slacks).

    Parameters
    ----------
    rows : (m,) int array
        The row of each column. [-]
    n_rows : int
        Rows of the LP. [-]
    cost : float or (m,) array
        Column costs (default 0). [-]
    lower, upper : float or (m,) array
        Column bounds (default free). [-]
    value : float
        The entry. [-]

    Returns
    -------
    ColumnSet
        m columns over ``n_rows`` rows.
    """
    rows = np.asarray(rows, dtype=np.int32)
    m = len(rows)
    matrix = sparse.csc_matrix((np.full(m, float(value)), rows, np.arange(m + 1)),
                               shape=(n_rows, m))
    return ColumnSet(_bounds(cost, m), _bounds(lower, m), _bounds(upper, m), matrix)


def stack_columns(*sets: ColumnSet) -> ColumnSet:
    """The column sets side by side, in order.

    Parameters
    ----------
    *sets : ColumnSet
        Column sets over the same rows.

    Returns
    -------
    ColumnSet
        Their columns, first set first.
    """
    return ColumnSet(np.concatenate([s.cost for s in sets]),
                     np.concatenate([s.lower for s in sets]),
                     np.concatenate([s.upper for s in sets]),
                     sparse.hstack([s.matrix for s in sets], format="csc"))


def new_highs(*, ipm: bool, crossover: bool = False,
              tolerance: float = FEASIBILITY_TOL) -> highspy.Highs:
    """A silent HiGHS instance (its start-up banner does not reach stdout).

    Parameters
    ----------
    ipm : bool
        Interior point method; otherwise the dual simplex method.
    crossover : bool
        With ``ipm``, cross over to a vertex (exact duals, clean forces).
    tolerance : float
        Primal and dual feasibility tolerance. [-]

    Returns
    -------
    highspy.Highs
        With output off and the method and tolerances set.
    """
    fd = os.dup(1)
    try:
        with open(os.devnull, "w") as null:
            os.dup2(null.fileno(), 1)
            h = highspy.Highs()
    finally:
        os.dup2(fd, 1)
        os.close(fd)
    h.setOptionValue("output_flag", False)
    if ipm:
        h.setOptionValue("solver", "ipm")
        h.setOptionValue("run_crossover", "on" if crossover else "off")
    else:
        h.setOptionValue("solver", "simplex")
    h.setOptionValue("primal_feasibility_tolerance", tolerance)
    h.setOptionValue("dual_feasibility_tolerance", tolerance)
    return h


def add_columns(h: highspy.Highs, columns: ColumnSet) -> None:
    """Append ``columns`` to the LP held by ``h`` (its rows must exist).

    Parameters
    ----------
    h : highspy.Highs
        A HiGHS instance holding the LP's rows.
    columns : ColumnSet
        The columns to append.
    """
    mat = columns.matrix
    if columns.size == 0:
        return
    h.addCols(columns.size, columns.cost, columns.lower, columns.upper, int(mat.nnz),
              mat.indptr[:-1].astype(np.int32), mat.indices.astype(np.int32), mat.data)


def basic_columns(h: highspy.Highs) -> np.ndarray | None:
    """Which columns are basic in HiGHS's current basis, or None when it has none.

    Reads HiGHS's list of basic variables (one per row: a column index, or
    ``-1 - row`` for a row's slack), about ten times faster than converting every
    column's basis status one by one.

    Parameters
    ----------
    h : highspy.Highs
        The instance, after a solve.

    Returns
    -------
    (num_col,) bool array or None
        True for the basic columns.
    """
    if not h.getBasis().valid:
        return None
    status, basic = h.getBasicVariables()
    if status != highspy.HighsStatus.kOk:
        # no factored basis to read from: each column's status, one by one
        kind = int(highspy.HighsBasisStatus.kBasic)
        return np.array([int(c) == kind for c in h.getBasis().col_status], dtype=bool)
    basic = np.asarray(basic, dtype=np.int64)
    out = np.zeros(h.getNumCol(), dtype=bool)
    out[basic[basic >= 0]] = True
    return out


def model_status(h: highspy.Highs) -> str:
    """``"optimal"``, ``"infeasible"`` or HiGHS's own words for the model status.

    Parameters
    ----------
    h : highspy.Highs
        A HiGHS instance after ``run()``.

    Returns
    -------
    str
        ``"optimal"``, ``"infeasible"`` (also for unbounded-or-infeasible) or
        HiGHS's status string.
    """
    status = h.getModelStatus()
    if status == highspy.HighsModelStatus.kOptimal:
        return "optimal"
    if status in (highspy.HighsModelStatus.kInfeasible,
                  highspy.HighsModelStatus.kUnboundedOrInfeasible):
        return "infeasible"
    return h.modelStatusToString(status)


@dataclass(frozen=True)
class LPResult:
    """Outcome of :func:`solve_columns`.

    Parameters
    ----------
    status : str
        As :func:`model_status`.
    x : (m,) float array or None
        Column values (None unless optimal). [-]
    row_dual : (rows,) float array or None
        Row duals (HiGHS's sign convention). [-]
    objective : float
        Optimal objective (nan unless optimal). [-]
    """

    status: str
    x: np.ndarray | None = None
    row_dual: np.ndarray | None = None
    objective: float = float("nan")


def solve_columns(columns: ColumnSet, row_lower, row_upper, *, ipm: bool = False,
                  crossover: bool = False, tolerance: float = FEASIBILITY_TOL) -> LPResult:
    """Minimise ``cost . x`` over ``columns`` with ``row_lower <= A x <= row_upper``.

    Parameters
    ----------
    columns : ColumnSet
        Every column of the LP.
    row_lower, row_upper : (rows,) float arrays
        Row bounds (equal for an equality). [-]
    ipm, crossover : bool
        Method, as :func:`new_highs`.
    tolerance : float
        Feasibility tolerance, as :func:`new_highs`. [-]

    Returns
    -------
    LPResult
        Its status, and the solution and duals when optimal.
    """
    mat = columns.matrix
    n_row, n_col = mat.shape
    lp = highspy.HighsLp()
    lp.num_col_, lp.num_row_ = int(n_col), int(n_row)
    lp.col_cost_, lp.col_lower_, lp.col_upper_ = columns.cost, columns.lower, columns.upper
    lp.row_lower_ = np.asarray(row_lower, dtype=float)
    lp.row_upper_ = np.asarray(row_upper, dtype=float)
    lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    lp.a_matrix_.num_col_, lp.a_matrix_.num_row_ = int(n_col), int(n_row)
    lp.a_matrix_.start_ = mat.indptr.astype(np.int32)
    lp.a_matrix_.index_ = mat.indices.astype(np.int32)
    lp.a_matrix_.value_ = mat.data.astype(float)
    h = new_highs(ipm=ipm, crossover=crossover, tolerance=tolerance)
    h.passModel(lp)
    h.run()
    status = model_status(h)
    if status != "optimal":
        return LPResult(status)
    sol = h.getSolution()
    return LPResult(status, np.asarray(sol.col_value), np.asarray(sol.row_dual),
                    float(h.getInfo().objective_function_value))


def raise_for_status(status: str, infeasible: str) -> None:
    """Raise :class:`SolveError` unless ``status`` is ``"optimal"``.

    Parameters
    ----------
    status : str
        As :func:`model_status`.
    infeasible : str
        The message when the LP is infeasible.
    """
    if status == "infeasible":
        raise SolveError("infeasible", infeasible)
    if status != "optimal":
        raise SolveError("solver", f"HiGHS stopped without a proven optimum: {status}")
