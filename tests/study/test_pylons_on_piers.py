"""Pylons on their own piers (issue 11): each count its own crossing with its own reference,
stacked volume and cost of superstructure, piers and foundations, and the cheapest count
moving with the foundation cost."""

from __future__ import annotations

import pytest

from bridgeopt import BridgeScenario, InputError, PRESETS, UnitCosts, study
from bridgeopt.workbook import charts

FAN = "cable-stayed fan"


@pytest.fixture(scope="module")
def table():
    # a 1 km steel crossing of repeating spans, foundations 100 m below the deck
    b = BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2.0e5,
                       material=PRESETS["steel"], divisions=12, foundation_depth=100.0)
    return study.pylon_sweep(b, [1000.0], [1, 2, 3], [FAN])


def test_each_pylon_count_is_its_own_crossing_with_its_own_reference(table):
    forms = table[table["option"] == FAN].set_index("pylons")
    assert list(forms["crossing"]) == ["", "1 pier", "2 piers"]
    assert list(forms["series"]) == [FAN, f"{FAN} (1 pier)", f"{FAN} (2 piers)"]
    plain = table[table["option"] == study.REFERENCE]["volume_m3"].iloc[0]
    assert forms.loc[1, "reference_volume_m3"] == pytest.approx(plain, rel=1e-12)
    # more supports, less material: the reference on more piers is lighter (a lower bound
    # on more supports can only fall), and no form is below its own crossing's reference
    refs = list(forms["reference_volume_m3"])
    assert refs[0] > refs[1] > refs[2]
    assert (forms["volume_m3"] >= forms["reference_volume_m3"] * (1 - 1e-9)).all()
    # a pier shaft of 100 m under each pylon: pier volume is counted
    assert (forms["pier_volume_m3"] > 0).all()
    assert list(forms["foundations"]) == [1, 2, 3]


def test_stacked_quantities_add_up_to_the_totals(table):
    costs = study.pylon_costs(table, costs=UnitCosts(3.0, 5.0), foundation_cost=123.0)
    assert len(costs) == 3
    total = costs["superstructure_volume_m3"] + costs["pier_volume_m3"]
    assert list(total) == pytest.approx(list(costs["volume_m3"]), rel=1e-12)
    forms = table[table["option"] == FAN]
    assert list(costs["volume_m3"]) == pytest.approx(list(forms["volume_m3"]), rel=1e-12)
    parts = costs["superstructure_cost"] + costs["pier_cost"] + costs["foundation_cost"]
    assert list(parts) == pytest.approx(list(costs["cost"]), rel=1e-12)
    # material priced by sense: tension at 3, compression (piers included) at 5 per m3
    by_sense = 3.0 * forms["tension_volume_m3"] + 5.0 * forms["compression_volume_m3"]
    assert list(costs["superstructure_cost"] + costs["pier_cost"]) == pytest.approx(
        list(by_sense), rel=1e-12)
    assert list(costs["foundation_cost"]) == [123.0, 246.0, 369.0]


def test_cheapest_count_is_the_largest_without_foundation_cost_and_one_with_a_large_one(table):
    free = study.pylon_costs(table, foundation_cost=0.0)
    assert int(free.loc[free["cheapest"], "pylons"].iloc[0]) == 3
    dear = study.pylon_costs(table, foundation_cost=1e9)
    assert int(dear.loc[dear["cheapest"], "pylons"].iloc[0]) == 1
    assert free["cheapest"].sum() == dear["cheapest"].sum() == 1


def test_cost_chart_stacks_the_three_parts_and_marks_the_cheapest(table):
    costs = study.pylon_costs(table, foundation_cost=1e9)
    fig = charts.pylon_cost_figure(costs)
    names = [t.name for t in fig.data]
    assert names[:3] == ["superstructure", "pier shafts", "foundations"]
    assert fig.layout.barmode == "stack"
    assert "cheapest pylon count" in names
    labels = list(fig.data[0].x[1])
    assert labels == ["1 pylon(s)", "2 pylon(s) (1 pier)", "3 pylon(s) (2 piers)"]


def test_pylon_chart_names_every_series_on_piers_with_its_crossing(table):
    fig = charts.pylon_figure(table)
    names = [t.name for t in fig.data]
    assert names.count(study.REFERENCE) == 1
    assert f"{FAN}, 2 pylon(s) (1 pier)" in names and f"{FAN}, 3 pylon(s) (2 piers)" in names
    assert f"{study.REFERENCE} (1 pier)" in names and f"{study.REFERENCE} (2 piers)" in names


@pytest.mark.parametrize("value", [-1.0, float("inf"), "a lot", True])
def test_bad_foundation_cost_is_one_clear_line(table, value):
    with pytest.raises(InputError) as err:
        study.pylon_costs(table, foundation_cost=value)
    assert err.value.field == "foundation_cost" and "\n" not in str(err.value)
