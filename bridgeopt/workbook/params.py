"""Notebook parameters: their text converted as the notebook converts it, and checked
before a report runs, so that a bad ``--param`` is one clear line and never an HTML
report whose body is an error.

A study notebook declares its parameters in its cell tagged ``parameters`` as
``name = workbook.param("name", default, fast=...)``; the default's type is the
parameter's type.  :data:`RANGES` gives the valid values of the names the study
notebooks use.
"""

from __future__ import annotations

import ast
import difflib
import math
from pathlib import Path
from typing import Any, Mapping

from bridgeopt.errors import InputError
from bridgeopt.model.bridge import ARRANGEMENTS
from bridgeopt.model.limits import DECK_LOAD, HEIGHT_PER_SPAN, SPAN
from bridgeopt.model.materials import PRESETS

__all__ = ["convert_text", "notebook_parameters", "check_parameters", "RANGES"]

#: Valid values of the study notebooks' parameters: ``(low, high, unit)`` for numbers
#: (each item of a list), a tuple of names for choices.
RANGES: dict[str, Any] = {
    "span": (*SPAN, "m"), "spans": (*SPAN, "m"),
    "rise": (0.0, HEIGHT_PER_SPAN * SPAN[1], "m"), "depth": (0.0, HEIGHT_PER_SPAN * SPAN[1], "m"),
    "rise_ratio": (0.0, HEIGHT_PER_SPAN, "(height / span)"),
    "depth_ratio": (0.0, HEIGHT_PER_SPAN, "(depth / span)"),
    "span_to_rise": (0.1, 1000.0, "(span / rise)"),
    "deck_load": (*DECK_LOAD, "N/m"),
    "divisions": (0, 240, "(even; 0 keeps the scenario file's)"),
    "pylons": (1, 4, "(pylons per span)"), "pylon_counts": (1, 4, "(pylons per span)"),
    "foundation_depth": (0.0, HEIGHT_PER_SPAN * SPAN[1], "m (below the deck)"),
    "foundation_cost": (0.0, 1e15, "(currency per foundation)"),
    "steel_cost": (1e-9, 1e15, "(currency per m3)"),
    "material": tuple(PRESETS), "arrangement": ARRANGEMENTS,
}
_FORM_NAMES = ("form", "forms")
#: Parameters every notebook has (``fast``: the small variant the tests run).
COMMON = {"fast": False}


def convert_text(text: str, default: Any) -> Any:
    """``text`` converted to the type of ``default`` (bool, int, float, str or list).

    Parameters
    ----------
    text : str
        The value as written (an environment variable, or ``--param NAME=VALUE``).
    default : object
        The parameter's default; a list converts comma-separated text item by item.

    Returns
    -------
    object

    Raises
    ------
    ValueError
        When the text does not convert.
    """
    if isinstance(default, bool):
        return text.strip().lower() in ("1", "true", "yes", "on")
    if isinstance(default, int):
        return int(text)
    if isinstance(default, float):
        return float(text)
    if isinstance(default, (list, tuple)):
        kind = type(default[0]) if default else float
        return [kind(v) for v in text.split(",") if v.strip()]
    return text


def notebook_parameters(notebook: str | Path) -> dict[str, Any]:
    """The parameters a notebook declares, with their defaults.

    Parameters
    ----------
    notebook : path
        A study notebook (``.ipynb``).

    Returns
    -------
    dict
        Name -> default, from the ``workbook.param(name, default)`` calls of its cell
        tagged ``parameters`` (empty when it has none).
    """
    import nbformat

    nb = nbformat.read(str(notebook), as_version=4)
    found: dict[str, Any] = {}
    for cell in nb.cells:
        if cell.get("cell_type") != "code" or "parameters" not in cell.get("metadata", {}).get(
                "tags", []):
            continue
        for node in ast.walk(ast.parse(cell.source)):
            if (isinstance(node, ast.Call) and getattr(node.func, "attr", None) == "param"
                    and len(node.args) >= 2 and isinstance(node.args[0], ast.Constant)):
                try:
                    found[node.args[0].value] = ast.literal_eval(node.args[1])
                except ValueError:
                    continue
    return found


def _check_value(name: str, item: str, value: Any) -> None:
    rule = RANGES.get(name)
    values = value if isinstance(value, list) else [value]
    if name in _FORM_NAMES:
        from bridgeopt.study import available_forms

        rule = tuple(available_forms())
    if isinstance(rule, tuple) and rule and isinstance(rule[0], str):
        for v in values:
            if v not in rule:
                raise InputError("--param", item, f"{name} one of " + ", ".join(map(repr, rule)))
        return
    if rule is None:
        return
    low, high, unit = rule
    for v in values:
        if isinstance(v, (int, float)) and not isinstance(v, bool):
            if not math.isfinite(v) or not low <= v <= high:
                raise InputError("--param", item, f"{name} from {low:g} to {high:g} {unit}")
            if name == "divisions" and v % 2:
                raise InputError("--param", item, f"{name} an even whole number from {low:g} "
                                 f"to {high:g} {unit}")
    if not values:
        raise InputError("--param", item, f"{name}: at least one value, comma-separated")


def check_parameters(notebook: str | Path, parameters: Mapping[str, str]) -> dict[str, Any]:
    """Check ``--param`` values against the notebook's parameters before it runs.

    Parameters
    ----------
    notebook : path
        The study notebook.
    parameters : mapping of str to str
        Name -> value text, as given on the command line.

    Returns
    -------
    dict
        Name -> converted value.

    Raises
    ------
    InputError
        Naming ``--param`` with ``NAME=VALUE``: an unknown name (with the notebook's names),
        a value that does not convert, or one outside :data:`RANGES`.
    """
    known = {**notebook_parameters(notebook), **COMMON}
    out = {}
    for name, text in parameters.items():
        item = f"{name}={text}"
        if name not in known:
            close = difflib.get_close_matches(name, list(known), n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            raise InputError("--param", item, "a parameter of this notebook: "
                             + ", ".join(known) + hint)
        try:
            value = convert_text(text, known[name])
        except ValueError:
            raise InputError("--param", item, f"{name} a value like {known[name]!r}") from None
        _check_value(name, item, value)
        out[name] = value
    return out
