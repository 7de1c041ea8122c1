"""Scenario files: TOML -> a checked :class:`Scenario` (inputs only; nothing here solves).

A scenario file describes either

* a **layout problem** (``[domain]``, ``[material]``, ``[[support]]``,
                        ``[[load]]``, ``[[line_load]]``, ``[[symmetry]]`` ...), which becomes a
  :class:`~bridgeopt.model.problem.Problem`; or
* a **bridge problem** (``[bridge]`` and ``[material]``), which becomes a
  :class:`~bridgeopt.model.bridge.BridgeScenario` (its problem is
  ``BridgeScenario.to_problem()``, reported per whole span),

plus ``[solve]`` options.  Every key, unit, default and valid range is listed
in ``docs/scenario.md``.  :func:`bridgeopt.study.solve.solve_scenario` solves a
scenario.

Checking is strict: an unknown key anywhere, a value of the wrong type or out
of range raises :class:`~bridgeopt.errors.InputError` whose one-line message
names the key (dotted, with the index of an array-of-tables entry, e.g.
``support[1].fix``), the value and the valid range (the field checks are in
:mod:`bridgeopt.files.fields`, the tables in :mod:`bridgeopt.files.sections`
and :mod:`bridgeopt.files.casefile`).  Supports, loads, line loads and mirror
lines are also checked against the grid when the file is read, and a
``[form]`` against the domain, so that a point that misses a grid node or a
form that does not fit is reported before any solve.

Units are SI: m, N, N/m, Pa, kg/m3.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any, Mapping

from bridgeopt.errors import InputError
from bridgeopt.files.casefile import (bridge_cases, cases_dict, check_cases_on_grid, cost_dict,
                                      cost_table, crossing_keys, layout_cases)
from bridgeopt.files.fields import (KEYS, MISSING, Shown, check_keys, is_whole, short, string,
                                    table)
from bridgeopt.files.io import read_toml
from bridgeopt.files.bridge_table import parse_bridge
from bridgeopt.files.scenario_dict import material_dict, problem_dict
from bridgeopt.files.sections import parse_layout
from bridgeopt.forms.build import build_form
from bridgeopt.forms.specs import FormSpec, parse_form
from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.model.crossing import full_span_problem
from bridgeopt.model.loads import CaseStudy, LoadCase
from bridgeopt.model.problem import Problem
from bridgeopt.solver.ground import build_grid
from bridgeopt.solver.lumping import restrained_rows

__all__ = ["SolveOptions", "Scenario", "load_scenario", "parse_scenario", "problem_dict",
           "material_dict", "KEYS"]

_MAX_BATCH = 10_000_000


def _solve_options(data: Mapping) -> "SolveOptions":
    raw = table("solve", data.get("solve", {}), "a table [solve] with keys "
                + ", ".join(KEYS["solve"]))
    check_keys(raw, "solve", "solve", "[solve]")
    member_adding = raw.get("member_adding", True)
    if not isinstance(member_adding, bool):
        raise InputError("solve.member_adding", short(member_adding), "true or false")
    batch = raw.get("batch")
    if batch is not None and (not is_whole(batch) or not 1 <= batch <= _MAX_BATCH):
        raise InputError("solve.batch", short(batch),
                         f"a whole number from 1 to {_MAX_BATCH} (members added per round)")
    geometry = raw.get("geometry_optimization", False)
    if not isinstance(geometry, bool):
        raise InputError("solve.geometry_optimization", short(geometry), "true or false")
    return SolveOptions(member_adding=member_adding, batch=None if batch is None else int(batch),
                        geometry_optimization=geometry)


def _name(data: Mapping, default: str) -> str:
    return string("name", data["name"]) if "name" in data else default


def _description(data: Mapping) -> str:
    if "description" not in data:
        return ""
    value = data["description"]
    if not isinstance(value, str):
        raise InputError("description", short(value), "a text string")
    return value


@dataclass(frozen=True)
class SolveOptions:
    """How a scenario is solved (the ``[solve]`` table).

    Parameters
    ----------
    member_adding : bool
        Member adding (default) or the full ground structure in one LP; same optimum.
    batch : int, optional
        Most members added per member-adding round (default: the solver's choice). [-]
    geometry_optimization : bool
        Move, merge and prune the nodes of the layout afterwards
        (:func:`~bridgeopt.geometry.optimize.optimize_geometry`).
    """

    member_adding: bool = True
    batch: int | None = None
    geometry_optimization: bool = False


@dataclass(frozen=True)
class Scenario:
    """A checked scenario: a layout :class:`Problem` or a :class:`BridgeScenario`, and options.

    Exactly one of ``layout`` and ``bridge`` is set.  :attr:`problem` is the
    layout problem to solve in either case.

    Parameters
    ----------
    name : str
        The scenario's name.
    layout : Problem or None
        The layout problem of a file with a ``[domain]`` table (lengths [m], forces [N]).
    bridge : BridgeScenario or None
        The crossing of a file with a ``[bridge]`` table (lengths [m], deck load [N/m]).
    solve : SolveOptions
        How the scenario is solved (the ``[solve]`` table).
    description : str
        Free text of the file's ``description`` key.
    source : str
        Where the scenario came from (file path), for messages; not compared.
    form : FormSpec, optional
        The bridge form to set against the reference (the ``[form]`` table).
    cases : tuple of LoadCase
        The ``[[load_case]]`` tables, on top of the permanent loads (forces [N],
        intensities [N/m]).
    costs : UnitCosts or None
        The ``[cost]`` table (prices of tension and compression members per m3; a file's
        prices per tonne are converted), or None.
    permanent : bool
        The problem's own loads are permanent loads present in every case (False for a
        layout file whose loads come only from its load cases).
    piers : tuple of float
        x-coordinates of extra foundations of a bridge modelled over the whole span. [m]
    anchorages : tuple of (float, float)
        Extra held points of a whole-span bridge. [m]
    channels : tuple of polygons
        Clearance envelopes (navigation channels) no member may pass through, each a tuple
        of (x, z) points. [m]

    Attributes
    ----------
    problem : Problem
        The layout problem to solve: ``layout``, the whole span of ``bridge``
        (:attr:`full_span`), or ``bridge.to_problem()`` (half span).
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
        cases = self.cases or (LoadCase("permanent"),)
        return CaseStudy(self.problem, cases, self.costs, self.permanent)

    @property
    def kind(self) -> str:
        """``"layout"`` or ``"bridge"``."""
        return "layout" if self.layout is not None else "bridge"

    def with_solve(self, **changes) -> "Scenario":
        """A copy with some solve options changed (``member_adding=False`` ...).

        Parameters
        ----------
        **changes
            Fields of :class:`SolveOptions` and their new values.

        Returns
        -------
        Scenario
        """
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
            if b.back_span is not None:
                out["bridge"]["back_span"] = b.back_span
            if b.foundation_depth:
                out["bridge"]["foundation_depth"] = b.foundation_depth
            out["material"] = material_dict(b.material)
            if b.compression_material is not None:
                out["compression_material"] = material_dict(b.compression_material)
            if self.form is not None:
                out["form"] = self.form.to_dict()
        else:
            out.update(problem_dict(self.layout))
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


def parse_scenario(data: Mapping, *, source: str = "<dict>") -> Scenario:
    """Check a scenario given as a dict (as :func:`tomllib.load` returns it).

    Parameters
    ----------
    data : mapping
        Tables and keys of a scenario file.
    source : str
        Label for messages (the file path).

    Returns
    -------
    Scenario
        The checked scenario.

    Raises
    ------
    InputError
        Unknown key, wrong type, value out of range, or a point off the grid.
    """
    if not isinstance(data, Mapping):
        raise InputError("scenario", short(data), "a table of keys (a TOML document)")
    data = dict(data)
    description = _description(data)
    has_bridge, has_domain = "bridge" in data, "domain" in data
    if has_bridge and has_domain:
        raise InputError("domain", Shown("{...}"), "left out of a bridge scenario (a file has "
                         "either a [bridge] table or a [domain] table, not both)")
    solve = _solve_options(data)
    if has_bridge:
        bridge = parse_bridge(data, _name(data, "bridge"))
        form = parse_form(data["form"]) if "form" in data else None
        if form is not None and form.type != "reference":
            build_form(bridge, form)  # the form must fit the domain: report it before solving
        return _with_cases(data, Scenario(name=bridge.name, bridge=bridge, solve=solve,
                                          description=description, source=source, form=form))
    if not has_domain:
        raise InputError("domain", MISSING, "a [domain] table (layout problem) or a [bridge] "
                         "table (bridge problem)")
    problem = parse_layout(data, _name(data, "layout problem"),
                           first_case=lambda: layout_cases(data)[0])
    return _with_cases(data, Scenario(name=problem.name, layout=problem, solve=solve,
                                      description=description, source=source))


def _with_cases(data: Mapping, scenario: Scenario) -> Scenario:
    """Add ``[[load_case]]``, ``[cost]`` and a bridge's piers, anchorages and channels."""
    if not any(k in data for k in ("load_case", "cost")) and not (
            scenario.bridge is not None
            and any(k in data["bridge"] for k in ("piers", "anchorages", "channel"))):
        return scenario
    if scenario.form is not None and scenario.form.type != "reference":
        key = next(k for k in ("load_case", "cost") if k in data) if any(
            k in data for k in ("load_case", "cost")) else next(
            f"bridge.{k}" for k in ("piers", "anchorages", "channel") if k in data["bridge"])
        raise InputError(key, Shown("..."), "left out of a file with a [form] table (forms "
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
            restrained_rows(out.problem, build_grid(out.problem))
    except InputError as err:
        if err.field.startswith("support"):
            raise InputError("bridge.anchorages", err.value, "points at grid nodes of the "
                             "domain, outside the channels") from None
        raise
    return out


def load_scenario(path: str | Path) -> Scenario:
    """Read and check the TOML scenario file at ``path``.

    Parameters
    ----------
    path : str or Path
        The scenario file (``.toml``).

    Returns
    -------
    Scenario
        The checked scenario, its ``source`` the path.

    Raises
    ------
    InputError
        The file cannot be read, is not valid TOML, or has a bad key or value
        (the field ``"file"`` for the first two).
    """
    path = Path(path)
    data = read_toml(path, "scenario file")
    return parse_scenario(data, source=str(path))
