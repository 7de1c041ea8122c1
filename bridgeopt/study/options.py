"""Option studies: the reference optimum against practical bridge forms, and sweeps.

A *form* (cable-stayed, suspension, arch ...) is any function registered under a
name in the registry of :mod:`bridgeopt.forms.registry`::

    from bridgeopt import study
    study.register_form("suspension", solve_suspension)

with the signature ``solve(bridge: BridgeScenario, options: Mapping) -> Design``
(``options`` carries the study's choices for that form, for example
``{"pylons": 2}``).  A solver that raises :class:`~bridgeopt.errors.SolveError`
or :class:`~bridgeopt.errors.InputError` makes the option ``"failed"`` with the
message, and the study carries on.  A name that is asked for but not
registered is reported as ``"unavailable"``.  The reference optimum is solved by
:func:`bridgeopt.study.solve.solve_scenario`.

Every table here is a :class:`pandas.DataFrame` in SI units, the unit in each
column name.  Nothing here draws (see :mod:`bridgeopt.workbook.plots`).
"""

from __future__ import annotations

import difflib
import math
import time
from dataclasses import dataclass
from functools import lru_cache
from typing import Any, Iterable, Mapping

import numpy as np

from bridgeopt.errors import InputError, SolveError
from bridgeopt.files.scenario import Scenario
from bridgeopt.forms.registry import (FORM_SOLVERS, KNOWN_FORMS, REFERENCE, FormSolver,
                                      available_forms, register_form, unregister_form)
from bridgeopt.forms.quantities import dimension_columns
from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.solver.design import BELOW_REFERENCE_TOL, Design, below_reference
from bridgeopt.study.crossings import crossing_name, reference_on, series_name
from bridgeopt.study.solve import OPTION_STATUS, STATUSES, case_status, solve_scenario
from bridgeopt.study.tables import bridge_from_file, inputs_table, quantities

__all__ = ["REFERENCE", "KNOWN_FORMS", "FORM_SOLVERS", "FormSolver", "Option", "register_form",
           "unregister_form", "available_forms", "solve_reference", "solve_option",
           "solve_options", "compare", "quantities", "STATUSES", "comparison_table",
           "comparison_rows", "inputs_table", "bridge_from_file", "crossing_name",
           "series_name", "reference_on", "options_by_series", "bounded", "BELOW_REFERENCE_TOL"]


@dataclass(frozen=True)
class Option:
    """One option of a comparison: the reference optimum or a form.

    Parameters
    ----------
    name : str
        :data:`REFERENCE` or the form's name.
    status : {"optimal", "unavailable", "failed"}
        How the solve ended.
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


def _quiet_solve(fn, *args):
    # exp(k h) overflows for members far beyond the self-weight reach; the solver drops
    # them (infinite cost), so numpy's overflow warning is only noise.
    with np.errstate(over="ignore"):
        return fn(*args)


@lru_cache(maxsize=256)
def solve_reference(bridge: BridgeScenario) -> Design:
    """The minimum-volume layout of ``bridge`` (cached on the frozen scenario).

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (span, rise, depth [m], deck load [N/m], materials).

    Returns
    -------
    Design
        The reference optimum (volume [m3], weight [N]).

    Raises
    ------
    SolveError, InputError
    """
    return solve_scenario(Scenario(name=bridge.name, bridge=bridge)).design


def solve_option(bridge: BridgeScenario, name: str,
                 options: Mapping[str, Any] | None = None) -> Option:
    """Solve one option; never raises for a failed or unavailable form.

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (span, rise, depth [m], deck load [N/m], materials).
    name : str
        :data:`REFERENCE` or a form name.
    options : mapping, optional
        Passed to the form's solver (e.g. ``{"pylons": 2}``).

    Returns
    -------
    Option
        Status ``"optimal"`` with the design, else ``"unavailable"`` or ``"failed"``
        with the message; the solve's wall time [s].
    """
    t0 = time.perf_counter()
    if name == REFERENCE:
        fn = solve_reference
        args = (bridge,)
    elif name in FORM_SOLVERS:
        fn = FORM_SOLVERS[name]
        args = (bridge, dict(options or {}))
    elif name in KNOWN_FORMS:
        return Option(name, "unavailable", None, f"{name}: not available in this version "
                      "(no solver registered)")
    else:
        close = difflib.get_close_matches(str(name), list(available_forms()), n=1)
        return Option(name, "unavailable", None, f"{name}: not a form bridgeopt knows; the "
                      "forms are " + ", ".join(map(repr, available_forms()))
                      + (f" (did you mean {close[0]!r}?)" if close else ""))
    try:
        design = _quiet_solve(fn, *args)
    except (SolveError, InputError) as err:
        message = (f"{name}: solve failed ({err.status}): {err.message}"
                   if isinstance(err, SolveError) else f"{name}: {err}")
        return Option(name, OPTION_STATUS[case_status(err)], None, message,
                      time.perf_counter() - t0)
    return Option(name, "optimal", design, design.message, time.perf_counter() - t0)


def solve_options(bridge: BridgeScenario, forms: Iterable[str] = (),
                  options: Mapping[str, Any] | None = None) -> dict[str, Option]:
    """The reference optimum and each form in ``forms``, by name (reference first).

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (span, rise, depth [m], deck load [N/m], materials).
    forms : iterable of str
        Form names (see :func:`available_forms`); the reference is always solved.
    options : mapping, optional
        Passed to every form's solver (e.g. ``{"pylons": 2}``).

    Returns
    -------
    dict of str to Option
        Each option once, :data:`REFERENCE` first (see :func:`solve_option`).
    """
    names = [REFERENCE] + [f for f in forms if f != REFERENCE]
    results = {n: solve_option(bridge, n, options) for n in dict.fromkeys(names)}
    ref = results[REFERENCE].design
    return {n: bounded(o, ref) if n != REFERENCE else o for n, o in results.items()}


def bounded(option: Option, reference: Design | None) -> Option:
    """``option``, or a failed one when its form is lighter than the reference it is set against.

    The reference optimum bounds every structure on the same grid nodes (W.S. Dorn,
    R.E. Gomory, H.J. Greenberg 1964, J. de Mecanique 3:25-52); a form with nodes
    between the grid's (free anchors, leg heads, inclined hangers) can fall under it on
    a coarse grid, where the grid reference is no bound.  Such a result is not shown
    as a design: the option fails with a message that says so and asks for a finer grid.

    Parameters
    ----------
    option : Option
        A solved form.
    reference : Design or None
        The plain reference of the scenario; a form on its own crossing (piers) is
        checked against that crossing's reference instead (:func:`reference_on`).

    Returns
    -------
    Option
        ``option`` when it is not below its reference (or either is missing), else
        status ``"failed"`` without a design.
    """
    d = option.design
    if d is None or reference is None:
        return option
    own = reference
    if crossing_name(getattr(d, "problem", None), reference.problem):
        try:
            own = reference_on(d.problem)
        except (SolveError, InputError):
            return option
    message = below_reference(option.name, d.volume, own.volume)
    if message is None:
        return option
    return Option(option.name, "failed", None, message, option.seconds)


def comparison_table(bridge: BridgeScenario, results: Mapping[str, Option]):
    """:func:`compare`'s table from already solved options (see :func:`solve_options`).

    Parameters
    ----------
    bridge : BridgeScenario
        The scenario the options were solved for.
    results : mapping of str to Option
        Solved options by name, :data:`REFERENCE` among them.

    Returns
    -------
    pandas.DataFrame
        The columns of :func:`compare` (volumes [m3], weights [N], ratios [-], times [s]).
    """
    import pandas as pd

    return pd.DataFrame(comparison_rows(bridge, results))






def _reference_volume_on(problem) -> float:
    """Reference optimum on the bridge's domain with a form's own supports. [m3]"""
    try:
        return reference_on(problem).volume
    except (SolveError, InputError):
        return math.nan


def options_by_series(results: Mapping[str, Option], table) -> dict[str, Option]:
    """The options to draw, each named with its crossing, each form after its crossing's reference.

    A form on other supports than the scenario's (the ``crossing`` column of
    ``table``, e.g. intermediate pylons on their own piers) is preceded by the
    reference optimum of that crossing (:func:`reference_on`), named
    ``"reference optimum (1 pier)"``, so that it is never drawn beside the plain
    reference alone.

    Parameters
    ----------
    results : mapping of str to Option
        Solved options by name (:func:`solve_options`).
    table : pandas.DataFrame
        Their :func:`comparison_table` (``option`` and ``crossing`` columns).

    Returns
    -------
    dict of str to Option
        By :func:`series_name`; a crossing's reference that cannot be solved is an
        option with status ``"failed"`` and the message.
    """
    out: dict[str, Option] = {}
    crossings = dict(zip(table["option"], table.get("crossing", [""] * len(table))))
    for name, option in results.items():
        crossing = crossings.get(name) or ""
        if crossing and option.design is not None:
            label = series_name(REFERENCE, crossing)
            try:
                own = reference_on(option.design.problem)
                out[label] = Option(label, "optimal", own, own.message)
            except (SolveError, InputError) as err:
                out[label] = Option(label, "failed", None, f"{label}: {err}")
        out[series_name(name, crossing)] = option
    return out


def _split(design) -> dict:
    """Volumes by part: tension and compression elements, and the pier shafts. [m3]"""
    if design is None:
        return {"tension_volume_m3": math.nan, "compression_volume_m3": math.nan,
                "pier_volume_m3": math.nan}
    m = design.members
    vol = np.asarray(m.volume, dtype=float) * design.copies
    sense = np.asarray(m.sense, dtype=str)
    group = np.asarray(m.group, dtype=str)
    return {"tension_volume_m3": float(vol[sense == "tension"].sum()),
            "compression_volume_m3": float(vol[sense != "tension"].sum()),
            "pier_volume_m3": float(vol[group == "pier"].sum())}


def comparison_rows(bridge: BridgeScenario, results: Mapping[str, Option]) -> list[dict]:
    """The rows of :func:`compare`'s table for already solved options.

    Parameters
    ----------
    bridge : BridgeScenario
        The scenario the options were solved for.
    results : mapping
        :class:`Option` by name (see :func:`solve_options`).

    Returns
    -------
    list of dict
        One row per option, the keys the columns of :func:`compare`.
    """
    ref = results.get(REFERENCE)
    ref_volume = ref.design.volume if ref is not None and ref.design is not None else math.nan
    ref_problem = ref.design.problem if ref is not None and ref.design is not None else None
    rows = []
    for name, opt in results.items():
        d = opt.design
        volume = d.volume if d is not None else math.nan
        # a form standing on piers the plain reference lacks is its own crossing, set
        # against the optimum with the same supports, so that the ratio stays a fair one
        fair, crossing = ref_volume, ""
        if d is not None and name != REFERENCE and ref_problem is not None:
            crossing = crossing_name(getattr(d, "problem", None), ref_problem)
            if crossing:
                fair = _reference_volume_on(d.problem)
        rows.append({
            "option": name, "crossing": crossing, "series": series_name(name, crossing),
            "status": opt.status, "volume_m3": volume,
            "weight_N": d.weight if d is not None else math.nan,
            "reference_volume_m3": fair,
            "ratio_to_reference": volume / fair,
            "normalised_volume": bridge.normalised_volume(volume) if d is not None else math.nan,
            **_split(d),
            "seconds": opt.seconds, "message": opt.message,
        })
        rows[-1].update(dimension_columns(d))   # a form's final dimensions, when it has them
    return rows


def compare(bridge: BridgeScenario, forms: Iterable[str] = (),
            options: Mapping[str, Any] | None = None):
    """One row per option: reference optimum first, then each form.

    Parameters
    ----------
    bridge : BridgeScenario
        The scenario compared (lengths [m], deck load [N/m], materials).
    forms : iterable of str
        The forms set against the reference, by name (:func:`available_forms`).
    options : mapping, optional
        The study's choices for the forms, given to each solver (``{"pylons": 2}``).

    Returns
    -------
    pandas.DataFrame
        Columns ``option``, ``crossing`` (``""`` on the scenario's own supports,
        else how the option's crossing differs, e.g. ``"3 piers"``), ``series``
        (the option named with its crossing, as in charts), ``status``,
        ``volume_m3`` [m3], ``weight_N`` [N], ``reference_volume_m3`` [m3] (the
        optimum of the option's own crossing: a form on extra piers is set against
        an optimum on them too), ``ratio_to_reference`` [-], ``normalised_volume``
        [-] (volume sigma / (deck_load span^2)), ``tension_volume_m3``,
        ``compression_volume_m3`` and ``pier_volume_m3`` (the form's pier shafts)
        [m3], ``seconds`` [s], ``message``.  Volumes of
        options that did not solve are NaN.
    """
    import pandas as pd

    return pd.DataFrame(comparison_rows(bridge, solve_options(bridge, forms, options)))
