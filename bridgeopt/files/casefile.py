"""Scenario-file tables of multi-case studies: ``[[load_case]]``, ``[cost]``, and the
bridge's ``piers``, ``anchorages`` and ``[[bridge.channel]]``.

Called by :mod:`bridgeopt.files.scenario` (the field checks of
:mod:`bridgeopt.files.fields`, same strict checking: an unknown key or a
bad value raises :class:`~bridgeopt.errors.InputError` naming the key, the
value and the valid range).  Every key is listed with its unit in
``docs/scenario.md``.
"""

from __future__ import annotations

import dataclasses
from typing import Mapping

from bridgeopt.errors import InputError
from bridgeopt.files.fields import (KEYS, Shown, check_keys, entries, number, point, polygon,
                                    renamed, required, short, string, table, tables)
from bridgeopt.files.sections import parse_line_load, parse_point_load
from bridgeopt.model.loads import PATTERNS, LoadCase, UnitCosts, traffic_load
from bridgeopt.model.problem import Problem
from bridgeopt.solver.ground import build_grid
from bridgeopt.solver.layout import nodal_loads

__all__ = ["layout_cases", "bridge_cases", "cost_table", "crossing_keys", "check_cases_on_grid",
           "cases_dict", "cost_dict"]

_BASES = ("volume", "mass")


def _name(where: str, raw: Mapping, i: int, taken=()) -> str:
    name = string(f"{where}.name", raw["name"]) if "name" in raw else f"case {i + 1}"
    if name in taken:
        raise InputError(f"{where}.name", name, "a name not used by another case")
    return name


def layout_cases(data: Mapping) -> tuple[LoadCase, ...]:
    """``[[load_case]]`` tables of a layout file: each with ``[[load_case.load]]`` and
    ``[[load_case.line_load]]`` entries (as the top-level ones).

    Parameters
    ----------
    data : mapping
        The whole file (point loads [N], line loads [N/m], points [m]).

    Returns
    -------
    tuple of LoadCase
        In file order (empty without ``[[load_case]]``).

    Raises
    ------
    InputError
        A bad key or value, a traffic key, a case without loads, or a repeated name.
    """
    out = []
    for i, raw in enumerate(tables("load_case", data.get("load_case"))):
        where = f"load_case[{i}]"
        check_keys(raw, "load_case", where, "[[load_case]]")
        for key in ("pattern", "intensity", "side", "from", "to"):
            if key in raw:
                raise InputError(f"{where}.{key}", short(raw[key]),
                                 "left out of a layout file (traffic patterns are for bridge "
                                 "files; give [[load_case.load]] or [[load_case.line_load]])")
        try:
            loads = entries(raw, "load", parse_point_load)
        except InputError as err:
            raise renamed(err, "load", f"{where}.load") from None
        try:
            lines = entries(raw, "line_load", parse_line_load)
        except InputError as err:
            raise renamed(err, "line_load", f"{where}.line_load") from None
        if not loads and not lines:
            raise InputError(where, Shown("{...}"), "a case with at least one "
                             "[[load_case.load]] or [[load_case.line_load]]")
        out.append(LoadCase(_name(where, raw, i, [c.name for c in out]), loads, lines))
    return tuple(out)


def bridge_cases(data: Mapping, span: float) -> tuple[LoadCase, ...]:
    """``[[load_case]]`` tables of a bridge file: a traffic ``pattern`` on the deck.

    Parameters
    ----------
    data : mapping
        The whole file (intensities [N/m], extents [m]).
    span : float
        The bridge's span, the deck's length. [m]

    Returns
    -------
    tuple of LoadCase
        One traffic line load each, in file order.

    Raises
    ------
    InputError
        A bad key or value, or a repeated name.
    """
    out = []
    for i, raw in enumerate(tables("load_case", data.get("load_case"))):
        where = f"load_case[{i}]"
        check_keys(raw, "load_case", where, "[[load_case]]")
        for key in ("load", "line_load"):
            if key in raw:
                raise InputError(f"{where}.{key}", short(raw[key]),
                                 "left out of a bridge file (give pattern and intensity)")
        pattern = required(where, raw, "pattern", "one of " + ", ".join(map(repr, PATTERNS)))
        if pattern not in PATTERNS:
            raise InputError(f"{where}.pattern", short(pattern),
                             "one of " + ", ".join(map(repr, PATTERNS)))
        valid = "a number > 0 N/m (traffic load on the deck, downwards)"
        q = number(f"{where}.intensity", required(where, raw, "intensity", valid), valid,
                   lambda v: v > 0)
        side = raw.get("side", "left")
        if side not in ("left", "right") or (pattern != "half" and "side" in raw):
            raise InputError(f"{where}.side", short(side),
                             "'left' or 'right', only with pattern = 'half'")
        ends = {}
        for key in ("from", "to"):
            if key in raw:
                if pattern != "user":
                    raise InputError(f"{where}.{key}", short(raw[key]),
                                     "left out unless pattern = 'user'")
                ends[key] = number(f"{where}.{key}", raw[key], "an x-coordinate in m")
        load = traffic_load(pattern, intensity=q, deck=(0.0, span), start=ends.get("from"),
                            end=ends.get("to"), side=side, field=f"{where}.pattern")
        out.append(LoadCase(_name(where, raw, i, [c.name for c in out]), (), (load,)))
    return tuple(out)


def cost_table(data: Mapping, problem: Problem) -> UnitCosts | None:
    """The ``[cost]`` table: prices of tension and compression elements.

    Parameters
    ----------
    data : mapping
        The whole file (prices per m3, or per tonne with ``basis = "mass"``).
    problem : Problem
        The problem priced (its densities [kg/m3] turn prices per tonne into per m3).

    Returns
    -------
    UnitCosts or None
        Prices per m3; None without a ``[cost]`` table.
    """
    if "cost" not in data:
        return None
    raw = table("cost", data["cost"], "a table [cost] with keys " + ", ".join(KEYS["cost"]))
    check_keys(raw, "cost", "cost", "[cost]")
    basis = raw.get("basis", "volume")
    if basis not in _BASES:
        raise InputError("cost.basis", short(basis),
                         "'volume' (prices per m3) or 'mass' (prices per tonne)")
    unit = "per m3" if basis == "volume" else "per tonne"
    price = {}
    for key in ("tension", "compression"):
        valid = f"a number > 0 (price {unit})"
        price[key] = number(f"cost.{key}", required("cost", raw, key, valid), valid,
                            lambda v: v > 0)
    currency = string("cost.currency", raw["currency"]) if "currency" in raw else "cost unit"
    if basis == "mass":
        return UnitCosts.per_tonne(problem, price["tension"], price["compression"], currency)
    return UnitCosts(price["tension"], price["compression"], currency)


def crossing_keys(raw: Mapping) -> tuple[tuple, tuple, tuple]:
    """``piers``, ``anchorages`` and ``[[bridge.channel]]`` of a ``[bridge]`` table.

    Parameters
    ----------
    raw : mapping
        The ``[bridge]`` table (pier x [m], anchorage points [m], channel outlines [m]).

    Returns
    -------
    piers : tuple of float
        Pier x-coordinates. [m]
    anchorages : tuple of (float, float)
        Anchorage points. [m]
    channels : tuple of polygons
        Channel outlines, each a tuple of (x, z) points. [m]
    """
    piers = raw.get("piers", [])
    if not isinstance(piers, (list, tuple)):
        raise InputError("bridge.piers", short(piers), "a list of x-coordinates in m")
    piers = tuple(number(f"bridge.piers[{i}]", x, "an x-coordinate in m")
                  for i, x in enumerate(piers))
    anch = raw.get("anchorages", [])
    if not isinstance(anch, (list, tuple)):
        raise InputError("bridge.anchorages", short(anch), "a list of points [x, z] in m")
    anch = tuple(point(f"bridge.anchorages[{i}]", p) for i, p in enumerate(anch))
    channels = []
    for i, zone in enumerate(tables("bridge.channel", raw.get("channel"))):
        check_keys(zone, "bridge.channel", f"bridge.channel[{i}]", "[[bridge.channel]]")
        outline = required(f"bridge.channel[{i}]", zone, "outline",
                           "a list of at least 3 points [[x, z], ...] in m")
        channels.append(polygon(f"bridge.channel[{i}].outline", outline))
    return piers, anch, tuple(channels)


def check_cases_on_grid(problem: Problem, cases) -> None:
    """Every case's loads lie on grid nodes (errors name ``load_case[i]...``).

    Parameters
    ----------
    problem : Problem
        The problem whose grid the loads must meet.
    cases : iterable of LoadCase
        The cases to check (loads [N] at points [m]).

    Raises
    ------
    InputError
        Naming ``load_case[i].load...`` or ``load_case[i].line_load...``.
    """
    grid = build_grid(problem)
    for i, case in enumerate(cases):
        if not (case.loads or case.line_loads):
            continue
        try:
            nodal_loads(dataclasses.replace(problem, loads=case.loads,
                                            line_loads=case.line_loads), grid)
        except InputError as err:
            err = renamed(err, "line_load", f"load_case[{i}].line_load")
            raise renamed(err, "load", f"load_case[{i}].load") from None


def cases_dict(cases, *, bridge: bool) -> list[dict]:
    """``[[load_case]]`` entries in the file schema (bridge traffic as 'user' extents).

    Parameters
    ----------
    cases : iterable of LoadCase
        Loads [N], line loads [N/m], points [m].
    bridge : bool
        The cases of a bridge file (traffic on the deck).

    Returns
    -------
    list of dict
        One table per case, keys as ``docs/scenario.md``.
    """
    out = []
    for c in cases:
        d: dict = {"name": c.name}
        if bridge:
            (q,) = c.line_loads
            d.update(pattern="user", intensity=q.intensity, **{"from": q.start[0], "to": q.end[0]})
        else:
            if c.loads:
                d["load"] = [{"at": list(p.at), "force": list(p.force)} for p in c.loads]
            if c.line_loads:
                d["line_load"] = [{"from": list(q.start), "to": list(q.end),
                                   "intensity": q.intensity} for q in c.line_loads]
        out.append(d)
    return out


def cost_dict(costs: UnitCosts) -> dict:
    """The ``[cost]`` table in the file schema (prices per m3).

    Parameters
    ----------
    costs : UnitCosts
        The unit costs (per m3).

    Returns
    -------
    dict
        Keys ``tension``, ``compression``, ``basis`` (``"volume"``), ``currency``.
    """
    return {"tension": costs.tension, "compression": costs.compression, "basis": "volume",
            "currency": costs.currency}
