"""Frozen description of a layout-optimization problem.

A :class:`Problem` holds the design domain (a polygon, optionally with excluded
zones), the nodal spacing, supports, mirror (symmetry) lines, loads and
materials.  It says nothing about how it is solved: see :mod:`bridgeopt.solver.layout`.

Sign conventions: x to the right, z upwards; forces in N; a line load's
intensity is positive downwards (gravity).
"""

from __future__ import annotations

import math
import numbers
from dataclasses import dataclass


from bridgeopt.errors import InputError
from bridgeopt.model.limits import COORDINATE, FORCE, INTENSITY
from bridgeopt.model.materials import Material
from bridgeopt.model.plane import polygon_area

__all__ = ["Domain", "Support", "PointLoad", "LineLoad", "Problem"]

_FIXES = ("x", "z", "xz")

#: Largest grid the solver accepts (cells); about 140 x 140. Finer grids need
#: more memory and time than a concept study should take on a workstation.
MAX_CELLS = 20_000


def _check_point(name: str, value: object) -> tuple[float, float]:
    try:
        x, z = (float(v) for v in value)  # type: ignore[union-attr]
    except (TypeError, ValueError):
        raise InputError(name, value, "a pair [x, z] of finite numbers in m") from None
    if not (abs(x) <= COORDINATE and abs(z) <= COORDINATE):
        raise InputError(name, value, f"a pair [x, z] of finite numbers within +-{COORDINATE:g} m")
    return (x, z)


def _check_polygon(name: str, value: object) -> tuple[tuple[float, float], ...]:
    try:
        pts = tuple(_check_point(f"{name}[{i}]", p) for i, p in enumerate(value))  # type: ignore[arg-type]
    except TypeError:
        raise InputError(name, value, "a list of at least 3 points [x, z] in m") from None
    if len(pts) < 3:
        raise InputError(name, value, "a list of at least 3 points [x, z] in m")
    if polygon_area(pts) == 0:
        raise InputError(name, value, "a polygon of non-zero area")
    return pts


@dataclass(frozen=True)
class Domain:
    """Design domain: a simple polygon with optional excluded zones.

    Parameters
    ----------
    outline : sequence of (x, z)
        Vertices of the domain polygon, in order. [m]
    excluded : sequence of polygons
        Zones inside which no node lies and through which no member passes. [m]
    """

    outline: tuple[tuple[float, float], ...]
    excluded: tuple[tuple[tuple[float, float], ...], ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "outline", _check_polygon("domain.outline", self.outline))
        object.__setattr__(self, "excluded", tuple(
            _check_polygon(f"excluded[{i}]", p) for i, p in enumerate(self.excluded)))

    @classmethod
    def rectangle(cls, x: tuple[float, float], z: tuple[float, float],
                  excluded: tuple = ()) -> "Domain":
        """Rectangle ``x[0] <= x <= x[1]``, ``z[0] <= z <= z[1]``. [m]"""
        (x0, x1), (z0, z1) = _check_point("domain.x", x), _check_point("domain.z", z)
        if not x1 > x0:
            raise InputError("domain.x", list(x), "[x0, x1] with x1 > x0 (m)")
        if not z1 > z0:
            raise InputError("domain.z", list(z), "[z0, z1] with z1 > z0 (m)")
        return cls(((x0, z0), (x1, z0), (x1, z1), (x0, z1)), tuple(excluded))

    @property
    def bounds(self) -> tuple[float, float, float, float]:
        """(x0, x1, z0, z1) of the bounding box. [m]"""
        xs, zs = zip(*self.outline)
        return (min(xs), max(xs), min(zs), max(zs))

    @property
    def is_box(self) -> bool:
        """True for an axis-aligned rectangle without excluded zones."""
        if self.excluded or len(self.outline) != 4:
            return False
        x0, x1, z0, z1 = self.bounds
        return all((x in (x0, x1)) and (z in (z0, z1)) for x, z in self.outline)


@dataclass(frozen=True)
class Support:
    """A point support at a grid node.

    Parameters
    ----------
    at : (x, z)
        Position. [m]
    fix : {"x", "z", "xz"}
        Restrained directions.
    """

    at: tuple[float, float]
    fix: str = "xz"

    def __post_init__(self) -> None:
        object.__setattr__(self, "at", _check_point("support.at", self.at))
        if self.fix not in _FIXES:
            raise InputError("support.fix", self.fix, "one of 'x', 'z', 'xz'")


@dataclass(frozen=True)
class PointLoad:
    """A point load at a grid node.

    Parameters
    ----------
    at : (x, z)
        Position. [m]
    force : (fx, fz)
        Force components, z upwards (a gravity load has fz < 0). [N]
    """

    at: tuple[float, float]
    force: tuple[float, float]

    def __post_init__(self) -> None:
        object.__setattr__(self, "at", _check_point("load.at", self.at))
        try:
            f = tuple(float(v) for v in self.force)  # type: ignore[union-attr]
        except (TypeError, ValueError):
            f = ()
        size = math.hypot(*f) if len(f) == 2 else math.nan
        if not FORCE[0] <= size <= FORCE[1]:
            raise InputError("load.force", self.force, f"a pair [fx, fz] in N of magnitude "
                             f"{FORCE[0]:g} to {FORCE[1]:g} N")
        object.__setattr__(self, "force", f)


@dataclass(frozen=True)
class LineLoad:
    """A uniformly distributed load along a horizontal line, shared between nodes.

    Parameters
    ----------
    start, end : (x, z)
        Ends of the loaded line; both at the same height. [m]
    intensity : float
        Load per unit horizontal length, positive downwards. [N/m]
    """

    start: tuple[float, float]
    end: tuple[float, float]
    intensity: float

    def __post_init__(self) -> None:
        s = _check_point("line_load.from", self.start)
        e = _check_point("line_load.to", self.end)
        if abs(s[1] - e[1]) > 1e-9 * max(1.0, abs(s[1])):
            raise InputError("line_load.to", list(e), f"a point at the same height z = {s[1]} m as 'from'")
        if not e[0] > s[0]:
            s, e = e, s
        if not e[0] > s[0]:
            raise InputError("line_load.to", list(e), "a point with x different from 'from'")
        w = self.intensity
        if not (isinstance(w, numbers.Real) and not isinstance(w, bool)
                and INTENSITY[0] <= abs(w) <= INTENSITY[1]):
            raise InputError("line_load.intensity", w, f"a number in N/m of magnitude "
                             f"{INTENSITY[0]:g} to {INTENSITY[1]:g} (positive downwards)")
        object.__setattr__(self, "intensity", float(w))
        object.__setattr__(self, "start", s)
        object.__setattr__(self, "end", e)


@dataclass(frozen=True)
class Problem:
    """A layout-optimization problem.

    Parameters
    ----------
    domain : Domain
        Design domain.
    spacing : float
        Target nodal spacing; the grid divides each side of the bounding box into
        a whole number of cells, as close to this as possible. [m]
    material : Material
        Material of the tension elements, and of the compression elements unless
        ``compression_material`` is given.
    supports : tuple of Support
        Held points and the directions they are held in.
    loads : tuple of PointLoad
        Concentrated loads at grid nodes.
    line_loads : tuple of LineLoad
        Horizontal uniform line loads, lumped to the nodes along them.
    mirror_lines : tuple of float
        x-coordinates of vertical mirror (symmetry) lines on the domain's edge.
        Nodes on them are held horizontally (free horizontal reaction). [m]
    compression_material : Material, optional
        Material of the compression elements.
    copies : float
        How many copies of the modelled part the reported structure holds
        (2 for a half model reported as the whole). Volume and weight are
        multiplied by it. [-]
    name : str
        Label for reports.
    """

    domain: Domain
    spacing: float
    material: Material
    supports: tuple[Support, ...] = ()
    loads: tuple[PointLoad, ...] = ()
    line_loads: tuple[LineLoad, ...] = ()
    mirror_lines: tuple[float, ...] = ()
    compression_material: Material | None = None
    copies: float = 1.0
    name: str = "layout problem"

    def __post_init__(self) -> None:
        for name in ("supports", "loads", "line_loads", "mirror_lines"):
            object.__setattr__(self, name, tuple(getattr(self, name)))
        x0, x1, z0, z1 = self.domain.bounds
        extent = max(x1 - x0, z1 - z0)
        if not (isinstance(self.spacing, (int, float)) and math.isfinite(self.spacing)
                and 0 < self.spacing <= extent):
            raise InputError("domain.spacing", self.spacing, f"a number in (0, {extent:g}] m")
        n_cells = math.ceil((x1 - x0) / self.spacing) * math.ceil((z1 - z0) / self.spacing)
        if n_cells > MAX_CELLS:
            least = math.sqrt((x1 - x0) * (z1 - z0) / MAX_CELLS)
            raise InputError("domain.spacing", self.spacing,
                             f">= {least:.4g} m here (at most {MAX_CELLS} grid cells)")
        if not (math.isfinite(self.copies) and self.copies > 0):
            raise InputError("copies", self.copies, "a number > 0")
        if not self.supports and not self.mirror_lines:
            raise InputError("support", [], "at least one support")
        if not self.loads and not self.line_loads:
            raise InputError("load", [], "at least one point load or line load")
        for i, m in enumerate(self.mirror_lines):
            if not (x0 - 1e-9 * extent <= m <= x1 + 1e-9 * extent):
                raise InputError(f"symmetry[{i}].x", m, f"a line on the domain, x in [{x0:g}, {x1:g}] m")

    @property
    def compression(self) -> Material:
        """Material of the compression elements."""
        return self.compression_material or self.material

    @property
    def weightless(self) -> bool:
        return self.material.weightless and self.compression.weightless

    def k(self, sense: str) -> float:
        """Self-weight parameter rho*g/sigma of the elements of ``sense``. [1/m]

        Parameters
        ----------
        sense : {"tension", "compression"}
            Tension elements use ``material``, compression elements ``compression``.
        """
        mat = self.material if sense == "tension" else self.compression
        return mat.k(sense)

    def strength(self, sense: str) -> float:
        """Design stress of the elements of ``sense``. [Pa]

        Parameters
        ----------
        sense : {"tension", "compression"}
            The tension stress of ``material``, or the compression stress of ``compression``.
        """
        return (self.material.tension_strength if sense == "tension"
                else self.compression.compression_strength)

    def density(self, sense: str) -> float:
        """Density of the elements of ``sense``. [kg/m3]

        Parameters
        ----------
        sense : {"tension", "compression"}
            Picks ``material`` (tension) or ``compression`` (compression elements).
        """
        return (self.material if sense == "tension" else self.compression).density

    def total_applied_load(self) -> float:
        """Sum of the magnitudes of the applied loads (not self-weight). [N]"""
        total = sum(math.hypot(*p.force) for p in self.loads)
        total += sum(abs(q.intensity) * (q.end[0] - q.start[0]) for q in self.line_loads)
        return float(total)

    def grid_shape(self) -> tuple[int, int]:
        """Number of cells (nx, nz) of the grid over the bounding box."""
        x0, x1, z0, z1 = self.domain.bounds
        nx = max(1, round((x1 - x0) / self.spacing))
        nz = max(1, round((z1 - z0) / self.spacing))
        return nx, nz

