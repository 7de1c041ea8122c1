"""Load cases, traffic patterns and unit costs: the inputs of a multi-case study.

A :class:`LoadCase` is one set of applied loads that the structure must carry on
its own; a :class:`CaseStudy` asks for one structure that carries every case in
turn (members sized by the worst case), priced by :class:`UnitCosts`.  The
problem's own loads are the *permanent* loads, present in every case (e.g. the
deck's own weight); each case adds its traffic.

Traffic patterns on a deck line (:func:`traffic_load`):

* ``"full"``: the whole deck;
* ``"half"``: the left half (``side="right"`` for the right half);
* ``"central"``: the middle half, from a quarter to three quarters of the deck;
* ``"user"``: from ``start`` to ``end`` (x-coordinates). [m]

An asymmetric pattern (half span, a user extent off the centre) must not be
placed on a half-span mirror model: a mirror line imposes the mirror-image load
on the other half.  Bridge studies with load cases therefore use the full-span
model (:func:`bridgeopt.model.crossing.full_span_problem`).

Sign conventions as in :mod:`bridgeopt.model.problem`: x to the right, z upwards,
line-load intensity positive downwards. [N/m]
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from bridgeopt.errors import InputError
from bridgeopt.model.problem import LineLoad, PointLoad, Problem

__all__ = ["PATTERNS", "LoadCase", "UnitCosts", "CaseStudy", "traffic_load"]

PATTERNS = ("full", "half", "central", "user")


def traffic_load(pattern: str, *, intensity: float, deck: tuple[float, float], z: float = 0.0,
                 start: float | None = None, end: float | None = None,
                 side: str = "left", field: str = "load_case.pattern") -> LineLoad:
    """A traffic line load on the deck for a named pattern.

    Parameters
    ----------
    pattern : {"full", "half", "central", "user"}
        Which part of the deck is loaded: all of it, the ``side`` half, the central
        half, or ``start`` to ``end``.
    intensity : float
        Traffic load per unit length, positive downwards. [N/m]
    deck : (float, float)
        x-coordinates of the deck's ends. [m]
    z : float
        Height of the deck line. [m]
    start, end : float, optional
        Extent of a ``"user"`` pattern. [m]
    side : {"left", "right"}
        Which half a ``"half"`` pattern loads.
    field : str
        Name of the pattern in messages.

    Returns
    -------
    LineLoad
    """
    x0, x1 = float(deck[0]), float(deck[1])
    length = x1 - x0
    if pattern == "full":
        a, b = x0, x1
    elif pattern == "half":
        if side not in ("left", "right"):
            raise InputError(field.rsplit(".", 1)[0] + ".side", side, "'left' or 'right'")
        a, b = (x0, x0 + 0.5 * length) if side == "left" else (x0 + 0.5 * length, x1)
    elif pattern == "central":
        a, b = x0 + 0.25 * length, x0 + 0.75 * length
    elif pattern == "user":
        where = field.rsplit(".", 1)[0]
        for name, v in (("from", start), ("to", end)):
            if v is None or not math.isfinite(v):
                raise InputError(f"{where}.{name}", v, f"an x-coordinate in [{x0:g}, {x1:g}] m "
                                 "(required with pattern = 'user')")
        a, b = sorted((float(start), float(end)))
        if not (x0 - 1e-9 * length <= a < b <= x1 + 1e-9 * length):
            raise InputError(f"{where}.to", end, f"an x-coordinate in [{x0:g}, {x1:g}] m, "
                             "different from 'from'")
    else:
        raise InputError(field, pattern, "one of " + ", ".join(map(repr, PATTERNS)))
    return LineLoad((a, z), (b, z), intensity)


@dataclass(frozen=True)
class LoadCase:
    """One load case: loads the structure must carry, on top of the permanent loads.

    Parameters
    ----------
    name : str
        Label for reports (unique within a study).
    loads : tuple of PointLoad
        Concentrated loads of this case, at grid nodes.
    line_loads : tuple of LineLoad
        Line loads of this case (e.g. :func:`traffic_load`).
    """

    name: str
    loads: tuple[PointLoad, ...] = ()
    line_loads: tuple[LineLoad, ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "loads", tuple(self.loads))
        object.__setattr__(self, "line_loads", tuple(self.line_loads))
        if not isinstance(self.name, str) or not self.name.strip():
            raise InputError("load_case.name", self.name, "a non-empty text string")


@dataclass(frozen=True)
class UnitCosts:
    """Unit costs of the element groups (for a cost objective).

    Parameters
    ----------
    tension : float
        Price of tension elements (``material``) per m3. [currency/m3]
    compression : float
        Price of compression elements (``compression_material``, or ``material``
        when there is none) per m3. [currency/m3]
    currency : str
        Label of the currency unit in reports.

    Notes
    -----
    With one material and equal prices a member may carry tension in one case
    and compression in another (one area).  When the prices differ, or a
    ``compression_material`` is given, every member is either a tension element
    or a compression element and a pair of nodes may hold one of each.
    """

    tension: float = 1.0
    compression: float = 1.0
    currency: str = "cost unit"

    def __post_init__(self) -> None:
        for name in ("tension", "compression"):
            v = getattr(self, name)
            if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or v <= 0:
                raise InputError(f"cost.{name}", v, "a finite number > 0 (price per m3)")

    @classmethod
    def per_tonne(cls, problem: Problem, tension: float, compression: float,
                  currency: str = "cost unit") -> "UnitCosts":
        """Prices given per tonne (1000 kg) of material, turned into prices per m3.

        Raises :class:`InputError` for a weightless material (no mass to price).
        """
        out = []
        for name, price, dens in (("tension", tension, problem.density("tension")),
                                  ("compression", compression, problem.density("compression"))):
            if dens <= 0:
                raise InputError("cost.basis", "mass", "'volume' for a weightless material "
                                 f"({name} elements have density 0)")
            out.append(price * dens / 1000.0)
        return cls(out[0], out[1], currency)


@dataclass(frozen=True)
class CaseStudy:
    """A problem with several load cases, optionally priced.

    Parameters
    ----------
    problem : Problem
        Domain, supports, materials; its loads are the permanent loads (present
        in every case) when ``permanent`` is True.
    cases : tuple of LoadCase
        At least one.
    costs : UnitCosts, optional
        Minimise cost instead of volume.
    permanent : bool
        Whether the problem's own loads act in every case (False: the cases
        hold all the loads, and the problem's loads only locate the grid).
    """

    problem: Problem
    cases: tuple[LoadCase, ...]
    costs: UnitCosts | None = None
    permanent: bool = True

    def __post_init__(self) -> None:
        object.__setattr__(self, "cases", tuple(self.cases))
        if not self.cases:
            raise InputError("load_case", [], "at least one [[load_case]]")
        names = [c.name for c in self.cases]
        for i, n in enumerate(names):
            if n in names[:i]:
                raise InputError(f"load_case[{i}].name", n, "a name not used by another case")
        for i, c in enumerate(self.cases):
            has_own = bool(c.loads or c.line_loads)
            has_perm = self.permanent and bool(self.problem.loads or self.problem.line_loads)
            if not has_own and not has_perm:
                raise InputError(f"load_case[{i}]", c.name, "a case with at least one load "
                                 "(or permanent loads in the problem)")

    def case_loads(self, i: int) -> tuple[tuple[PointLoad, ...], tuple[LineLoad, ...]]:
        """Point and line loads acting in case ``i`` (permanent loads included).

        Parameters
        ----------
        i : int
            Index into ``cases``. [-]

        Returns
        -------
        (tuple of PointLoad, tuple of LineLoad)
        """
        c = self.cases[i]
        if self.permanent:
            return self.problem.loads + c.loads, self.problem.line_loads + c.line_loads
        return c.loads, c.line_loads

    def total_load(self, i: int) -> float:
        """Sum of the magnitudes of the applied loads of case ``i``. [N]

        Parameters
        ----------
        i : int
            Position of the case in ``cases``. [-]
        """
        loads, lines = self.case_loads(i)
        total = sum(math.hypot(*p.force) for p in loads)
        total += sum(abs(q.intensity) * (q.end[0] - q.start[0]) for q in lines)
        return float(total)
