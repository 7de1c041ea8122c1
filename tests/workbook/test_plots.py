"""Figures from designs and study tables (bridgeopt.workbook.plots, bridgeopt.workbook.charts): no solving inside."""

import math

import numpy as np
import pandas as pd
import pytest

pytest.importorskip("plotly")

from bridgeopt import PRESETS, BridgeScenario, study  # noqa: E402
from bridgeopt.workbook import charts
from bridgeopt.workbook import plots


@pytest.fixture(scope="module")
def design():
    bridge = BridgeScenario(span=1200.0, rise=300.0, depth=100.0, deck_load=1.5e5,
                            material=PRESETS["steel"], arrangement="single", divisions=12)
    return study.solve_reference(bridge)


def _member_traces(fig, sense):
    return [t for t in fig.data if t.mode == "lines" and t.name == sense]


def test_design_figure_draws_every_member_in_its_sense_colour(design):
    fig = plots.design_figure(design)
    m = design.members
    for sense in ("tension", "compression"):
        traces = _member_traces(fig, sense)
        assert traces and {t.line.color for t in traces} == {plots.PALETTE[sense]}
        # each member and its mirror image is one polyline ended by a None
        breaks = sum(sum(v is None for v in t.x) for t in traces)
        assert breaks == 2 * int((m.sense == sense).sum())
    assert plots.PALETTE["tension"] != plots.PALETTE["compression"]
    assert fig.layout.yaxis.scaleanchor == "x" and fig.layout.yaxis.scaleratio == 1
    assert sum(bool(t.showlegend) for t in fig.data if t.name in ("tension", "compression")) == 2


def test_half_model_is_drawn_over_the_whole_span(design):
    fig = plots.design_figure(design)
    xs = np.array([x for t in fig.data if t.mode == "lines" for x in t.x if x is not None])
    # the crossing: the 1200 m span and its back spans to the anchor points (issue 11),
    # 0.4 x 1200 m clipped to whole 100 m grid steps: 400 m each side
    back = design.problem.domain.bounds[0]
    assert back == pytest.approx(-400.0)
    assert xs.min() >= back - 1e-9 and xs.max() <= 1200.0 - back + 1e-9
    assert xs.max() - 600.0 == pytest.approx(600.0 - xs.min())
    assert xs.min() <= 1e-9 and xs.max() >= 1200.0 - 1e-9


def test_line_width_grows_with_force(design):
    fig = plots.design_figure(design)
    m = design.members
    biggest = int(np.argmax(m.axial_force))
    end = m.curves[biggest][-1]
    widths = {}
    for t in fig.data:
        if t.mode == "lines" and t.name in ("tension", "compression"):
            pts = {(x, z) for x, z in zip(t.x, t.y) if x is not None}
            widths[t.line.width] = pts
    thickest = max(widths)
    assert (float(end[0]), float(end[1])) in widths[thickest]
    assert len(widths) > 1 and min(widths) < thickest


def test_curved_members_follow_their_centrelines(design):
    fig = plots.design_figure(design)
    n_points = sum(len(c) for c in design.members.curves)
    drawn = sum(sum(x is not None for x in t.x) for t in fig.data
                if t.mode == "lines" and t.name in ("tension", "compression"))
    assert drawn == 2 * n_points


def test_options_figure_notes_options_without_a_design(design):
    opts = {study.REFERENCE: study.Option(study.REFERENCE, "optimal", design, ""),
            "suspension": study.Option("suspension", "unavailable", None, "suspension: not here")}
    fig = plots.options_figure(opts)
    assert "suspension: not here" in fig.layout.title.text
    assert len([t for t in fig.data if t.name == "deck level"]) == 1  # one panel only
    assert any(study.REFERENCE in (a.text or "") for a in fig.layout.annotations)


def test_ratio_bar_heights_are_the_ratios():
    table = pd.DataFrame({"option": [study.REFERENCE, "a", "b"],
                          "status": ["optimal", "optimal", "failed"],
                          "volume_m3": [10.0, 13.0, math.nan],
                          "ratio_to_reference": [1.0, 1.3, math.nan]})
    fig = plots.ratio_bar(table)
    assert list(fig.data[0].x) == [study.REFERENCE, "a"]
    assert list(fig.data[0].y) == [1.0, 1.3]
    assert any("b: failed" in (a.text or "") for a in fig.layout.annotations)


def _sweep_table():
    rows = []
    for i, s in enumerate([1000.0, 2000.0, 4000.0]):
        rows.append({"option": study.REFERENCE, "status": "optimal", "span_m": s,
                     "normalised_span": s / 4600, "normalised_volume": 1 + i,
                     "volume_m3": 10.0 * (1 + i), "ratio_to_reference": 1.0, "rise_m": s / 5})
        ok = i < 2
        rows.append({"option": "arch", "status": "optimal" if ok else "failed", "span_m": s,
                     "normalised_span": s / 4600, "normalised_volume": 2 + i if ok else math.nan,
                     "volume_m3": 20.0 * (1 + i) if ok else math.nan,
                     "ratio_to_reference": 2.0 if ok else math.nan, "rise_m": s / 5})
    return pd.DataFrame(rows)


def test_span_chart_marks_where_a_form_becomes_impossible():
    table = _sweep_table()
    fig = charts.span_volume_figure(table)
    rects = [s for s in fig.layout.shapes if s.type == "rect"]
    assert len(rects) == 1
    assert 2000 / 4600 < rects[0].x0 < 4000 / 4600
    arch = next(t for t in fig.data if t.name == "arch")
    assert arch.y[-1] is None  # the failed point is not drawn as a volume
    assert fig.layout.yaxis.type == "log"


def test_height_chart_shades_the_common_practice_bands():
    table = _sweep_table()
    table["span_to_rise"] = table["span_m"] / table["rise_m"]
    fig = charts.height_figure(table)
    rects = {(s.x0, s.x1) for s in fig.layout.shapes if s.type == "rect"}
    # built bridges' ratios given in issue 11 (common practice): span / pylon height above
    # the deck 3.4 to 4.9 for cable-stayed, span / sag 8.5 to 13.5 for suspension
    assert {(3.4, 4.9), (8.5, 13.5)} <= rects
    texts = " ".join(a.text or "" for a in fig.layout.annotations)
    assert texts.count("common practice") == 2


def test_ratio_and_pylon_charts_have_one_line_per_form_and_count():
    table = pd.concat([_sweep_table().assign(pylons=n) for n in (1, 2)], ignore_index=True)
    fig = charts.pylon_figure(table)
    assert [t.name for t in fig.data] == [study.REFERENCE, "arch, 1 pylon(s)", "arch, 2 pylon(s)"]
    ratio = charts.ratio_figure(table, "span_m", by_pylons=True)
    assert len(ratio.data) == 2


def test_span_chart_draws_the_reference_on_a_forms_own_supports():
    """A form compared with an optimum on its own supports gets that optimum drawn too
    (a hand-made table: the chart never solves)."""
    rows = []
    for span, ref, own, vol in ((1000.0, 400.0, 300.0, 450.0), (2000.0, 2000.0, 1500.0, 2400.0)):
        norm = 1.0 / span ** 2   # any normalisation factor per span
        rows.append({"option": study.REFERENCE, "span_m": span, "status": "optimal",
                     "volume_m3": ref, "reference_volume_m3": ref, "normalised_span": span / 1e4,
                     "normalised_volume": ref * norm, "ratio_to_reference": 1.0})
        for name in ("form a", "form b"):   # two forms on the same own supports: one line
            rows.append({"option": name, "span_m": span, "status": "optimal", "volume_m3": vol,
                         "reference_volume_m3": own, "normalised_span": span / 1e4,
                         "normalised_volume": vol * norm, "ratio_to_reference": vol / own})
    fig = charts.span_volume_figure(pd.DataFrame(rows))
    extra = [t for t in fig.data if t.name.startswith("reference optimum on the supports")]
    assert len(extra) == 1
    assert list(extra[0].y) == pytest.approx([300.0 / 1000.0 ** 2, 1500.0 / 2000.0 ** 2])
