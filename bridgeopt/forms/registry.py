"""The one registry of bridge forms an option study offers, by name.

A *form solver* is any function ``solve(bridge, options) -> Design``:
``options`` carries a study's choices for the form (for example
``{"pylons": 2}``; a solver ignores the keys it does not use), and the returned
:class:`~bridgeopt.solver.design.Design` labels its members in
``members.group`` ("stay", "pylon", "deck", "cable", "hanger", "tower",
"arch rib" ...).  A solver raises :class:`~bridgeopt.errors.SolveError` or
:class:`~bridgeopt.errors.InputError` when the form cannot be built.

:data:`FORM_SOLVERS` holds the package's forms under the names of
:data:`KNOWN_FORMS` at import; :func:`register_form` adds or replaces one,
:func:`unregister_form` removes one (``bridgeopt.study`` offers both).
"""

from __future__ import annotations

from typing import Any, Callable, Mapping

from bridgeopt.errors import InputError
from bridgeopt.forms.solve import solve_form
from bridgeopt.forms.specs import form_keys, parse_form
from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.solver.design import Design

__all__ = ["REFERENCE", "KNOWN_FORMS", "FORM_SOLVERS", "FormSolver", "form_solver",
           "V_TOWERS", "V_TOWER_REACH", "solve_v_towers", "v_tower_legs",
           "register_form", "unregister_form", "available_forms"]

#: Name of the reference optimum in every study table (not a form name).
REFERENCE = "reference optimum"

FormSolver = Callable[[BridgeScenario, Mapping[str, Any]], Design]

#: The package's forms by study name: (form type, fixed ``[form]`` keys).
_PACKAGE_FORMS = {
    "cable-stayed fan": ("cable-stayed", {"pattern": "fan"}),
    "cable-stayed semi-fan": ("cable-stayed", {"pattern": "semi-fan"}),
    "cable-stayed harp": ("cable-stayed", {"pattern": "harp"}),
    "cable-stayed, forked pylon": ("cable-stayed", {"pylon": "forked"}),
    "suspension": ("suspension", {}),
    "arch": ("arch", {}),
}

#: Study name of the suspension form with V-shaped towers (:func:`solve_v_towers`).
V_TOWERS = "suspension, V-towers"
#: Where a V-shaped tower's inclined leg meets the cable, as a part of the half span's
#: hangers counted from the tower: 4 of 15 was the lightest at 1, 2.5 and 5 km (30 divisions,
#: docs/benchmarks.md, "Suspension: inclined hangers and V-shaped towers"). [-]
V_TOWER_REACH = 4.0 / 15.0

#: Forms the workbook offers (in its pickers even when a name is unregistered).
KNOWN_FORMS = (*_PACKAGE_FORMS, V_TOWERS)


def form_solver(form_type: str, *, strict: bool = False, **fixed) -> FormSolver:
    """A ``solve(bridge, options) -> Design`` for one form type.

    Parameters
    ----------
    form_type : str
        A :data:`~bridgeopt.forms.specs.FORM_TYPES` entry, e.g. ``"suspension"``.
    strict : bool
        Every key of ``options`` must be the form's, as in a ``[form]`` table (a
        ``type`` key must be ``form_type``), and the reference is solved too.
        Otherwise (for a study, which passes the same options to every form) keys
        the form does not have are ignored and only the form is solved; its
        design's ``problem`` is :func:`~bridgeopt.forms.form_problem`, on which a
        fair reference is solved.
    **fixed
        ``[form]`` keys that override the options (e.g. ``pattern="harp"``).

    Returns
    -------
    callable
        ``solve(bridge, options) -> Design``, named ``solve_<form type>_<fixed values>``.
    """
    keys = set(form_keys(form_type)) - {"type"}

    def solve(bridge: BridgeScenario, options: Mapping) -> Design:
        """Solve this form for ``bridge`` with ``[form]`` keys ``options``; the form's Design."""
        if strict:
            table = dict(options)
            if table.setdefault("type", form_type) != form_type:
                raise InputError("form.type", table["type"], f"{form_type!r} for this solver")
            table.update(fixed)
            return solve_form(bridge, parse_form(table)).design
        table = {k: v for k, v in dict(options).items() if k in keys}
        table.update(fixed, type=form_type)
        return solve_form(bridge, parse_form(table), compare=False).design
    solve.__name__ = "solve_" + "_".join([form_type, *map(str, fixed.values())]).replace("-", "_")
    return solve


def solve_v_towers(bridge: BridgeScenario, options: Mapping) -> Design:
    """The suspension form with V-shaped towers, its legs at :data:`V_TOWER_REACH` of the hangers.

    For a study: ``options`` keys the suspension form does not have are ignored, as
    with :func:`form_solver`; the leg meets the cable at the hanger nearest
    ``V_TOWER_REACH`` of the half span's hangers from the tower (at least the first,
    short of mid-span), so that it sits at the same place on any grid.

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (span [m], rise [m], grid divisions ...).
    options : mapping
        The study's choices (``spacing`` [m] and the other suspension keys are used).

    Returns
    -------
    Design
        The sized, geometry-optimized form.
    """
    legs = v_tower_legs(bridge, options.get("spacing"))
    return form_solver("suspension", tower_legs=legs)(bridge, options)


def v_tower_legs(bridge: BridgeScenario, spacing: float | None = None) -> int:
    """The hanger, counted from the tower, at which a V-shaped tower's leg meets the cable.

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (span [m], grid divisions).
    spacing : float, optional
        Hanger spacing (default: the grid step). [m]

    Returns
    -------
    int
        round(:data:`V_TOWER_REACH` x hangers of the half span), at least 1 and short of
        mid-span. [-]

    Raises
    ------
    InputError
        Fewer than 2 hangers in the half span.
    """
    hangers = (bridge.divisions // 2 if spacing is None
               else max(1, round(0.5 * bridge.span / float(spacing))))
    if hangers < 2:
        raise InputError("bridge.divisions", bridge.divisions,
                         "at least 4 for V-shaped towers (a leg needs a hanger short of mid-span)")
    return max(1, min(hangers - 1, round(V_TOWER_REACH * hangers)))


#: Registered form solvers, by name: the package's forms, then any registered.
FORM_SOLVERS: dict[str, FormSolver] = {
    **{name: form_solver(form_type, **fixed) for name, (form_type, fixed)
       in _PACKAGE_FORMS.items()},
    V_TOWERS: solve_v_towers}


def register_form(name: str, solver: FormSolver) -> FormSolver:
    """Register ``solver`` under ``name`` (replacing any earlier one); return it.

    Parameters
    ----------
    name : str
        Name shown in pickers and tables, e.g. ``"suspension"``.
    solver : callable
        ``solver(bridge, options) -> Design``; raises ``SolveError`` or
        ``InputError`` when the form cannot be built.

    Returns
    -------
    callable
        ``solver``, unchanged.

    Raises
    ------
    InputError
        ``name`` is empty or the reference's name, or ``solver`` is not callable.
    """
    if not isinstance(name, str) or not name.strip() or name == REFERENCE:
        raise InputError("form", name, f"a non-empty name other than {REFERENCE!r}")
    if not callable(solver):
        raise InputError(f"form[{name!r}]", solver, "a callable solver(bridge, options)")
    FORM_SOLVERS[name] = solver
    return solver


def unregister_form(name: str) -> None:
    """Remove the form ``name`` from the registry (no error if absent).

    Parameters
    ----------
    name : str
        The registered name, e.g. ``"suspension"``.
    """
    FORM_SOLVERS.pop(name, None)


def available_forms() -> tuple[str, ...]:
    """Known forms first (in :data:`KNOWN_FORMS` order), then any other registered names.

    Returns
    -------
    tuple of str
        The form names a study offers.
    """
    return KNOWN_FORMS + tuple(n for n in FORM_SOLVERS if n not in KNOWN_FORMS)
