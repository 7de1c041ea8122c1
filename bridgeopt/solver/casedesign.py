"""The result of a multi-case layout: :class:`CaseDesign` (a structure for every load case).

Areas in m2, forces in N per case, volumes in m3; built by
:func:`case_design` from the dimensionless optimum of
:mod:`bridgeopt.solver.multicase`.  The self-weight is lumped, half of each
member's weight at each end node (Hemp 1973, ch. 4).

References
----------
.. [1] W.S. Hemp (1973), Optimum Structures, Clarendon Press, Oxford (ch. 4).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from bridgeopt.model.materials import GRAVITY
from bridgeopt.solver.design import accepted

__all__ = ["CaseDesign", "case_design"]


@dataclass(frozen=True)
class CaseDesign:
    """A structure that carries every load case of a :class:`CaseStudy`.

    Parameters
    ----------
    status, message : str
        ``"optimal"``, and what was proven.
    volume : float
        Material volume of the reported structure (``copies`` times the model). [m3]
    cost : float
        Priced volume (``copies`` times the model), in the study's currency; the
        volume when no costs are given. [currency or m3]
    weight : float
        Self-weight of the reported structure. [N]
    nodes : (n, 2) float array
        Node coordinates. [m]
    start, end : (m,) int arrays
        Member ends (indices into ``nodes``). [-]
    group : (m,) str array
        ``"member"``, or ``"tension"`` / ``"compression"``.
    area : (m,) float array
        Cross-section area. [m2]
    length : (m,) float array
        Chord length. [m]
    member_volume : (m,) float array
        Volume of each member of the model. [m3]
    forces : (m, K) float array
        Axial force in each case, tension positive. [N]
    governing : (m,) int array
        The case with the largest |q|/(sigma a). [-]
    utilisation : (m, K) float array
        |q| / (sigma a) per case. [-]
    loads : (K, n, 2) float array
        Applied nodal loads per case (self-weight excluded). [N]
    reactions : (K, r, 3) float array
        Rows (node, Rx, Rz) per case. [-, N, N]
    case_names : tuple of str
        Names of the load cases, in order.
    stats : dict
        ``rounds``, ``seconds``, ``columns``, ``candidates``, ``grid_nodes``,
        ``lp_objective``, ``gap``, ``equilibrium_error``, ``dropped`` (members taken out of
        the LP at zero area during member adding) and ``vertex`` (a basic solution).
    copies : float
        Number of copies of the model in the reported structure. [-]
    study : CaseStudy
        The study solved (frozen).
    """

    status: str
    message: str
    volume: float
    cost: float
    weight: float
    nodes: np.ndarray
    start: np.ndarray
    end: np.ndarray
    group: np.ndarray
    area: np.ndarray
    length: np.ndarray
    member_volume: np.ndarray
    forces: np.ndarray
    governing: np.ndarray
    utilisation: np.ndarray
    loads: np.ndarray
    reactions: np.ndarray
    case_names: tuple
    stats: dict
    copies: float
    study: object = dataclasses.field(repr=False, default=None)

    def member_weight(self) -> np.ndarray:
        """Self-weight of each member of the model. [N]"""
        p = self.study.problem
        dens = np.where(self.group == "compression", p.density("compression"),
                        p.density("tension") if self.study.problem.compression_material is not None
                        else p.material.density)
        return dens * GRAVITY * self.member_volume

    def residual(self, case: int) -> np.ndarray:
        """Out-of-balance force at every node in ``case``, (n, 2). [N]

        Member end forces (q n on the start node, -q n on the end node), half of
        each member's weight at each end, applied loads and reactions.

        Parameters
        ----------
        case : int
            Index of the load case. [-]
        """
        r = np.array(self.loads[case], dtype=float)
        unit = (self.nodes[self.end] - self.nodes[self.start]) / self.length[:, None]
        q = self.forces[:, case]
        np.add.at(r, self.start, q[:, None] * unit)
        np.add.at(r, self.end, -q[:, None] * unit)
        w = self.member_weight()
        np.add.at(r[:, 1], self.start, -0.5 * w)
        np.add.at(r[:, 1], self.end, -0.5 * w)
        for node, rx, rz in self.reactions[case]:
            r[int(node)] += (rx, rz)
        return r

    def governing_counts(self) -> dict:
        """Number of members each case governs, by case name."""
        counts = np.bincount(self.governing, minlength=len(self.case_names))
        return {n: int(c) for n, c in zip(self.case_names, counts)}

    def to_frame(self):
        """Members as a :class:`pandas.DataFrame` (one row per member; forces per case)."""
        import pandas as pd

        df = pd.DataFrame({
            "start": self.start, "end": self.end,
            "x_start_m": self.nodes[self.start, 0], "z_start_m": self.nodes[self.start, 1],
            "x_end_m": self.nodes[self.end, 0], "z_end_m": self.nodes[self.end, 1],
            "group": self.group, "area_m2": self.area, "length_m": self.length,
            "volume_m3": self.member_volume,
            "governing_case": [self.case_names[i] for i in self.governing],
        })
        for k, name in enumerate(self.case_names):
            df[f"force_{name}_N"] = self.forces[:, k]
        return df

    def summary(self) -> str:
        """A few lines for the engineer."""
        counts = ", ".join(f"{n}: {c}" for n, c in self.governing_counts().items())
        return (f"{self.status}: volume {self.volume:.6g} m3, cost {self.cost:.6g}, weight "
                f"{self.weight:.6g} N, {len(self.start)} members; governing case (members) "
                f"{counts}; {self.stats.get('rounds', 0)} LP rounds, "
                f"{self.stats.get('seconds', 0.0):.2f} s")



def case_design(study, grid, f: np.ndarray, data, out: dict, ref_len: float, ref_force: float,
                ref_sigma: float, rounds: int, seconds: float, columns: int,
                gap: float) -> CaseDesign:
    """Turn the dimensionless multi-case LP optimum ``out`` into a :class:`CaseDesign` in SI units.

    Parameters
    ----------
    study : CaseStudy
        The study solved.
    grid : Grid
        Its ground-structure nodes.
    f : (K, n, 2) float array
        Applied nodal loads per case. [N]
    data : multicase LP data
        Pairs, groups and restrained rows of the LP.
    out : dict
        The LP optimum (areas, forces, reactions, duals) of
        :mod:`bridgeopt.solver.multicase`.
    ref_len, ref_force, ref_sigma : float
        Reference length, force and stress of the dimensionless LP. [m, N, Pa]
    rounds : int
        Member-adding rounds. [-]
    seconds : float
        Wall time. [s]
    columns : int
        Members in the last LP. [-]
    gap : float
        Proven relative optimality gap. [-]

    Returns
    -------
    CaseDesign
        In SI units, checked by :func:`bridgeopt.solver.design.accepted`.

    Raises
    ------
    SolveError
        Status ``"numerical"`` when the volume or the equilibrium check is out of bounds.
    """
    area_d = out["area"]
    keep = area_d > 1e-9 * max(float(area_d.max()), 1e-300)
    pair, grp = out["pair"][keep], out["group"][keep]
    a, b = data.a[pair], data.b[pair]
    area = area_d[keep] * ref_force / ref_sigma
    length = out["length"][keep] * ref_len
    forces = out["force"][keep] * ref_force
    groups = data.groups
    sig_t = np.array([g[1] for g in groups])[grp] * ref_sigma
    sig_c = np.array([g[2] for g in groups])[grp] * ref_sigma
    cap = np.where(forces >= 0, sig_t[:, None], sig_c[:, None]) * area[:, None]
    with np.errstate(invalid="ignore", divide="ignore"):
        util = np.where(cap > 0, np.abs(forces) / cap, 0.0)
    loaded = np.nonzero(np.any(f != 0, axis=(0, 2)))[0]
    used = np.unique(np.concatenate([a, b, loaded, data.fixed // 2]))
    index = -np.ones(grid.n, dtype=np.int64)
    index[used] = np.arange(len(used))
    K = len(study.cases)
    nfix = len(data.fixed)
    reactions = np.zeros((K, nfix, 3))
    reactions[:, :, 0] = index[data.fixed // 2]
    for k in range(K):
        reactions[k, np.arange(nfix), 1 + data.fixed % 2] = out["reactions"][k] * ref_force
    volume = area * length
    costs = study.costs
    price = np.ones(len(area))
    if costs is not None:
        price = np.where(grp == len(groups) - 1, costs.compression, costs.tension) \
            if len(groups) > 1 else np.full(len(area), costs.tension)
    p = study.problem
    copies = p.copies
    names = np.array([g[0] for g in groups])[grp]
    design = CaseDesign(
        status="optimal",
        message=("proven optimum of the multi-case layout LP (lumped self-weight)" if gap == 0
                 else "optimum of the multi-case layout LP (lumped self-weight) within a "
                 f"proven gap of {gap:.1e}"),
        volume=copies * float(volume.sum()), cost=copies * float((price * volume).sum()),
        weight=0.0, nodes=grid.xz[used], start=index[a], end=index[b], group=names,
        area=area, length=length, member_volume=volume, forces=forces,
        governing=np.argmax(util, axis=1) if len(area) else np.zeros(0, int),
        utilisation=util, loads=f[:, used], reactions=reactions,
        case_names=tuple(c.name for c in study.cases),
        stats={"rounds": rounds, "seconds": seconds, "columns": columns,
               "candidates": len(data.a) * len(groups), "grid_nodes": grid.n,
               "lp_objective": out["objective"], "gap": gap},
        copies=copies, study=study)
    weight = copies * float(design.member_weight().sum())
    worst = max(float(np.abs(design.residual(k)).max()) for k in range(K))
    stats = dict(design.stats, equilibrium_error=worst / ref_force)
    accepted(design.volume, worst / ref_force, "several-case design")
    return dataclasses.replace(design, weight=weight, stats=stats)
