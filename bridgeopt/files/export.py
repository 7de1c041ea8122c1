"""Files of a solved design for the firm's own tools: CSV tables, JSON, SVG and DXF.

:func:`export_design` writes, into one folder,

* ``members.csv``: one row per member (``id``, ``start``, ``end``, end
  coordinates ``x_start_m`` ..., ``sense``, ``group``, ``horizontal_force_N``,
  ``axial_force_N``, ``volume_m3``, ``sag_m``);
* ``nodes.csv``: one row per node (``id``, ``x_m``, ``z_m``, applied load
  ``load_x_N``, ``load_z_N``, reaction ``reaction_x_N``, ``reaction_z_N``);
* ``design.json``: the JSON of the solve (:func:`~bridgeopt.files.design_json.design_to_dict`);
* ``design.svg`` and ``design.dxf``: drawings (:mod:`bridgeopt.files.drawing`);
* ``README.txt``: what each file holds, the units, and the cautions (the CSV
  files are plain tables, header first, so they carry the cautions here).

``nodes.csv`` and ``members.csv`` are also a valid proposed layout for
``bridgeopt judge`` (extra columns are ignored).  :func:`design_from_dict` reads
``design.json`` back into a :class:`~bridgeopt.solver.design.Design`.
"""

from __future__ import annotations

import math
import os
import shutil
import tempfile
from pathlib import Path
from typing import Iterable

import numpy as np

from bridgeopt.cautions import CAUTION_LINES
from bridgeopt.solver.design import Design, Members
from bridgeopt.files.drawing import write_dxf, write_svg
from bridgeopt.errors import InputError
from bridgeopt.files.io import read_json
from bridgeopt.files.design_json import design_to_dict, write_json

__all__ = ["FORMATS", "export_design", "members_table", "nodes_table", "design_from_dict",
           "read_design_json"]

#: Formats :func:`export_design` writes, and their files.
FORMATS = {"csv": ("members.csv", "nodes.csv"), "json": ("design.json",),
           "svg": ("design.svg",), "dxf": ("design.dxf",)}


def members_table(design: Design):
    """Members as a :class:`pandas.DataFrame` with an ``id`` column first.

    Parameters
    ----------
    design : Design
        A solved design.

    Returns
    -------
    pandas.DataFrame
        One row per member; forces in N, volumes in m3, lengths in m.
    """
    df = design.to_frame()
    df.insert(0, "id", np.arange(len(df)))
    return df


def nodes_table(design: Design):
    """Nodes as a :class:`pandas.DataFrame` with an ``id`` column first.

    Parameters
    ----------
    design : Design
        A solved design (its nodes, applied loads and reactions).

    Returns
    -------
    pandas.DataFrame
        One row per node; coordinates in m, loads and reactions in N.
    """
    df = design.nodes_frame()
    df.insert(0, "id", np.arange(len(df)))
    return df


def parse_formats(text: str | Iterable[str]) -> tuple[str, ...]:
    """Formats from ``"csv,json,svg,dxf"`` (or a list), checked."""
    items = text.split(",") if isinstance(text, str) else list(text)
    out = tuple(dict.fromkeys(i.strip().lower() for i in items if i.strip()))
    bad = [f for f in out if f not in FORMATS]
    if bad or not out:
        raise InputError("--formats", text, "a comma-separated list of " + ", ".join(FORMATS))
    return out


def _readme(design: Design, formats) -> str:
    lines = [f"bridgeopt export: {getattr(design.problem, 'name', 'design')}", "",
             *CAUTION_LINES, "",
             "Units: m, N, m3; x to the right, z upwards. The modelled part is given (for a "
             f"bridge, the half span); volumes of the whole structure are {design.copies:g} "
             "times the model's.", ""]
    about = {
        "members.csv": "one row per member: id, start and end node ids, end coordinates "
                       "[m], sense, element group, horizontal force [N], largest axial force "
                       "[N], volume [m3], sag [m]",
        "nodes.csv": "one row per node: id, x_m, z_m [m], applied load and reaction [N]",
        "design.json": "the whole solve: inputs, nodes, members with centrelines, loads, "
                       "reactions, statistics, units, cautions",
        "design.svg": "drawing; one group per element group; blue tension, red compression",
        "design.dxf": "CAD drawing (metres); one layer per element group; curved members as "
                      "polylines; notes on layer NOTES",
    }
    for f in formats:
        lines += [f"{name}: {about[name]}" for name in FORMATS[f]]
    return "\n".join(lines) + "\n"


#: The list of files an export wrote into its folder (so that a later export may replace them).
EXPORT_RECORD = ".bridgeopt-export"


def _names(formats) -> list[str]:
    return [n for f in formats for n in FORMATS[f]] + ["README.txt"]


def check_export_target(folder: str | Path, formats: Iterable[str] = tuple(FORMATS), *,
                        force: bool = False) -> None:
    """Refuse, before any solve, an export that would replace files bridgeopt did not write.

    Parameters
    ----------
    folder : path
        The export folder (need not exist).
    formats : iterable of {"csv", "json", "svg", "dxf"}
    force : bool
        Replace such files all the same.

    Raises
    ------
    InputError
        Naming ``--output``: the folder is a file, or holds files of the user's at the
        names the export writes (without ``force``).
    """
    folder = Path(folder)
    if folder.exists() and not folder.is_dir():
        raise InputError("--output", str(folder), "a folder (created if missing), not a file")
    if force or not folder.is_dir():
        return
    record = folder / EXPORT_RECORD
    ours = set(record.read_text(encoding="utf-8").split()) if record.is_file() else set()
    foreign = [n for n in _names(parse_formats(formats)) if (folder / n).exists() and n not in ours]
    if foreign:
        raise InputError("--output", str(folder), "a folder without files of your own at the "
                         f"names the export writes (found {', '.join(foreign)}, not written by "
                         "bridgeopt; choose another folder or add --force to replace them)")


def export_design(design: Design, folder: str | Path, formats: Iterable[str] = tuple(FORMATS),
                  *, scenario=None, form=None, wall_seconds: float | None = None,
                  force: bool = False) -> list[Path]:
    """Write ``design`` into ``folder`` in ``formats`` (see the module docstring).

    All or nothing: every file is written into a temporary folder inside ``folder``
    first and moved into place only when all of them are written, so a failure
    leaves the folder as it was.  Files the user made are never replaced without
    ``force`` (see :func:`check_export_target`).

    Parameters
    ----------
    design : Design
        A solved design.
    folder : path
        Created if missing.
    formats : iterable of {"csv", "json", "svg", "dxf"}
        Which files to write (:data:`FORMATS`); a comma-separated string is accepted.
    scenario : Scenario, optional
        The scenario it was solved from, for the JSON's inputs.
    form : FormResult, optional
        A solved bridge form, for the JSON's form keys and reference volume.
    wall_seconds : float, optional
        Total solve time, recorded in the JSON's stats. [s]
    force : bool
        Replace files at the export's names that bridgeopt did not write.

    Returns
    -------
    list of Path
        The files written, README.txt last.
    """
    formats = parse_formats(formats)
    folder = Path(folder)
    check_export_target(folder, formats, force=force)
    folder.mkdir(parents=True, exist_ok=True)
    names = _names(formats)
    tmp = Path(tempfile.mkdtemp(dir=folder, prefix=".bridgeopt-export-"))
    try:
        if "csv" in formats:
            members_table(design).to_csv(tmp / "members.csv", index=False)
            nodes_table(design).to_csv(tmp / "nodes.csv", index=False)
        if "json" in formats:
            write_json(tmp / "design.json", design_to_dict(
                design, scenario=scenario, wall_seconds=wall_seconds, form=form))
        if "svg" in formats:
            write_svg(design, tmp / "design.svg")
        if "dxf" in formats:
            write_dxf(design, tmp / "design.dxf")
        (tmp / "README.txt").write_text(_readme(design, formats), encoding="utf-8")
        record = folder / EXPORT_RECORD
        ours = set(record.read_text(encoding="utf-8").split()) if record.is_file() else set()
        (tmp / EXPORT_RECORD).write_text("\n".join(sorted(ours | set(names))) + "\n",
                                         encoding="utf-8")
        for name in [*names, EXPORT_RECORD]:
            os.replace(tmp / name, folder / name)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return [folder / n for n in names]


def _problem_of(inputs: dict):
    """The problem a design JSON was solved on, from its inputs."""
    from bridgeopt.forms import form_problem
    from bridgeopt.files.scenario import parse_scenario

    scenario = parse_scenario(inputs)
    if scenario.bridge is not None and scenario.form is not None:
        return form_problem(scenario.bridge, scenario.form)
    return scenario.problem


def _num(v) -> float:
    return math.nan if v is None else float(v)


def design_from_dict(data: dict) -> Design:
    """A :class:`Design` from the JSON of a solve (:func:`~bridgeopt.files.design_json.design_to_dict`).

    Duals are not stored in the JSON: they come back as nan.  Reactions come back
    one row per supported node (the JSON sums them per node).

    Parameters
    ----------
    data : dict
        The decoded JSON of a solve (schema ``bridgeopt.design/1``).

    Returns
    -------
    Design
        With its problem rebuilt from the JSON's inputs.

    Raises
    ------
    InputError
        Not the JSON of a solve.
    """
    if not isinstance(data, dict) or not str(data.get("schema", "")).startswith(
            "bridgeopt.design/"):
        raise InputError("design", "not a design", "the JSON of a solve (schema "
                         "bridgeopt.design/1, written by bridgeopt solve --json or export)")
    try:
        return _design_from_dict(data)
    except InputError:
        raise
    except KeyError as err:
        raise InputError(f"design JSON key {err.args[0]!r}", "<missing>", "present, as "
                         "bridgeopt wrote it (the file was edited or cut short)") from None
    except (TypeError, ValueError, IndexError, AttributeError) as err:
        raise InputError("design JSON", "not as bridgeopt wrote it", "the JSON of a solve, "
                         f"unedited ({type(err).__name__}: {err})") from None


def _design_from_dict(data: dict) -> Design:
    nodes = np.array([[n["x"], n["z"]] for n in data["nodes"]], dtype=float).reshape(-1, 2)
    bad = np.nonzero(~np.isfinite(nodes).all(axis=1))[0]
    if len(bad):
        i = int(bad[0])
        raise InputError(f"design JSON nodes[{i}]", data["nodes"][i], "finite x and z in m")
    ms = data["members"]
    for i, m in enumerate(ms):
        for end in ("start", "end"):
            v = m[end]
            if isinstance(v, bool) or not isinstance(v, int) or not 0 <= v < len(nodes):
                raise InputError(f"design JSON members[{i}].{end}", v,
                                 f"a node index from 0 to {len(nodes) - 1}")
    members = Members(
        start=np.array([m["start"] for m in ms], dtype=np.int64),
        end=np.array([m["end"] for m in ms], dtype=np.int64),
        sense=np.array([m["sense"] for m in ms], dtype=str),
        horizontal_force=np.array([_num(m["horizontal_force"]) for m in ms]),
        force_start=np.array([m["force_start"] for m in ms], dtype=float).reshape(-1, 2),
        force_end=np.array([m["force_end"] for m in ms], dtype=float).reshape(-1, 2),
        volume=np.array([_num(m["volume"]) for m in ms]),
        sag=np.array([_num(m["sag"]) for m in ms]),
        curves=tuple(np.array(m["curve"], dtype=float).reshape(-1, 2) for m in ms),
        group=np.array([m.get("group", "member") for m in ms], dtype=str))
    loads = np.zeros_like(nodes)
    for q in data.get("loads", []):
        loads[q["node"]] = (q["fx"], q["fz"])
    reactions = np.array([[r["node"], r["rx"], r["rz"]] for r in data.get("reactions", [])],
                         dtype=float).reshape(-1, 3)
    return Design(status=data["status"], message=data["message"],
                  volume=_num(data["volume"]), weight=_num(data["weight"]), nodes=nodes,
                  members=members, loads=loads, reactions=reactions,
                  duals=np.full_like(nodes, math.nan), stats=data.get("stats", {}),
                  copies=float(data["copies"]), model_volume=_num(data["model_volume"]),
                  equilibrium_error=_num(data["stats"].get("equilibrium_error")),
                  problem=_problem_of(data["inputs"]))


def read_design_json(path: str | Path) -> Design:
    """:func:`design_from_dict` of the JSON file at ``path``.

    Parameters
    ----------
    path : path
        A ``design.json`` written by ``bridgeopt solve --json`` or ``export``.

    Returns
    -------
    Design
    """
    return design_from_dict(read_json(path, "design JSON file"))
