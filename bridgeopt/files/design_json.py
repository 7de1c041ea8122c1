"""Design -> JSON-ready dict, and an atomic JSON writer.

:func:`design_to_dict` turns a :class:`~bridgeopt.solver.design.Design` into plain
Python values (dicts, lists, str, float, int, bool, None) in SI units, with
the scenario's inputs and the cautions every output carries.  Non-finite
numbers become ``None`` so the result is strict JSON.

Top-level keys: ``bridgeopt_version``, ``schema``, ``name``, ``kind``,
``source``, ``status``, ``message``, ``volume`` [m3], ``weight`` [N],
``weight_kN``, ``mass_t``, ``model_volume`` [m3], ``copies``,
``normalised_volume`` (bridges; else null), ``applied_load`` [N], ``nodes``,
``members``, ``loads``, ``reactions``, ``stats``, ``inputs``, ``derived``,
``units``, ``cautions``; for a bridge form also ``reference_volume`` [m3],
``volume_ratio`` [-] and ``form`` (see :func:`design_to_dict`).
"""

from __future__ import annotations

import json
import math
import os
from pathlib import Path
from typing import Any

import numpy as np

from bridgeopt.cautions import CAUTION_LINES, CAUTIONS
from bridgeopt.solver.design import Design
from bridgeopt.files.io import atomic_write
from bridgeopt.model.materials import GRAVITY
from bridgeopt.files.scenario import Scenario, problem_dict

__all__ = ["SCHEMA", "UNITS", "design_to_dict", "scenario_inputs", "write_json", "to_json",
           "plain_json"]

#: Identifier of the JSON layout written here.
SCHEMA = "bridgeopt.design/1"

#: Units of the numbers in the JSON.
UNITS = {
    "length": "m", "coordinates": "m", "force": "N", "line_load": "N/m", "volume": "m3",
    "weight": "N", "weight_kN": "kN", "mass_t": "t (1000 kg)", "stress": "Pa",
    "density": "kg/m3", "gravity": "m/s2", "time": "s", "normalised_volume": "-",
}


def plain_json(value: Any) -> Any:
    """``value`` with numpy types turned into Python ones and non-finite floats into None.

    Parameters
    ----------
    value : object
        Numbers, strings, None, numpy scalars and arrays, in dicts, lists and tuples.

    Returns
    -------
    object
        The same structure, fit for strict JSON (no nan or infinity).
    """
    if isinstance(value, dict):
        return {str(k): plain_json(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [plain_json(v) for v in value]
    if isinstance(value, np.ndarray):
        return plain_json(value.tolist())
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        v = float(value)
        return v if math.isfinite(v) else None
    if value is None or isinstance(value, str):
        return value
    return str(value)


def scenario_inputs(scenario) -> dict:
    """The inputs of a :class:`~bridgeopt.files.scenario.Scenario` in the scenario-file schema.

    Parameters
    ----------
    scenario : Scenario
        A parsed scenario file.

    Returns
    -------
    dict
        Its tables and keys as plain JSON values, in SI units (N, m, Pa, kg/m3).
    """
    return plain_json(scenario.to_dict())


def _derived(problem, scenario) -> dict:
    """Quantities computed from the inputs (grid, self-weight lengths ...)."""
    nx, nz = problem.grid_shape()
    out: dict[str, Any] = {
        "grid_cells": [nx, nz], "spacing": problem.spacing, "copies": problem.copies,
        "applied_load_model": problem.total_applied_load(), "gravity": GRAVITY,
        "self_supporting_length": {
            "tension": problem.material.self_supporting_length("tension"),
            "compression": problem.compression.self_supporting_length("compression"),
        },
    }
    bridge = getattr(scenario, "bridge", None)
    if bridge is not None:
        out.update({
            "model": ("whole span (load cases, piers, anchorages or channels)"
                      if getattr(scenario, "full_span", False) else
                      "half span between mirror lines, reported as one whole span"),
            "normalised_span": bridge.normalised_span,
            "rise_cells": bridge.rise_cells, "depth_cells": bridge.depth_cells,
        })
    return out


def design_to_dict(design: Design, *, scenario: Scenario | None = None,
                   wall_seconds: float | None = None, form=None, crossing: str = "") -> dict:
    """A JSON-ready dict of ``design`` (SI units; see the module docstring for the keys).

    Parameters
    ----------
    design : Design
        A solved design (layout, form or frame).
    scenario : Scenario, optional
        Adds the inputs in file schema, the name, kind and source; without it the
        inputs come from ``design.problem``.
    wall_seconds : float, optional
        Total time including reading and checking, recorded in ``stats``. [s]
    form : FormResult, optional
        A solved bridge form (``design`` is then its design): adds
        ``reference_volume`` [m3], ``volume_ratio`` [-] and ``form`` (type, keys,
        starting volume, main dimensions, quantities per element group).
    crossing : str
        With ``form``: how the crossing the form and its reference stand on differs
        from the scenario's own (``"2 piers"``; ``""`` for the same supports), written
        as ``reference_crossing``.

    Returns
    -------
    dict
        Plain JSON values (non-finite numbers as None), schema :data:`SCHEMA`.
    """
    problem = design.problem
    m = design.members
    nodes = [{"x": float(x), "z": float(z)} for x, z in design.nodes]
    members = []
    for i in range(len(m)):
        members.append({
            "id": i, "start": int(m.start[i]), "end": int(m.end[i]),
            "sense": str(m.sense[i]), "group": str(m.group[i]),
            "horizontal_force": float(m.horizontal_force[i]),
            "axial_force": float(m.axial_force[i]),
            "force_start": [float(v) for v in m.force_start[i]],
            "force_end": [float(v) for v in m.force_end[i]],
            "volume": float(m.volume[i]), "sag": float(m.sag[i]),
            "curve": [[float(x), float(z)] for x, z in m.curves[i]],
        })
    reactions: dict[int, list[float]] = {}
    for node, rx, rz in design.reactions:
        r = reactions.setdefault(int(node), [0.0, 0.0])
        r[0] += float(rx)
        r[1] += float(rz)
    loads = [{"node": i, "x": float(design.nodes[i, 0]), "z": float(design.nodes[i, 1]),
              "fx": float(fx), "fz": float(fz)}
             for i, (fx, fz) in enumerate(design.loads) if fx != 0 or fz != 0]
    n_t = int((m.sense == "tension").sum())
    stats = dict(design.stats)
    stats.update({"members": len(m), "tension_members": n_t,
                  "compression_members": len(m) - n_t, "nodes": len(design.nodes),
                  "equilibrium_error": design.equilibrium_error})
    if wall_seconds is not None:
        stats["wall_seconds"] = wall_seconds
    if isinstance(scenario, Scenario):
        inputs = scenario.to_dict()
        name, kind, source = scenario.name, scenario.kind, scenario.source
    else:
        inputs = problem_dict(problem) if problem is not None else {}
        name = getattr(problem, "name", "layout problem")
        kind, source = "layout", None
        inputs = {"name": name, **inputs}
    bridge = getattr(scenario, "bridge", None)
    out = {
        "bridgeopt_version": _version(), "schema": SCHEMA,
        "name": name, "kind": kind, "source": source,
        "status": design.status, "message": design.message,
        "volume": design.volume, "weight": design.weight,
        "weight_kN": design.weight / 1e3, "mass_t": design.weight / GRAVITY / 1e3,
        "model_volume": design.model_volume, "copies": design.copies,
        "normalised_volume": bridge.normalised_volume(design.volume) if bridge else None,
        "applied_load": (problem.total_applied_load() * design.copies
                         if problem is not None else None),
        "nodes": nodes, "members": members, "loads": loads,
        "reactions": [{"node": n, "x": float(design.nodes[n, 0]), "z": float(design.nodes[n, 1]),
                       "rx": r[0], "rz": r[1]} for n, r in sorted(reactions.items())],
        "stats": stats, "inputs": inputs,
        "derived": _derived(problem, scenario) if problem is not None else {},
        "units": UNITS, "cautions": list(CAUTION_LINES), "caution": CAUTIONS,
    }
    if form is not None:
        out["reference_volume"] = form.reference_volume
        out["reference_crossing"] = crossing
        out["volume_ratio"] = form.ratio
        out["form"] = {"type": form.form_type, "keys": form.spec.to_dict(),
                       "start_volume": form.start_volume, "geometry": form.geometry,
                       "dimensions": getattr(form, "dimensions", {}),
                       "quantities": form.quantities,
                       "reference_stats": {} if form.reference is None else {
                           k: v for k, v in form.reference.stats.items() if k != "history"}}
    return plain_json(out)


def _version() -> str:
    from bridgeopt import __version__

    return __version__


def to_json(data: dict) -> str:
    """Strict JSON text of ``data`` (NaN and infinity become null).

    Parameters
    ----------
    data : dict
        JSON-ready values; numpy numbers and arrays are turned into plain ones.

    Returns
    -------
    str
        One JSON document and a newline.
    """
    return json.dumps(plain_json(data), allow_nan=False) + "\n"


def write_json(path: str | os.PathLike, data: dict) -> Path:
    """Write ``data`` as JSON to ``path`` atomically (temporary file, then rename).

    A reader never sees a half-written file; on failure the old file, if any,
    is left as it was.

    Parameters
    ----------
    path : path
        The JSON file to write.
    data : dict
        JSON-ready values (:func:`design_to_dict`, a case report ...).

    Returns
    -------
    Path
        ``path``.
    """
    text = to_json(data)
    return atomic_write(path, lambda tmp: Path(tmp).write_text(text, encoding="utf-8"))
