"""Practical bridge forms set against the reference optimum.

A form is a fixed topology (cable-stayed, suspension, arch) whose members are
sized by the same LP as the reference, with equal-strength self-weight
elements, and whose free geometry (pylon height, sag, rise ...) is then
improved by geometry optimization within the form's rules.  See
:func:`solve_form` and the ``[form]`` table in ``docs/scenario.md``.
"""

from typing import Mapping

from ..bridge import BridgeScenario
from ..design import Design
from ..errors import InputError
from .specs import (FORM_TYPES, ArchForm, CableStayedForm, FormSpec, ReferenceForm,
                    SuspensionForm, form_keys, parse_form)
from .build import build_form, form_problem
from .solve import GROUPS, FormResult, group_quantities, solve_form

__all__ = ["FORM_TYPES", "ArchForm", "CableStayedForm", "FormSpec", "ReferenceForm",
           "SuspensionForm", "form_keys", "parse_form", "GROUPS", "FormResult", "build_form",
           "form_problem", "group_quantities", "solve_form", "FORM_SOLVERS"]


def _solver(form_type: str):
    def solve(bridge: BridgeScenario, options: Mapping) -> Design:
        """Solve this form type for ``bridge`` with ``[form]`` keys ``options``; the form's Design."""
        options = dict(options)
        if options.setdefault("type", form_type) != form_type:
            raise InputError("form.type", options["type"], f"{form_type!r} for this solver")
        return solve_form(bridge, parse_form(options)).design
    solve.__name__ = f"solve_{form_type.replace('-', '_')}"
    return solve


#: ``fn(bridge, options) -> Design`` per form type, for a study's form registry.
FORM_SOLVERS = {t: _solver(t) for t in FORM_TYPES}
