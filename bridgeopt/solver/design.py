"""The immutable result of a solve: a design.

A :class:`Design` holds forces in N, volumes in m3, lengths in m.  It is only
ever built from a proven LP optimum; a failed solve raises
:class:`~bridgeopt.errors.SolveError` instead.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

__all__ = ["Members", "Design", "equilibrium_residual", "accepted", "EQUILIBRIUM_TOL",
           "below_reference", "BELOW_REFERENCE_TOL"]

#: Largest out-of-balance force of a returned design, as a part of the applied load. [-]
EQUILIBRIUM_TOL = 1e-6


def _frozen(a) -> np.ndarray:
    a = np.array(a)
    a.setflags(write=False)
    return a


@dataclass(frozen=True)
class Members:
    """Members of a design, as parallel read-only arrays.

    Parameters
    ----------
    start, end : int arrays
        Indices into :attr:`Design.nodes` (start is the left or lower end). [-]
    sense : str array
        ``"tension"`` or ``"compression"``.
    horizontal_force : float array
        Constant horizontal force component of a curved or straight member;
        0 for a vertical member. [N]
    force_start, force_end : (m, 2) float arrays
        Force the member applies to its start / end node, (x, z). [N]
    volume : float array
        Material volume. [m3]
    sag : float array
        Largest vertical distance between centreline and chord. [m]
    curves : tuple of (k, 2) arrays
        Points along each centreline, start to end. [m]
    group : str array
        Element group label (``"member"`` for layout optimization; forms use
        ``"stay"``, ``"pylon"``, ``"deck"`` ...).
    """

    start: np.ndarray
    end: np.ndarray
    sense: np.ndarray
    horizontal_force: np.ndarray
    force_start: np.ndarray
    force_end: np.ndarray
    volume: np.ndarray
    sag: np.ndarray
    curves: tuple
    group: np.ndarray

    def __post_init__(self) -> None:
        for name in ("start", "end", "sense", "horizontal_force", "force_start",
                     "force_end", "volume", "sag", "group"):
            object.__setattr__(self, name, _frozen(getattr(self, name)))
        object.__setattr__(self, "curves", tuple(_frozen(c) for c in self.curves))

    def __len__(self) -> int:
        return len(self.start)

    @property
    def axial_force(self) -> np.ndarray:
        """Largest end force magnitude of each member. [N]"""
        return np.maximum(np.hypot(*self.force_start.T), np.hypot(*self.force_end.T))


def equilibrium_residual(nodes, members: Members, loads, reactions) -> np.ndarray:
    """Out-of-balance force at every node, (n, 2). [N]

    Sums the end forces of the members, the applied loads and the reactions,
    independently of the LP that produced them.

    Parameters
    ----------
    nodes : (n, 2) float array
        Node coordinates. [m]
    members : Members
        Member ends and end forces. [N]
    loads : (n, 2) float array
        Applied nodal loads. [N]
    reactions : (r, 3) float array
        Rows (node, Rx, Rz). [-, N, N]

    Returns
    -------
    (n, 2) float array
        Sum of member end forces, loads and reactions at each node (zero in
        equilibrium). [N]
    """
    r = np.array(loads, dtype=float).reshape(-1, 2).copy()
    np.add.at(r, members.start, members.force_start)
    np.add.at(r, members.end, members.force_end)
    for node, rx, rz in reactions:
        r[int(node)] += (rx, rz)
    return r


@dataclass(frozen=True)
class Design:
    """A solved layout.

    Parameters
    ----------
    status : str
        ``"optimal"``.
    message : str
        What was proven (optimum, gap).
    volume : float
        Material volume of the reported structure (``copies`` times the model). [m3]
    weight : float
        Self-weight of the reported structure (0 when weightless). [N]
    nodes : (n, 2) float array
        Coordinates of the nodes that carry members, loads or supports. [m]
    members : Members
        The members, as parallel arrays.
    loads : (n, 2) float array

        Applied nodal loads (self-weight excluded). [N]
    reactions : (r, 3) float array
        Rows of (node, Rx, Rz). [-, N, N]
    duals : (n, 2) float array
        Equality-row duals: volume added per unit load at each node. [m3/N]
    stats : dict
        ``rounds``, ``columns`` (in the final LP), ``candidates`` (potential
        columns), ``seconds``, ``grid_nodes``.
    copies : float
        Number of copies of the model in the reported structure. [-]
    model_volume : float
        Volume of the modelled part. [m3]
    equilibrium_error : float
        Largest nodal out-of-balance divided by the total applied load. [-]
    problem : object
        The problem solved (frozen).
    """

    status: str
    message: str
    volume: float
    weight: float
    nodes: np.ndarray
    members: Members
    loads: np.ndarray
    reactions: np.ndarray
    duals: np.ndarray
    stats: dict
    copies: float
    model_volume: float
    equilibrium_error: float
    problem: object = field(repr=False, default=None)

    def __post_init__(self) -> None:
        for name in ("nodes", "loads", "reactions", "duals"):
            object.__setattr__(self, name, _frozen(getattr(self, name)))
        object.__setattr__(self, "stats", dict(self.stats))

    def to_frame(self):
        """Members as a :class:`pandas.DataFrame` (one row per member, SI units in the names)."""
        import pandas as pd

        m = self.members
        return pd.DataFrame({
            "start": m.start, "end": m.end,
            "x_start_m": self.nodes[m.start, 0], "z_start_m": self.nodes[m.start, 1],
            "x_end_m": self.nodes[m.end, 0], "z_end_m": self.nodes[m.end, 1],
            "sense": m.sense, "group": m.group,
            "horizontal_force_N": m.horizontal_force,
            "axial_force_N": m.axial_force,
            "volume_m3": m.volume, "sag_m": m.sag,
        })

    def nodes_frame(self):
        """Nodes as a :class:`pandas.DataFrame` with loads and reactions."""
        import pandas as pd

        df = pd.DataFrame({"x_m": self.nodes[:, 0], "z_m": self.nodes[:, 1],
                           "load_x_N": self.loads[:, 0], "load_z_N": self.loads[:, 1]})
        rx = np.zeros(len(self.nodes))
        rz = np.zeros(len(self.nodes))
        if len(self.reactions):
            idx = self.reactions[:, 0].astype(np.int64)
            np.add.at(rx, idx, self.reactions[:, 1])
            np.add.at(rz, idx, self.reactions[:, 2])
        df["reaction_x_N"] = rx
        df["reaction_z_N"] = rz
        return df

    def summary(self) -> str:
        """A few lines for the engineer."""
        m = self.members
        n_t = int((m.sense == "tension").sum())
        return (f"{self.status}: volume {self.volume:.6g} m3, weight {self.weight:.6g} N, "
                f"{len(m)} members ({n_t} tension, {len(m) - n_t} compression), "
                f"{len(self.nodes)} nodes; {self.stats.get('rounds', 0)} LP rounds, "
                f"{self.stats.get('seconds', 0.0):.2f} s")


def accepted(volume: float, equilibrium_error: float, what: str = "design") -> None:
    """Refuse a solve whose result no engineer should see: no design is better than that.

    Parameters
    ----------
    volume : float
        Volume of the whole reported structure. [m3]
    equilibrium_error : float
        Largest out-of-balance force of the independent check, as a part of the
        applied load. [-]
    what : str
        What was solved, for the message.

    Raises
    ------
    SolveError
        Status ``"numerical"``: the volume is not finite and positive, or the
        design fails the independent equilibrium check by more than
        :data:`EQUILIBRIUM_TOL`.
    """
    from bridgeopt.errors import SolveError

    if not (np.isfinite(volume) and volume > 0):
        raise SolveError("numerical", f"the {what} came out with a volume of {volume!r} m3, "
                         "which no structure has: loads, strengths or sizes are far outside "
                         "the ranges the solver resolves (docs/limits.md)")
    if not (np.isfinite(equilibrium_error) and equilibrium_error <= EQUILIBRIUM_TOL):
        raise SolveError("numerical", f"the {what} fails the independent equilibrium check "
                         f"(out of balance by {equilibrium_error!r} of the applied load, more "
                         f"than {EQUILIBRIUM_TOL:g}); it is not returned (docs/limits.md)")


#: A form lighter than its reference by more than this part is refused, not shown. [-]
BELOW_REFERENCE_TOL = 1e-6


def below_reference(what: str, volume: float, reference_volume: float) -> str | None:
    """Why a form's volume cannot be shown against its reference, or None when it can.

    The reference optimum bounds every structure whose nodes are grid nodes (W.S. Dorn,
    R.E. Gomory, H.J. Greenberg 1964, J. de Mecanique 3:25-52); a form with nodes between
    them (free anchors, leg heads, inclined hangers) can fall under it on a coarse grid.
    Such a result is no finding: the solve is refused.

    Parameters
    ----------
    what : str
        The form, as the message names it ("the cable-stayed form").
    volume, reference_volume : float
        The form's volume and that of the reference it is set against. [m3]

    Returns
    -------
    str or None
        The refusal's message (asking for more ``bridge.divisions``), or None.
    """
    if not volume < reference_volume * (1 - BELOW_REFERENCE_TOL):
        return None
    return (f"{what} ({volume:.6g} m3) is below the reference optimum it is set against "
            f"({reference_volume:.6g} m3): the grid is too coarse to bound a form whose nodes "
            "fall between its nodes; use more grid divisions (bridge.divisions)")
