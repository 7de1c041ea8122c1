"""One table of dimension columns serves the study tables and the sweep rows.

Check values: the sweep's column names are the ones its rows carried before the table
was shared (``<geometry key>_m`` for pylon_height, tower_height, sag, rise, deck_panel,
and every key of ``FormResult.dimensions`` as it is; bridgeopt/sweep/store.py README
text lists them), so files users already have still read.  The numbers come from the
form's own solve (bridgeopt.forms.solve_form on the same bridge); a per-stay list is
JSON text of the same values (the sweep's own convention, docs/scenario.md).
"""

from __future__ import annotations

import json

import pytest

from bridgeopt import PRESETS, BridgeScenario
from bridgeopt.forms import ArchForm, CableStayedForm, SuspensionForm, solve_form
from bridgeopt.forms.quantities import (
    DIMENSION_COLUMNS,
    DIMENSION_TABLE,
    SWEEP_DIMENSION_COLUMNS,
    dimension_columns,
)
from bridgeopt.sweep.cases import dimension_cells

#: The geometry keys the sweep wrote as ``<key>_m`` columns before the shared table.
SWEEP_GEOMETRY = ("pylon_height", "tower_height", "sag", "rise", "deck_panel")


def _bridge() -> BridgeScenario:
    return BridgeScenario(span=600.0, rise=240.0, depth=60.0, deck_load=1.5e5,
                          material=PRESETS["steel"], arrangement="repeating", divisions=6)


FORMS = [CableStayedForm(pattern="harp", stays=3), SuspensionForm(), ArchForm()]


def test_the_table_has_each_column_once_and_the_study_part_in_it():
    names = [row[0] for row in DIMENSION_TABLE]
    assert len(names) == len(set(names))
    assert set(DIMENSION_COLUMNS) <= set(SWEEP_DIMENSION_COLUMNS)
    assert {row[1] for row in DIMENSION_TABLE} == {"geometry", "dimensions"}


@pytest.mark.parametrize("spec", FORMS, ids=lambda s: s.type)
def test_sweep_cells_keep_their_names_and_match_the_study_columns(spec):
    result = solve_form(_bridge(), spec, optimize=False)
    cells = dimension_cells(result.dimensions, result.geometry)
    # the names the sweep wrote before: nothing lost, nothing renamed
    before = {f"{k}_m" for k in SWEEP_GEOMETRY if k in result.geometry}
    before |= {k for k, v in result.dimensions.items() if not isinstance(v, bool)}
    assert set(cells) == before
    for key in SWEEP_GEOMETRY:
        if key in result.geometry:
            assert cells[f"{key}_m"] == pytest.approx(result.geometry[key], rel=1e-12)
    for key, value in result.dimensions.items():
        if isinstance(value, list):
            assert json.loads(cells[key]) == pytest.approx(value, rel=1e-6)
        elif isinstance(value, str):
            assert cells[key] == value
    # a study table's columns are the same cells, by the same names
    study = dimension_columns(result.design)
    assert study, "the study table has the form's dimensions"
    for name, value in study.items():
        assert cells[name] == pytest.approx(value, rel=1e-12)


def test_a_forked_pylons_leg_geometry_stays_out_of_the_sweep_as_before():
    cells = dimension_cells({}, {"pylon_height": 100.0, "leg_lean": 3.0,
                                 "leg_head_height": 40.0})
    assert cells == {"pylon_height_m": 100.0}
