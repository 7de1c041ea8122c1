"""Solving one sweep case, in a worker process (local or on a Dask cluster).

The functions here take and return plain picklable values and never raise for a
bad case: a case's :class:`~bridgeopt.errors.InputError`,
:class:`~bridgeopt.errors.SolveError` or any other exception becomes its row's
``status`` and ``error``, so one bad case never stops a sweep.
"""

from __future__ import annotations

import json
import math
import numbers
import time
from typing import Any, Mapping

import numpy as np

from bridgeopt.errors import SolveError
from bridgeopt.study.crossings import crossing_name
from bridgeopt.files.scenario import Scenario, parse_scenario
from bridgeopt.forms import FormResult, ReferenceForm, form_problem
from bridgeopt.forms.quantities import SWEEP_DIMENSION_COLUMNS, dimension_values
from bridgeopt.solver.design import Design
from bridgeopt.solver.multicase import single_case_reference
from bridgeopt.study.solve import CASE_STATUSES, case_status, form_reference, solve_scenario

__all__ = ["RESULT_COLUMNS", "STATUSES", "dimension_cells", "solve_case", "solve_reference", "reference_group",
           "error_row"]

#: Columns every row has after the inputs, with their units.
RESULT_COLUMNS = {
    "status": ", ".join(CASE_STATUSES[:-1]) + " or " + CASE_STATUSES[-1],
    "error": "the error message of a bad case (empty when ok)",
    "volume_m3": "material volume of the design, whole structure [m3]",
    "reference_volume_m3": "volume of the reference optimum on the same problem [m3]",
    "ratio": "volume / reference volume [-] (1 for the reference itself)",
    "weight_N": "self-weight of the design [N]",
    "normalised_volume": "volume sigma / (deck_load span^2) [-] (bridges)",
    "members": "members in the design (one model) [-]",
    "seconds": "wall time of the case's own solve, in its worker [s]",
}
#: Statuses of a case's row (defined with the solve, :data:`bridgeopt.study.solve.CASE_STATUSES`).
STATUSES = CASE_STATUSES


def dimension_cells(dimensions: Mapping[str, Any],
                    geometry: Mapping[str, Any] | None = None) -> dict[str, Any]:
    """A form's final dimensions as sweep-row cells, by the one table of dimension columns.

    The columns are :data:`~bridgeopt.forms.quantities.SWEEP_DIMENSION_COLUMNS`: the
    study table's and a sweep-only part of the same table (the deck panel, the other
    anchor moves, ``span_to_rise``, the start pattern and the per-stay lists).

    Parameters
    ----------
    dimensions : mapping
        :attr:`~bridgeopt.forms.solve.FormResult.dimensions` (``span_to_height``,
        ``anchor_move_largest_m``, ``anchor_heights_m`` ...).
    geometry : mapping, optional
        :attr:`~bridgeopt.forms.solve.FormResult.geometry` (``pylon_height``,
        ``sag``, ``deck_panel`` ...) [m]; its columns get ``_m`` names.

    Returns
    -------
    dict
        Numbers as floats (their unit in their name: ``_m`` metres, ratios [-]),
        lists (one value per stay) as JSON text, texts as they are; values of
        any other kind (a flag) are left out.
    """
    form = {"geometry": geometry or {}, "dimensions": dimensions}
    cells: dict[str, Any] = {}
    for key, value in dimension_values(form, SWEEP_DIMENSION_COLUMNS).items():
        if isinstance(value, bool):
            continue
        if isinstance(value, numbers.Real):
            cells[key] = float(value)
        elif isinstance(value, str):
            cells[key] = value
        elif isinstance(value, (list, tuple, np.ndarray)):
            cells[key] = json.dumps([round(float(v), 6) for v in value])
    return cells


def error_row(status: str, message: str, seconds: float = 0.0) -> dict[str, Any]:
    """The result columns of a bad case.

    Parameters
    ----------
    status : str
        One of :data:`STATUSES` (not ``"ok"``).
    message : str
        The error message (whitespace runs become single spaces).
    seconds : float
        Wall time spent on the case before it failed. [s]

    Returns
    -------
    dict
        :data:`RESULT_COLUMNS`, the numeric ones nan.
    """
    return {"status": status, "error": " ".join(str(message).split()), "volume_m3": math.nan,
            "reference_volume_m3": math.nan, "ratio": math.nan, "weight_N": math.nan,
            "normalised_volume": math.nan, "members": math.nan, "seconds": seconds}


def reference_group(scenario: Scenario):
    """The key of the reference a case is compared with, and whether it is that reference.

    Cases with equal keys share one reference solve: a bridge form's reference is
    the layout optimum of :func:`~bridgeopt.forms.form_problem` (its supports
    included) with the same solve options; a reference case provides it.
    Layout scenarios are their own reference: ``(None, True)``.

    Parameters
    ----------
    scenario : Scenario
        The case, parsed.

    Returns
    -------
    key : tuple or None
        (form problem, geometry_optimization, member_adding), or None for a layout
        scenario or a load-case study.
    is_reference : bool
        Whether the case is the group's reference itself.
    """
    if scenario.bridge is None or scenario.study is not None:
        return None, True
    spec = scenario.form or ReferenceForm()
    problem = form_problem(scenario.bridge, spec)
    opts = scenario.solve
    return (problem, opts.geometry_optimization, opts.member_adding), spec.type == "reference"


def solve_reference(data: dict) -> tuple[Design | None, str]:
    """The reference optimum of a case's form problem (shared by a group); (design, error).

    Parameters
    ----------
    data : dict
        A case of the group, in the scenario-file schema.

    Returns
    -------
    design : Design or None
        The reference optimum, or None when it could not be solved.
    error : str
        Empty, or the exception's type and message.
    """
    try:
        return form_reference(parse_scenario(data)), ""
    except Exception as err:  # the forms then solve (and fail on) their own reference
        return None, f"{type(err).__name__}: {err}"


def _ok_row(scenario: Scenario, design: Design, reference_volume: float,
            seconds: float, form: FormResult | None) -> dict[str, Any]:
    bridge = scenario.bridge
    row = {"status": "ok", "error": "", "volume_m3": design.volume,
           "reference_volume_m3": reference_volume, "ratio": design.volume / reference_volume,
           "weight_N": design.weight,
           "normalised_volume": bridge.normalised_volume(design.volume) if bridge else math.nan,
           "members": len(design.members), "seconds": seconds}
    if form is not None:
        row.update(dimension_cells(form.dimensions, form.geometry))
        if bridge is not None:  # a form on other supports is its own crossing: say which
            row["reference_crossing"] = crossing_name(
                getattr(form.reference, "problem", None), bridge.to_problem())
    return row


def _case_row(scenario: Scenario, design, seconds: float) -> dict[str, Any]:
    """Result columns of a load-case study: compared with its heaviest case alone."""
    _, single = single_case_reference(scenario.study)
    bridge = scenario.bridge
    row = {"status": "ok", "error": "", "volume_m3": design.volume,
           "reference_volume_m3": single.volume, "ratio": design.volume / single.volume,
           "weight_N": design.weight,
           "normalised_volume": bridge.normalised_volume(design.volume) if bridge else math.nan,
           "members": len(design.start), "seconds": seconds, "cost": design.cost}
    for name, count in design.governing_counts().items():
        row[f"governs_{name}"] = count
    return row


def solve_case(data: dict, reference: Design | None = None) -> tuple[dict, Design | None]:
    """Solve one case given as a scenario-file dict; (result columns, reference design).

    Parameters
    ----------
    data : dict
        The case in the scenario-file schema.
    reference : Design, optional
        The reference optimum of the case's group (see :func:`reference_group`);
        a bridge form is compared with it instead of solving its own.

    Returns
    -------
    row : dict
        :data:`RESULT_COLUMNS` (and a form's main dimensions, ``pylon_height_m`` ...).
    design : Design or None
        The case's design when it is a reference (for the forms of its group).
    """
    t0 = time.perf_counter()
    try:
        scenario = parse_scenario(data)
        solved = solve_scenario(scenario, reference=reference)
        if solved.form is not None:
            return _ok_row(scenario, solved.design, solved.form.reference_volume,
                           time.perf_counter() - t0, solved.form), None
        with np.errstate(over="ignore"):
            if scenario.study is not None:
                return _case_row(scenario, solved.design, time.perf_counter() - t0), None
        design = solved.design
        return _ok_row(scenario, design, design.volume, time.perf_counter() - t0, None), design
    except Exception as err:  # recorded, never stops the sweep
        status = case_status(err)
        if isinstance(err, SolveError):
            message = f"{err.status}: {err.message}"
        elif status == "input-error":
            message = str(err)
        else:
            message = f"{type(err).__name__}: {err}"
        return error_row(status, message, time.perf_counter() - t0), None
