"""Practical bridge forms set against the reference optimum.

A form is a fixed topology (cable-stayed, suspension, arch) whose members are
sized by the same LP as the reference, with equal-strength self-weight
elements, and whose free geometry (pylon height, sag, rise ...) is then
improved by geometry optimization within the form's rules.  See
:func:`solve_form` and the ``[form]`` table in ``docs/scenario.md``.  The forms
an option study offers are registered in :data:`FORM_SOLVERS`
(:mod:`bridgeopt.forms.registry`).
"""

from bridgeopt.forms.specs import (FORM_TYPES, ArchForm, CableStayedForm, FormSpec, ReferenceForm,
                                   SuspensionForm, form_keys, parse_form)
from bridgeopt.forms.build import build_form, form_problem
from bridgeopt.forms.solve import GROUPS, FormResult, group_quantities, solve_form
from bridgeopt.forms.registry import (FORM_SOLVERS, KNOWN_FORMS, REFERENCE, FormSolver,
                                      available_forms, form_solver, register_form,
                                      unregister_form)

__all__ = ["FORM_TYPES", "ArchForm", "CableStayedForm", "FormSpec", "ReferenceForm",
           "SuspensionForm", "form_keys", "parse_form", "GROUPS", "FormResult", "build_form",
           "form_problem", "group_quantities", "solve_form", "FORM_SOLVERS", "KNOWN_FORMS",
           "REFERENCE", "FormSolver", "available_forms", "form_solver", "register_form",
           "unregister_form"]
