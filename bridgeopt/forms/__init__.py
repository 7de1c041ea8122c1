"""Practical bridge forms set against the reference optimum.

A form is a fixed topology (cable-stayed, suspension, arch) whose members are
sized by the same LP as the reference, with equal-strength self-weight
elements, and whose free geometry (pylon height, sag, rise ...) is then
improved by geometry optimization within the form's rules.  See
:func:`solve_form` and the ``[form]`` table in ``docs/scenario.md``.
"""

from typing import Mapping

from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.solver.design import Design
from bridgeopt.errors import InputError
from bridgeopt.forms.specs import (FORM_TYPES, ArchForm, CableStayedForm, FormSpec, ReferenceForm,
                    SuspensionForm, form_keys, parse_form)
from bridgeopt.forms.build import build_form, form_problem
from bridgeopt.forms.solve import GROUPS, FormResult, group_quantities, solve_form

__all__ = ["FORM_TYPES", "ArchForm", "CableStayedForm", "FormSpec", "ReferenceForm",
           "SuspensionForm", "form_keys", "parse_form", "GROUPS", "FormResult", "build_form",
           "form_problem", "group_quantities", "solve_form", "FORM_SOLVERS", "STUDY_FORMS",
           "study_solver"]


def _solver(form_type: str):
    def solve(bridge: BridgeScenario, options: Mapping) -> Design:
        """Solve this form type for ``bridge`` with ``[form]`` keys ``options``; the form's Design."""
        options = dict(options)
        if options.setdefault("type", form_type) != form_type:
            raise InputError("form.type", options["type"], f"{form_type!r} for this solver")
        return solve_form(bridge, parse_form(options)).design
    solve.__name__ = f"solve_{form_type.replace('-', '_')}"
    return solve


#: ``fn(bridge, options) -> Design`` per form type (strict: every key must be the form's).
FORM_SOLVERS = {t: _solver(t) for t in FORM_TYPES}


def study_solver(form_type: str, **fixed):
    """A lenient ``fn(bridge, options) -> Design`` for an option study.

    Keys of ``options`` that the form does not have are ignored (a study passes
    the same options to every form); ``fixed`` keys (e.g. ``pattern="harp"``)
    override the options.  The design's ``problem`` is :func:`form_problem`, on
    which a fair reference is solved.
    """
    keys = set(form_keys(form_type)) - {"type"}

    def solve(bridge: BridgeScenario, options: Mapping) -> Design:
        table = {k: v for k, v in dict(options).items() if k in keys}
        table.update(fixed, type=form_type)
        return solve_form(bridge, parse_form(table), compare=False).design
    solve.__name__ = "solve_" + "_".join([form_type, *map(str, fixed.values())]).replace("-", "_")
    return solve


#: Lenient solvers under the names an option study offers.
STUDY_FORMS = {
    "cable-stayed fan": study_solver("cable-stayed", pattern="fan"),
    "cable-stayed semi-fan": study_solver("cable-stayed", pattern="semi-fan"),
    "cable-stayed harp": study_solver("cable-stayed", pattern="harp"),
    "suspension": study_solver("suspension"),
    "arch": study_solver("arch"),
}
