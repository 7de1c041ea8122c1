"""Sweep files: a scenario file in which any value may be a list -> one case per combination.

A sweep file has the keys and tables of a scenario file (``docs/scenario.md``);
any value may instead be a **list of values**, and the sweep has one case per
combination of the listed values (their Cartesian product).  A single table
(``[bridge]``, ``[material]``, ``[compression_material]``, ``[form]``,
``[solve]``, ``[domain]``) may also be written as an array of tables
(``[[form]]``, ``[[material]]``): each entry is one alternative, and its own
values may again be lists.  Alternatives are how forms with different keys go
in one sweep::

    [bridge]
    span = [800.0, 1200.0]
    rise = 300.0
    depth = 60.0
    deck_load = 1.8e5

    [material]
    preset = ["steel", "cfrp"]

    [[form]]
    type = "reference"

    [[form]]
    type = "cable-stayed"
    pattern = ["fan", "harp"]

is 2 x 2 x (1 + 2) = 12 cases.  Values that are lists in a scenario file (a
point ``at = [x, z]``, a domain's ``x = [x0, x1]``, an ``outline``) are swept
by a list of them (``at = [[0.0, 0.0], [0.0, 5.0]]``); arrays of tables that
are arrays in a scenario file (``[[support]]``, ``[[load]]`` ...) are not
alternatives (every entry applies), but their values may be lists.

Keys are checked before anything runs: an unknown key, or an empty list, is an
:class:`~bridgeopt.errors.InputError` naming it.  Each case is then checked as a
scenario file; a case whose values do not fit together is recorded as a bad
case by the runner, not raised.
"""

from __future__ import annotations

import difflib
import hashlib
import itertools
import json
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Mapping

from bridgeopt.errors import InputError
from bridgeopt.forms.specs import FORM_TYPES, form_keys
from bridgeopt.files.io import read_toml
from bridgeopt.files.scenario import KEYS

__all__ = ["Case", "Sweep", "expand_sweep", "load_sweep", "case_key", "flatten"]

#: Tables written once in a scenario file; in a sweep file a list of them is a list of alternatives.
SINGLE_TABLES = {("bridge",): "bridge", ("material",): "material",
                 ("compression_material",): "material", ("form",): "form",
                 ("solve",): "solve", ("domain",): "domain", ("cost",): "cost"}
#: Arrays of tables in a scenario file (each entry applies; not alternatives).
ARRAY_TABLES = {("support",): "support", ("load",): "load", ("line_load",): "line_load",
                ("symmetry",): "symmetry", ("domain", "excluded"): "domain.excluded",
                ("load_case",): "load_case"}
#: How deeply a value is nested in lists in a scenario file (0 for a number or a string).
LIST_DEPTH = {("domain", "x"): 1, ("domain", "z"): 1, ("domain", "outline"): 2,
              ("domain", "excluded", "outline"): 2, ("support", "at"): 1, ("load", "at"): 1,
              ("load", "force"): 1, ("line_load", "from"): 1, ("line_load", "to"): 1,
              ("bridge", "piers"): 1, ("bridge", "anchorages"): 2,
              ("bridge", "channel", "outline"): 2, ("load_case", "load", "at"): 1,
              ("load_case", "load", "force"): 1, ("load_case", "line_load", "from"): 1,
              ("load_case", "line_load", "to"): 1}
#: Most cases in one sweep.
MAX_CASES = 100_000


def _name(path: tuple[str, ...]) -> str:
    return ".".join(path)


def _depth(value: Any) -> int:
    """How deeply ``value`` is nested in lists (judged by first elements)."""
    depth = 0
    while isinstance(value, list) and value:
        depth += 1
        value = value[0]
    return depth + (1 if isinstance(value, list) else 0)


def _check_keys(table: Mapping, path: tuple[str, ...], valid: tuple[str, ...], label: str) -> None:
    for key in table:
        if key not in valid:
            close = difflib.get_close_matches(str(key), valid, n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            raise InputError(_name(path + (str(key),)), "{...}" if isinstance(table[key], Mapping)
                             else table[key], f"one of the keys of {label}: "
                             + ", ".join(valid) + hint)


def _entries(value: Any, path: tuple[str, ...]) -> list[Mapping]:
    """A table, or the entries of an array of tables, at ``path``."""
    if isinstance(value, Mapping):
        return [value]
    if isinstance(value, list) and value and all(isinstance(v, Mapping) for v in value):
        return list(value)
    raise InputError(_name(path), value if not isinstance(value, list) else "[...]",
                     f"a table [{_name(path)}] or an array of tables [[{_name(path)}]]")


def _form_types(entry: Mapping) -> list[str]:
    kind = entry.get("type")
    kinds = kind if isinstance(kind, list) else [kind]
    bad = [k for k in kinds if k not in FORM_TYPES]
    if bad or not kinds:
        raise InputError("form.type", bad[0] if bad else kind,
                         "one of " + ", ".join(map(repr, FORM_TYPES)) + " (or a list of them)")
    return kinds


def check_sweep_keys(data: Mapping) -> None:
    """Raise :class:`InputError` for the first unknown key of a sweep file."""
    if not isinstance(data, Mapping):
        raise InputError("sweep", "not a table", "a table of keys (a TOML document)")
    kind = "bridge-file" if "bridge" in data else "layout"
    _check_keys(data, (), KEYS[kind], "a bridge sweep file" if kind == "bridge-file"
                else "a layout sweep file")
    for path, table_kind in list(SINGLE_TABLES.items()) + list(ARRAY_TABLES.items()):
        if len(path) > 1 or path[0] not in data:
            continue  # [[domain.excluded]] is checked with each [domain] below
        for entry in _entries(data[path[0]], path):
            if table_kind == "form":
                kinds = _form_types(entry)  # keys every listed type has
                valid = tuple(k for k in form_keys(kinds[0])
                              if all(k in form_keys(t) for t in kinds))
                _check_keys(entry, path, valid, "[form] with type = "
                            + " or ".join(map(repr, _form_types(entry))))
            else:
                _check_keys(entry, path, KEYS[table_kind], f"[{_name(path)}]")
            if table_kind == "domain" and "excluded" in entry:
                for zone in _entries(entry["excluded"], ("domain", "excluded")):
                    _check_keys(zone, ("domain", "excluded"), KEYS["domain.excluded"],
                                "[[domain.excluded]]")


def _expand(value: Any, path: tuple[str, ...]) -> list[Any]:
    """Every value ``value`` stands for (a one-element list when nothing varies)."""
    if isinstance(value, Mapping):
        keys = list(value)
        choices = [_expand(value[k], path + (str(k),)) for k in keys]
        return [dict(zip(keys, combo)) for combo in itertools.product(*choices)]
    if not isinstance(value, list):
        return [value]
    if not value:
        raise InputError(_name(path), [], "a value, or a non-empty list of values to sweep")
    if all(isinstance(v, Mapping) for v in value):
        if path in ARRAY_TABLES:   # every entry applies: the product of their variations
            return [list(combo) for combo in itertools.product(
                *(_expand(v, path) for v in value))]
        return [case for v in value for case in _expand(v, path)]  # alternatives
    depth = _depth(value)
    if depth > LIST_DEPTH.get(path, 0) + 1:
        raise InputError(_name(path), value, _list_valid(path))
    if depth > LIST_DEPTH.get(path, 0):
        return [case for v in value for case in _expand(v, path)]
    return [value]


def _list_valid(path: tuple[str, ...]) -> str:
    """What a swept value at ``path`` may be (for the message on a list nested too deeply)."""
    own = LIST_DEPTH.get(path, 0)
    if own == 0:
        return "a value, or a list of values to sweep (not a list of lists)"
    return (f"a value nested {own} list(s) deep, or a list of such values to sweep "
            "(one level more at the most)")


def _count(value: Any, path: tuple[str, ...]) -> int:
    """How many values :func:`_expand` gives for ``value``, without building them."""
    if isinstance(value, Mapping):
        n = 1
        for k, v in value.items():
            n *= _count(v, path + (str(k),))
        return n
    if not isinstance(value, list) or not value:
        return 1
    if all(isinstance(v, Mapping) for v in value):
        counts = [_count(v, path) for v in value]
        if path in ARRAY_TABLES:
            n = 1
            for c in counts:
                n *= c
            return n
        return sum(counts)
    depth = _depth(value)
    if depth > LIST_DEPTH.get(path, 0) + 1:
        raise InputError(_name(path), value, _list_valid(path))
    if depth > LIST_DEPTH.get(path, 0):
        return sum(_count(v, path) for v in value)
    return 1


def case_key(data: Mapping) -> str:
    """A stable identifier of a case: a hash of its scenario dict (16 hex digits).

    Parameters
    ----------
    data : mapping
        The case as a scenario-file dict; key order does not matter.

    Returns
    -------
    str
        The first 16 hex digits of the SHA-256 of its sorted JSON.
    """
    text = json.dumps(data, sort_keys=True, separators=(",", ":"), default=str)
    return hashlib.sha256(text.encode()).hexdigest()[:16]


def flatten(data: Mapping, prefix: str = "") -> dict[str, Any]:
    """A scenario dict as one level of dotted keys, as messages name them (``support[1].at``).

    Values that are lists (points, outlines) become JSON text.

    Parameters
    ----------
    data : mapping
        A scenario-file dict (tables nested as TOML gives them).
    prefix : str
        Put before every key (used for the nested tables).

    Returns
    -------
    dict
        Dotted key -> value.
    """
    out: dict[str, Any] = {}
    for key, value in data.items():
        name = f"{prefix}{key}"
        if isinstance(value, Mapping):
            out.update(flatten(value, name + "."))
        elif isinstance(value, list) and value and all(isinstance(v, Mapping) for v in value):
            for i, entry in enumerate(value):
                out.update(flatten(entry, f"{name}[{i}]."))
        elif isinstance(value, list):
            out[name] = json.dumps(value)
        else:
            out[name] = value
    return out


@dataclass(frozen=True)
class Case:
    """One combination of a sweep: a scenario-file dict and its stable key.

    Parameters
    ----------
    index : int
        Position in the sweep (0-based). [-]
    key : str
        :func:`case_key` of ``data``; finished keys are not run again.
    data : dict
        The case as a scenario-file dict (``parse_scenario`` reads it).
    """

    index: int
    key: str
    data: dict = field(compare=False)

    @property
    def inputs(self) -> dict[str, Any]:
        """The case's inputs as dotted keys (``bridge.span``, ``form.type`` ...)."""
        return flatten(self.data)


@dataclass(frozen=True)
class Sweep:
    """An expanded sweep file.

    Parameters
    ----------
    name : str
        The sweep file's ``name`` (default ``"sweep"``).
    cases : tuple of Case
        Every distinct combination, in case order.
    varied : tuple of str
        Dotted keys whose value differs between cases.
    source : str
        Where the sweep was read from, for messages.
    """

    name: str
    cases: tuple
    varied: tuple
    source: str = "<dict>"

    def __len__(self) -> int:
        return len(self.cases)


def expand_sweep(data: Mapping, *, source: str = "<dict>") -> Sweep:
    """Every case of a sweep file given as a dict (as :func:`tomllib.load` returns it).

    Parameters
    ----------
    data : mapping
        The sweep file: scenario tables in which any value may be a list of
        values, and ``[[table]]`` alternatives; values in SI units (N, m, Pa).
    source : str
        Where the data came from, for messages.

    Returns
    -------
    Sweep

    Raises
    ------
    InputError
        An unknown key, an empty list, or more than :data:`MAX_CASES` cases.
    """
    check_sweep_keys(data)
    count = _count(data, ())
    if count > MAX_CASES:  # refused before the product is built
        raise InputError("sweep", f"{count} cases", f"at most {MAX_CASES} cases (split the sweep)")
    combos = _expand(dict(data), ())
    seen: dict[str, int] = {}
    cases = []
    for combo in combos:
        key = case_key(combo)
        if key in seen:
            continue  # the same case twice (alternatives that coincide)
        seen[key] = len(cases)
        cases.append(Case(index=len(cases), key=key, data=combo))
    flat = [c.inputs for c in cases]
    names = list(dict.fromkeys(k for f in flat for k in f))
    varied = tuple(k for k in names if len({json.dumps(f.get(k), default=str) for f in flat}) > 1)
    name = data.get("name") if isinstance(data.get("name"), str) else "sweep"
    return Sweep(name=name, cases=tuple(cases), varied=varied, source=source)


def load_sweep(path: str | Path) -> Sweep:
    """Read a sweep file (TOML) and expand it; see :func:`expand_sweep`.

    Parameters
    ----------
    path : path
        The sweep file (``.toml``).

    Returns
    -------
    Sweep
    """
    path = Path(path)
    data = read_toml(path, "sweep file")
    return expand_sweep(data, source=str(path))
