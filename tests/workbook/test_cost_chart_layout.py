"""The pylon cost chart keeps its legend clear of the two-level bar labels under the plot.

Common practice for chart legibility (no source): a legend must not overlap axis labels.
With the legend under a multi-category axis the rotated count labels and the form names
ran into it (seen in docs/screens/pylon_study.png); the legend now sits above the plot.
"""

from __future__ import annotations

import pandas as pd

from bridgeopt.workbook import charts


def _costs():
    rows = []
    for n in (1, 2, 3):
        crossing = "" if n == 1 else f"{n - 1} pier{'s' if n > 2 else ''}"
        rows.append({"option": "cable-stayed fan", "pylons": n, "span_m": 1000.0,
                     "crossing": crossing, "superstructure_cost": 100.0 / n,
                     "pier_cost": 5.0 * (n - 1), "foundation_cost": 50.0 * (n - 1),
                     "cost": 100.0 / n + 55.0 * (n - 1), "cheapest": n == 1})
    return pd.DataFrame(rows)


def test_legend_sits_above_the_plot_and_labels_have_room_below():
    fig = charts.pylon_cost_figure(_costs())
    legend = fig.layout.legend
    assert legend.yanchor == "bottom" and legend.y >= 1.0      # above the plotting area
    assert fig.layout.margin.b >= 120                          # room for the two label rows
    assert fig.layout.margin.t >= 90                           # room for title and legend
