"""Study tables -> plotly charts.  Pure functions: nothing here solves.

Each function takes a table from :mod:`bridgeopt.study.options` (span, height or
pylon sweep) and returns a :class:`plotly.graph_objects.Figure`.  Options that
did not solve at some point are marked there ("impossible" regions shaded),
never drawn as if they had a volume.

A form is only ever drawn against the reference optimum of its own crossing: a
series on other supports than the scenario's (the ``crossing`` column, e.g.
intermediate pylons on their own piers) is named with its crossing in the legend
("cable-stayed fan (2 piers)") and gets that crossing's reference as its own
dotted line ("reference optimum (2 piers)"); the line named "reference
optimum" alone is the scenario's own crossing.
"""

from __future__ import annotations

import math

import numpy as np

from bridgeopt.workbook.plots import PALETTE, option_style, series_name
from bridgeopt.study.options import REFERENCE

__all__ = ["span_volume_figure", "ratio_figure", "height_figure", "pylon_figure",
           "pylon_cost_figure", "COMMON_PRACTICE_BANDS"]

#: Ratios of built bridges (common practice figures, not from a code):
#: (label, low, high, colour key) with low/high as span / height.
COMMON_PRACTICE_BANDS = (
    ("built cable-stayed bridges: span / pylon height above deck 3.4 to 4.9 (common practice)",
     3.4, 4.9, "band"),
    ("built suspension bridges: span / sag 8.5 to 13.5 (common practice)", 8.5, 13.5, "band2"),
)


def _crossing_of(table, name) -> str:
    """The crossing of option ``name`` in ``table`` (its first solved row's), or ``""``."""
    if "crossing" not in table:
        return ""
    rows = table[(table["option"] == name) & (table["status"] == "optimal")]
    found = [c for c in rows["crossing"] if isinstance(c, str) and c]
    return found[0] if found else ""


def _base(title, height=420):
    import plotly.graph_objects as go

    fig = go.Figure()
    fig.update_layout(title=title, height=height, template="simple_white",
                      margin={"l": 70, "r": 20, "t": 60, "b": 60},
                      legend={"orientation": "h", "y": -0.22, "x": 0}, hovermode="closest")
    return fig


def _names(table) -> list[str]:
    names = list(dict.fromkeys(table["option"]))
    return sorted(names, key=lambda n: n != REFERENCE)


def _mark_impossible(fig, table, x: str, names) -> None:
    """Shade, per option, the x range from its first failed point to the end of the chart."""
    if not len(table):
        return
    x_hi = float(table[x].max())
    for i, name in enumerate(names):
        rows = table[(table["option"] == name) & (table["status"] == "failed")]
        if not len(rows):
            continue
        x0 = float(rows[x].min())
        ok = table[(table["option"] == name) & (table["status"] == "optimal")]
        below = ok[ok[x] < x0][x]
        if len(below):  # start half way between the last solved and the first failed point
            x0 = 0.5 * (x0 + float(below.max()))
        fig.add_vrect(x0=x0, x1=x_hi, fillcolor=PALETTE["impossible"], line_width=0,
                      layer="below")
        fig.add_annotation(x=x0, y=1.0 - 0.07 * i, xref="x", yref="paper", xanchor="left",
                           showarrow=False, text=f"{name}: no structure found beyond here",
                           font={"size": 11, "color": option_style(i)["color"]})


def _lines(fig, table, x: str, y: str, names, hover: str, offset: int = 0) -> None:
    """One line per option that solved somewhere (styles by position in ``names``)."""
    import plotly.graph_objects as go

    for i, name in enumerate(names):
        rows = table[table["option"] == name].sort_values(x)
        ok = rows["status"] == "optimal"
        if not ok.any():
            continue
        yv = rows[y].where(ok)
        style = option_style(i + offset)
        fig.add_trace(go.Scatter(
            x=list(rows[x]), y=[None if not math.isfinite(v) else float(v) for v in yv],
            mode="lines+markers", name=series_name(name, _crossing_of(table, name)),
            line=style, marker={"color": style["color"], "size": 6},
            hovertext=[hover.format(**r) for r in rows.to_dict("records")], hoverinfo="text"))


def _unavailable_note(fig, table) -> None:
    names = sorted({o for o, s in zip(table["option"], table["status"]) if s == "unavailable"})
    if names:
        fig.add_annotation(text="not yet available: " + ", ".join(names), showarrow=False,
                           xref="paper", yref="paper", x=0, y=1.02, xanchor="left",
                           yanchor="bottom", font={"size": 11})


def _own_support_references(fig, table, names, x: str = "normalised_span",
                            y: str = "normalised_volume") -> None:
    """Dotted lines: the reference optimum of each crossing other than the scenario's own.

    A form on extra piers (intermediate pylons) is its own crossing, set against
    the optimum with those supports (``reference_volume_m3``); drawn here and
    named "reference optimum (2 piers)", so that no form ever seems to beat "the"
    least volume.  One line per crossing.
    """
    import plotly.graph_objects as go

    if "reference_volume_m3" not in table:
        return
    if "crossing" not in table:   # a table without crossings: compare with the plain optimum
        plain = table[table["option"] == REFERENCE].set_index(x)["volume_m3"]
        table = table.copy()
        ref = plain.reindex(table[x]).to_numpy(float)
        own = ~np.isclose(table["reference_volume_m3"].to_numpy(float), ref, rtol=1e-9)
        table["crossing"] = np.where(own & (table["option"] != REFERENCE), "own supports", "")
    drawn: set = set()
    for name in names:
        rows = table[(table["option"] == name) & (table["status"] == "optimal")]
        rows = rows[rows["crossing"].astype(str) != ""].sort_values(x)
        if rows.empty or name == REFERENCE:
            continue
        crossing = _crossing_of(table, name)
        if crossing in drawn:
            continue
        drawn.add(crossing)
        ref = rows["reference_volume_m3"].to_numpy(float)
        scale = (rows[y] / rows["volume_m3"]).to_numpy(float) if y != "volume_m3" else 1.0
        fig.add_trace(go.Scatter(
            x=list(rows[x]), y=list(ref * scale), mode="lines",
            name=(f"{REFERENCE} on the supports of {name}" if crossing == "own supports"
                  else series_name(REFERENCE, crossing)),
            line={"color": option_style(0)["color"], "dash": "dot", "width": 1},
            hoverinfo="skip"))


def span_volume_figure(table, *, title: str | None = None):
    """Normalised volume against normalised span, per option (span sweep table).

    x: span / (sigma/(rho g)) [-]; y: volume sigma / (deck_load span^2) [-],
    logarithmic.  A dotted line marks span = pi sigma/(rho g), the reach of a
    single equal-strength element.

    Parameters
    ----------
    table : pandas.DataFrame
        :func:`bridgeopt.study.trends.span_sweep` output (``normalised_span``,
        ``normalised_volume``, ``span_m``, ``volume_m3``, ``status`` per option).
    title : str, optional
        Heading (default: "Volume against span (normalised)").

    Returns
    -------
    plotly.graph_objects.Figure
        Logarithmic volume axis; options that did not solve are listed in a note.
    """
    names = _names(table)
    fig = _base(title or "Volume against span (normalised)")
    _lines(fig, table, "normalised_span", "normalised_volume", names,
           "{option}<br>span {span_m:,.0f} m<br>volume {volume_m3:,.4g} m3<br>{status}")
    _own_support_references(fig, table, names)
    _mark_impossible(fig, table, "normalised_span", names)
    fig.add_vline(x=math.pi, line={"color": PALETTE["deck"], "dash": "dot"})
    fig.add_annotation(x=math.pi, y=0.02, xref="x", yref="paper", text="reach of one "
                       "equal-strength element", showarrow=False, xanchor="right",
                       font={"size": 10})
    fig.update_xaxes(title_text="span / (strength / (density g)) [-]")
    fig.update_yaxes(title_text="volume / (deck load span^2 / strength) [-]", type="log")
    _unavailable_note(fig, table)
    return fig


def ratio_figure(table, x: str = "normalised_span", *, title: str | None = None,
                 x_title: str | None = None, by_pylons: bool = False):
    """Each form's volume over the reference optimum's, against ``x``.

    Parameters
    ----------
    table : pandas.DataFrame
        A sweep table (span, height or pylon).
    x : str
        Column for the horizontal axis (``normalised_span``, ``span_to_rise``,
        ``span_m`` ...).
    title : str, optional
        Heading (default: "Volume over the reference optimum").
    x_title : str, optional
        Title of the horizontal axis (default: the column's name).
    by_pylons : bool
        One line per (form, pylon count) (pylon sweep table).

    Returns
    -------
    plotly.graph_objects.Figure
        A dotted line marks the reference, ratio 1.
    """
    import plotly.graph_objects as go

    forms = [n for n in _names(table) if n != REFERENCE]
    fig = _base(title or "Volume over the reference optimum")
    fig.add_hline(y=1.0, line={"color": option_style(0)["color"], "dash": "dot"})
    if by_pylons and "pylons" in table:
        for i, ((name, n), rows) in enumerate(table[table["option"] != REFERENCE]
                                              .groupby(["option", "pylons"], sort=False)):
            rows = rows.sort_values(x)
            if not (rows["status"] == "optimal").any():
                continue
            style = option_style(1 + i)
            fig.add_trace(go.Scatter(x=list(rows[x]), y=list(rows["ratio_to_reference"]
                                                             .where(rows["status"] == "optimal")),
                                     mode="lines+markers",
                                     name=series_name(f"{name}, {n} pylon(s)",
                                                      _crossing_of(rows, name)),
                                     line=style))
    else:
        _lines(fig, table[table["option"] != REFERENCE], x, "ratio_to_reference", forms,
               "{option}<br>ratio {ratio_to_reference:.4g}<br>{status}", offset=1)
        _mark_impossible(fig, table, x, [REFERENCE] + forms)
    if not any(table.loc[table["option"] != REFERENCE, "status"] == "optimal"):
        if len(table):
            fig.update_xaxes(range=[float(table[x].min()), float(table[x].max())])
        fig.add_annotation(text="no form solved here: only the reference optimum is available",
                           showarrow=False, xref="paper", yref="paper", x=0.5, y=0.5)
    _unavailable_note(fig, table)
    fig.update_xaxes(title_text=x_title or x)
    fig.update_yaxes(title_text="volume / reference volume [-]", rangemode="tozero")
    return fig


def height_figure(table, *, title: str | None = None, normalised: bool = False):
    """Volume against span / allowed rise, with common-practice bands shaded.

    Parameters
    ----------
    table : pandas.DataFrame
        :func:`bridgeopt.study.trends.height_sweep` output.
    title : str, optional
        Heading (default: "Volume as the allowed rise above the deck is cut").
    normalised : bool
        Plot normalised volume instead of m3.

    Returns
    -------
    plotly.graph_objects.Figure
        Horizontal axis span / allowed rise [-]; common-practice bands shaded.
    """
    names = _names(table)
    y = "normalised_volume" if normalised else "volume_m3"
    fig = _base(title or "Volume as the allowed rise above the deck is cut", height=460)
    for k, (label, lo, hi, colour) in enumerate(COMMON_PRACTICE_BANDS):
        fig.add_vrect(x0=lo, x1=hi, fillcolor=PALETTE[colour], line_width=0, layer="below")
        fig.add_annotation(x=0.5 * (lo + hi), y=1.0 - 0.08 * k, xref="x", yref="paper",
                           text=label.replace(": ", ":<br>", 1), showarrow=False,
                           font={"size": 10})
    _lines(fig, table, "span_to_rise", y, names,
           "{option}<br>rise {rise_m:,.0f} m (span/{span_to_rise:.3g})<br>"
           "volume {volume_m3:,.4g} m3<br>{status}")
    _own_support_references(fig, table, names, "span_to_rise", y)
    _mark_impossible(fig, table, "span_to_rise", names)
    fig.update_xaxes(title_text="span / allowed rise above deck [-] (lower structure to the "
                                "right)")
    fig.update_yaxes(title_text="volume / (deck load span^2 / strength) [-]" if normalised
                     else "volume [m3]")
    _unavailable_note(fig, table)
    return fig


def pylon_figure(table, *, title: str | None = None):
    """Volume against span for each form and pylon count (pylon sweep table).

    Parameters
    ----------
    table : pandas.DataFrame
        :func:`bridgeopt.study.trends.pylon_sweep` output (``span_m``, ``pylons``,
        ``volume_m3``, ``status`` per option).
    title : str, optional
        Heading (default: "Volume against span by pylon count").

    Returns
    -------
    plotly.graph_objects.Figure
        Span [m] against volume [m3], logarithmic.
    """
    import plotly.graph_objects as go

    fig = _base(title or "Volume against span by pylon count")
    ref = table[table["option"] == REFERENCE].drop_duplicates("span_m").sort_values("span_m")
    fig.add_trace(go.Scatter(x=list(ref["span_m"]),
                             y=list(ref["volume_m3"].where(ref["status"] == "optimal")),
                             mode="lines+markers", name=REFERENCE, line=option_style(0)))
    forms = table[table["option"] != REFERENCE]
    drawn: set = set()
    for i, ((name, n), rows) in enumerate(forms.groupby(["option", "pylons"], sort=False)):
        rows = rows.sort_values("span_m")
        if not (rows["status"] == "optimal").any():
            continue
        crossing = _crossing_of(rows, name)
        fig.add_trace(go.Scatter(x=list(rows["span_m"]),
                                 y=list(rows["volume_m3"].where(rows["status"] == "optimal")),
                                 mode="lines+markers",
                                 name=series_name(f"{name}, {n} pylon(s)", crossing),
                                 line=option_style(1 + i)))
        if crossing and crossing not in drawn and "reference_volume_m3" in rows:
            drawn.add(crossing)
            ok = rows[rows["status"] == "optimal"]
            fig.add_trace(go.Scatter(x=list(ok["span_m"]), y=list(ok["reference_volume_m3"]),
                                     mode="lines", name=series_name(REFERENCE, crossing),
                                     line={"color": option_style(0)["color"], "dash": "dot",
                                           "width": 1}))
    _unavailable_note(fig, table)
    fig.update_xaxes(title_text="span [m]")
    fig.update_yaxes(title_text="volume [m3]", type="log")
    return fig



def pylon_cost_figure(costs, span: float | None = None, *, title: str | None = None,
                      currency: str = "cost unit"):
    """Stacked cost of superstructure, piers and foundations against the pylon count.

    Parameters
    ----------
    costs : pandas.DataFrame
        :func:`bridgeopt.study.trends.pylon_costs` output.
    span : float, optional
        The span shown (default: the largest in the table). [m]
    title : str, optional
        Heading (default: "Cost by pylon count, <span> m span").
    currency : str
        Label of the currency unit.

    Returns
    -------
    plotly.graph_objects.Figure
        One group of stacked bars per form, one bar per pylon count; the
        cheapest count of each form is marked.
    """
    import plotly.graph_objects as go

    fig = _base(title or "", height=440)
    if not len(costs):
        fig.add_annotation(text="no form solved", showarrow=False, xref="paper",
                           yref="paper", x=0.5, y=0.5)
        return fig
    span = float(costs["span_m"].max()) if span is None else float(span)
    rows = costs[costs["span_m"] == span].sort_values(["option", "pylons"])
    labels = [[o for o in rows["option"]],
              [series_name(f"{n} pylon(s)", c) for n, c in zip(rows["pylons"], rows["crossing"])]]
    parts = (("superstructure_cost", "superstructure", PALETTE["tension"]),
             ("pier_cost", "pier shafts", PALETTE["compression"]),
             ("foundation_cost", "foundations", PALETTE["deck"]))
    for column, name, colour in parts:
        fig.add_trace(go.Bar(x=labels, y=list(rows[column]), name=name, marker_color=colour))
    best = rows[rows["cheapest"]]
    fig.add_trace(go.Scatter(
        x=[list(best["option"]), [series_name(f"{n} pylon(s)", c)
                                  for n, c in zip(best["pylons"], best["crossing"])]],
        y=list(best["cost"] * 1.04), mode="markers+text", text=["cheapest"] * len(best),
        textposition="top center", marker={"symbol": "triangle-down", "size": 10,
                                           "color": PALETTE["support"]},
        name="cheapest pylon count"))
    # the two-level bar labels (form, then count and crossing) take the space under the
    # plot, so the legend goes above it, under the title, where nothing overlaps it
    fig.update_layout(barmode="stack", title=title or f"Cost by pylon count, {span:,.0f} m span",
                      height=520, margin={"l": 70, "r": 20, "t": 100, "b": 150},
                      legend={"orientation": "h", "yanchor": "bottom", "y": 1.02, "x": 0})
    fig.update_xaxes(tickangle=-30)
    fig.update_yaxes(title_text=f"cost [{currency}]")
    return fig
