"""Member-adding pricing from a table of lattice offsets.

On a uniform grid the LP coefficients of a candidate member (cost and the four
end-force factors, for tension and for compression, equal-strength self-weight
elements included) depend only on its lattice offset (di, dj) and on the
material, not on where the member sits.  So each offset's coefficients are
computed once (cached per grid step, material and scales), and every
candidate's work ``u.a`` against the row duals ``u`` is formed with shifted
arrays on the lattice of duals: for one di, the duals at the start nodes
``U[i, j]`` and, for every dj at once, at the end nodes ``U[i + di, j + dj]``
(a sliding window on a NaN-padded copy).  A table of pair indices on the same
lattice (-1 where no candidate) carries the domain edges, excluded zones and the
gcd filter exactly as :func:`bridgeopt.solver.ground.candidate_pairs` made them.

A node set that is not a uniform lattice, or whose pairs are not all stored
left to right (lower to upper if vertical), has no offset table
(:func:`on_lattice` is False) and is priced by the general path of
:mod:`bridgeopt.solver.lp`.

Column k of sense s is violated (enters the LP) when ``u.a_k > c_k (1 + tol)``
(the dual check of member adding: M. Gilbert, A. Tyas 2003, Engineering
Computations 20(8):1044-1064).
"""

from __future__ import annotations

import functools
import weakref
from dataclasses import dataclass

import numpy as np
from numpy.lib.stride_tricks import sliding_window_view

from bridgeopt.solver.elements import SENSES, curved_coefficients, vertical_coefficients

__all__ = ["Lattice", "lattice_of", "on_lattice", "price_offsets", "predict_offsets",
           "offset_coefficients"]

#: Node coordinates off the lattice by more than this fraction of a step: not uniform.
LATTICE_TOL = 1e-9
#: No offset table when the lattice box has more than this many positions per node
#: (a sparse node set on a fine lattice), or when the table would hold more than
#: this many entries per candidate pair.
BOX_PER_NODE = 4
TABLE_PER_PAIR = 4
#: The offset table finds columns this much (relative) below the threshold too; their
#: ratios are then recomputed by the general path (offset and per-position
#: coefficients differ by rounding only, about 1e-15).
HAIR = 1e-9


@dataclass(frozen=True)
class Lattice:
    """Offset table of an LP's candidate pairs on a uniform lattice.

    Parameters
    ----------
    step : (float, float)
        Lattice spacing in x and z, in the LP's length unit (dimensionless). [-]
    shape : (int, int)
        Lattice positions along x and z. [-]
    ij : (n, 2) int array
        Lattice indices of the nodes. [-]
    pad : int
        Largest |dj| of any pair: width of the NaN padding of the dual grid. [-]
    groups : tuple of (di, dj, table)
        One per distinct di: the distinct dj (sorted) of its pairs and an int32
        table of shape (shape[0] - di, len(dj), shape[1]) holding, at [i, c, j],
        the pair from node (i, j) to (i + di, j + dj[c]), or -1.
    """

    step: tuple[float, float]
    shape: tuple[int, int]
    ij: np.ndarray
    pad: int
    groups: tuple


_TABLES: dict[int, tuple[weakref.ref, Lattice | None]] = {}


def _lattice_index(v: np.ndarray):
    """(index, step) of coordinates ``v`` on a uniform 1-D lattice, or None."""
    levels = np.unique(v)
    if len(levels) == 1:
        return np.zeros(len(v), dtype=np.int64), 1.0
    gaps = np.diff(levels)
    cells = np.rint((levels[-1] - levels[0]) / gaps.min())
    step = (levels[-1] - levels[0]) / cells
    index = np.rint((v - levels[0]) / step)
    if np.abs(v - levels[0] - index * step).max() > LATTICE_TOL * step:
        return None
    return index.astype(np.int64), float(step)


def _build(data) -> Lattice | None:
    xz = np.asarray(data.xz, dtype=float)
    n, n_pairs = len(xz), len(data.a)
    if n < 2 or n_pairs == 0:
        return None
    ix, iz = _lattice_index(xz[:, 0]), _lattice_index(xz[:, 1])
    if ix is None or iz is None:
        return None
    ij = np.column_stack([ix[0], iz[0]])
    shape = (int(ij[:, 0].max()) + 1, int(ij[:, 1].max()) + 1)
    if shape[0] * shape[1] > BOX_PER_NODE * n:
        return None
    a, b = np.asarray(data.a), np.asarray(data.b)
    di = ij[b, 0] - ij[a, 0]
    dj = ij[b, 1] - ij[a, 1]
    if np.any(di < 0) or np.any((di == 0) & (dj <= 0)):
        return None
    pad = int(np.abs(dj).max())
    # every pair's place in one flat table, group by group (di), each (i, dj column, j)
    ni, nj = shape
    code = di * (2 * pad + 1) + (dj + pad)               # offset number
    present = np.zeros((ni, 2 * pad + 1), dtype=bool)
    present.ravel()[code] = True
    ndj = present.sum(axis=1)
    sizes = (ni - np.arange(ni)) * ndj * nj
    if sizes.sum() > TABLE_PER_PAIR * n_pairs + 10_000:
        return None
    first = np.concatenate([[0], np.cumsum(sizes)[:-1]])
    # per offset: place of its (i, j) = (0, 0) entry and stride in i
    base = (first[:, None] + (np.cumsum(present, axis=1) - 1) * nj).ravel()
    stride = np.repeat(ndj * nj, 2 * pad + 1)
    at = base[code] + ij[a, 0] * stride[code] + ij[a, 1]
    flat = np.full(int(sizes.sum()), -1, dtype=np.int32)
    flat[at] = np.arange(n_pairs, dtype=np.int32)
    groups = tuple((d, np.flatnonzero(present[d]) - pad,
                    flat[first[d]:first[d] + sizes[d]].reshape(ni - d, ndj[d], nj))
                   for d in range(ni) if ndj[d])
    return Lattice(step=(ix[1], iz[1]), shape=shape, ij=ij, pad=pad, groups=groups)


def lattice_of(data) -> Lattice | None:
    """The offset table of an LP's candidates, or None if they are not on a uniform lattice.

    Built once per LPData object and kept while the object lives.

    Parameters
    ----------
    data : LPData
        Dimensionless LP data (:class:`bridgeopt.solver.lp.LPData`): node
        coordinates ``xz`` [-] and candidate ends ``a``, ``b``.

    Returns
    -------
    Lattice or None
    """
    key = id(data)
    hit = _TABLES.get(key)
    if hit is not None and hit[0]() is data:
        return hit[1]
    table = _build(data)
    _TABLES[key] = (weakref.ref(data, lambda _, key=key: _TABLES.pop(key, None)), table)
    return table


def on_lattice(data) -> bool:
    """Whether an LP's candidates can be priced from a table of lattice offsets.

    Parameters
    ----------
    data : LPData
        Dimensionless LP data (:class:`bridgeopt.solver.lp.LPData`).

    Returns
    -------
    bool
        True when :func:`lattice_of` finds an offset table.
    """
    return lattice_of(data) is not None


@functools.lru_cache(maxsize=16)
def offset_coefficients(hx: float, hz: float, di_max: int, pad: int, k: float,
                        cost_scale: float, sense: str) -> tuple[np.ndarray, ...]:
    """LP coefficients of every lattice offset, for one sense and material.

    Parameters
    ----------
    hx, hz : float
        Lattice spacing in x and z. [L]
    di_max : int
        Largest di; offsets di = 0 .. di_max are tabulated.
    pad : int
        Largest |dj|; offsets dj = -pad .. pad are tabulated (column dj + pad).
    k : float
        rho*g/sigma of the sense's material, in the same length unit. [1/L]
    cost_scale : float
        Factor on the cost (sigma_ref / sigma_sense). [-]
    sense : {"tension", "compression"}

    Returns
    -------
    cost, px, pz, qz : ndarray, shape (di_max + 1, 2 pad + 1), read-only
        Cost and the end-force factors of :func:`~bridgeopt.solver.lp.column_entries`
        (qx = -px for every element); nan where no element can span the offset
        (k Lx at the span limit, or the null offset).
    """
    dj = np.arange(-pad, pad + 1, dtype=float) * hz
    di = np.arange(di_max + 1, dtype=float) * hx
    cost = np.full((di_max + 1, 2 * pad + 1), np.nan)
    px = np.zeros_like(cost)
    pz = np.zeros_like(cost)
    qz = np.zeros_like(cost)
    if di_max >= 1:
        lx, dz = np.meshgrid(di[1:], dj, indexing="ij")
        c, pxf, pzf, _, qzf = curved_coefficients(lx, dz, k, sense)
        cost[1:], px[1:], pz[1:], qz[1:] = c, pxf, pzf, qzf
    up = slice(pad + 1, None)
    if pad >= 1:
        c, pzf, qzf = vertical_coefficients(dj[up], k, sense)
        cost[0, up], pz[0, up], qz[0, up] = c, pzf, qzf
    cost *= cost_scale
    for arr in (cost, px, pz, qz):
        arr.flags.writeable = False
    return cost, px, pz, qz


def _dual_grid(lat: Lattice, u: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """x and z duals on the lattice, NaN off the nodes, NaN-padded by ``pad`` in j."""
    grids = []
    for c in range(2):
        g = np.full((lat.shape[0], lat.shape[1] + 2 * lat.pad), np.nan)
        g[lat.ij[:, 0], lat.ij[:, 1] + lat.pad] = u[c::2]
        grids.append(g)
    return grids[0], grids[1]


def _ratios(data, lat: Lattice, u: np.ndarray, tol: float, in_lp, use_allowed: bool):
    """Columns with u.a > c (1 + tol): (pair, sense, u.a / c), unordered."""
    ux, uz = _dual_grid(lat, u)
    width, pad = lat.shape[1], lat.pad
    coef = [offset_coefficients(lat.step[0], lat.step[1], lat.shape[0] - 1, pad,
                                float(data.k[s]), float(data.cost_scale[s]), s) for s in SENSES]
    found = []
    for d, djs, table in lat.groups:
        cols = djs + pad
        live = [np.isfinite(coef[s][0][d, cols]).any() for s in range(2)]
        if not any(live):
            continue
        ax = ux[:lat.shape[0] - d, None, pad:pad + width]
        az = uz[:lat.shape[0] - d, None, pad:pad + width]
        bx = sliding_window_view(ux[d:], width, axis=1)[:, cols, :]
        bz = sliding_window_view(uz[d:], width, axis=1)[:, cols, :]
        diff = ax - bx
        for s in range(2):
            if not live[s]:
                continue
            cost, px, pz, qz = (t[d, cols][None, :, None] for t in coef[s])
            with np.errstate(invalid="ignore"):
                # in place: one array of the group's size, not five
                work = px * diff
                work += pz * az
                work += qz * bz
                bad = np.flatnonzero(work > cost * (1.0 + tol))
            if len(bad) == 0:
                continue
            pair = table.ravel()[bad]
            keep = pair >= 0
            if in_lp is not None:
                keep[keep] = ~in_lp[pair[keep], s]
            if use_allowed and data.allowed is not None:
                keep[keep] = data.allowed[pair[keep], s]
            if keep.any():
                bad = bad[keep]
                c = np.broadcast_to(cost, work.shape).ravel()[bad]
                found.append((pair[keep], np.full(len(bad), s, dtype=np.int64),
                              work.ravel()[bad] / c))
    if not found:
        return None
    return tuple(np.concatenate(x) for x in zip(*found))


def _ordered(found, chunk: int):
    """``found`` in the general pricing's order: by chunk of pairs, then sense, then pair."""
    if found is None:
        return None
    pair, sense, ratio = found
    order = np.lexsort((pair, sense, pair // chunk))
    return pair[order], sense[order], ratio[order]


def _exact(data, found, u: np.ndarray, entries):
    """Work u.a and cost of the columns ``found``, recomputed by the general path's ``entries``.

    Member adding ranks the columns by u.a/c, and fine grids have many near-ties
    (ratios equal to 1e-15): ratios that differ in the last bits from the
    general path's break them otherwise, which sends HiGHS down another (valid)
    path.  Recomputing the few columns found keeps the solve the same.
    """
    pair, sense, _ = found
    work, cost = np.empty(len(pair)), np.empty(len(pair))
    for s, name in enumerate(SENSES):
        sel = sense == s
        if sel.any():
            cost[sel], rows, vals = entries(data, pair[sel], name)
            work[sel] = np.einsum("ij,ij->i", u[rows], vals)
    return work, cost


def price_offsets(data, in_lp: np.ndarray, u: np.ndarray, *, tol: float, chunk: int,
                  entries):
    """Violated columns of a lattice LP as (pair, sense, ratio u.a/c), or None.

    The same columns, ratios and order (by chunk of ``chunk`` pairs, then
    sense, then pair) as the general pricing of :mod:`bridgeopt.solver.lp`: the
    offset table finds the columns within a hair of the threshold, and their
    work and cost are recomputed by ``entries`` and tested as there.

    Parameters
    ----------
    data : LPData
        Dimensionless LP data with ``on_lattice(data)`` True.
    in_lp : ndarray, shape (n_pairs, 2), bool
        Columns already in the LP (not priced).
    u : ndarray, shape (2 n,)
        Equality-row duals (x, z interleaved). [-]
    tol : float
        Relative violation for a column to enter. [-]
    chunk : int
        Pairs per chunk of the general pricing (sets the order). [-]
    entries : callable
        ``entries(data, pair, sense) -> (cost, rows, vals)`` of the general path
        (:func:`bridgeopt.solver.lp.column_entries`).

    Returns
    -------
    (pair, sense, ratio) or None
        Candidate index, sense (0 tension, 1 compression) and u.a/c of every
        violated column; None when there is none.
    """
    u = np.asarray(u, dtype=float)
    found = _ordered(_ratios(data, lattice_of(data), u, tol - HAIR, in_lp, True), chunk)
    if found is None:
        return None
    work, cost = _exact(data, found, u, entries)
    with np.errstate(invalid="ignore"):
        bad = work > cost * (1.0 + tol)
    if not bad.any():
        return None
    return found[0][bad], found[1][bad], work[bad] / cost[bad]


def predict_offsets(data, guess: np.ndarray, limit: int, *, ratio: float, chunk: int,
                    entries) -> np.ndarray:
    """Pairs predicted active by a guess of the duals, on a lattice LP.

    The pairs whose u.a/c exceeds ``ratio`` in either sense, the ``limit`` with
    the largest ratios if more, as sorted unique pair indices: the same as the
    general prediction of :mod:`bridgeopt.solver.lp` (ratios recomputed as in
    :func:`price_offsets`).

    Parameters
    ----------
    data : LPData
        Dimensionless LP data with ``on_lattice(data)`` True.
    guess : ndarray, shape (2 n,)
        Estimated equality-row duals. [-]
    limit : int
        Most (pair, sense) picks kept. [-]
    ratio : float
        Least u.a/c of a pick. [-]
    chunk : int
        Pairs per chunk of the general prediction (sets the order of ties). [-]
    entries : callable
        The general path's column entries, as in :func:`price_offsets`.

    Returns
    -------
    ndarray of int
        Sorted unique candidate indices.
    """
    guess = np.asarray(guess, dtype=float)
    found = _ordered(_ratios(data, lattice_of(data), guess, ratio - 1.0 - HAIR, None, False),
                     chunk)
    if found is None:
        return np.zeros(0, dtype=np.int64)
    work, cost = _exact(data, found, guess, entries)
    with np.errstate(invalid="ignore"):
        r = work / cost
    near = r > ratio
    pair, r = found[0][near], r[near]
    if len(pair) > limit:
        pair = pair[np.argpartition(-r, limit)[:limit]]
    return np.unique(pair)
