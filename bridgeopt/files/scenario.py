"""Scenario files: TOML -> a checked :class:`Scenario` -> a :class:`~bridgeopt.solver.design.Design`.

A scenario file describes either

* a **layout problem** (``[domain]``, ``[material]``, ``[[support]]``,
  ``[[load]]``, ``[[line_load]]``, ``[[symmetry]]`` ...), which becomes a
  :class:`~bridgeopt.model.problem.Problem`; or
* a **bridge problem** (``[bridge]`` and ``[material]``), which becomes a
  :class:`~bridgeopt.model.bridge.BridgeScenario` (its problem is
  ``BridgeScenario.to_problem()``, reported per whole span),

plus ``[solve]`` options.  Every key, unit, default and valid range is listed
in ``docs/scenario.md``.

Checking is strict: an unknown key anywhere, a value of the wrong type or out
of range raises :class:`~bridgeopt.errors.InputError` whose one-line message
names the key (dotted, with the index of an array-of-tables entry, e.g.
``support[1].fix``), the value and the valid range.  Supports, loads, line
loads and mirror lines are also checked against the grid when the file is
read, so a point that misses a grid node is reported before any solve.

Units are SI: m, N, N/m, Pa, kg/m3.
"""

from __future__ import annotations

import difflib
import math
import numbers
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any, Mapping

from bridgeopt.model.bridge import ARRANGEMENTS, BridgeScenario
from bridgeopt.solver.design import Design
from bridgeopt.errors import InputError
from bridgeopt.forms.build import build_form
from bridgeopt.forms.specs import FormSpec, parse_form
from bridgeopt.files.io import read_toml
from bridgeopt.geometry.optimize import optimize_geometry
from bridgeopt.solver.ground import build_grid
from bridgeopt.solver.layout import nodal_loads, optimize_layout, restrained_rows
from bridgeopt.model.materials import PRESETS, Material
from bridgeopt.model.plane import crossing_edges, polygon_area
from bridgeopt.model.problem import MAX_CELLS, Domain, LineLoad, PointLoad, Problem, Support

__all__ = ["SolveOptions", "Scenario", "load_scenario", "parse_scenario", "solve_scenario",
           "KEYS"]

#: Valid keys of every table, in the order the documentation lists them.
KEYS: dict[str, tuple[str, ...]] = {
    "layout": ("name", "description", "copies", "domain", "material", "compression_material",
               "support", "load", "line_load", "symmetry", "solve", "load_case", "cost"),
    "bridge-file": ("name", "description", "bridge", "material", "compression_material",
                    "form", "solve", "load_case", "cost"),
    "domain": ("x", "z", "outline", "spacing", "excluded"),
    "domain.excluded": ("outline",),
    "material": ("preset", "name", "strength", "tension_strength", "compression_strength",
                 "density"),
    "support": ("at", "fix"),
    "load": ("at", "force"),
    "line_load": ("from", "to", "intensity"),
    "symmetry": ("x",),
    "bridge": ("span", "rise", "depth", "deck_load", "arrangement", "divisions", "name",
               "piers", "anchorages", "channel"),
    "bridge.channel": ("outline",),
    "solve": ("member_adding", "batch", "geometry_optimization"),
    "load_case": ("name", "pattern", "intensity", "side", "from", "to", "load", "line_load"),
    "cost": ("tension", "compression", "basis", "currency"),
}

#: Keys that are planned but not available in this version (clear message, not a typo hint).
_PLANNED: dict[str, tuple[str, ...]] = {}

#: Hints for keys that are valid elsewhere.
_HINTS = {
    "excluded": "excluded zones go in [[domain.excluded]] tables",
    "spacing": "spacing goes in the [domain] table",
    "supports": "each support is a [[support]] table",
    "loads": "each point load is a [[load]] table",
    "line_loads": "each line load is a [[line_load]] table",
    "form": "a [form] table belongs to a bridge scenario (with a [bridge] table)",
}

_FIXES = ("x", "z", "xz")
_MAX_BATCH = 10_000_000


class _Shown:
    """A value whose repr is the given text (for messages about missing or long values)."""

    def __init__(self, text: str) -> None:
        self.text = text

    def __repr__(self) -> str:
        return self.text


_MISSING = _Shown("<missing>")


def _short(value: object) -> object:
    """The value, or a short stand-in when its repr would not fit on a line."""
    if isinstance(value, dict):
        return _Shown("{...}")
    text = repr(value)
    return value if len(text) <= 80 else _Shown(text[:72] + " ...")


# ---------------------------------------------------------------- primitive checks

def _is_number(value: object) -> bool:
    return (isinstance(value, numbers.Real) and not isinstance(value, bool)
            and math.isfinite(value))


def _is_whole(value: object) -> bool:
    return isinstance(value, numbers.Integral) and not isinstance(value, bool)


def _number(field: str, value: object, valid: str, ok=lambda v: True) -> float:
    """A finite number (int or float, not bool) passing ``ok``; ``valid`` names the range."""
    if not _is_number(value) or not ok(value):
        raise InputError(field, _short(value), valid)
    return float(value)


def _string(field: str, value: object, valid: str = "a non-empty text string") -> str:
    if not isinstance(value, str) or not value.strip():
        raise InputError(field, _short(value), valid)
    return value


def _point(field: str, value: object, valid: str = "a pair [x, z] of numbers in m") \
        -> tuple[float, float]:
    if (not isinstance(value, (list, tuple)) or len(value) != 2
            or not all(_is_number(v) for v in value)):
        raise InputError(field, _short(value), valid)
    return (float(value[0]), float(value[1]))


def _polygon(field: str, value: object) -> tuple[tuple[float, float], ...]:
    valid = "a list of at least 3 points [[x, z], ...] in m forming a simple polygon"
    if not isinstance(value, (list, tuple)) or len(value) < 3:
        raise InputError(field, _short(value), valid)
    pts = tuple(_point(f"{field}[{i}]", p) for i, p in enumerate(value))
    if pts[0] == pts[-1]:
        pts = pts[:-1]  # a closed ring written out: drop the repeated first point
        if len(pts) < 3:
            raise InputError(field, _short(value), valid)
    if polygon_area(pts) == 0:
        raise InputError(field, _short(value), "a polygon of non-zero area (points in order "
                         "around the boundary, m)")
    crossing = crossing_edges(pts)
    if crossing is not None:
        i, j = crossing
        raise InputError(field, _short(value),
                         f"a simple polygon (edges {i} and {j} cross or touch; "
                         "list the points in order around the boundary)")
    return pts


def _table(field: str, value: object, what: str) -> dict:
    if not isinstance(value, Mapping):
        raise InputError(field, _short(value), what)
    return value


def _tables(field: str, value: object) -> list[dict]:
    """An array of tables ``[[field]]`` (absent -> empty)."""
    if value is None:
        return []
    if not isinstance(value, (list, tuple)) or not all(isinstance(v, Mapping) for v in value):
        raise InputError(field, _short(value),
                         f"an array of tables, written [[{field}]] once per entry")
    return value


def _check_keys(raw: Mapping, kind: str, prefix: str, label: str) -> None:
    """Raise :class:`InputError` for the first key of ``raw`` not in ``KEYS[kind]``."""
    valid = KEYS[kind]
    for key in raw:
        if key in valid:
            continue
        name = f"{prefix}.{key}" if prefix else key
        keys = ", ".join(valid)
        if key in _PLANNED.get(kind, ()):
            raise InputError(name, _short(raw[key]),
                             f"not available in this version of bridgeopt (planned); remove it. "
                             f"Keys of {label}: {keys}")
        hint = ""
        if not prefix and key in _HINTS:
            hint = f"; {_HINTS[key]}"
        else:
            close = difflib.get_close_matches(key, valid, n=1)
            if close:
                hint = f" (did you mean {close[0]!r}?)"
        raise InputError(name, _short(raw[key]), f"one of the keys of {label}: {keys}{hint}")


def _rename(err: InputError, old: str, new: str) -> InputError:
    """The same error with the field prefix ``old`` replaced by ``new``."""
    f = err.field
    if f == old or f.startswith(old + "."):
        f = new + f[len(old):]
    return InputError(f, err.value, err.valid)


# ---------------------------------------------------------------- tables

def _material(raw: object, label: str, *, for_compression: bool = False,
              allow_single: bool = False) -> Material:
    """Material from a ``[material]`` / ``[compression_material]`` table.

    ``allow_single``: the compression strength of ``[material]`` may be left out
    because a ``[compression_material]`` table provides it.
    """
    raw = _table(label, raw, f"a table [{label}] with keys " + ", ".join(KEYS["material"]))
    _check_keys(raw, "material", label, f"[{label}]")
    base = None
    if "preset" in raw:
        preset = raw["preset"]
        if not isinstance(preset, str) or preset not in PRESETS:
            raise InputError(f"{label}.preset", _short(preset),
                             "one of " + ", ".join(map(repr, PRESETS)))
        base = PRESETS[preset]
    name = _string(f"{label}.name", raw["name"]) if "name" in raw else (
        base.name if base else "custom")
    pa = "a number > 0 Pa"
    positive = (lambda v: v > 0)
    ts = cs = None
    if "strength" in raw:
        for other in ("tension_strength", "compression_strength"):
            if other in raw:
                raise InputError(f"{label}.{other}", _short(raw[other]),
                                 f"left out when {label}.strength is given (strength sets both "
                                 "tension and compression design stress)")
        ts = cs = _number(f"{label}.strength", raw["strength"], pa, positive)
    else:
        if "tension_strength" in raw:
            ts = _number(f"{label}.tension_strength", raw["tension_strength"], pa, positive)
        if "compression_strength" in raw:
            cs = _number(f"{label}.compression_strength", raw["compression_strength"], pa,
                         positive)
        if base is not None:
            ts = base.tension_strength if ts is None else ts
            cs = base.compression_strength if cs is None else cs
        if for_compression:
            if cs is None:
                raise InputError(f"{label}.compression_strength", _MISSING,
                                 f"{pa} (required: give strength, compression_strength "
                                 "or a preset)")
            ts = cs if ts is None else ts  # unused for compression elements
        else:
            if ts is None:
                raise InputError(f"{label}.tension_strength", _MISSING,
                                 f"{pa} (required: give strength, tension_strength and "
                                 "compression_strength, or a preset)")
            if cs is None:
                if not allow_single:
                    raise InputError(f"{label}.compression_strength", _MISSING,
                                     f"{pa} (required with tension_strength, unless "
                                     "[compression_material] is given)")
                cs = ts  # unused: [compression_material] is used for compression
    if "density" in raw:
        density = _number(f"{label}.density", raw["density"],
                          "a number >= 0 kg/m3 (0 = weightless)", lambda v: v >= 0)
    elif base is not None:
        density = base.density
    else:
        raise InputError(f"{label}.density", _MISSING,
                         "a number >= 0 kg/m3 (required; 0 = weightless)")
    return Material(name, ts, cs, density)


def _materials(data: Mapping) -> tuple[Material, Material | None]:
    if "material" not in data:
        raise InputError("material", _MISSING, "a [material] table (strength and density, "
                         "or a preset)")
    comp = None
    if "compression_material" in data:
        comp = _material(data["compression_material"], "compression_material",
                         for_compression=True)
    mat = _material(data["material"], "material", allow_single=comp is not None)
    return mat, comp


def _solve_options(data: Mapping) -> "SolveOptions":
    raw = _table("solve", data.get("solve", {}), "a table [solve] with keys "
                 + ", ".join(KEYS["solve"]))
    _check_keys(raw, "solve", "solve", "[solve]")
    member_adding = raw.get("member_adding", True)
    if not isinstance(member_adding, bool):
        raise InputError("solve.member_adding", _short(member_adding), "true or false")
    batch = raw.get("batch")
    if batch is not None and (not _is_whole(batch) or not 1 <= batch <= _MAX_BATCH):
        raise InputError("solve.batch", _short(batch),
                         f"a whole number from 1 to {_MAX_BATCH} (members added per round)")
    geometry = raw.get("geometry_optimization", False)
    if not isinstance(geometry, bool):
        raise InputError("solve.geometry_optimization", _short(geometry), "true or false")
    return SolveOptions(member_adding=member_adding, batch=None if batch is None else int(batch),
                        geometry_optimization=geometry)


def _name(data: Mapping, default: str) -> str:
    return _string("name", data["name"]) if "name" in data else default


def _description(data: Mapping) -> str:
    if "description" not in data:
        return ""
    value = data["description"]
    if not isinstance(value, str):
        raise InputError("description", _short(value), "a text string")
    return value


def _domain(raw: object) -> tuple[Domain, float]:
    raw = _table("domain", raw, "a table [domain] with keys " + ", ".join(KEYS["domain"]))
    _check_keys(raw, "domain", "domain", "[domain]")
    zones = []
    for i, zone in enumerate(_tables("domain.excluded", raw.get("excluded"))):
        _check_keys(zone, "domain.excluded", f"domain.excluded[{i}]", "[[domain.excluded]]")
        if "outline" not in zone:
            raise InputError(f"domain.excluded[{i}].outline", _MISSING,
                             "a list of at least 3 points [[x, z], ...] in m (required)")
        zones.append(_polygon(f"domain.excluded[{i}].outline", zone["outline"]))
    if "outline" in raw:
        for key in ("x", "z"):
            if key in raw:
                raise InputError(f"domain.{key}", _short(raw[key]),
                                 "left out when domain.outline is given (give either outline "
                                 "or x and z)")
        outline = _polygon("domain.outline", raw["outline"])
        make = lambda: Domain(outline, tuple(zones))  # noqa: E731
    else:
        for key in ("x", "z"):
            if key not in raw:
                raise InputError(f"domain.{key}", _MISSING,
                                 f"a pair [{key}0, {key}1] in m with {key}1 > {key}0 "
                                 "(required unless domain.outline is given)")
        x = _point("domain.x", raw["x"], "a pair [x0, x1] of numbers in m with x1 > x0")
        z = _point("domain.z", raw["z"], "a pair [z0, z1] of numbers in m with z1 > z0")
        make = lambda: Domain.rectangle(x, z, tuple(zones))  # noqa: E731
    try:
        domain = make()
    except InputError as err:
        raise _rename(err, "excluded", "domain.excluded") from None
    if "spacing" not in raw:
        raise InputError("domain.spacing", _MISSING, "a number > 0 m (required)")
    spacing = _number("domain.spacing", raw["spacing"], "a number > 0 m", lambda v: v > 0)
    return domain, spacing


def _entries(data: Mapping, key: str, build) -> tuple:
    out = []
    for i, raw in enumerate(_tables(key, data.get(key))):
        _check_keys(raw, key, f"{key}[{i}]", f"[[{key}]]")
        try:
            out.append(build(f"{key}[{i}]", raw))
        except InputError as err:
            raise _rename(err, key, f"{key}[{i}]") from None
    return tuple(out)


def _required(where: str, raw: Mapping, key: str, valid: str) -> object:
    if key not in raw:
        raise InputError(f"{where}.{key}", _MISSING, f"{valid} (required)")
    return raw[key]


def _support(where: str, raw: Mapping) -> Support:
    at = _point(f"{where}.at", _required(where, raw, "at", "a pair [x, z] in m"))
    fix = raw.get("fix", "xz")
    if fix not in _FIXES:
        raise InputError(f"{where}.fix", _short(fix),
                         "one of 'x', 'z', 'xz' (restrained directions)")
    return Support(at, fix)


def _load(where: str, raw: Mapping) -> PointLoad:
    at = _point(f"{where}.at", _required(where, raw, "at", "a pair [x, z] in m"))
    valid = "a pair [fx, fz] of numbers in N, not both 0 (z upwards: gravity has fz < 0)"
    force = _point(f"{where}.force", _required(where, raw, "force", valid), valid)
    if force == (0.0, 0.0):
        raise InputError(f"{where}.force", list(force), valid)
    return PointLoad(at, force)


def _line_load(where: str, raw: Mapping) -> LineLoad:
    start = _point(f"{where}.from", _required(where, raw, "from", "a pair [x, z] in m"))
    end = _point(f"{where}.to", _required(where, raw, "to", "a pair [x, z] in m"))
    valid = "a number != 0 in N/m (positive downwards)"
    q = _number(f"{where}.intensity", _required(where, raw, "intensity", valid), valid,
                lambda v: v != 0)
    return LineLoad(start, end, q)


def _symmetry(where: str, raw: Mapping) -> float:
    return _number(f"{where}.x", _required(where, raw, "x", "a number in m"), "a number in m")


def _check_on_grid(problem: Problem) -> None:
    """Supports, loads, line loads and mirror lines must lie on grid nodes."""
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


def _layout(data: Mapping, name: str) -> Problem:
    _check_keys(data, "layout", "", "a layout scenario file")
    if "domain" not in data:
        raise InputError("domain", _MISSING, "a [domain] table")
    domain, spacing = _domain(data["domain"])
    material, comp = _materials(data)
    copies = 1.0
    if "copies" in data:
        copies = _number("copies", data["copies"],
                         "a number > 0 (copies of the modelled part in the reported structure)",
                         lambda v: v > 0)
    loads = _entries(data, "load", _load)
    line_loads = _entries(data, "line_load", _line_load)
    if not loads and not line_loads and "load_case" in data:
        # no permanent loads: the first case's loads place the problem's loads (see Scenario)
        from bridgeopt.files.casefile import layout_cases

        first = layout_cases(data)[0]
        loads, line_loads = first.loads, first.line_loads
    problem = Problem(
        domain=domain, spacing=spacing, material=material,
        supports=_entries(data, "support", _support),
        loads=loads, line_loads=line_loads,
        mirror_lines=_entries(data, "symmetry", _symmetry),
        compression_material=comp, copies=copies, name=name)
    _check_on_grid(problem)
    return problem


def _largest_divisions(span: float, rise: float, depth: float) -> int:
    """Most even divisions for which the half-span grid stays within MAX_CELLS."""
    best = 0
    for d in range(2, 241, 2):
        s = span / d
        cells = (d // 2) * max(1, math.floor(rise / s + 1e-9) + math.floor(depth / s + 1e-9))
        if cells <= MAX_CELLS:
            best = d
    return best


def _bridge(data: Mapping, name: str) -> BridgeScenario:
    _check_keys(data, "bridge-file", "", "a bridge scenario file")
    raw = _table("bridge", data["bridge"], "a table [bridge] with keys "
                 + ", ".join(KEYS["bridge"]))
    _check_keys(raw, "bridge", "bridge", "[bridge]")
    if "name" in raw:
        inner = _string("bridge.name", raw["name"])
        if "name" in data and data["name"] != inner:
            raise InputError("bridge.name", inner, f"left out, or the same as the top-level "
                             f"name {data['name']!r}")
        name = inner
    span = _number("bridge.span", _required("bridge", raw, "span", "a number > 0 m"),
                   "a number > 0 m", lambda v: v > 0)
    rise = _number("bridge.rise", _required("bridge", raw, "rise", "a number >= 0 m"),
                   "a number >= 0 m", lambda v: v >= 0)
    depth = _number("bridge.depth", _required("bridge", raw, "depth", "a number >= 0 m"),
                    "a number >= 0 m", lambda v: v >= 0)
    deck_load = _number("bridge.deck_load",
                        _required("bridge", raw, "deck_load", "a number > 0 N/m"),
                        "a number > 0 N/m (downwards)", lambda v: v > 0)
    arrangement = raw.get("arrangement", "repeating")
    if arrangement not in ARRANGEMENTS:
        raise InputError("bridge.arrangement", _short(arrangement),
                         "one of " + ", ".join(map(repr, ARRANGEMENTS)))
    divisions = raw.get("divisions", 30)
    if not _is_whole(divisions) or divisions < 2 or divisions > 240 or divisions % 2:
        raise InputError("bridge.divisions", _short(divisions),
                         "an even whole number from 2 to 240")
    divisions = int(divisions)
    material, comp = _materials(data)
    bridge = BridgeScenario(span=span, rise=rise, depth=depth, deck_load=deck_load,
                            material=material, arrangement=arrangement, divisions=divisions,
                            name=name, compression_material=comp)
    try:
        bridge.to_problem()
    except InputError as err:
        if err.field != "domain.spacing":
            raise
        most = _largest_divisions(span, rise, depth)
        if most < 2:
            raise InputError("bridge.rise", rise, f"a smaller rise + depth for this span (the "
                             f"half-span grid would exceed {MAX_CELLS} cells)") from None
        raise InputError("bridge.divisions", divisions,
                         f"an even whole number from 2 to {most} for this span, rise and depth "
                         f"(at most {MAX_CELLS} grid cells in the half-span model)") from None
    return bridge


# ---------------------------------------------------------------- public API

@dataclass(frozen=True)
class SolveOptions:
    """How a scenario is solved (the ``[solve]`` table).

    Attributes
    ----------
    member_adding : bool
        Member adding (default) or the full ground structure in one LP; same optimum.
    batch : int, optional
        Most members added per member-adding round (default: the solver's choice).
    geometry_optimization : bool
        Move, merge and prune the nodes of the layout afterwards
        (:func:`~bridgeopt.geometry.optimize.optimize_geometry`).
    """

    member_adding: bool = True
    batch: int | None = None
    geometry_optimization: bool = False


@dataclass(frozen=True)
class Scenario:
    """A checked scenario: a layout :class:`Problem` or a :class:`BridgeScenario`, and solve options.

    Exactly one of ``layout`` and ``bridge`` is set.  :attr:`problem` is the
    layout problem to solve in either case.

    Attributes
    ----------
    name : str
    layout : Problem or None
    bridge : BridgeScenario or None
    solve : SolveOptions
    description : str
    source : str
        Where the scenario came from (file path), for messages; not compared.
    form : FormSpec, optional
        The bridge form to set against the reference (the ``[form]`` table).
    """

    name: str
    layout: Problem | None = None
    bridge: BridgeScenario | None = None
    solve: SolveOptions = SolveOptions()
    description: str = ""
    source: str = field(default="<dict>", compare=False)
    form: FormSpec | None = None
    cases: tuple = ()
    costs: object = None
    permanent: bool = True
    piers: tuple = ()
    anchorages: tuple = ()
    channels: tuple = ()
    problem: Problem = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        if (self.layout is None) == (self.bridge is None):
            raise ValueError("a Scenario holds exactly one of layout and bridge")
        if self.layout is not None:
            problem = self.layout
        elif self.full_span:
            from bridgeopt.model.crossing import full_span_problem

            problem = full_span_problem(self.bridge, piers=self.piers,
                                        anchorages=self.anchorages, channels=self.channels)
        else:
            problem = self.bridge.to_problem()
        object.__setattr__(self, "problem", problem)

    @property
    def full_span(self) -> bool:
        """A bridge modelled over the whole span (load cases, piers, anchorages or channels)."""
        return self.bridge is not None and bool(self.cases or self.piers or self.anchorages
                                                or self.channels)

    @property
    def study(self):
        """The :class:`~bridgeopt.model.loads.CaseStudy` of a file with ``[[load_case]]`` or
        ``[cost]`` (a cost alone: one case, the permanent loads); None otherwise."""
        if not self.cases and self.costs is None:
            return None
        from bridgeopt.model.loads import CaseStudy, LoadCase

        cases = self.cases or (LoadCase("permanent"),)
        return CaseStudy(self.problem, cases, self.costs, self.permanent)

    @property
    def kind(self) -> str:
        """``"layout"`` or ``"bridge"``."""
        return "layout" if self.layout is not None else "bridge"

    def with_solve(self, **changes) -> "Scenario":
        """A copy with some solve options changed (``member_adding=False`` ...)."""
        return replace(self, solve=replace(self.solve, **changes))

    def to_dict(self) -> dict:
        """The scenario as a dict in the file's schema (``parse_scenario`` reads it back).

        All values are plain Python (str, float, bool, int, lists, dicts), ready for JSON.
        """
        out: dict[str, Any] = {"name": self.name}
        if self.description:
            out["description"] = self.description
        if self.bridge is not None:
            b = self.bridge
            out["bridge"] = {"span": b.span, "rise": b.rise, "depth": b.depth,
                             "deck_load": b.deck_load, "arrangement": b.arrangement,
                             "divisions": b.divisions}
            out["material"] = _material_dict(b.material)
            if b.compression_material is not None:
                out["compression_material"] = _material_dict(b.compression_material)
            if self.form is not None:
                out["form"] = self.form.to_dict()
        else:
            out.update(_problem_dict(self.layout))
            if not self.permanent:
                out.pop("load", None)
                out.pop("line_load", None)
        if self.bridge is not None and (self.piers or self.anchorages or self.channels):
            out["bridge"].update(piers=list(self.piers),
                                 anchorages=[list(p) for p in self.anchorages])
            if self.channels:
                out["bridge"]["channel"] = [{"outline": [list(pt) for pt in c]}
                                            for c in self.channels]
        if self.cases or self.costs is not None:
            from bridgeopt.files.casefile import cases_dict, cost_dict

            if self.cases:
                out["load_case"] = cases_dict(self.cases, bridge=self.bridge is not None)
            if self.costs is not None:
                out["cost"] = cost_dict(self.costs)
        solve: dict[str, Any] = {"member_adding": self.solve.member_adding}
        if self.solve.batch is not None:
            solve["batch"] = self.solve.batch
        if self.solve.geometry_optimization:
            solve["geometry_optimization"] = True
        out["solve"] = solve
        return out


def _material_dict(m: Material) -> dict:
    return {"name": m.name, "tension_strength": m.tension_strength,
            "compression_strength": m.compression_strength, "density": m.density}


def _problem_dict(p: Problem) -> dict:
    """A layout problem's keys in the file schema (without name and solve)."""
    d = p.domain
    x0, x1, z0, z1 = d.bounds
    domain: dict[str, Any] = {}
    if d.outline == ((x0, z0), (x1, z0), (x1, z1), (x0, z1)):
        domain["x"], domain["z"] = [x0, x1], [z0, z1]
    else:
        domain["outline"] = [list(pt) for pt in d.outline]
    domain["spacing"] = p.spacing
    if d.excluded:
        domain["excluded"] = [{"outline": [list(pt) for pt in zone]} for zone in d.excluded]
    out: dict[str, Any] = {"copies": p.copies, "domain": domain,
                           "material": _material_dict(p.material)}
    if p.compression_material is not None:
        out["compression_material"] = _material_dict(p.compression_material)
    if p.supports:
        out["support"] = [{"at": list(s.at), "fix": s.fix} for s in p.supports]
    if p.loads:
        out["load"] = [{"at": list(q.at), "force": list(q.force)} for q in p.loads]
    if p.line_loads:
        out["line_load"] = [{"from": list(q.start), "to": list(q.end),
                             "intensity": q.intensity} for q in p.line_loads]
    if p.mirror_lines:
        out["symmetry"] = [{"x": m} for m in p.mirror_lines]
    return out


def parse_scenario(data: Mapping, *, source: str = "<dict>") -> Scenario:
    """Check a scenario given as a dict (as :func:`tomllib.load` returns it).

    Parameters
    ----------
    data : mapping
        Tables and keys of a scenario file.
    source : str
        Label for messages (the file path).

    Raises
    ------
    InputError
        Unknown key, wrong type, value out of range, or a point off the grid.
    """
    if not isinstance(data, Mapping):
        raise InputError("scenario", _short(data), "a table of keys (a TOML document)")
    data = dict(data)
    description = _description(data)
    has_bridge, has_domain = "bridge" in data, "domain" in data
    if has_bridge and has_domain:
        raise InputError("domain", _Shown("{...}"), "left out of a bridge scenario (a file has "
                         "either a [bridge] table or a [domain] table, not both)")
    solve = _solve_options(data)
    if has_bridge:
        bridge = _bridge(data, _name(data, "bridge"))
        form = parse_form(data["form"]) if "form" in data else None
        if form is not None and form.type != "reference":
            build_form(bridge, form)  # the form must fit the domain: report it before solving
        return _with_cases(data, Scenario(name=bridge.name, bridge=bridge, solve=solve,
                                          description=description, source=source, form=form))
    if not has_domain:
        raise InputError("domain", _MISSING, "a [domain] table (layout problem) or a [bridge] "
                         "table (bridge problem)")
    problem = _layout(data, _name(data, "layout problem"))
    return _with_cases(data, Scenario(name=problem.name, layout=problem, solve=solve,
                                      description=description, source=source))


def _with_cases(data: Mapping, scenario: Scenario) -> Scenario:
    """Add ``[[load_case]]``, ``[cost]`` and a bridge's piers, anchorages and channels."""
    if not any(k in data for k in ("load_case", "cost")) and not (
            scenario.bridge is not None
            and any(k in data["bridge"] for k in ("piers", "anchorages", "channel"))):
        return scenario
    from bridgeopt.files.casefile import (bridge_cases, check_cases_on_grid, cost_table, crossing_keys,
                           layout_cases)

    if scenario.form is not None and scenario.form.type != "reference":
        key = next(k for k in ("load_case", "cost") if k in data) if any(
            k in data for k in ("load_case", "cost")) else next(
            f"bridge.{k}" for k in ("piers", "anchorages", "channel") if k in data["bridge"])
        raise InputError(key, _Shown("..."), "left out of a file with a [form] table (forms "
                         "are single-case half-span studies; load cases, costs, piers, "
                         "anchorages and channels use the whole-span reference)")
    changes: dict[str, Any] = {}
    if scenario.bridge is not None:
        piers, anch, channels = crossing_keys(data["bridge"])
        changes.update(piers=piers, anchorages=anch, channels=channels)
        if "load_case" in data:
            changes["cases"] = bridge_cases(data, scenario.bridge.span)
    elif "load_case" in data:
        changes["cases"] = layout_cases(data)
        changes["permanent"] = "load" in data or "line_load" in data
    if scenario.solve.geometry_optimization and ("load_case" in data or "cost" in data):
        raise InputError("solve.geometry_optimization", True, "false with [[load_case]] or "
                         "[cost] (geometry optimization is for single-case volume studies)")
    out = replace(scenario, **changes)
    out = replace(out, costs=cost_table(data, out.problem))
    try:
        check_cases_on_grid(out.problem, out.cases)
        if out.full_span:
            from bridgeopt.solver.layout import restrained_rows

            restrained_rows(out.problem, build_grid(out.problem))
    except InputError as err:
        if err.field.startswith("support"):
            raise InputError("bridge.anchorages", err.value, "points at grid nodes of the "
                             "domain, outside the channels") from None
        raise
    return out


def load_scenario(path: str | Path) -> Scenario:
    """Read and check the TOML scenario file at ``path``.

    Raises
    ------
    InputError
        The file cannot be read, is not valid TOML, or has a bad key or value
        (the field ``"file"`` for the first two).
    """
    path = Path(path)
    data = read_toml(path, "scenario file")
    return parse_scenario(data, source=str(path))


def solve_scenario(scenario: Scenario, *, member_adding: bool | None = None) -> Design:
    """Solve ``scenario`` with its ``[solve]`` options (``member_adding`` overrides).

    With ``geometry_optimization`` the layout is then rationalised by
    :func:`~bridgeopt.geometry.optimize.optimize_geometry`.

    A bridge's design is reported per whole span (the half-span model times two).

    A scenario with ``[[load_case]]`` or ``[cost]`` returns a
    :class:`~bridgeopt.solver.multicase.CaseDesign` from
    :func:`~bridgeopt.solver.multicase.optimize_cases` instead of a :class:`Design`.

    Raises
    ------
    SolveError
        No structure can carry the loads, or HiGHS failed.
    """
    opts = scenario.solve
    adding = opts.member_adding if member_adding is None else member_adding
    if scenario.study is not None:
        from bridgeopt.solver.multicase import optimize_cases

        return optimize_cases(scenario.study, member_adding=adding, batch=opts.batch)
    design = optimize_layout(scenario.problem, member_adding=adding, batch=opts.batch)
    if opts.geometry_optimization:
        design = optimize_geometry(design)
    return design
