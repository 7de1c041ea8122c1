"""The crossing an option stands on: its name, its reference optimum, its series name.

A crossing is a span, its supports and its envelope (issue 11: one crossing, one
reference).  A form whose problem has other supports than the scenario's (the
piers of intermediate pylons, pier foundations moved for a deck arch) is its own
crossing: :func:`crossing_name` says how it differs (``"2 piers"``),
:func:`series_name` names the form with it wherever it is shown, and
:func:`reference_on` is that crossing's reference optimum.
"""

from __future__ import annotations

from functools import lru_cache

from bridgeopt.files.scenario import Scenario
from bridgeopt.solver.design import Design
from bridgeopt.study.solve import solve_scenario

__all__ = ["crossing_name", "series_name", "reference_on"]


def series_name(option: str, crossing: str = "") -> str:
    """Legend and table name of a series: the option, with its crossing when it has its own.

    Parameters
    ----------
    option : str
        Option name (``"cable-stayed fan"``, ``"reference optimum"`` ...).
    crossing : str
        The ``crossing`` column: ``""`` for the scenario's own supports, else e.g.
        ``"2 piers"``.

    Returns
    -------
    str
    """
    return f"{option} ({crossing})" if crossing else option


def crossing_name(problem, plain) -> str:
    """How the supports of ``problem`` differ from those of the crossing's ``plain`` problem.

    Parameters
    ----------
    problem : Problem
        The problem an option was solved on.
    plain : Problem
        The crossing's own problem (its reference optimum's).

    Returns
    -------
    str
        ``""`` for the same supports; ``"3 piers"`` for intermediate piers (per
        span, counted over the whole span of a half model), ``"foundations 60 m
        below the deck"`` for pier foundations moved, joined by ", "; ``"own
        supports"`` for any other difference.
    """
    if problem is None or plain is None or (problem.supports, problem.mirror_lines) == \
            (plain.supports, plain.mirror_lines):
        return ""
    mirrors = set(plain.mirror_lines)
    extra = [s for s in problem.supports if s not in plain.supports]
    lost = [s for s in plain.supports if s not in problem.supports]
    moved = [s for s in extra if any(t.at[0] == s.at[0] and t.fix == s.fix for t in lost)]
    inner = [s for s in extra if s not in moved and s.fix == "z"]
    if set(problem.mirror_lines) != mirrors or len(moved) != len(lost) \
            or len(moved) + len(inner) != len(extra):
        return "own supports"
    parts = []
    if inner:
        copies = max(1, round(problem.copies))
        n = sum(1 if s.at[0] in mirrors else copies for s in inner)
        parts.append(f"{n} pier" + ("s" if n != 1 else ""))
    if moved:
        depths = sorted({-s.at[1] for s in moved})
        parts.append("foundations " + ", ".join(f"{d:g}" for d in depths) + " m below the deck")
    return ", ".join(parts)


@lru_cache(maxsize=64)
def reference_on(problem) -> Design:
    """The reference optimum of the crossing ``problem`` (a form's own supports), cached.

    Parameters
    ----------
    problem : Problem
        The problem a form was solved on (:func:`~bridgeopt.forms.form_problem`).

    Raises
    ------
    SolveError, InputError
    """
    return solve_scenario(Scenario(name=problem.name, layout=problem)).design
