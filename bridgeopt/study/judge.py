"""Judging a proposed layout: sized by the same LP, set against the reference optimum.

:func:`judge_proposal` sizes the user's members (:mod:`bridgeopt.files.proposal`)
with :func:`~bridgeopt.solver.frame.size_frame` -- the same LP and the same
equal-strength self-weight elements as layout optimization, under the
scenario's loads and supports -- and solves the reference optimum on the same
problem.  The ratio of the two volumes says how close the proposal is to the
least material any layout in the design domain could use.

Where the excess lies
---------------------
The reference's optimal LP duals are a virtual displacement field u over the
grid (m3/N: volume added per unit load at each node).  By LP duality, for every
candidate member of the ground structure the virtual work of its end forces in
u is at most its volume, and the applied loads' work in u is the reference
volume [1]_.  For each member i of the sized proposal, with end forces F_a, F_b
and volume V_i,

    excess_i = V_i - (F_a . u(a) + F_b . u(b))   [m3]

is what the member costs beyond what the optimum's displacement field says its
force is worth (its reduced cost times its force).  It is >= 0 for members
between grid nodes, zero for members the optimum uses, and when the proposal's
nodes, loads and supports lie on the grid the excesses add up to exactly the
proposal's volume minus the reference volume (the nodal work terms cancel by
equilibrium).  Off-grid nodes take u interpolated linearly from the grid, and
the sum is then close to, not equal to, the difference.  The report ranks
members by their excess.

References
----------
.. [1] W.S. Dorn, R.E. Gomory, H.J. Greenberg (1964), J. de Mecanique 3:25-52.
.. [2] M. Gilbert, A. Tyas (2003), Engineering Computations 20(8):1044-1064 (the
   same dual check chooses members in member adding).
"""

from __future__ import annotations

import dataclasses
import logging
import math
from dataclasses import dataclass

import numpy as np

from bridgeopt.cautions import CAUTIONS
from bridgeopt.solver.design import Design
from bridgeopt.errors import InputError, SolveError
from bridgeopt.solver.frame import Frame, position_tolerance, size_frame
from bridgeopt.solver.layout import design_from_lp, solve_layout_lp
from bridgeopt.model.problem import Problem
from bridgeopt.files.proposal import Proposal

__all__ = ["Judgement", "judge_proposal", "judge_problem", "unbalanced_nodes"]

log = logging.getLogger(__name__)


def judge_problem(scenario) -> Problem:
    """The problem a proposal is judged on: a bridge form's problem, else the scenario's.

    Parameters
    ----------
    scenario : Scenario
        The scenario read (a bridge with a ``[form]``, or any other).

    Returns
    -------
    Problem
        :func:`~bridgeopt.forms.form_problem` of the bridge and form, else
        ``scenario.problem``.
    """
    if scenario.bridge is not None and scenario.form is not None:
        from bridgeopt.forms import form_problem

        return form_problem(scenario.bridge, scenario.form)
    return scenario.problem


def _supports_at_nodes(problem: Problem, nodes: np.ndarray) -> Problem:
    """``problem`` keeping only the supports that stand on a proposal node."""
    tol = position_tolerance(problem)
    kept = tuple(s for s in problem.supports
                 if np.hypot(*(nodes - np.asarray(s.at)).T).min() <= tol)
    mirrored = any((np.abs(nodes[:, 0] - m) <= tol).any() for m in problem.mirror_lines)
    if not kept and not mirrored:
        where = ", ".join(f"[{s.at[0]:.6g}, {s.at[1]:.6g}]" for s in problem.supports[:4])
        raise InputError("layout.nodes", "no node at a support",
                         f"a node at one of the scenario's supports ({where} m) or on a mirror "
                         f"line (x = {', '.join(f'{m:.6g}' for m in problem.mirror_lines)} m)")
    if not kept and problem.total_applied_load() > 0:
        # mirror lines hold horizontally only: the vertical load needs a support
        vertical = [s for s in problem.supports if "z" in s.fix]
        if vertical:
            where = ", ".join(f"[{s.at[0]:.6g}, {s.at[1]:.6g}]" for s in vertical[:4])
            raise InputError("layout.nodes", "no node at a vertical support",
                             f"a node at one of the scenario's supports that take vertical "
                             f"load ({where} m)")
    if len(kept) < len(problem.supports):
        log.info("%d of the scenario's supports have no node of the proposal and are not used",
                 len(problem.supports) - len(kept))
    return dataclasses.replace(problem, supports=kept)


def _reference_with_field(problem: Problem):
    """The reference optimum and its virtual displacement field u(x, z) [m3/N]."""
    from scipy.interpolate import LinearNDInterpolator, NearestNDInterpolator

    grid, f, data, sol, refs = solve_layout_lp(problem, member_adding=True, batch=None,
                                               coarse_start=True)
    reference = design_from_lp(problem, grid, data, sol, f, *refs)
    ref_len, ref_force, ref_sigma = refs
    u = sol.duals.reshape(-1, 2) * ref_len / ref_sigma
    sign = 1.0 if -(f * u).sum() >= 0 else -1.0   # the solver's sign convention of duals
    u = sign * u
    linear = LinearNDInterpolator(grid.xz, u)
    nearest = NearestNDInterpolator(grid.xz, u)

    def field(points: np.ndarray) -> np.ndarray:
        v = linear(points)
        bad = ~np.isfinite(v).all(axis=1)
        if bad.any():
            v[bad] = nearest(points[bad])
        return v

    return reference, field


def unbalanced_nodes(problem: Problem, proposal: Proposal) -> list[int]:
    """Nodes of ``proposal`` where the loads cannot be balanced (indices into its nodes).

    First a local check: an unsupported node whose members (and restrained
    directions) all lie along one line cannot carry a force across that line --
    its load, or the self-weight its members hang on it.  Then, if none is
    found, a global one: the least total out-of-balance force (an L1 norm) of
    straight weightless bars of free sign under the applied loads, solved as a
    linear program over sparse columns; nodes left out of balance belong to a
    mechanism.

    Parameters
    ----------
    problem : Problem
        Supports, mirror lines and loads (at the proposal's nodes).
    proposal : Proposal
        Nodes [m] and members of the proposed layout.

    Returns
    -------
    list of int
        The nodes that cannot be balanced (empty when every node can).
    """
    from bridgeopt.solver.elements import bar_factors
    from bridgeopt.solver.frame import frame_loads, frame_restraints
    from bridgeopt.solver.highs import (DEFAULT_TOL, INF, entry_columns, node_rows,
                                        solve_columns, stack_columns, unit_columns)

    nodes = proposal.nodes
    n = len(nodes)
    f = frame_loads(problem, nodes)
    rows = set(frame_restraints(problem, nodes).tolist())
    d = nodes[proposal.end] - nodes[proposal.start]
    d = d / np.hypot(*d.T)[:, None]
    weighty = problem.material.density > 0 or problem.compression.density > 0
    scale = max(np.abs(f).max(), 1.0)
    bad = []
    for i in range(n):
        at = np.concatenate([d[proposal.start == i], d[proposal.end == i]])
        dirs = list(at)
        if 2 * i in rows:
            dirs.append(np.array([1.0, 0.0]))
        if 2 * i + 1 in rows:
            dirs.append(np.array([0.0, 1.0]))
        if not dirs:
            if np.abs(f[i]).max() > 1e-12 * scale:
                bad.append(i)
            continue
        stack = np.array(dirs)
        if np.linalg.matrix_rank(stack, tol=1e-9) >= 2:
            continue
        along = stack[np.argmax(np.hypot(*stack.T))]
        needs = [f[i] / scale] + ([np.array([0.0, -1.0])] if weighty and len(at) else [])
        if any(abs(along[0] * v[1] - along[1] * v[0]) > 1e-9 for v in needs):
            bad.append(i)
    if bad:
        return bad
    # global: min sum(s+ + s-) with B q + R r + s+ - s- = -f, q and r free (sparse columns)
    n2 = 2 * n
    every = np.arange(n2)
    columns = stack_columns(
        entry_columns(np.zeros(len(d)), node_rows(proposal.start, proposal.end), bar_factors(d),
                      n2, lower=-INF),
        unit_columns(sorted(rows), n2),
        unit_columns(every, n2, cost=1.0, lower=0.0),
        unit_columns(every, n2, cost=1.0, lower=0.0, value=-1.0))
    rhs = -f.ravel() / scale
    # HiGHS's default tolerance, as this check always had: it only names the nodes
    res = solve_columns(columns, rhs, rhs, tolerance=DEFAULT_TOL)
    if res.status != "optimal":
        return []
    s = res.x[columns.size - 2 * n2:]
    out = (s[:n2] + s[n2:]).reshape(n, 2)
    return [int(i) for i in np.nonzero(np.abs(out).max(axis=1) > 1e-7)[0]]


@dataclass(frozen=True)
class Judgement:
    """A proposed layout sized by the LP and set against the reference optimum.

    Parameters
    ----------
    proposal : Proposal
        The proposed layout as read (nodes [m], members, the user's node ids).
    design : Design
        The proposal's members sized by the LP (members that carry no force are
        left out).
    reference : Design
        The reference optimum on the same problem.
    volume : float
        Volume of the sized proposal (whole structure). [m3]
    reference_volume : float
        Volume of the reference optimum (whole structure). [m3]
    ratio : float
        volume / reference_volume. [-]
    excess : pandas.DataFrame
        One row per sized member, largest excess first: ``member`` (row of
        ``design.members``), ``start``, ``end`` (the user's node ids), ``group``,
        ``sense``, ``volume_m3``, ``excess_m3`` (see the module docstring; whole
        structure), ``share`` of the total excess.
    unused : tuple of int
        Proposal members (indices) that carry no force. [-]
    """

    proposal: Proposal
    design: Design
    reference: Design
    volume: float
    reference_volume: float
    ratio: float
    excess: object
    unused: tuple

    def summary(self, top: int = 5) -> str:
        """A few lines for the engineer, ending with the cautions.

        Parameters
        ----------
        top : int
            Most members listed among those carrying the excess. [-]
        """
        lines = [f"proposed layout ({self.proposal.source}): {len(self.proposal.start)} members, "
                 f"{len(self.design.members)} carrying force",
                 f"  proposal volume      {self.volume:.6g} m3",
                 f"  reference optimum    {self.reference_volume:.6g} m3",
                 f"  ratio                {self.ratio:.6g} (proposal / reference)",
                 f"  excess               {self.volume - self.reference_volume:.6g} m3"]
        rows = self.excess.head(top)
        if len(rows) and self.volume > self.reference_volume * (1 + 1e-9):
            lines.append("  members carrying most of the excess (excess = volume less the work "
                         "of the member's forces in the optimum's virtual displacements):")
            width = max(len(f"{r['start']} - {r['end']}") for _, r in rows.iterrows())
            for _, r in rows.iterrows():
                pair = f"{r['start']} - {r['end']}"
                lines.append(f"    {pair:<{width}}  {r['group']:<10} {r['sense']:<12}"
                             f" volume {r['volume_m3']:.4g} m3, excess {r['excess_m3']:.4g} m3 "
                             f"({100 * r['share']:.0f} %)")
        if self.unused:
            p = self.proposal
            names = ", ".join(f"{p.ids[p.start[j]]} - {p.ids[p.end[j]]}" for j in self.unused[:8])
            more = f" and {len(self.unused) - 8} more" if len(self.unused) > 8 else ""
            lines.append(f"  carrying no force (left out): {names}{more}")
        lines.append(CAUTIONS)
        return "\n".join(lines)


def judge_proposal(problem: Problem, proposal: Proposal) -> Judgement:
    """Size ``proposal`` on ``problem`` and set it against the reference optimum.

    Parameters
    ----------
    problem : Problem
        The scenario's problem (:func:`judge_problem`); supports where the
        proposal has no node are not used by the proposal.
    proposal : Proposal
        Nodes [m] and members of the proposed layout.

    Returns
    -------
    Judgement
        The sized proposal, the reference optimum and the excess per member.


    Raises
    ------
    InputError
        A load or a line load's end is not at a node of the proposal.
    SolveError
        ``"unstable"``: the proposal cannot carry the loads; the message names
        the nodes that cannot be balanced.  ``"infeasible"``/``"span-limit"``:
        self-weight or the members' allowed senses make it impossible.

    References
    ----------
    .. [1] W.S. Dorn, R.E. Gomory, H.J. Greenberg (1964), J. de Mecanique 3:25-52.
    .. [2] H.E. Fairclough et al. (2018), Proc. R. Soc. A 474:20170726.
    """
    import pandas as pd

    used = _supports_at_nodes(problem, proposal.nodes)
    frame = Frame(problem=used, nodes=proposal.nodes, start=proposal.start, end=proposal.end,
                  senses=proposal.senses, group=proposal.group)
    x0, x1, z0, z1 = problem.domain.bounds
    tol = position_tolerance(problem)
    outside = [i for i, (x, z) in enumerate(proposal.nodes)
               if not (x0 - tol <= x <= x1 + tol and z0 - tol <= z <= z1 + tol)]
    if outside:
        log.warning("node(s) %s of the proposal lie outside the design domain (x %.6g to %.6g m, "
                    "z %.6g to %.6g m), where the reference may not go: the ratio may be "
                    "below 1", ", ".join(proposal.label(i) for i in outside[:5]), x0, x1, z0, z1)
    try:
        with np.errstate(over="ignore"):
            design = size_frame(frame)
    except InputError as err:
        what = {"load": "a point load acts", "line_load": "a line load (the deck) starts or ends",
                "support": "a support stands"}.get(err.field.split("[")[0])
        if what is None:
            raise
        nearest = err.valid.replace("frame", "layout")
        raise InputError("layout.nodes", err.value, f"a node of the proposed layout at this "
                         f"point, where {what} ({err.field}); {nearest}") from None
    except SolveError as err:
        if err.status != "infeasible":
            raise
        bad = unbalanced_nodes(used, proposal)
        if bad:
            names = ", ".join(proposal.label(i) for i in bad[:10])
            more = f" and {len(bad) - 10} more" if len(bad) > 10 else ""
            raise SolveError("unstable", f"the proposed layout cannot carry the loads: node(s) "
                             f"{names}{more} cannot be balanced (their members all lie along "
                             "one line, or they belong to a mechanism); add members or supports "
                             "there") from None
        raise SolveError("infeasible", "the proposed layout cannot carry the loads with "
                         "equal-strength self-weight elements in the senses allowed (every node "
                         "can be balanced by weightless bars of either sense, so a member's "
                         "sense or its own weight is the cause)") from None
    with np.errstate(over="ignore"):
        reference, field = _reference_with_field(problem)
    # map sized members back to the proposal's node ids
    tol = position_tolerance(problem)
    lookup = np.array([int(np.argmin(np.hypot(*(proposal.nodes - p).T))) for p in design.nodes])
    m = design.members
    u_start = field(design.nodes[m.start])
    u_end = field(design.nodes[m.end])
    work = (m.force_start * u_start).sum(axis=1) + (m.force_end * u_end).sum(axis=1)
    excess = design.copies * (m.volume - work)
    total = excess.sum()
    table = pd.DataFrame({
        "member": np.arange(len(m)),
        "start": [proposal.ids[i] for i in lookup[m.start]],
        "end": [proposal.ids[i] for i in lookup[m.end]],
        "group": m.group, "sense": m.sense, "volume_m3": design.copies * m.volume,
        "excess_m3": excess,
        "share": excess / total if total > 0 else np.zeros(len(m)),
    }).sort_values("excess_m3", ascending=False, kind="stable").reset_index(drop=True)
    pairs = {tuple(sorted(p)) for p in zip(lookup[m.start].tolist(), lookup[m.end].tolist())}
    unused = tuple(j for j, p in enumerate(zip(proposal.start.tolist(), proposal.end.tolist()))
                   if tuple(sorted(p)) not in pairs)
    ratio = design.volume / reference.volume if reference.volume > 0 else math.nan
    if ratio < 1 - 1e-6:
        log.warning("the proposal (%.6g m3) is lighter than the reference optimum on this grid "
                    "(%.6g m3): its nodes off the grid (or outside the domain) are not open to "
                    "the reference; use a finer grid (more divisions) for a fair bound",
                    design.volume, reference.volume)
    return Judgement(proposal=proposal, design=design, reference=reference, volume=design.volume,
                     reference_volume=reference.volume, ratio=ratio, excess=table,
                     unused=unused)
