"""Tables of one crossing that need no solve of their own: its inputs, a design's quantities.

Also the bridge scenario of a scenario file.  Every table is a
:class:`pandas.DataFrame` in SI units (or the unit its ``unit`` column names);
nothing here draws.
"""

from __future__ import annotations

import dataclasses

from bridgeopt.errors import InputError
from bridgeopt.files.scenario import load_scenario
from bridgeopt.forms.quantities import group_quantities
from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.solver.design import Design

__all__ = ["bridge_from_file", "inputs_table", "quantities"]


def bridge_from_file(path, *, divisions: int | None = None) -> BridgeScenario:
    """The bridge scenario of a TOML scenario file (see ``docs/scenario.md``).

    Parameters
    ----------
    path : path
        The scenario file (``.toml``) with a ``[bridge]`` table.
    divisions : int, optional
        Replace the file's grid divisions (e.g. a coarse grid for a quick run). [-]

    Returns
    -------
    BridgeScenario
        The file's bridge (lengths [m], deck load [N/m]), named after the file's
        ``name`` when ``[bridge]`` gives none.

    Raises
    ------
    InputError
        The file is not a bridge scenario, or a value in it is invalid.
    """
    scenario = load_scenario(path)
    if scenario.bridge is None:
        raise InputError("bridge", str(path), "a scenario file with a [bridge] table")
    bridge = scenario.bridge
    if scenario.name and bridge.name == "bridge":
        bridge = dataclasses.replace(bridge, name=scenario.name)
    return bridge if divisions is None else dataclasses.replace(bridge, divisions=divisions)


def inputs_table(bridge: BridgeScenario):
    """The scenario's inputs as a table: ``input``, ``value``, ``unit``.

    Parameters
    ----------
    bridge : BridgeScenario
        The scenario whose inputs are listed.

    Returns
    -------
    pandas.DataFrame
        One row per input, the value in the unit of its ``unit`` column (m, kN/m, MPa,
        kg/m3, ``-``).
    """
    import pandas as pd

    m = bridge.material
    rows = [("crossing", bridge.name, ""),
            ("arrangement", bridge.arrangement, ""),
            ("span", bridge.span, "m"),
            ("rise allowed above deck", bridge.rise, "m"),
            ("depth allowed below deck", bridge.depth, "m"),
            ("pier foundations below deck", -bridge.foundation_level, "m"),
            *((("back span behind each abutment", bridge.back_length, "m"),)
              if bridge.arrangement == "single" else ()),
            ("deck load", bridge.deck_load / 1e3, "kN/m"),
            ("material", m.name, ""),
            ("tension design stress", m.tension_strength / 1e6, "MPa"),
            ("compression design stress", m.compression_strength / 1e6, "MPa"),
            ("density", m.density, "kg/m3"),
            ("grid divisions across the span", bridge.divisions, "-"),
            ("grid step", bridge.spacing, "m"),
            ("normalised span, span / (strength / (density g))", bridge.normalised_span, "-")]
    return pd.DataFrame(rows, columns=["input", "value", "unit"])


def quantities(design: Design):
    """Per-group and per-sense quantities of a design (whole reported structure).

    A table of :func:`~bridgeopt.forms.solve.group_quantities` by group and sense.

    Parameters
    ----------
    design : Design
        A solved design (a form or the reference optimum).

    Returns
    -------
    pandas.DataFrame
        One row per (group, sense) and a ``total`` row: ``members`` (in the
        modelled part) [-], ``length_m`` (along the centrelines) [m],
        ``volume_m3`` [m3], ``weight_N`` [N], ``largest_force_N`` [N].  Lengths,
        volumes and weights are multiplied by ``design.copies``.
    """
    import pandas as pd

    rows = [{"group": g, "sense": sense, **q}
            for (g, sense), q in group_quantities(design, by_sense=True).items()]
    out = pd.DataFrame(rows, columns=["group", "sense", "members", "length_m", "volume_m3",
                                      "weight_N", "largest_force_N"])
    total = {"group": "total", "sense": "", "members": int(out["members"].sum()),
             "length_m": out["length_m"].sum(), "volume_m3": out["volume_m3"].sum(),
             "weight_N": out["weight_N"].sum(), "largest_force_N": out["largest_force_N"].max()}
    return pd.concat([out, pd.DataFrame([total])], ignore_index=True)
