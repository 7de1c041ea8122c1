"""Member adding: the one driver of the single-case and the multi-case layout LP.

Both LPs choose their members from a ground structure of candidate pairs, each
pair in one or more groups (senses, or element groups), by the same rounds
(Gilbert & Tyas 2003):

1. **seed** the LP with the pairs of lattice reach 1 (nearest neighbours), plus
   any pairs a guess of the duals predicts to be active (or the seed alone,
   ``seed_reach=0``); if that LP has no optimum, double the reach until it has
   (or every pair is in);
2. **solve** the LP over the members in it;
3. **price** every candidate left out against the LP's duals (the dual check:
   its virtual work exceeds its cost by more than a tolerance);
4. **add** the most violated ones (at most ``batch``, most violated first by the
   ratio work/cost) and go to 2;
5. **stop** when no candidate violates the check, or when the proven relative
   optimality gap ``1 - 1/max(work/cost)`` is below a tolerance (the dual check
   is homogeneous in the duals: dividing them by the largest ratio makes every
   column dual feasible, so the optimum is at least objective / ratio), or
   after a safety number of rounds.

A model may also take out members that stayed at zero force (:class:`Pruner`,
used by the single- and the multi-case LP between dual simplex solves): they are candidates
again, so step 3 covers them and the stopping rule and the gap stay exact.

What differs between the two LPs lives in their models (the
:class:`MemberModel` protocol): how columns are stated, how the LP is solved,
and how a candidate is priced.

References
----------
.. [1] M. Gilbert, A. Tyas (2003), "Layout optimization of large-scale
   pin-jointed frames", Engineering Computations 20(8):1044-1064.
"""

from __future__ import annotations

import logging
import numbers
import time
from dataclasses import dataclass
from typing import Protocol

import numpy as np

from bridgeopt.errors import InputError

__all__ = ["MemberModel", "AddingResult", "add_members", "proven_gap", "strongest", "check_options",
           "Pruner", "DROP_AFTER", "solve_with_removal"]

log = logging.getLogger(__name__)
#: Progress of long solves (the command line shows it; a library user may).
progress = logging.getLogger("bridgeopt.progress")
#: Seconds after which each round is reported on the progress logger. [s]
PROGRESS_AFTER = 3.0
#: A column that carried no force in this many solves in a row leaves the LP. [-]
DROP_AFTER = 2


class MemberModel(Protocol):
    """What :func:`add_members` needs of an LP over (pair, group) members."""

    #: (n_pairs, n_groups) bool: which members are in the LP.
    in_lp: np.ndarray

    def add(self, pair: np.ndarray, group: np.ndarray) -> None:
        """Put the members (pair[i], group[i]) in the LP (those in it already are skipped).

        Parameters
        ----------
        pair, group : (m,) int arrays
            Candidate pair and group of each member. [-]
        """

    def solve(self) -> str:
        """Solve the LP over its members: ``"optimal"``, ``"infeasible"`` or HiGHS's words."""

    def price(self) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
        """(pair, group, ratio work/cost) of the members out of the LP that violate the dual
        check at the last solve's duals, or None."""


@dataclass(frozen=True)
class AddingResult:
    """Outcome of :func:`add_members`.

    Parameters
    ----------
    status : str
        Status of the last solve.
    rounds : int
        LP solves. [-]
    gap : float
        Proven relative optimality gap left (0 when no member violates the check). [-]
    """

    status: str
    rounds: int
    gap: float


def proven_gap(ratio_max: float) -> float:
    """Proven relative optimality gap when the worst candidate has work/cost = ``ratio_max``.

    Parameters
    ----------
    ratio_max : float
        Largest ratio of virtual work to cost over the candidates. [-]

    Returns
    -------
    float
        ``max(0, 1 - 1/ratio_max)``: the optimum is at least the LP objective over
        ``ratio_max``. [-]
    """
    return max(0.0, 1.0 - 1.0 / ratio_max)


def strongest(ratio: np.ndarray, limit: int) -> np.ndarray:
    """Indices of the ``limit`` largest entries of ``ratio`` (all when there are fewer).

    Parameters
    ----------
    ratio : (m,) float array
        Violation ratios work/cost. [-]
    limit : int
        Most indices returned. [-]

    Returns
    -------
    (min(m, limit),) int array
        Indices into ``ratio``, in no particular order. [-]
    """
    if len(ratio) <= limit:
        return np.arange(len(ratio))
    return np.argpartition(-ratio, limit)[:limit]


class Pruner:
    """Which members leave the LP: those at zero force for ``after`` solves in a row.

    Keeps each LP's size near that of its active set: a member that carried no
    force (and is nonbasic, where the solve has a basis) in the last ``after``
    solves is taken out; pricing covers it again like any candidate out of the
    LP, so it comes back if it violates the dual check, and the stopping rule and
    the proven gap stay exact.  Against cycling, a member added in the last
    ``after`` rounds is never taken out (its count starts at 0), and a member is
    taken out at most once: after it comes back it stays.

    Parameters
    ----------
    n_pairs, n_groups : int
        Shape of the model's ``in_lp``. [-]
    after : int
        Solves at zero force before a member leaves (at least 2: after 1 the
        rounds were seen to cycle). [-]
    """

    def __init__(self, n_pairs: int, n_groups: int, *, after: int = DROP_AFTER):
        if after < 1:
            raise InputError("after", after, "a whole number >= 1")
        self.after = after
        #: (n_pairs, n_groups) bool: members taken out once (they stay if they come back).
        self.dropped = np.zeros((n_pairs, n_groups), dtype=bool)
        #: Solves in a row at zero force of each LP member, in LP order. [-]
        self.zero = np.zeros(0, dtype=np.int64)
        #: Members taken out so far. [-]
        self.count = 0

    def added(self, m: int) -> None:
        """``m`` members were appended to the LP (in LP order).

        Parameters
        ----------
        m : int
            Number of members appended. [-]
        """
        self.zero = np.concatenate([self.zero, np.zeros(m, dtype=np.int64)])

    def solved(self, at_zero: np.ndarray) -> None:
        """Record a solve: ``at_zero`` (LP order) tells which members carried no force.

        Parameters
        ----------
        at_zero : (m,) bool array
            Member at zero force in the last solve. [-]
        """
        self.zero = np.where(at_zero, self.zero + 1, 0)

    def due_now(self, mask: np.ndarray) -> None:
        """Make the members ``mask`` (LP order) due to leave at the next :meth:`pick`.

        For members already known to be far from entering (e.g. a large reduced cost
        at a vertex optimum); :meth:`pick` still takes only the removable (nonbasic) ones,
        and a member removed once and brought back is never removed again.

        Parameters
        ----------
        mask : (m,) bool array
            Members, in LP order. [-]
        """
        self.zero[mask] = np.maximum(self.zero[mask], self.after)

    def pick(self, pair: np.ndarray, group: np.ndarray, removable: np.ndarray) -> np.ndarray:
        """Members (LP order) to take out now; they are forgotten here.

        Parameters
        ----------
        pair, group : (m,) int arrays
            Pair and group of each LP member, in LP order. [-]
        removable : (m,) bool array
            Members that may leave without harm to the solver's state (nonbasic). [-]

        Returns
        -------
        (m,) bool array
            True for the members to take out.
        """
        drop = (self.zero >= self.after) & removable & ~self.dropped[pair, group]
        self.dropped[pair[drop], group[drop]] = True
        self.zero = self.zero[~drop]
        self.count += int(drop.sum())
        return drop


def solve_with_removal(model) -> str:
    """One solve of a model that removes columns (:class:`Pruner`), with the safety nets.

    The columns due to leave are taken out (``model.remove_due()``), then the LP is
    solved (``model.run_once()``).  The removed columns were at zero in a basic
    optimum, so the LP without them has that optimum too; should HiGHS say otherwise
    from the warm start, they come back (for good) and the LP is solved again; if it
    still does, every column ever removed comes back, removal stops
    (``model.pruner = None``) and the LP is solved from scratch.  Used by the
    single-case (:class:`~bridgeopt.solver.lpmodel.LayoutModel`) and the multi-case
    (:class:`~bridgeopt.solver.casemodel.CaseModel`) models.

    Parameters
    ----------
    model : object
        Has ``pruner`` (a :class:`Pruner` or None), ``in_lp`` ((pairs, groups) bool),
        ``h`` (its ``highspy.Highs``), ``add(pair, group)``, ``remove_due()`` (the
        (pair, group) arrays taken out, or None) and ``run_once()`` (HiGHS's status
        word).

    Returns
    -------
    str
        ``"optimal"`` or HiGHS's words for the last solve.
    """
    gone = None
    if model.pruner is not None and model.pruner.zero.max(initial=0) >= model.pruner.after:
        gone = model.remove_due()
    status = model.run_once()
    if gone is not None and len(gone[0]) and status != "optimal":
        model.add(*gone)
        model.h.clearSolver()
        status = model.run_once()
    if model.pruner is not None and model.pruner.count and status != "optimal":
        back = np.nonzero(model.pruner.dropped & ~model.in_lp)
        model.pruner = None
        model.add(back[0], back[1])
        model.h.clearSolver()
        status = model.run_once()
    return status


def _all_groups(pair: np.ndarray, n_groups: int) -> tuple[np.ndarray, np.ndarray]:
    """Every group of each pair: group 0 of all pairs first, then group 1, ..."""
    return np.tile(pair, n_groups), np.repeat(np.arange(n_groups), len(pair))


def add_members(model: MemberModel, reach: np.ndarray, *, member_adding: bool = True,
                batch: int | None = None, gap_tol: float | None = None,
                max_rounds: int = 500, seed: np.ndarray | None = None,
                seed_groups: np.ndarray | None = None, seed_reach: int = 1,
                min_batch: int = 1000) -> AddingResult:
    """Run member adding (module docstring) on ``model``.

    Parameters
    ----------
    model : MemberModel
        The LP, empty or with members already in it.
    reach : (n_pairs,) int array
        Lattice reach max(|di|, |dj|) of each candidate pair. [-]
    member_adding : bool
        False puts every candidate in the LP and solves it once.
    batch : int, optional
        Most members added per round (default max(1000, 10 % of those in the LP)). [-]
    gap_tol : float, optional
        Stop once the proven relative gap is at most this (default: only when no
        member violates the dual check). [-]
    max_rounds : int
        Safety stop on LP solves. [-]
    seed : (s,) int array, optional
        Pairs to put in the first LP, in every group (e.g. predicted by a
        coarser grid's duals). [-]
    seed_groups : (s,) int array, optional
        The group of each seed pair, when each goes in one group only. [-]
    seed_reach : int
        With a seed, the first LP also holds the pairs of reach at most this
        (0: the seed alone; widened to 1, 2, 4, ... while it has no optimum). [-]
    min_batch : int
        Without ``batch``: most members added per round max(min_batch, 10 % of those
        in the LP). [-]

    Returns
    -------
    AddingResult
    """
    n_groups = model.in_lp.shape[1]
    t0 = time.perf_counter()
    if member_adding and seed is not None:
        model.add(*(_all_groups(seed, n_groups) if seed_groups is None else (seed, seed_groups)))
    level = (seed_reach if seed is not None else 1) if member_adding else np.inf
    rounds = 0
    while True:
        start = np.nonzero(reach <= level)[0]
        model.add(*_all_groups(start, n_groups))
        rounds += 1
        status = model.solve()
        if status == "optimal" or len(start) == len(reach):
            break
        # the start cannot carry the loads (infeasible), or only with forces so large that
        # HiGHS gives up (status unknown): widen it
        level = max(1, 2 * level)
    gap = 0.0
    while status == "optimal" and member_adding and rounds < max_rounds:
        found = model.price()
        if found is None:
            gap = 0.0
            break
        pair, group, ratio = found
        gap = proven_gap(float(ratio.max()))
        if gap_tol is not None and gap <= gap_tol:
            break
        top = strongest(ratio, batch or max(min_batch, int(0.1 * model.in_lp.sum())))
        if time.perf_counter() - t0 > PROGRESS_AFTER:
            progress.info("member adding: round %d, %d members in the LP, %d more to add, "
                          "proven gap %.1e, %.0f s", rounds, int(model.in_lp.sum()), len(top),
                          gap, time.perf_counter() - t0)
        model.add(pair[top], group[top])
        rounds += 1
        status = model.solve()
    if member_adding and rounds >= max_rounds:
        log.warning("member adding stopped after %d rounds; proven gap %.2e", rounds, gap)
    return AddingResult(status, rounds, gap)


def check_options(*, member_adding: object, batch: object, **flags: object) -> None:
    """Check the solve options of a layout entry point, with the project's own error.

    Parameters
    ----------
    member_adding : bool
        Member adding on or off.
    batch : int or None
        Most members added per round. [-]
    **flags : bool
        Other on/off options, by name (``coarse_start=...``).

    Raises
    ------
    InputError
        Naming the option, its value and what it may be.
    """
    for name, value in {"member_adding": member_adding, **flags}.items():
        if not isinstance(value, (bool, np.bool_)):
            raise InputError(name, value, "True or False")
    if batch is not None and (isinstance(batch, (bool, np.bool_))
                              or not isinstance(batch, numbers.Integral) or batch < 1):
        raise InputError("batch", batch, "None (automatic) or a whole number >= 1: the most "
                         "members added per member-adding round")
