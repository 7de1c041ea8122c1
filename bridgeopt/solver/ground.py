"""Ground structure: grid nodes and candidate members.

Nodes lie on a rectangular lattice over the domain's bounding box, kept where
they fall inside the domain and outside every excluded zone.  Candidate members
join node pairs whose lattice offset (di, dj) has gcd(|di|, |dj|) = 1, so that
no third node lies on a member (W.S. Dorn, R.E. Gomory, H.J. Greenberg 1964,
J. de Mecanique 3:25-52).  Pairs are generated in chunks and kept as two int32
arrays; no dense all-pairs matrix is ever formed.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from bridgeopt.errors import InputError
from bridgeopt.model.plane import points_in_polygon, segments_cross
from bridgeopt.model.problem import Problem

__all__ = ["Grid", "build_grid", "candidate_pairs", "members_clear_of_zones"]

#: Number of node pairs examined per chunk when generating candidates.
PAIR_CHUNK = 2_000_000


@dataclass(frozen=True)
class Grid:
    """Grid nodes of a problem.

    Parameters
    ----------
    xz : ndarray, shape (n, 2)
        Node coordinates. [m]
    ij : ndarray, shape (n, 2), int
        Lattice indices of the nodes. [-]
    step : (float, float)
        Lattice spacing in x and z. [m]
    origin : (float, float)
        Coordinates of lattice index (0, 0). [m]
    """

    xz: np.ndarray
    ij: np.ndarray
    step: tuple[float, float]
    origin: tuple[float, float]

    @property
    def n(self) -> int:
        return len(self.xz)

    def node_at(self, point, field: str) -> int:
        """Index of the node at ``point``; :class:`InputError` naming ``field`` if none.

        Parameters
        ----------
        point : (2,) float array
            Where the node should be. [m]
        field : str
            Input name for the error message.
        """
        p = np.asarray(point, dtype=float)
        d = np.hypot(*(self.xz - p).T)
        i = int(np.argmin(d))
        if d[i] > 1e-6 * max(self.step):
            raise InputError(field, list(map(float, point)),
                             f"a grid node of the domain (nearest node at "
                             f"[{self.xz[i, 0]:.6g}, {self.xz[i, 1]:.6g}] m, "
                             f"grid step {self.step[0]:.6g} x {self.step[1]:.6g} m)")
        return i


def build_grid(problem: Problem) -> Grid:
    """Lattice nodes inside ``problem.domain`` and outside its excluded zones.

    Parameters
    ----------
    problem : Problem
        Its domain and spacing. [m]

    Returns
    -------
    Grid
        The kept lattice nodes (at least 2).

    Raises
    ------
    InputError
        Naming ``domain.spacing`` when fewer than 2 nodes fall in the domain.
    """
    x0, x1, z0, z1 = problem.domain.bounds
    nx, nz = problem.grid_shape()
    sx, sz = (x1 - x0) / nx, (z1 - z0) / nz
    i, j = np.meshgrid(np.arange(nx + 1), np.arange(nz + 1), indexing="ij")
    ij = np.column_stack([i.ravel(), j.ravel()])
    xz = np.column_stack([x0 + ij[:, 0] * sx, z0 + ij[:, 1] * sz])
    tol = 1e-7 * max(sx, sz)
    keep = np.ones(len(xz), dtype=bool)
    if not problem.domain.is_box:
        keep &= points_in_polygon(xz, problem.domain.outline, boundary=True, tol=tol)
        for zone in problem.domain.excluded:
            keep &= ~points_in_polygon(xz, zone, boundary=False, tol=tol)
    if keep.sum() < 2:
        raise InputError("domain.spacing", problem.spacing, "a spacing that leaves at least 2 nodes in the domain")
    return Grid(xz=xz[keep], ij=ij[keep].astype(np.int64), step=(sx, sz), origin=(x0, z0))


def members_clear_of_zones(problem: Problem, grid: Grid, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Members that stay in the domain and out of every excluded zone.

    Parameters
    ----------
    problem : Problem
        Its domain outline and excluded zones. [m]
    grid : Grid
        Node coordinates. [m]
    a, b : (m,) int arrays
        Member end nodes. [-]

    Returns
    -------
    (m,) bool array
        True for a member that crosses no edge of the outline or of a zone and
        whose midpoint is in the domain and out of every zone.
    """
    p, q = grid.xz[a], grid.xz[b]
    ok = np.ones(len(a), dtype=bool)
    tol = 1e-7 * max(grid.step)
    eps = 1e-9 * max(grid.step) ** 2
    mid = 0.5 * (p + q)
    outline = np.asarray(problem.domain.outline)
    for ea, eb in zip(outline, np.roll(outline, -1, axis=0)):
        ok &= ~segments_cross(p, q, ea, eb, eps=eps)
    ok &= points_in_polygon(mid, outline, boundary=True, tol=tol)
    for zone in problem.domain.excluded:
        zone = np.asarray(zone, dtype=float)
        for ea, eb in zip(zone, np.roll(zone, -1, axis=0)):
            ok &= ~segments_cross(p, q, ea, eb, eps=eps)
        ok &= ~points_in_polygon(mid, zone, boundary=False, tol=tol)
    return ok


def candidate_pairs(problem: Problem, grid: Grid) -> tuple[np.ndarray, np.ndarray]:
    """All candidate members as index arrays ``(a, b)``.

    ``a`` is the left end (or the lower end of a vertical member).  Pairs with a
    third lattice node on the segment are skipped (gcd filter), and so are
    members leaving the domain or crossing an excluded zone.

    Parameters
    ----------
    problem : Problem
        Its domain (members leaving it are skipped).
    grid : Grid
        The lattice nodes. [m]

    Returns
    -------
    a, b : (p,) int32 arrays
        End nodes of each candidate pair (indices into ``grid``). [-]
    """
    n = grid.n
    order = np.lexsort((grid.ij[:, 1], grid.ij[:, 0]))  # by i, then j
    ij = grid.ij[order]
    out_a, out_b = [], []
    # coprime[|di|, |dj|]: no third lattice node on the segment (a table lookup, not a gcd
    # per pair)
    span = ij.max(axis=0) - ij.min(axis=0) + 1 if n else np.ones(2, dtype=np.int64)
    coprime = np.gcd.outer(np.arange(span[0]), np.arange(span[1])) == 1
    rows = max(1, PAIR_CHUNK // max(n, 1))
    for start in range(0, n, rows):
        stop = min(n, start + rows)
        ia = np.arange(start, stop)[:, None]
        ib = np.arange(n)[None, :]
        mask = ib > ia
        di = np.abs(ij[None, :, 0] - ij[start:stop, None, 0])
        dj = np.abs(ij[None, :, 1] - ij[start:stop, None, 1])
        mask &= coprime[di, dj]
        aa, bb = np.nonzero(mask)
        out_a.append(order[aa + start].astype(np.int32))
        out_b.append(order[bb].astype(np.int32))
    a = np.concatenate(out_a) if out_a else np.zeros(0, np.int32)
    b = np.concatenate(out_b) if out_b else np.zeros(0, np.int32)
    # a is left (smaller i), or lower for vertical pairs: guaranteed by the sort order.
    if not problem.domain.is_box:
        keep = np.ones(len(a), dtype=bool)
        for s in range(0, len(a), PAIR_CHUNK):
            keep[s:s + PAIR_CHUNK] = members_clear_of_zones(problem, grid, a[s:s + PAIR_CHUNK], b[s:s + PAIR_CHUNK])
        a, b = a[keep], b[keep]
    return a, b
