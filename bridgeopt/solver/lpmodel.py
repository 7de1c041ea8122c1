"""The single-case layout LP held in one HiGHS instance, round by round.

:class:`LayoutModel` is the :class:`~bridgeopt.solver.adding.MemberModel` of
:func:`bridgeopt.solver.lp.solve_lp`: columns are appended to (and, once they
stayed at zero force, deleted from) one live HiGHS instance, so each dual
simplex re-solve starts from the previous basis.  :func:`vertex_solve` turns
an interior point optimum into a vertex one.  The columns and the dual check
come from :mod:`bridgeopt.solver.lp` (passed in, so that this module does not
import it).

References
----------
.. [1] Q. Huangfu, J.A.J. Hall (2018), "Parallelizing the dual revised simplex
   method", Math. Prog. Comp. 10:119-142 (HiGHS).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from bridgeopt.solver.adding import Pruner, solve_with_removal
from bridgeopt.solver.highs import (add_columns, basic_columns, model_status, new_highs,
                                    unit_columns)

__all__ = ["LayoutModel", "vertex_solve", "VERTEX", "FIRST_IPM", "FIRST_DROP_RATIO",
           "ACTIVE_FORCE", "ZERO_FORCE"]

#: After interior point rounds, re-solve the columns they use by dual simplex for a
#: vertex (basic) optimum: forces on few members, exact duals.
VERTEX = True
#: Columns with a force above this fraction of the largest are reported (and kept
#: for the vertex re-solve). [-]
ACTIVE_FORCE = 1e-9
#: A column with a force at most this fraction of the largest is "at zero" for
#: the removal of columns (:class:`~bridgeopt.solver.adding.Pruner`). [-]
ZERO_FORCE = 1e-9
#: Simplex-sized LPs solve their first (cold) LP by interior point with crossover
#: to a basis, then re-solve by warm dual simplex.
FIRST_IPM = True
#: With ``first_drop``, the columns of the first LP that are nonbasic at zero force at
#: its vertex optimum and have u.a/c below this (reduced cost d above (1 - this) times
#: their cost c, as u.a/c = 1 - d/c) leave before the second solve, not after
#: :data:`~bridgeopt.solver.adding.DROP_AFTER` solves (half the dual simplex work of a
#: coarse-started LP, docs/benchmarks.md). [-]
FIRST_DROP_RATIO = 0.8


class LayoutModel:
    """The layout LP held in one HiGHS instance, for :func:`~bridgeopt.solver.adding.add_members`.

    Columns are appended to the live instance, so each round's dual simplex
    starts from the previous basis (a warm start); columns at zero force for
    :data:`~bridgeopt.solver.adding.DROP_AFTER` solves are deleted from it
    (:class:`~bridgeopt.solver.adding.Pruner`).  The multi-case LP has its own
    live model, :class:`bridgeopt.solver.casemodel.CaseModel`.

    Parameters
    ----------
    data : LPData
        The dimensionless LP (:class:`bridgeopt.solver.lp.LPData`).
    ipm : bool
        Solve by interior point without crossover; otherwise by dual simplex (the
        first LP by interior point with crossover when :data:`FIRST_IPM`).
    prune : bool
        Delete columns that stayed at zero force (:class:`~bridgeopt.solver.adding.Pruner`).
    columns : callable
        ``columns(data, pair, s) -> (pairs kept, ColumnSet)``
        (:func:`bridgeopt.solver.lp.lp_columns`).
    price : callable
        ``price(data, in_lp, duals) -> (pair, sense, ratio) or None``
        (:func:`bridgeopt.solver.lp.price_candidates`).
    first_drop : bool
        After the first solve (interior point with crossover, with ``prune``), the
        nonbasic zero-force columns with u.a/c below :data:`FIRST_DROP_RATIO` leave at
        once (for a first LP seeded generously, e.g. from a coarser grid).
    """

    #: Columns with a force above this fraction of the largest are in use. [-]
    active = ACTIVE_FORCE

    def __init__(self, data, *, ipm: bool, prune: bool = True, columns: Callable,
                 price: Callable, first_drop: bool = False):
        self.data = data
        self.columns, self.pricer = columns, price
        n2 = 2 * len(data.xz)
        self.h = new_highs(ipm=ipm)
        rhs = -np.asarray(data.load, dtype=float)
        self.h.addRows(n2, rhs, rhs, 0, np.zeros(n2, dtype=np.int32),
                       np.zeros(0, dtype=np.int32), np.zeros(0))
        # free reactions on the restrained rows come first
        add_columns(self.h, unit_columns(data.fixed, n2))
        self.nfix = len(data.fixed)
        self.in_lp = np.zeros((len(data.a), 2), dtype=bool)
        self.pair = np.zeros(0, dtype=np.int64)
        self.sense = np.zeros(0, dtype=np.int8)
        #: Cost of each member column, in LP order. [-]
        self.cost = np.zeros(0)
        self.pruner = Pruner(len(data.a), 2) if prune else None
        #: Whether the solves give a vertex (basic) solution.
        self.vertex = not ipm
        #: Columns taken out of the LP for staying at zero force.
        self.dropped = 0
        #: Solve the first LP by interior point with crossover (then warm dual simplex).
        self.first_ipm = not ipm and FIRST_IPM
        self.first_drop = first_drop and self.first_ipm and prune
        self.solves = 0

    def add(self, pair: np.ndarray, group: np.ndarray) -> None:
        """Put the members (pair[i], sense group[i]) in the LP (those in it already are skipped).

        Parameters
        ----------
        pair, group : (m,) int arrays
            Candidate pair and sense (0 tension, 1 compression) of each member. [-]
        """
        for s in range(2):
            chosen = pair[group == s]
            kept, columns = self.columns(self.data, chosen[~self.in_lp[chosen, s]], s)
            # columns no element can span stay out (and are never violated: nan cost)
            self.in_lp[kept, s] = True
            if len(kept):
                add_columns(self.h, columns)
                self.pair = np.concatenate([self.pair, kept])
                self.sense = np.concatenate([self.sense, np.full(len(kept), s, dtype=np.int8)])
                self.cost = np.concatenate([self.cost, columns.cost])
                if self.pruner is not None:
                    self.pruner.added(len(kept))

    def remove_due(self) -> tuple[np.ndarray, np.ndarray]:
        """Delete the columns that stayed at zero force (nonbasic ones, where there is a basis).

        Returns the (pair, sense) of the deleted columns.
        """
        basic = basic_columns(self.h)
        removable = np.ones(len(self.pair), dtype=bool) if basic is None else ~basic[self.nfix:]
        drop = self.pruner.pick(self.pair, self.sense, removable)
        gone = self.pair[drop], self.sense[drop].astype(np.int64)
        if drop.any():
            where = np.nonzero(drop)[0]
            self.h.deleteCols(len(where), (where + self.nfix).astype(np.int32))
            self.in_lp[gone] = False
            self.pair, self.sense = self.pair[~drop], self.sense[~drop]
            self.cost = self.cost[~drop]
            self.dropped += len(where)
        return gone

    def solve(self) -> str:
        """Remove the columns due to leave, then solve: ``"optimal"`` or HiGHS's words.

        With the safety nets of :func:`~bridgeopt.solver.adding.solve_with_removal`.
        """
        status = solve_with_removal(self)
        if self.pruner is not None and status == "optimal":
            force = self.forces()
            at_zero = force <= ZERO_FORCE * force.max(initial=0.0)
            self.pruner.solved(at_zero)
            if self.first_drop and self.solves == 1:
                self.pruner.due_now(at_zero & self._far_from_entering())
        return status

    def _far_from_entering(self) -> np.ndarray:
        """Member columns (LP order) nonbasic with u.a/c below :data:`FIRST_DROP_RATIO`."""
        basic = basic_columns(self.h)
        if basic is None:
            return np.zeros(len(self.pair), dtype=bool)
        reduced = np.asarray(self.h.getSolution().col_dual)[self.nfix:]
        # u.a / c = 1 - d / c (every member column costs c > 0)
        return ~basic[self.nfix:] & (reduced > (1.0 - FIRST_DROP_RATIO) * self.cost)

    def run_once(self) -> str:
        """One HiGHS solve of the LP as it stands: ``"optimal"`` or HiGHS's words."""
        first = self.solves == 0 and self.first_ipm
        if first:
            self.h.setOptionValue("solver", "ipm")
            self.h.setOptionValue("run_crossover", "on")
        self.h.run()
        if first:
            self.h.setOptionValue("solver", "simplex")
        self.solves += 1
        return model_status(self.h)

    def forces(self) -> np.ndarray:
        """Force of each member column of the last solve, in LP order. [-]"""
        return np.asarray(self.h.getSolution().col_value)[self.nfix:]

    def price(self):
        """(pair, sense, ratio work/cost) of the columns out of the LP that violate the dual
        check at the last solve's duals, or None."""
        return self.pricer(self.data, self.in_lp,
                                np.asarray(self.h.getSolution().row_dual))

    def arrays(self):
        """(pair, sense) of the LP's member columns, in LP order. [-]"""
        return self.pair, self.sense


def vertex_solve(model: LayoutModel, objective: float, gap: float):
    """A vertex optimum by dual simplex over the columns the interior point solution uses.

    Those columns hold a solution of the interior point objective, so the
    restricted optimum is at most that; the proven lower bound on the full
    optimum is the better of the interior point one and the vertex duals' own
    (priced over every candidate).

    Parameters
    ----------
    model : LayoutModel
        The model after its last (interior point) solve.
    objective : float
        Its objective. [-]
    gap : float
        The proven relative optimality gap of that objective. [-]

    Returns
    -------
    (LayoutModel, float, float)
        The vertex model, its objective [-] and its proven gap [-]; ``model``,
        ``objective`` and ``gap`` unchanged when the restricted LP has no optimum.
    """
    force = model.forces()
    used = force > ACTIVE_FORCE * force.max(initial=0.0)
    pair, sense = model.arrays()
    simplex = LayoutModel(model.data, ipm=False, prune=False, columns=model.columns,
                          price=model.pricer)
    simplex.add(pair[used], sense[used].astype(np.int64))
    if simplex.solve() != "optimal":
        return model, objective, gap
    value = float(simplex.h.getInfo().objective_function_value)
    bound = objective * (1.0 - gap)
    found = simplex.price()
    bound = max(bound, value if found is None else value / float(found[2].max()))
    simplex.vertex = True
    simplex.dropped = model.dropped
    return simplex, value, max(0.0, 1.0 - bound / value)
