"""Lists in sweep files: one level of list sweeps a key; a list nested deeper than a key can
hold is refused with one line (it was flattened into cases silently before).  And a form's
result row names the crossing it and its reference stand on."""

from __future__ import annotations

import pytest

from bridgeopt import InputError
from bridgeopt.sweep import expand_sweep


def _sweep(**bridge):
    base = {"span": 600.0, "rise": 150.0, "depth": 0.0, "deck_load": 1.8e5, "divisions": 12}
    return {"name": "Wendle Flats (fictional)", "bridge": {**base, **bridge},
            "material": {"preset": "steel"}}


def test_a_list_of_lists_for_a_number_is_refused():
    with pytest.raises(InputError) as err:
        expand_sweep(_sweep(span=[[600.0, 700.0]]))
    assert err.value.field == "bridge.span"
    assert "not a list of lists" in str(err.value)


def test_a_list_of_numbers_sweeps_and_a_list_of_pier_lists_sweeps_pier_sets():
    assert len(expand_sweep(_sweep(span=[600.0, 700.0]))) == 2
    piers = expand_sweep(_sweep(piers=[[300.0], [150.0, 450.0]]))
    assert [c.data["bridge"]["piers"] for c in piers.cases] == [[300.0], [150.0, 450.0]]
    one = expand_sweep(_sweep(piers=[300.0]))
    assert len(one) == 1 and one.cases[0].data["bridge"]["piers"] == [300.0]
    with pytest.raises(InputError) as err:
        expand_sweep(_sweep(piers=[[[300.0]]]))
    assert err.value.field == "bridge.piers"


def test_a_form_row_names_the_crossing_it_stands_on():
    from bridgeopt.sweep.cases import solve_case

    # 12 divisions: on 8 the form's off-grid pylon top and anchors fell 2 % below the grid
    # reference, which is now refused as "below-reference" (tests/study/test_below_reference_refused.py)
    data = _sweep(span=600.0, divisions=12, depth=60.0, foundation_depth=60.0)
    row, _ = solve_case({**data, "form": {"type": "cable-stayed", "pylons": 2}})
    assert row["status"] == "ok" and row["reference_crossing"] == "1 pier"
    row, _ = solve_case({**data, "form": {"type": "cable-stayed", "pylons": 1}})
    assert row["status"] == "ok" and row["reference_crossing"] == ""
