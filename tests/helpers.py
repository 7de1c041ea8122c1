"""Independent checks of a solved :class:`bridgeopt.Design`.

Nothing here calls ``bridgeopt.solver.design.equilibrium_residual`` or reads
``Design.equilibrium_error``: the nodal balance is recomputed from the member end
forces, the applied loads and the reactions with ``numpy.add.at``.

The statics used are common practice (nodal equilibrium of a pin-jointed
structure; free-body equilibrium of one element under its own weight; LP duality
for the optimality certificate, W.S. Dorn, R.E. Gomory, H.J. Greenberg 1964,
J. de Mecanique 3:25-52).
"""

from __future__ import annotations

import numpy as np

from bridgeopt import GRAVITY

__all__ = ["nodal_residual", "assert_equilibrium", "assert_optimal_design", "total_load"]


def nodal_residual(design) -> np.ndarray:
    """Out-of-balance force at every node of ``design``, shape (n, 2). [N]

    sum over members of the force each applies to its end nodes, plus the
    applied nodal loads, plus the support reactions.
    """
    n = len(design.nodes)
    m = design.members
    r = np.zeros((n, 2))
    loads = np.asarray(design.loads, dtype=float).reshape(-1, 2)
    assert loads.shape == (n, 2), "one applied-load row per node"
    r += loads
    start = np.asarray(m.start, dtype=np.int64)
    end = np.asarray(m.end, dtype=np.int64)
    if len(start):
        assert start.min() >= 0 and end.min() >= 0, "member ends must be nodes of the design"
        assert start.max() < n and end.max() < n, "member ends must be nodes of the design"
    np.add.at(r, start, np.asarray(m.force_start, dtype=float))
    np.add.at(r, end, np.asarray(m.force_end, dtype=float))
    reac = np.asarray(design.reactions, dtype=float).reshape(-1, 3)
    if len(reac):
        idx = reac[:, 0].astype(np.int64)
        assert np.all(idx == reac[:, 0]) and idx.min() >= 0 and idx.max() < n
        np.add.at(r, idx, reac[:, 1:])
    return r


def _densities(design) -> np.ndarray:
    """Density of each member, from the problem's materials (sense-wise). [kg/m3]"""
    prob = design.problem
    tension = prob.material.density
    compression = (prob.compression_material or prob.material).density
    return np.where(np.asarray(design.members.sense) == "tension", tension, compression)


def total_load(design) -> float:
    """Applied load plus self-weight of the model (one copy). [N]

    The reference for equilibrium tolerances ("of the total load").
    """
    applied = float(np.hypot(*np.asarray(design.loads, dtype=float).T).sum())
    weight = float((_densities(design) * GRAVITY * np.asarray(design.members.volume)).sum())
    return applied + weight


def assert_equilibrium(design, rtol: float = 1e-8) -> None:
    """Every node, every member and the whole model are in equilibrium.

    * node: sum of member end forces + applied load + reaction = 0;
    * member: the forces the element applies to its two ends add up to minus
      its own weight (it hangs on its end nodes): force_start + force_end =
      (0, -rho g V) (a weightless bar: equal and opposite end forces);
    * whole model: sum of reactions + applied loads = (0, weight of the model).

    All to ``rtol`` times :func:`total_load`.
    """
    scale = total_load(design)
    assert scale > 0
    r = nodal_residual(design)
    worst = float(np.abs(r).max()) if r.size else 0.0
    assert worst <= rtol * scale, (
        f"nodal out-of-balance {worst:.3e} N > {rtol:g} x total load {scale:.6g} N "
        f"at node {np.unravel_index(np.argmax(np.abs(r)), r.shape)[0]}")

    m = design.members
    weight = _densities(design) * GRAVITY * np.asarray(m.volume)
    member_sum = np.asarray(m.force_start) + np.asarray(m.force_end)
    expected = np.column_stack([np.zeros(len(m)), -weight])
    bad = np.abs(member_sum - expected).max() if len(m) else 0.0
    assert bad <= rtol * scale, f"a member's end forces do not balance its own weight ({bad:.3e} N)"

    reac = np.asarray(design.reactions, dtype=float).reshape(-1, 3)
    glob = reac[:, 1:].sum(axis=0) + np.asarray(design.loads).sum(axis=0)
    w_model = float(weight.sum())
    assert abs(glob[0]) <= rtol * scale, f"horizontal resultant {glob[0]:.3e} N"
    assert abs(glob[1] - w_model) <= rtol * scale, (
        f"vertical: reactions + loads = {glob[1]:.9g} N, model weight {w_model:.9g} N")


def assert_optimal_design(design, rtol: float = 1e-7) -> None:
    """Internal consistency and an LP optimality certificate of ``design``.

    * status "optimal" with no optimality gap, positive finite volume, volume = copies x model volume =
      copies x sum of member volumes, weight = copies x sum rho g V;
    * forces >= 0 in their sense: a tension member pulls each end node towards
      the other end, a compression member pushes it away;
    * equilibrium (:func:`assert_equilibrium`);
    * LP duality (common practice): with u the equality-row duals, the optimal
      volume equals the dual objective, V = -(sum of f.u) up to one global sign
      convention s; every active member has zero reduced cost,
      s*(F_start.u_start + F_end.u_end) = its volume; and the duals of restrained
      directions vanish (a reaction costs nothing).
    """
    assert design.status == "optimal"
    # a proven optimum, not one within an optimality gap (validation compares optima)
    assert design.stats.get("gap", 0.0) == 0.0, f"only within a gap: {design.message}"
    assert np.isfinite(design.volume) and design.volume > 0
    m = design.members
    assert len(m) > 0
    vols = np.asarray(m.volume)
    assert np.all(vols > 0)
    assert np.isclose(design.model_volume, vols.sum(), rtol=1e-12, atol=0)
    assert np.isclose(design.volume, design.copies * design.model_volume, rtol=1e-12, atol=0)
    weight = design.copies * float((_densities(design) * GRAVITY * vols).sum())
    assert np.isclose(design.weight, weight, rtol=1e-12, atol=1e-12 * max(1.0, weight))
    assert set(np.unique(m.sense)) <= {"tension", "compression"}
    assert np.all(np.asarray(m.horizontal_force) >= 0)

    nodes = np.asarray(design.nodes)
    chord = nodes[m.end] - nodes[m.start]
    pull_start = np.einsum("ij,ij->i", np.asarray(m.force_start), chord)
    pull_end = np.einsum("ij,ij->i", np.asarray(m.force_end), -chord)
    tens = np.asarray(m.sense) == "tension"
    assert np.all(pull_start[tens] > 0) and np.all(pull_end[tens] > 0), \
        "a tension member must pull both end nodes towards each other"
    assert np.all(pull_start[~tens] < 0) and np.all(pull_end[~tens] < 0), \
        "a compression member must push both end nodes apart"

    assert_equilibrium(design)

    u = np.asarray(design.duals, dtype=float)
    f = np.asarray(design.loads, dtype=float)
    dual_obj = -float((f * u).sum())
    s = 1.0 if dual_obj >= 0 else -1.0
    assert np.isclose(s * dual_obj, design.model_volume, rtol=rtol, atol=0), (
        f"dual objective {s * dual_obj:.10g} != model volume {design.model_volume:.10g}")
    work = (np.einsum("ij,ij->i", np.asarray(m.force_start), u[m.start])
            + np.einsum("ij,ij->i", np.asarray(m.force_end), u[m.end]))
    assert np.allclose(s * work, vols, rtol=1e-6, atol=rtol * design.model_volume), \
        "an active member has a non-zero reduced cost"
    scale_u = float(np.abs(u).max())
    for node, c in _restrained(design):
        # a restrained direction carries a free reaction column of zero cost: its dual is 0
        assert abs(u[node, c]) <= 1e-7 * scale_u, f"dual of restrained row ({node}, {c}) is {u[node, c]}"


def _restrained(design):
    """(node, direction) pairs held by supports or mirror lines, from the problem itself."""
    prob = design.problem
    nodes = np.asarray(design.nodes)
    x0, x1, z0, z1 = prob.domain.bounds
    tol = 1e-9 * max(x1 - x0, z1 - z0)
    out = []
    for s in prob.supports:
        d = np.hypot(*(nodes - np.asarray(s.at)).T)
        i = int(np.argmin(d))
        if d[i] <= tol:          # supports without members attached may be absent
            out += [(i, 0)] * ("x" in s.fix) + [(i, 1)] * ("z" in s.fix)
    for xm in prob.mirror_lines:
        out += [(int(i), 0) for i in np.nonzero(np.abs(nodes[:, 0] - xm) <= tol)[0]]
    return out


def fail_after_removal(monkeypatch, model_class, module, failures: int) -> dict:
    """Make HiGHS report "infeasible" ``failures`` times right after the first removal.

    Patches ``model_class.remove_due`` (to arm on the first removal that takes columns
    out) and ``module.model_status`` (to fail while armed); returns the state dict, whose
    ``"left"`` is 0 once every forced failure has happened.
    """
    state = {"armed": False, "left": failures}
    remove, status = model_class.remove_due, module.model_status

    def arming(self):
        gone = remove(self)
        state["armed"] = len(gone[0]) > 0 and state["left"] == failures
        return gone

    def failing(h):
        if state["armed"] and state["left"] > 0:
            state["left"] -= 1
            return "infeasible"
        return status(h)

    monkeypatch.setattr(model_class, "remove_due", arming)
    monkeypatch.setattr(module, "model_status", failing)
    return state
