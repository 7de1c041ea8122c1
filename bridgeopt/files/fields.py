"""Primitive checks of scenario-file values: numbers, strings, points, polygons, tables and keys.

Every check raises :class:`~bridgeopt.errors.InputError` whose one-line message
names the key (dotted, with the index of an array-of-tables entry, e.g.
``support[1].fix``), the value and the valid range.  A value too long for one
line is shown shortened; a key that is absent is shown as :data:`MISSING`.
:data:`KEYS` lists the valid keys of every table of a scenario file, in the
order ``docs/scenario.md`` lists them.

Used by :mod:`bridgeopt.files.sections`, :mod:`bridgeopt.files.casefile` and
:mod:`bridgeopt.files.scenario`.
"""

from __future__ import annotations

import difflib
import math
import numbers
from typing import Callable, Mapping

from bridgeopt.errors import InputError
from bridgeopt.model.plane import crossing_edges, polygon_area

__all__ = ["KEYS", "Shown", "MISSING", "short", "is_number", "is_whole", "number", "string",
           "point", "polygon", "table", "tables", "check_keys", "renamed", "required",
           "entries"]

#: Valid keys of every table, in the order the documentation lists them.
KEYS: dict[str, tuple[str, ...]] = {
    "layout": ("name", "description", "copies", "domain", "material", "compression_material",
               "support", "load", "line_load", "symmetry", "solve", "load_case", "cost"),
    "bridge-file": ("name", "description", "bridge", "material", "compression_material",
                    "form", "solve", "load_case", "cost"),
    "domain": ("x", "z", "outline", "spacing", "excluded"),
    "domain.excluded": ("outline",),
    "material": ("preset", "name", "strength", "tension_strength", "compression_strength",
                 "density"),
    "support": ("at", "fix"),
    "load": ("at", "force"),
    "line_load": ("from", "to", "intensity"),
    "symmetry": ("x",),
    "bridge": ("span", "rise", "depth", "deck_load", "arrangement", "divisions", "name",
               "back_span", "foundation_depth", "piers", "anchorages", "channel"),
    "bridge.channel": ("outline",),
    "solve": ("member_adding", "batch", "geometry_optimization"),
    "load_case": ("name", "pattern", "intensity", "side", "from", "to", "load", "line_load"),
    "cost": ("tension", "compression", "basis", "currency"),
}

#: Keys that are planned but not available in this version (clear message, not a typo hint).
PLANNED: dict[str, tuple[str, ...]] = {}

#: Hints for top-level keys that are valid elsewhere.
HINTS = {
    "excluded": "excluded zones go in [[domain.excluded]] tables",
    "spacing": "spacing goes in the [domain] table",
    "supports": "each support is a [[support]] table",
    "loads": "each point load is a [[load]] table",
    "line_loads": "each line load is a [[line_load]] table",
    "form": "a [form] table belongs to a bridge scenario (with a [bridge] table)",
}


class Shown:
    """A value whose repr is the given text (for messages about missing or long values).

    Parameters
    ----------
    text : str
        What a message shows for the value.
    """

    def __init__(self, text: str) -> None:
        self.text = text

    def __repr__(self) -> str:
        return self.text


#: Stand-in value of a required key that is absent.
MISSING = Shown("<missing>")


def short(value: object) -> object:
    """The value, or a short stand-in when its repr would not fit on a line.

    Parameters
    ----------
    value : object
        A value read from a file.

    Returns
    -------
    object
        ``value`` itself, or a :class:`Shown` stand-in (``{...}`` for a table, the
        first 72 characters of a long repr).
    """
    if isinstance(value, dict):
        return Shown("{...}")
    text = repr(value)
    return value if len(text) <= 80 else Shown(text[:72] + " ...")


def is_number(value: object) -> bool:
    """True for a finite int or float (not a bool).

    Parameters
    ----------
    value : object
        Any value; nan, inf and ``True`` are not numbers here.

    Returns
    -------
    bool
        Whether ``value`` is a finite real number.
    """
    return (isinstance(value, numbers.Real) and not isinstance(value, bool)
            and math.isfinite(value))


def is_whole(value: object) -> bool:
    """True for an int (not a bool): a count or an index, as a file gives it.

    Parameters
    ----------
    value : object
        Any value; a float with no fraction (``3.0``) is not whole.

    Returns
    -------
    bool
        Whether ``value`` is a Python or numpy integer.
    """
    return isinstance(value, numbers.Integral) and not isinstance(value, bool)


def number(field: str, value: object, valid: str,
           ok: Callable[[float], bool] = lambda v: True) -> float:
    """A finite number (int or float, not bool) passing ``ok``.

    Parameters
    ----------
    field, value : str, object
        The dotted key (named in the message) and the value read.
    valid : str
        The valid range, with its unit (``"a number > 0 m"``).
    ok : callable, optional
        Further condition on the value.

    Returns
    -------
    float
        The value, in the unit ``valid`` names.

    Raises
    ------
    InputError
        Not a finite number, or ``ok`` fails.
    """
    if not is_number(value) or not ok(value):
        raise InputError(field, short(value), valid)
    return float(value)


def string(field: str, value: object, valid: str = "a non-empty text string") -> str:
    """A non-empty text string.

    Parameters
    ----------
    field, value : str, object
        The dotted key (named in the message) and the value read.
    valid : str, optional
        What is valid, for the message.

    Returns
    -------
    str
        The value, unchanged.
    """
    if not isinstance(value, str) or not value.strip():
        raise InputError(field, short(value), valid)
    return value


def point(field: str, value: object, valid: str = "a pair [x, z] of numbers in m") \
        -> tuple[float, float]:
    """A pair of finite numbers.

    Parameters
    ----------
    field, value : str, object
        The dotted key (named in the message) and the value read. [m]
    valid : str, optional
        What is valid, with its unit, for the message.

    Returns
    -------
    (float, float)
        The point (x, z). [m]
    """
    if (not isinstance(value, (list, tuple)) or len(value) != 2
            or not all(is_number(v) for v in value)):
        raise InputError(field, short(value), valid)
    return (float(value[0]), float(value[1]))


def polygon(field: str, value: object) -> tuple[tuple[float, float], ...]:
    """A simple polygon of at least 3 points (a repeated closing point is dropped).

    Parameters
    ----------
    field, value : str, object
        The dotted key (named in the message) and the points read, ``[[x, z], ...]``. [m]

    Returns
    -------
    tuple of (float, float)
        The vertices, without a repeated closing point. [m]
    """
    valid = "a list of at least 3 points [[x, z], ...] in m forming a simple polygon"
    if not isinstance(value, (list, tuple)) or len(value) < 3:
        raise InputError(field, short(value), valid)
    pts = tuple(point(f"{field}[{i}]", p) for i, p in enumerate(value))
    if pts[0] == pts[-1]:
        pts = pts[:-1]  # a closed ring written out: drop the repeated first point
        if len(pts) < 3:
            raise InputError(field, short(value), valid)
    if polygon_area(pts) == 0:
        raise InputError(field, short(value), "a polygon of non-zero area (points in order "
                         "around the boundary, m)")
    crossing = crossing_edges(pts)
    if crossing is not None:
        i, j = crossing
        raise InputError(field, short(value),
                         f"a simple polygon (edges {i} and {j} cross or touch; "
                         "list the points in order around the boundary)")
    return pts


def table(field: str, value: object, what: str) -> Mapping:
    """A table (mapping).

    Parameters
    ----------
    field, value : str, object
        The dotted key (named in the message) and the value read.
    what : str
        The table expected, for the message.

    Returns
    -------
    Mapping
        The value, unchanged.
    """
    if not isinstance(value, Mapping):
        raise InputError(field, short(value), what)
    return value


def tables(field: str, value: object) -> list[Mapping]:
    """An array of tables ``[[field]]`` (absent -> empty).

    Parameters
    ----------
    field, value : str, object
        The dotted key (named in the message) and the array read (None: absent).

    Returns
    -------
    list of Mapping
        The tables, or an empty list when absent.
    """
    if value is None:
        return []
    if not isinstance(value, (list, tuple)) or not all(isinstance(v, Mapping) for v in value):
        raise InputError(field, short(value),
                         f"an array of tables, written [[{field}]] once per entry")
    return value


def check_keys(raw: Mapping, kind: str, prefix: str, label: str) -> None:
    """Raise :class:`InputError` for the first key of ``raw`` not in ``KEYS[kind]``.

    Parameters
    ----------
    raw : mapping
        The table read.
    kind : str
        Its key in :data:`KEYS`.
    prefix : str
        Dotted key of the table ("" at the top level).
    label : str
        The table as the message names it (``"[[support]]"``).
    """
    valid = KEYS[kind]
    for key in raw:
        if key in valid:
            continue
        name = f"{prefix}.{key}" if prefix else key
        keys = ", ".join(valid)
        if key in PLANNED.get(kind, ()):
            raise InputError(name, short(raw[key]),
                             f"not available in this version of bridgeopt (planned); remove it. "
                             f"Keys of {label}: {keys}")
        hint = ""
        if not prefix and key in HINTS:
            hint = f"; {HINTS[key]}"
        else:
            close = difflib.get_close_matches(key, valid, n=1)
            if close:
                hint = f" (did you mean {close[0]!r}?)"
        raise InputError(name, short(raw[key]), f"one of the keys of {label}: {keys}{hint}")


def renamed(err: InputError, old: str, new: str) -> InputError:
    """The same error with the field prefix ``old`` replaced by ``new``.

    Parameters
    ----------
    err : InputError
        The error raised with the old prefix.
    old, new : str
        Dotted key prefixes (``"load"`` -> ``"load_case[0].load"``).

    Returns
    -------
    InputError
        With the same value and valid range.
    """
    f = err.field
    if f == old or f.startswith(old + "."):
        f = new + f[len(old):]
    return InputError(f, err.value, err.valid)


def required(where: str, raw: Mapping, key: str, valid: str) -> object:
    """``raw[key]``; an :class:`InputError` naming ``where.key`` when it is absent.

    Parameters
    ----------
    where : str
        Dotted key of the table.
    raw : mapping
        The table read.
    key : str
        The key looked up.
    valid : str
        What is valid, for the message.

    Returns
    -------
    object
        The value read, unchecked.
    """
    if key not in raw:
        raise InputError(f"{where}.{key}", MISSING, f"{valid} (required)")
    return raw[key]


def entries(data: Mapping, key: str, build: Callable[[str, Mapping], object]) -> tuple:
    """Each ``[[key]]`` table of ``data`` checked and built by ``build(where, raw)``.

    Parameters
    ----------
    data : mapping
        The table holding the array.
    key : str
        The array's key, also its :data:`KEYS` entry.
    build : callable
        ``build("key[i]", raw)`` -> the entry.

    Returns
    -------
    tuple
        The built entries, in file order (empty when the array is absent).
    """
    out = []
    for i, raw in enumerate(tables(key, data.get(key))):
        check_keys(raw, key, f"{key}[{i}]", f"[[{key}]]")
        try:
            out.append(build(f"{key}[{i}]", raw))
        except InputError as err:
            raise renamed(err, key, f"{key}[{i}]") from None
    return tuple(out)
