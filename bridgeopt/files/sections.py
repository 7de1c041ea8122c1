"""The tables of a scenario file read into model inputs, and written back.

``[material]`` / ``[compression_material]``, ``[domain]`` (with
``[[domain.excluded]]``), ``[[support]]``, ``[[load]]``, ``[[line_load]]``,
``[[symmetry]]``, the layout problem they make, and the ``[bridge]`` table.
Each check raises :class:`~bridgeopt.errors.InputError` naming the key, the
value and the valid range (see :mod:`bridgeopt.files.fields`).  Supports,
loads, line loads and mirror lines are checked against the grid as they are
read, so that a point off the grid is reported before any solve; nothing here
solves.

Units are SI: m, N, N/m, Pa, kg/m3.
"""

from __future__ import annotations

from typing import Callable, Mapping

from bridgeopt.errors import InputError
from bridgeopt.files.fields import (KEYS, MISSING, check_keys, entries, number, point,
                                    polygon, renamed, required, short, string, table, tables)
from bridgeopt.model.loads import LoadCase
from bridgeopt.model.materials import PRESETS, Material
from bridgeopt.model.problem import Domain, LineLoad, PointLoad, Problem, Support
from bridgeopt.solver.ground import build_grid
from bridgeopt.solver.lumping import nodal_loads, restrained_rows

__all__ = ["parse_material", "parse_materials", "parse_domain", "parse_support",
           "parse_point_load", "parse_line_load", "parse_symmetry", "check_on_grid",
           "parse_layout"]

_FIXES = ("x", "z", "xz")


def parse_material(raw: object, label: str, *, for_compression: bool = False,
                   allow_single: bool = False) -> Material:
    """Material from a ``[material]`` / ``[compression_material]`` table.

    Parameters
    ----------
    raw : object
        The table read (strengths [Pa], density [kg/m3], or a preset).
    label : str
        Its key, ``"material"`` or ``"compression_material"``.
    for_compression : bool
        The table of compression elements: only its compression strength is required.
    allow_single : bool
        The compression strength of ``[material]`` may be left out because a
        ``[compression_material]`` table provides it.

    Returns
    -------
    Material
        Strengths [Pa], density [kg/m3].
    """
    raw = table(label, raw, f"a table [{label}] with keys " + ", ".join(KEYS["material"]))
    check_keys(raw, "material", label, f"[{label}]")
    base = None
    if "preset" in raw:
        preset = raw["preset"]
        if not isinstance(preset, str) or preset not in PRESETS:
            raise InputError(f"{label}.preset", short(preset),
                             "one of " + ", ".join(map(repr, PRESETS)))
        base = PRESETS[preset]
    name = string(f"{label}.name", raw["name"]) if "name" in raw else (
        base.name if base else "custom")
    pa = "a number > 0 Pa"

    def positive(v):
        return v > 0

    ts = cs = None
    if "strength" in raw:
        for other in ("tension_strength", "compression_strength"):
            if other in raw:
                raise InputError(f"{label}.{other}", short(raw[other]),
                                 f"left out when {label}.strength is given (strength sets both "
                                 "tension and compression design stress)")
        ts = cs = number(f"{label}.strength", raw["strength"], pa, positive)
    else:
        if "tension_strength" in raw:
            ts = number(f"{label}.tension_strength", raw["tension_strength"], pa, positive)
        if "compression_strength" in raw:
            cs = number(f"{label}.compression_strength", raw["compression_strength"], pa,
                        positive)
        if base is not None:
            ts = base.tension_strength if ts is None else ts
            cs = base.compression_strength if cs is None else cs
        if for_compression:
            if cs is None:
                raise InputError(f"{label}.compression_strength", MISSING,
                                 f"{pa} (required: give strength, compression_strength "
                                 "or a preset)")
            ts = cs if ts is None else ts  # unused for compression elements
        else:
            if ts is None:
                raise InputError(f"{label}.tension_strength", MISSING,
                                 f"{pa} (required: give strength, tension_strength and "
                                 "compression_strength, or a preset)")
            if cs is None:
                if not allow_single:
                    raise InputError(f"{label}.compression_strength", MISSING,
                                     f"{pa} (required with tension_strength, unless "
                                     "[compression_material] is given)")
                cs = ts  # unused: [compression_material] is used for compression
    if "density" in raw:
        density = number(f"{label}.density", raw["density"],
                         "a number >= 0 kg/m3 (0 = weightless)", lambda v: v >= 0)
    elif base is not None:
        density = base.density
    else:
        raise InputError(f"{label}.density", MISSING,
                         "a number >= 0 kg/m3 (required; 0 = weightless)")
    return Material(name, ts, cs, density)


def parse_materials(data: Mapping) -> tuple[Material, Material | None]:
    """``[material]`` and the optional ``[compression_material]`` of a file.

    Parameters
    ----------
    data : mapping
        The whole file.

    Returns
    -------
    material : Material
        The ``[material]`` table (strengths [Pa], density [kg/m3]).
    compression_material : Material or None
        The ``[compression_material]`` table, or None without one.
    """
    if "material" not in data:
        raise InputError("material", MISSING, "a [material] table (strength and density, "
                         "or a preset)")
    comp = None
    if "compression_material" in data:
        comp = parse_material(data["compression_material"], "compression_material",
                              for_compression=True)
    mat = parse_material(data["material"], "material", allow_single=comp is not None)
    return mat, comp


def parse_domain(raw: object) -> tuple[Domain, float]:
    """The ``[domain]`` table: the design domain and the grid spacing [m].

    Parameters
    ----------
    raw : object
        The table read (``x`` and ``z`` or ``outline``, ``spacing``, ``[[domain.excluded]]``). [m]

    Returns
    -------
    domain : Domain
        The design domain (outline and excluded zones). [m]
    spacing : float
        The grid spacing. [m]
    """
    raw = table("domain", raw, "a table [domain] with keys " + ", ".join(KEYS["domain"]))
    check_keys(raw, "domain", "domain", "[domain]")
    zones = []
    for i, zone in enumerate(tables("domain.excluded", raw.get("excluded"))):
        check_keys(zone, "domain.excluded", f"domain.excluded[{i}]", "[[domain.excluded]]")
        if "outline" not in zone:
            raise InputError(f"domain.excluded[{i}].outline", MISSING,
                             "a list of at least 3 points [[x, z], ...] in m (required)")
        zones.append(polygon(f"domain.excluded[{i}].outline", zone["outline"]))
    if "outline" in raw:
        for key in ("x", "z"):
            if key in raw:
                raise InputError(f"domain.{key}", short(raw[key]),
                                 "left out when domain.outline is given (give either outline "
                                 "or x and z)")
        outline = polygon("domain.outline", raw["outline"])
        make = lambda: Domain(outline, tuple(zones))  # noqa: E731
    else:
        for key in ("x", "z"):
            if key not in raw:
                raise InputError(f"domain.{key}", MISSING,
                                 f"a pair [{key}0, {key}1] in m with {key}1 > {key}0 "
                                 "(required unless domain.outline is given)")
        x = point("domain.x", raw["x"], "a pair [x0, x1] of numbers in m with x1 > x0")
        z = point("domain.z", raw["z"], "a pair [z0, z1] of numbers in m with z1 > z0")
        make = lambda: Domain.rectangle(x, z, tuple(zones))  # noqa: E731
    try:
        domain = make()
    except InputError as err:
        raise renamed(err, "excluded", "domain.excluded") from None
    if "spacing" not in raw:
        raise InputError("domain.spacing", MISSING, "a number > 0 m (required)")
    spacing = number("domain.spacing", raw["spacing"], "a number > 0 m", lambda v: v > 0)
    return domain, spacing


def parse_support(where: str, raw: Mapping) -> Support:
    """A ``[[support]]`` entry (point [m], restrained directions).

    Parameters
    ----------
    where : str
        Dotted key of the entry, ``"support[0]"``.
    raw : mapping
        The entry read: ``at`` and ``fix``.

    Returns
    -------
    Support
        The point [m] and its restrained directions (``"x"``, ``"z"`` or ``"xz"``).
    """
    at = point(f"{where}.at", required(where, raw, "at", "a pair [x, z] in m"))
    fix = raw.get("fix", "xz")
    if fix not in _FIXES:
        raise InputError(f"{where}.fix", short(fix),
                         "one of 'x', 'z', 'xz' (restrained directions)")
    return Support(at, fix)


def parse_point_load(where: str, raw: Mapping) -> PointLoad:
    """A ``[[load]]`` entry (point [m], force [N]).

    Parameters
    ----------
    where : str
        Dotted key of the entry, ``"load[0]"``.
    raw : mapping
        The entry read: ``at`` and ``force``.

    Returns
    -------
    PointLoad
        The point [m] and the force (fx, fz) [N].
    """
    at = point(f"{where}.at", required(where, raw, "at", "a pair [x, z] in m"))
    valid = "a pair [fx, fz] of numbers in N, not both 0 (z upwards: gravity has fz < 0)"
    force = point(f"{where}.force", required(where, raw, "force", valid), valid)
    if force == (0.0, 0.0):
        raise InputError(f"{where}.force", list(force), valid)
    return PointLoad(at, force)


def parse_line_load(where: str, raw: Mapping) -> LineLoad:
    """A ``[[line_load]]`` entry (ends [m], intensity [N/m]).

    Parameters
    ----------
    where : str
        Dotted key of the entry, ``"line_load[0]"``.
    raw : mapping
        The entry read: ``from``, ``to`` and ``intensity``.

    Returns
    -------
    LineLoad
        The ends [m] and the intensity [N/m] (positive downwards).
    """
    start = point(f"{where}.from", required(where, raw, "from", "a pair [x, z] in m"))
    end = point(f"{where}.to", required(where, raw, "to", "a pair [x, z] in m"))
    valid = "a number != 0 in N/m (positive downwards)"
    q = number(f"{where}.intensity", required(where, raw, "intensity", valid), valid,
               lambda v: v != 0)
    return LineLoad(start, end, q)


def parse_symmetry(where: str, raw: Mapping) -> float:
    """A ``[[symmetry]]`` entry: the mirror line's x [m].

    Parameters
    ----------
    where : str
        Dotted key of the entry, ``"symmetry[0]"``.
    raw : mapping
        The entry read: ``x``.

    Returns
    -------
    float
        The mirror line's x-coordinate. [m]
    """
    return number(f"{where}.x", required(where, raw, "x", "a number in m"), "a number in m")


def check_on_grid(problem: Problem) -> None:
    """Supports, loads, line loads and mirror lines must lie on grid nodes.

    Parameters
    ----------
    problem : Problem
        The layout problem read.
    """
    grid = build_grid(problem)
    restrained_rows(problem, grid)  # supports on nodes
    nodal_loads(problem, grid)      # point and line loads on nodes
    x0, x1 = problem.domain.bounds[:2]
    tol = 1e-6 * max(grid.step)
    for i, m in enumerate(problem.mirror_lines):
        if not (abs(m - x0) <= tol or abs(m - x1) <= tol):
            raise InputError(f"symmetry[{i}].x", m,
                             f"the left or right edge of the domain, x = {x0:g} or {x1:g} m "
                             "(the modelled part lies on one side of a mirror line)")
        if not (abs(grid.xz[:, 0] - m) <= tol).any():
            raise InputError(f"symmetry[{i}].x", m, "a line through grid nodes of the domain")


def parse_layout(data: Mapping, name: str, *,
                 first_case: Callable[[], LoadCase] | None = None) -> Problem:
    """The layout problem of a file with a ``[domain]`` table, checked against its grid.

    Parameters
    ----------
    data : mapping
        The whole file.
    name : str
        The problem's name.
    first_case : callable, optional
        The file's first ``[[load_case]]``, read when the file has no permanent loads
        (its loads then place the problem's loads; see
        :class:`~bridgeopt.files.scenario.Scenario`).

    Returns
    -------
    Problem
        The checked layout problem (lengths [m], forces [N], intensities [N/m]).
    """
    check_keys(data, "layout", "", "a layout scenario file")
    if "domain" not in data:
        raise InputError("domain", MISSING, "a [domain] table")
    domain, spacing = parse_domain(data["domain"])
    material, comp = parse_materials(data)
    copies = 1.0
    if "copies" in data:
        copies = number("copies", data["copies"],
                        "a number > 0 (copies of the modelled part in the reported structure)",
                        lambda v: v > 0)
    loads = entries(data, "load", parse_point_load)
    line_loads = entries(data, "line_load", parse_line_load)
    if not loads and not line_loads and "load_case" in data and first_case is not None:
        # no permanent loads: the first case's loads place the problem's loads (see Scenario)
        first = first_case()
        loads, line_loads = first.loads, first.line_loads
    problem = Problem(
        domain=domain, spacing=spacing, material=material,
        supports=entries(data, "support", parse_support),
        loads=loads, line_loads=line_loads,
        mirror_lines=entries(data, "symmetry", parse_symmetry),
        compression_material=comp, copies=copies, name=name)
    check_on_grid(problem)
    return problem
