"""Sweep rows carry a form's final dimensions: ratios, anchor moves and per-stay anchors.

Check values come from the form's own solve (bridgeopt.forms.solve_form on the same
scenario): the sweep row must hold the same numbers, and the ratio span / pylon height
must equal pylon spacing over the reported pylon height (its definition; for a repeating
span with one pylon per pier the spacing is the span: common practice for this ratio).
"""

from __future__ import annotations

import json
import math

import pandas as pd
import pytest

from bridgeopt.files.scenario import parse_scenario
from bridgeopt.forms import solve_form
from bridgeopt.sweep import expand_sweep, run_sweep
from bridgeopt.sweep.cases import dimension_cells
from bridgeopt.sweep.store import CSV

SCENARIO = {"name": "Orlen Sound trial", "bridge": {"span": 600.0, "rise": 300.0, "depth": 0.0,
                                                    "deck_load": 1.0e5, "divisions": 8},
            "material": {"preset": "steel"}, "form": {"type": "cable-stayed", "pattern": "fan"}}


def test_dimension_cells_types():
    cells = dimension_cells({"span_to_height": 3.5, "anchor_heights_m": [10.0, 20.0],
                             "start_pattern": "fan", "flag": True})
    assert cells == {"span_to_height": 3.5, "anchor_heights_m": "[10.0, 20.0]",
                     "start_pattern": "fan"}


@pytest.mark.slow
def test_a_cable_stayed_row_has_its_final_ratios_and_anchor_heights(tmp_path):
    sweep = expand_sweep(SCENARIO)
    run_sweep(sweep, tmp_path / "out", jobs=1)
    row = pd.read_csv(tmp_path / "out" / CSV).iloc[0]
    assert row["status"] == "ok"
    scenario = parse_scenario(SCENARIO)
    direct = solve_form(scenario.bridge, scenario.form)
    assert math.isclose(row["span_to_height"], direct.dimensions["span_to_height"], rel_tol=1e-6)
    assert math.isclose(row["span_to_height"], 600.0 / row["pylon_height_m"], rel_tol=1e-6)
    heights = json.loads(row["anchor_heights_m"])
    assert heights == pytest.approx(direct.dimensions["anchor_heights_m"], rel=1e-6)
    assert max(heights) == pytest.approx(row["pylon_height_m"], rel=1e-6)
    assert row["anchor_move_largest_m"] >= 0.0
