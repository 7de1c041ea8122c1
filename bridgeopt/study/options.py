"""Option studies: the reference optimum against practical bridge forms, and sweeps.

A *form* (cable-stayed, suspension, arch ...) is any function registered here
under a name::

    from bridgeopt import study
    study.register_form("suspension", solve_suspension)

with the signature ``solve(bridge: BridgeScenario, options: Mapping) -> Design``.
``options`` carries the study's choices for that form, for example
``{"pylons": 2}``; a solver ignores the keys it does not use.  The returned
:class:`~bridgeopt.solver.design.Design` labels its members in ``members.group``
("stay", "pylon", "deck", "cable", "hanger", "tower", "arch rib" ...).  A
solver raises :class:`~bridgeopt.errors.SolveError` or
:class:`~bridgeopt.errors.InputError` when the form cannot be built; the
study then reports the option as ``"failed"`` with the message and carries on.
A name that is asked for but not registered is reported as ``"unavailable"``.

Every table here is a :class:`pandas.DataFrame` in SI units, the unit in each
column name.  Nothing here draws (see :mod:`bridgeopt.workbook.plots`).
"""

from __future__ import annotations

import dataclasses
import math
import time
from dataclasses import dataclass
from functools import lru_cache
from typing import Any, Callable, Iterable, Mapping

import numpy as np

from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.solver.design import Design
from bridgeopt.errors import InputError, SolveError
from bridgeopt.solver.layout import optimize_layout
from bridgeopt.model.materials import GRAVITY

__all__ = ["REFERENCE", "KNOWN_FORMS", "FORM_SOLVERS", "FormSolver", "Option", "register_form",
           "unregister_form", "available_forms", "solve_reference", "solve_option",
           "solve_options", "compare",
           "quantities", "STATUSES", "comparison_table", "inputs_table",
           "bridge_from_file"]

#: Name of the reference optimum in every table.
REFERENCE = "reference optimum"

#: Forms the workbook offers (solvers are registered by :mod:`bridgeopt.forms` when present).
KNOWN_FORMS = ("cable-stayed fan", "cable-stayed semi-fan", "cable-stayed harp", "suspension",
               "arch")

#: Statuses of an option: solved, not registered, or the solve raised.
STATUSES = ("optimal", "unavailable", "failed")

FormSolver = Callable[[BridgeScenario, Mapping[str, Any]], Design]

#: Registered form solvers, by name.
FORM_SOLVERS: dict[str, FormSolver] = {}


def register_form(name: str, solver: FormSolver) -> FormSolver:
    """Register ``solver`` under ``name`` (replacing any earlier one); return it.

    Parameters
    ----------
    name : str
        Name shown in pickers and tables, e.g. ``"suspension"``.
    solver : callable
        ``solver(bridge, options) -> Design``; raises ``SolveError`` or
        ``InputError`` when the form cannot be built.
    """
    if not isinstance(name, str) or not name.strip() or name == REFERENCE:
        raise InputError("form", name, f"a non-empty name other than {REFERENCE!r}")
    if not callable(solver):
        raise InputError(f"form[{name!r}]", solver, "a callable solver(bridge, options)")
    _load_forms()
    FORM_SOLVERS[name] = solver
    return solver


def unregister_form(name: str) -> None:
    """Remove the form ``name`` from the registry (no error if absent)."""
    _load_forms()
    FORM_SOLVERS.pop(name, None)


def _load_forms() -> None:
    """Register the solvers of :mod:`bridgeopt.forms` under the study's form names, once.

    Registering or removing a name loads them first, so a later load never undoes it.
    """
    if _FORMS_LOADED:
        return
    _FORMS_LOADED.append(True)
    from bridgeopt.forms import STUDY_FORMS

    for name, solver in STUDY_FORMS.items():
        FORM_SOLVERS[name] = solver


_FORMS_LOADED: list[bool] = []


def available_forms() -> tuple[str, ...]:
    """Known forms first (in :data:`KNOWN_FORMS` order), then any other registered names."""
    _load_forms()
    extra = tuple(n for n in FORM_SOLVERS if n not in KNOWN_FORMS)
    return KNOWN_FORMS + extra


@dataclass(frozen=True)
class Option:
    """One option of a comparison: the reference optimum or a form.

    Attributes
    ----------
    name : str
    status : {"optimal", "unavailable", "failed"}
    design : Design or None
        The solved design when ``status == "optimal"``.
    message : str
        Why it failed or is unavailable, or the solver's message.
    seconds : float
        Wall time of the solve. [s]
    """

    name: str
    status: str
    design: Design | None
    message: str
    seconds: float = 0.0


def _quiet_solve(fn, *args) -> Design:
    # exp(k h) overflows for members far beyond the self-weight reach; the solver drops
    # them (infinite cost), so numpy's overflow warning is only noise.
    with np.errstate(over="ignore"):
        return fn(*args)


@lru_cache(maxsize=256)
def solve_reference(bridge: BridgeScenario) -> Design:
    """The minimum-volume layout of ``bridge`` (cached on the frozen scenario).

    Raises
    ------
    SolveError, InputError
    """
    return _quiet_solve(lambda b: optimize_layout(b.to_problem()), bridge)


def solve_option(bridge: BridgeScenario, name: str,
                 options: Mapping[str, Any] | None = None) -> Option:
    """Solve one option; never raises for a failed or unavailable form.

    Parameters
    ----------
    bridge : BridgeScenario
    name : str
        :data:`REFERENCE` or a form name.
    options : mapping, optional
        Passed to the form's solver (e.g. ``{"pylons": 2}``).
    """
    _load_forms()
    t0 = time.perf_counter()
    if name == REFERENCE:
        fn = solve_reference
        args = (bridge,)
    elif name in FORM_SOLVERS:
        fn = FORM_SOLVERS[name]
        args = (bridge, dict(options or {}))
    else:
        return Option(name, "unavailable", None, f"{name}: not available in this version "
                      "(no solver registered)")
    try:
        design = _quiet_solve(fn, *args)
    except SolveError as err:
        return Option(name, "failed", None, f"{name}: solve failed ({err.status}): {err.message}",
                      time.perf_counter() - t0)
    except InputError as err:
        return Option(name, "failed", None, f"{name}: {err}", time.perf_counter() - t0)
    return Option(name, "optimal", design, design.message, time.perf_counter() - t0)


def solve_options(bridge: BridgeScenario, forms: Iterable[str] = (),
                  options: Mapping[str, Any] | None = None) -> dict[str, Option]:
    """The reference optimum and each form in ``forms``, by name (reference first)."""
    names = [REFERENCE] + [f for f in forms if f != REFERENCE]
    return {n: solve_option(bridge, n, options) for n in dict.fromkeys(names)}


def comparison_table(bridge: BridgeScenario, results: Mapping[str, Option]):
    """:func:`compare`'s table from already solved options (see :func:`solve_options`)."""
    import pandas as pd

    return pd.DataFrame(_rows(bridge, results))


def bridge_from_file(path, *, divisions: int | None = None) -> BridgeScenario:
    """The bridge scenario of a TOML scenario file (see ``docs/scenario.md``).

    Parameters
    ----------
    path : path
    divisions : int, optional
        Replace the file's grid divisions (e.g. a coarse grid for a quick run). [-]

    Raises
    ------
    InputError
        The file is not a bridge scenario, or a value in it is invalid.
    """
    from bridgeopt.files.scenario import load_scenario

    scenario = load_scenario(path)
    if scenario.bridge is None:
        raise InputError("bridge", str(path), "a scenario file with a [bridge] table")
    bridge = scenario.bridge
    if scenario.name and bridge.name == "bridge":
        bridge = dataclasses.replace(bridge, name=scenario.name)
    return bridge if divisions is None else dataclasses.replace(bridge, divisions=divisions)


def inputs_table(bridge: BridgeScenario):
    """The scenario's inputs as a table: ``input``, ``value``, ``unit``."""
    import pandas as pd

    m = bridge.material
    rows = [("crossing", bridge.name, ""),
            ("arrangement", bridge.arrangement, ""),
            ("span", bridge.span, "m"),
            ("rise allowed above deck", bridge.rise, "m"),
            ("depth allowed below deck", bridge.depth, "m"),
            ("deck load", bridge.deck_load / 1e3, "kN/m"),
            ("material", m.name, ""),
            ("tension design stress", m.tension_strength / 1e6, "MPa"),
            ("compression design stress", m.compression_strength / 1e6, "MPa"),
            ("density", m.density, "kg/m3"),
            ("grid divisions across the span", bridge.divisions, "-"),
            ("grid step", bridge.spacing, "m"),
            ("normalised span, span / (strength / (density g))", bridge.normalised_span, "-")]
    return pd.DataFrame(rows, columns=["input", "value", "unit"])


@lru_cache(maxsize=64)
def _reference_volume_on(problem) -> float:
    """Reference optimum on the bridge's domain with a form's own supports. [m3]"""
    try:
        return _quiet_solve(optimize_layout, problem).volume
    except (SolveError, InputError):
        return math.nan


def _rows(bridge: BridgeScenario, results: Mapping[str, Option]) -> list[dict]:
    ref = results.get(REFERENCE)
    ref_volume = ref.design.volume if ref is not None and ref.design is not None else math.nan
    ref_problem = ref.design.problem if ref is not None and ref.design is not None else None
    rows = []
    for name, opt in results.items():
        d = opt.design
        volume = d.volume if d is not None else math.nan
        # a form standing on piers the plain reference lacks is set against the optimum
        # with the same supports, so that the ratio stays a fair one (>= 1)
        fair = ref_volume
        if d is not None and name != REFERENCE and ref_problem is not None:
            held = (getattr(d.problem, "supports", ref_problem.supports),
                    getattr(d.problem, "mirror_lines", ref_problem.mirror_lines))
            if held != (ref_problem.supports, ref_problem.mirror_lines):
                fair = _reference_volume_on(dataclasses.replace(
                    ref_problem, supports=held[0], mirror_lines=held[1]))
        rows.append({
            "option": name, "status": opt.status, "volume_m3": volume,
            "weight_N": d.weight if d is not None else math.nan,
            "reference_volume_m3": fair,
            "ratio_to_reference": volume / fair,
            "normalised_volume": bridge.normalised_volume(volume) if d is not None else math.nan,
            "seconds": opt.seconds, "message": opt.message,
        })
    return rows


def compare(bridge: BridgeScenario, forms: Iterable[str] = (),
            options: Mapping[str, Any] | None = None):
    """One row per option: reference optimum first, then each form.

    Returns
    -------
    pandas.DataFrame
        Columns ``option``, ``status``, ``volume_m3`` [m3], ``weight_N`` [N],
        ``reference_volume_m3`` [m3] (the optimum on the same domain with the option's
        own supports: a form on extra piers is set against an optimum on them too),
        ``ratio_to_reference`` [-], ``normalised_volume`` [-] (volume sigma /
        (deck_load span^2)), ``seconds`` [s], ``message``.  Volumes of
        options that did not solve are NaN.
    """
    import pandas as pd

    return pd.DataFrame(_rows(bridge, solve_options(bridge, forms, options)))


def _curve_length(curve: np.ndarray) -> float:
    return float(np.hypot(*np.diff(curve, axis=0).T).sum()) if len(curve) > 1 else 0.0


def quantities(design: Design):
    """Per-group and per-sense quantities of a design (whole reported structure).

    Returns
    -------
    pandas.DataFrame
        One row per (group, sense) and a ``total`` row: ``members`` (in the
        modelled part) [-],
        ``length_m`` (along the centrelines) [m], ``volume_m3`` [m3],
        ``weight_kN`` [kN], ``max_force_MN`` [MN].  Lengths, volumes and
        weights are multiplied by ``design.copies``.
    """
    import pandas as pd

    m = design.members
    prob = design.problem
    dens_t = prob.material.density if prob is not None else 0.0
    comp = getattr(prob, "compression_material", None) or getattr(prob, "material", None)
    dens_c = comp.density if comp is not None else 0.0
    sense = np.asarray(m.sense, dtype=str)
    density = np.where(sense == "tension", dens_t, dens_c)
    df = pd.DataFrame({
        "group": np.asarray(m.group, dtype=str), "sense": sense,
        "members": 1,
        "length_m": [design.copies * _curve_length(c) for c in m.curves],
        "volume_m3": design.copies * np.asarray(m.volume),
        "weight_kN": design.copies * density * GRAVITY * np.asarray(m.volume) / 1e3,
        "max_force_MN": m.axial_force / 1e6,
    })
    out = df.groupby(["group", "sense"], as_index=False).agg(
        members=("members", "sum"), length_m=("length_m", "sum"), volume_m3=("volume_m3", "sum"),
        weight_kN=("weight_kN", "sum"), max_force_MN=("max_force_MN", "max"))
    total = {"group": "total", "sense": "", "members": int(out["members"].sum()),
             "length_m": out["length_m"].sum(), "volume_m3": out["volume_m3"].sum(),
             "weight_kN": out["weight_kN"].sum(), "max_force_MN": out["max_force_MN"].max()}
    return pd.concat([out, pd.DataFrame([total])], ignore_index=True)
