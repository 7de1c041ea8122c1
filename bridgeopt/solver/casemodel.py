"""The multi-case layout LP held in one HiGHS instance, round by round.

:class:`CaseModel` is the :class:`~bridgeopt.solver.adding.MemberModel` of
:func:`bridgeopt.solver.multicase.optimize_cases` (formulation in that module's
docstring).  A member brings 1 + K columns (its area and one force per load
case) and its stress rows; both are appended to one live HiGHS instance
(``addCols``, then ``addRows`` on the new columns), so that each round's dual
simplex starts from the last basis: the new rows enter with basic slacks and
the new columns nonbasic at zero.  The first (cold) LP is solved by interior
point with crossover, to a basis.  Members that stayed at zero area for
:data:`~bridgeopt.solver.adding.DROP_AFTER` solves, with every column of theirs
nonbasic, leave the instance (``deleteRows`` of their stress rows, whose
slacks are then basic, and ``deleteCols``), so the basis stays valid
(:class:`~bridgeopt.solver.adding.Pruner`, with the same safety nets as the
single-case :class:`~bridgeopt.solver.lpmodel.LayoutModel`).  Members at zero
area at the crossover are due to leave at the first warm solve (:data:`EARLY_DROP`):
those with every column nonbasic leave without changing the basis or the duals.

A stress row that only repeats a bound is left out: a tension-only group has
q_k >= 0 as the force column's lower bound (its row q_k + 0 a >= 0 says the
same), a compression-only group q_k <= 0 as its upper bound.  This is exact
and halves the stress rows when tension and compression are priced apart.

References
----------
.. [1] M. Gilbert, A. Tyas (2003), "Layout optimization of large-scale
   pin-jointed frames", Engineering Computations 20(8):1044-1064.
.. [2] Q. Huangfu, J.A.J. Hall (2018), "Parallelizing the dual revised simplex
   method", Math. Prog. Comp. 10:119-142 (HiGHS).
"""

from __future__ import annotations

from collections.abc import Callable

import highspy
import numpy as np

from bridgeopt.solver.adding import Pruner, solve_with_removal
from bridgeopt.solver.elements import bar_factors
from bridgeopt.solver.highs import (
    INF,
    add_columns,
    basic_columns,
    model_status,
    new_highs,
    node_rows,
    triplet_columns,
    unit_columns,
)

__all__ = ["SWITCH", "WARM_BASIS", "ZERO_AREA", "CaseModel", "geometry"]

#: A member with an area at most this fraction of the largest is "at zero" for the
#: removal of members (:class:`~bridgeopt.solver.adding.Pruner`). [-]
ZERO_AREA = 1e-9
#: New force columns enter the basis in place of a stress row slack each.
WARM_BASIS = True
#: Members at zero area at the crossover are due to leave at the next solve.
EARLY_DROP = True
#: Interior point rounds go over to a vertex (crossover from their last solution) and
#: warm dual simplex once a round adds at most this fraction of the members. [-]
SWITCH = 0.1


def geometry(xz: np.ndarray, a: np.ndarray, b: np.ndarray):
    """Length and unit vector (a to b) of the members from node ``a`` to node ``b``.

    Parameters
    ----------
    xz : (n, 2) float array
        Node coordinates. [-]
    a, b : (m,) int arrays
        End nodes. [-]

    Returns
    -------
    ((m,) float array, (m, 2) float array)
        Lengths [-] and unit vectors [-].
    """
    d = xz[b] - xz[a]
    length = np.hypot(d[:, 0], d[:, 1])
    return length, d / length[:, None]


class CaseModel:
    """The multi-case LP in one HiGHS instance, for :func:`~bridgeopt.solver.adding.add_members`.

    Parameters
    ----------
    data : _Data
        The dimensionless multi-case LP (:mod:`bridgeopt.solver.multicase`).
    price : callable
        ``price(data, in_lp, duals) -> (pair, group, ratio) or None``
        (:func:`bridgeopt.solver.multicase.price_cases`).
    prune : bool
        Take out members that stayed at zero area (:class:`~bridgeopt.solver.adding.Pruner`).
    ipm : bool
        Solve the rounds by interior point without crossover (no warm start, no
        removal) until ``switch`` says otherwise; else the first LP by interior
        point with crossover and the rest by warm dual simplex.
    switch : bool
        With ``ipm``, cross over to a vertex and go on by warm dual simplex (with
        removal) once a round adds at most :data:`SWITCH` of the members.
    """

    def __init__(self, data, *, price: Callable, prune: bool = True, ipm: bool = False,
                 switch: bool = True):
        self.data, self.pricer = data, price
        self.K, self.n2 = data.loads.shape
        K, n2 = self.K, self.n2
        self.h = new_highs(ipm=ipm)
        rhs = -np.asarray(data.loads, dtype=float).ravel()
        self.h.addRows(K * n2, rhs, rhs, 0, np.zeros(K * n2, dtype=np.int32),
                       np.zeros(0, dtype=np.int32), np.zeros(0))
        # free reactions on the restrained rows of every case come first
        fixed = np.asarray(data.fixed)
        add_columns(self.h, unit_columns((np.arange(K)[:, None] * n2 + fixed).ravel(), K * n2))
        self.n_react = K * len(fixed)
        self.in_lp = np.zeros((len(data.a), len(data.groups)), dtype=bool)
        #: (pair, group) of each LP member, in LP order.
        self.pair = np.zeros(0, dtype=np.int64)
        self.group = np.zeros(0, dtype=np.int64)
        #: Owner (LP position) and role (0 area, 1 + k force in case k) of each member column.
        self.col_member = np.zeros(0, dtype=np.int64)
        self.col_role = np.zeros(0, dtype=np.int64)
        #: Owner (LP position) of each stress row, after the K * 2n equilibrium rows.
        self.row_member = np.zeros(0, dtype=np.int64)
        self.pruner = Pruner(*self.in_lp.shape) if prune and not ipm else None
        self.ipm, self.prune, self.switch = ipm, prune, switch
        #: Whether the solves give a vertex (basic) solution.
        self.vertex = not ipm
        #: Members taken out of the LP for staying at zero area.
        self.dropped = 0
        self.solves = 0
        self.out: dict | None = None
        g = np.array([grp[1:] for grp in data.groups], dtype=float)   # (G, 4)
        self._st, self._sc, self._kw, self._price = g.T

    # ------------------------------------------------------------------ building

    def add(self, pair: np.ndarray, group: np.ndarray) -> None:
        """Put the members (pair[i], group[i]) in the LP (those in it already are skipped).

        Parameters
        ----------
        pair, group : (m,) int arrays
            Candidate pair and element group of each member. [-]
        """
        pair, group = np.asarray(pair, dtype=np.int64), np.asarray(group, dtype=np.int64)
        key = np.unique(pair * self.in_lp.shape[1] + group)
        pair, group = np.divmod(key, self.in_lp.shape[1])
        new = ~self.in_lp[pair, group]
        pair, group = pair[new], group[new]
        m = len(pair)
        if m == 0:
            return
        if self.ipm and self.switch and self.out is not None and m <= SWITCH * len(self.pair):
            self.to_vertex()
        d, K, n2 = self.data, self.K, self.n2
        st, sc, kw, price = (v[group] for v in (self._st, self._sc, self._kw, self._price))
        length, unit = geometry(d.xz, d.a[pair], d.b[pair])
        ea, eb = d.a[pair], d.b[pair]
        col = np.arange(m)
        half_w = -0.5 * kw * length
        bar_rows, bar = node_rows(ea, eb), bar_factors(unit)
        ri, ci, vi = [], [], []
        for k in range(K):
            off = k * n2
            ri += [off + 2 * ea + 1, off + 2 * eb + 1]       # area: lumped weight, z rows
            ci += [col, col]
            vi += [half_w, half_w]
            ri += list((off + bar_rows).T)                  # force in case k
            ci += [(1 + k) * m + col] * 4
            vi += list(bar.T)
        n_col = m * (1 + K)
        columns = triplet_columns(
            np.concatenate(ri), np.concatenate(ci), np.concatenate(vi), shape=(K * n2, n_col),
            cost=np.concatenate([price * length, np.zeros(K * m)]),
            lower=np.concatenate([np.zeros(m)] + [np.where(sc == 0, 0.0, -INF)] * K),
            upper=np.concatenate([np.full(m, INF)] + [np.where(st == 0, 0.0, INF)] * K))
        base = self.h.getNumCol()
        add_columns(self.h, columns)
        # stress rows on the new columns: q - st a <= 0 (st > 0), q + sc a >= 0 (sc > 0)
        first = len(self.pair)
        idx, val, lo, up, owner = [], [], [], [], []
        row0 = self.h.getNumRow()
        # each new force column goes into the basis in place of one of its stress rows'
        # slacks (that row then at its bound 0): the member's columns then price exactly
        # as the dual check, and only a violating area column is dual infeasible
        swap_col, swap_row, swap_upper = [], [], []
        at = row0
        for k in range(K):
            q = base + (1 + k) * m + col
            taken = np.zeros(m, dtype=bool)
            for coef, lower, upper in ((-st, -INF, 0.0), (sc, 0.0, INF)):
                on = coef != 0.0
                idx.append(np.column_stack([q[on], base + col[on]]).ravel())
                val.append(np.column_stack([np.ones(on.sum()), coef[on]]).ravel())
                lo.append(np.full(on.sum(), lower))
                up.append(np.full(on.sum(), upper))
                owner.append(first + col[on])
                pick = on[on] & ~taken[on]
                swap_col.append(q[on][pick])
                swap_row.append(at + np.nonzero(pick)[0])
                swap_upper.append(np.full(pick.sum(), upper == 0.0))
                taken |= on
                at += int(on.sum())
        idx, val = np.concatenate(idx).astype(np.int32), np.concatenate(val)
        n_row = len(idx) // 2
        self.h.addRows(n_row, np.concatenate(lo), np.concatenate(up), len(idx),
                       np.arange(0, 2 * n_row, 2, dtype=np.int32), idx, val)
        if self.solves and WARM_BASIS and not self.ipm:
            self._swap(np.concatenate(swap_col), np.concatenate(swap_row),
                       np.concatenate(swap_upper))
        self.in_lp[pair, group] = True
        self.pair = np.concatenate([self.pair, pair])
        self.group = np.concatenate([self.group, group])
        self.col_member = np.concatenate([self.col_member, np.tile(first + col, 1 + K)])
        self.col_role = np.concatenate([self.col_role, np.repeat(np.arange(1 + K), m)])
        self.row_member = np.concatenate([self.row_member, *owner])
        if self.pruner is not None:
            self.pruner.added(m)

    def to_vertex(self) -> str:
        """Cross over from the last interior point solution to a vertex; later solves by
        warm dual simplex (with removal of members, when asked for).

        Should the crossover fail, the LP is solved again by interior point with crossover.
        """
        h = self.h
        h.crossover(h.getSolution())
        status = model_status(h)
        if status != "optimal" or not h.getBasis().valid:
            h.clearSolver()
            h.setOptionValue("run_crossover", "on")
            h.run()
            status = model_status(h)
        h.setOptionValue("solver", "simplex")
        self.ipm, self.vertex = False, True
        if self.prune:
            self.pruner = Pruner(*self.in_lp.shape)
            self.pruner.added(len(self.pair))
        self.out = self._result() if status == "optimal" else None
        if self.pruner is not None and self.out is not None and EARLY_DROP:
            # at zero area in the interior rounds and at the vertex: due to leave at the
            # next solve (those with every column nonbasic: same basis, same duals)
            area = self.out["area"]
            self.pruner.due_now(area <= ZERO_AREA * area.max(initial=0.0))
        return status

    def _swap(self, cols: np.ndarray, rows: np.ndarray, upper: np.ndarray) -> None:
        """Make ``cols`` basic and ``rows`` nonbasic (at upper bound where ``upper``)."""
        basis = self.h.getBasis()
        if not basis.valid:
            return
        col_status, row_status = list(basis.col_status), list(basis.row_status)
        S = highspy.HighsBasisStatus
        for c in cols.tolist():
            col_status[c] = S.kBasic
        for r, u in zip(rows.tolist(), upper.tolist()):
            row_status[r] = S.kUpper if u else S.kLower
        basis.col_status, basis.row_status = col_status, row_status
        self.h.setBasis(basis)

    def remove_due(self) -> tuple[np.ndarray, np.ndarray]:
        """Take out the members due to leave whose columns are all nonbasic.

        Returns the (pair, group) of the members taken out.
        """
        n = len(self.pair)
        basic = basic_columns(self.h)
        if basic is not None:
            removable = np.bincount(self.col_member[basic[self.n_react:]], minlength=n) == 0
        else:
            removable = np.ones(n, dtype=bool)
        drop = self.pruner.pick(self.pair, self.group, removable)
        gone = self.pair[drop], self.group[drop]
        if drop.any():
            rows = np.nonzero(drop[self.row_member])[0] + self.K * self.n2
            cols = np.nonzero(drop[self.col_member])[0] + self.n_react
            self.h.deleteRows(len(rows), rows.astype(np.int32))
            self.h.deleteCols(len(cols), cols.astype(np.int32))
            self.in_lp[gone] = False
            new_pos = np.cumsum(~drop) - 1
            keep_c, keep_r = ~drop[self.col_member], ~drop[self.row_member]
            self.col_member = new_pos[self.col_member[keep_c]]
            self.col_role = self.col_role[keep_c]
            self.row_member = new_pos[self.row_member[keep_r]]
            self.pair, self.group = self.pair[~drop], self.group[~drop]
            self.dropped += int(drop.sum())
        return gone

    # ------------------------------------------------------------------ solving

    def solve(self) -> str:
        """Remove the members due to leave, then solve: ``"optimal"`` or HiGHS's words.

        The optimum goes to ``self.out``; the safety nets are those of
        :func:`~bridgeopt.solver.adding.solve_with_removal`.
        """
        status = solve_with_removal(self)
        self.out = self._result() if status == "optimal" else None
        if self.pruner is not None and self.out is not None:
            area = self.out["area"]
            self.pruner.solved(area <= ZERO_AREA * area.max(initial=0.0))
        return status

    def run_once(self) -> str:
        """One HiGHS solve of the LP as it stands: ``"optimal"`` or HiGHS's words."""
        h = self.h
        if self.ipm:
            h.setOptionValue("run_crossover", "off")
        first = not self.ipm and self.solves == 0
        if first:
            h.setOptionValue("solver", "ipm")
            h.setOptionValue("run_crossover", "on")
        h.run()
        if first:
            h.setOptionValue("solver", "simplex")
        self.solves += 1
        return model_status(h)

    def _result(self) -> dict:
        sol = self.h.getSolution()
        x = np.asarray(sol.col_value)
        member = x[self.n_react:]
        K, n = self.K, len(self.pair)
        area = member[self.col_role == 0]
        force = np.column_stack([member[self.col_role == 1 + k] for k in range(K)]) \
            if n else np.zeros((0, K))
        d = self.data
        length, unit = geometry(d.xz, d.a[self.pair], d.b[self.pair])
        return {"pair": self.pair.copy(), "group": self.group.copy(), "area": area,
                "force": force, "reactions": x[:self.n_react].reshape(K, -1),
                "duals": np.asarray(sol.row_dual)[:K * self.n2].reshape(K, self.n2),
                "objective": float(self.h.getInfo().objective_function_value),
                "length": length, "unit": unit}

    def price(self):
        """Violating (pair, group, ratio) at the last solve's duals, or None."""
        return self.pricer(self.data, self.in_lp, self.out["duals"])
