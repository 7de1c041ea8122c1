"""The one way a scenario is solved, and the statuses a solve ends with.

:func:`solve_scenario` solves a checked
:class:`~bridgeopt.files.scenario.Scenario` with its ``[solve]`` options:

* a scenario with ``[[load_case]]`` or ``[cost]``: every case at once
  (:func:`~bridgeopt.solver.multicase.optimize_cases`);
* a bridge with a ``[form]`` other than the reference: the form, set against
  the reference optimum on the form's supports (:func:`~bridgeopt.forms.solve_form`);
  with ``geometry_optimization`` that reference is rationalised too
  (:func:`form_reference`);
* otherwise the reference optimum of the scenario's problem
  (:func:`~bridgeopt.solver.layout.optimize_layout`), then, with
  ``geometry_optimization``, its nodes moved, merged and pruned
  (:func:`~bridgeopt.geometry.optimize.optimize_geometry`).

The command line (``solve``, ``demo``, ``export``), the sweeps and the studies
all call it.  A bridge's design is reported per whole span.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from bridgeopt.errors import InputError, SolveError
from bridgeopt.files.scenario import Scenario
from bridgeopt.forms import FormResult, ReferenceForm, form_problem, solve_form
from bridgeopt.geometry.optimize import optimize_geometry
from bridgeopt.solver.design import Design, below_reference
from bridgeopt.solver.layout import optimize_layout
from bridgeopt.solver.multicase import CaseDesign, optimize_cases

__all__ = ["Solved", "solve_scenario", "form_reference", "STATUSES", "CASE_STATUSES",
           "OPTION_STATUS", "case_status"]

#: Statuses of an option of a study: solved, no solver registered, or the solve raised.
STATUSES = ("optimal", "unavailable", "failed")

#: Statuses of a solved case (a sweep's rows): solved, bad input, no solution, another error.
CASE_STATUSES = ("ok", "input-error", "solve-failed", "error")

#: The study's status of each case status (a study has no "error": other exceptions raise).
OPTION_STATUS = {"ok": "optimal", "input-error": "failed", "solve-failed": "failed",
                 "error": "failed"}


def case_status(err: BaseException | None) -> str:
    """The case status (:data:`CASE_STATUSES`) of a solve that raised ``err`` (None: solved).

    Parameters
    ----------
    err : exception or None
        What the solve raised.

    Returns
    -------
    str
        ``"ok"``, ``"input-error"``, ``"solve-failed"`` or ``"error"``.
    """
    if err is None:
        return "ok"
    if isinstance(err, InputError):
        return "input-error"
    if isinstance(err, SolveError):
        return "solve-failed"
    return "error"


@dataclass(frozen=True)
class Solved:
    """A solved scenario.

    Parameters
    ----------
    scenario : Scenario
        The scenario as solved (its ``solve`` options with any overrides applied).
    design : Design or CaseDesign
        The design, whole structure: a :class:`~bridgeopt.solver.multicase.CaseDesign`
        for a scenario with load cases or costs, the form's design for a ``[form]``.
    form : FormResult or None
        The solved form set against its reference, for a ``[form]`` other than the
        reference.
    """

    scenario: Scenario
    design: Design | CaseDesign
    form: FormResult | None = None


def form_reference(scenario: Scenario) -> Design:
    """The reference optimum of a bridge scenario on its form's problem, with its options.

    The layout optimum of :func:`~bridgeopt.forms.form_problem` (the form's
    supports included), rationalised by geometry optimization when the scenario's
    ``[solve]`` asks for it: the design a form is compared with.

    Parameters
    ----------
    scenario : Scenario
        A bridge scenario (``scenario.bridge`` set).

    Returns
    -------
    Design
        The reference optimum on the form's problem (volume [m3], weight [N]).

    Raises
    ------
    SolveError, InputError
    """
    opts = scenario.solve
    with np.errstate(over="ignore"):
        design = optimize_layout(form_problem(scenario.bridge, scenario.form or ReferenceForm()),
                                 member_adding=opts.member_adding, batch=opts.batch)
        if opts.geometry_optimization:
            design = optimize_geometry(design)
    return design


def solve_scenario(scenario: Scenario, *, geometry_optimization: bool | None = None,
                   member_adding: bool | None = None,
                   reference: Design | None = None) -> Solved:
    """Solve ``scenario`` with its ``[solve]`` options.

    Parameters
    ----------
    scenario : Scenario
        A checked scenario (:func:`~bridgeopt.files.scenario.load_scenario`).
    geometry_optimization : bool, optional
        Override ``[solve] geometry_optimization`` (None: the scenario's).
    member_adding : bool, optional
        Override ``[solve] member_adding`` (None: the scenario's; same optimum).
    reference : Design, optional
        An already solved :func:`form_reference` of the scenario, for a ``[form]``
        (saves a solve when several forms share it).

    Returns
    -------
    Solved
        The scenario as solved and its design (whole structure; volume [m3]).

    Raises
    ------
    SolveError
        No structure can carry the loads, or HiGHS failed.
    InputError
        The form does not fit the design domain.
    """
    changes = {k: v for k, v in (("geometry_optimization", geometry_optimization),
                                 ("member_adding", member_adding)) if v is not None}
    if changes:
        scenario = scenario.with_solve(**changes)
    opts = scenario.solve
    # exp(k h) overflows for members far beyond the self-weight reach; their costs are
    # infinite and the solver drops them, so numpy's overflow warning is only noise here.
    with np.errstate(over="ignore"):
        if scenario.study is not None:
            design = optimize_cases(scenario.study, member_adding=opts.member_adding,
                                    batch=opts.batch)
            return Solved(scenario, design)
        if scenario.form is not None and scenario.form.type != "reference":
            # a form's free dimensions are always optimized; [solve] geometry_optimization
            # also rationalises the reference it is compared with
            if reference is None and opts.geometry_optimization:
                reference = form_reference(scenario)
            form = solve_form(scenario.bridge, scenario.form, reference=reference,
                              member_adding=opts.member_adding)
            message = below_reference(f"the {scenario.form.type} form", form.volume,
                                      form.reference_volume)
            if message:
                raise SolveError("below-reference", message)
            return Solved(scenario, form.design, form)
        design = optimize_layout(scenario.problem, member_adding=opts.member_adding,
                                 batch=opts.batch)
        if opts.geometry_optimization:
            design = optimize_geometry(design)
    return Solved(scenario, design)
