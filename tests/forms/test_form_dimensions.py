"""A form's final dimensions reach the result, the design JSON, the drawing and study tables."""

from __future__ import annotations

import json

import numpy as np
import pytest

from bridgeopt import PRESETS, BridgeScenario, study
from bridgeopt.files.design_json import design_to_dict
from bridgeopt.files.drawing import design_svg
from bridgeopt.forms import CableStayedForm, SuspensionForm, solve_form


def bridge(**changes) -> BridgeScenario:
    base = dict(span=600.0, rise=240.0, depth=60.0, deck_load=1.5e5, material=PRESETS["steel"],
                arrangement="repeating", divisions=10)
    base.update(changes)
    return BridgeScenario(**base)


def test_free_anchors_report_their_heights_and_how_far_they_moved():
    b = bridge()
    free = solve_form(b, CableStayedForm(pattern="harp", stays=5))
    kept = solve_form(b, CableStayedForm(pattern="harp", stays=5, anchors="pattern"),
                      reference=free.reference)
    # the pattern's best height is the first stage of the free form: never heavier
    assert free.volume <= kept.volume * (1 + 1e-9)
    assert free.start_volume == pytest.approx(kept.start_volume, rel=1e-12)
    d = free.dimensions
    assert len(d["anchor_heights_m"]) == len(d["stay_deck_x_m"]) == 5
    assert np.all(np.diff(d["stay_deck_x_m"]) > 0)
    assert np.all(np.diff(d["anchor_heights_m"]) >= 0)      # anchors keep their order
    assert max(d["anchor_heights_m"]) == pytest.approx(free.geometry["pylon_height"], rel=1e-9)
    assert d["span_to_height"] == pytest.approx(600.0 / free.geometry["pylon_height"])
    assert d["anchor_move_largest_m"] >= d["anchor_move_mean_m"] >= 0.0
    # the fixed pattern: a harp's anchors evenly up the pylon, none moved
    k = kept.dimensions
    h = kept.geometry["pylon_height"]
    np.testing.assert_allclose(k["anchor_heights_m"], h * np.arange(1, 6) / 5, rtol=1e-9)
    assert k["anchor_move_largest_m"] == pytest.approx(0.0, abs=1e-9)
    assert "moved from the harp pattern" in free.summary()


def test_dimensions_reach_the_json_the_drawing_and_the_study_table():
    b = bridge()
    result = solve_form(b, SuspensionForm())
    data = json.loads(json.dumps(design_to_dict(result.design, form=result)))
    dims = data["form"]["dimensions"]
    assert dims["sag_ratio"] == pytest.approx(result.geometry["sag"] / 600.0)
    assert dims["span_to_sag"] == pytest.approx(1.0 / dims["sag_ratio"])
    svg = design_svg(result.design)
    assert "span to sag" in svg and "tower height" in svg
    table = study.compare(b, ["cable-stayed fan", "suspension"], {"pylons": 1})
    rows = table.set_index("option")
    assert rows.loc["suspension", "sag_ratio"] == pytest.approx(dims["sag_ratio"], rel=1e-6)
    assert rows.loc["cable-stayed fan", "span_to_height"] > 0
    assert np.isnan(rows.loc["reference optimum", "sag_ratio"])


def test_a_bad_anchors_value_is_one_clear_line():
    from bridgeopt import InputError
    from bridgeopt.forms import parse_form

    with pytest.raises(InputError) as info:
        parse_form({"type": "cable-stayed", "anchors": "loose"})
    msg = str(info.value)
    assert info.value.field == "form.anchors" and "\n" not in msg
    assert "'free'" in msg and "'pattern'" in msg and "loose" in msg
