"""Study tables -> plotly charts.  Pure functions: nothing here solves.

Each function takes a table from :mod:`bridgeopt.study.options` (span, height or
pylon sweep) and returns a :class:`plotly.graph_objects.Figure`.  Options that
did not solve at some point are marked there ("impossible" regions shaded),
never drawn as if they had a volume.
"""

from __future__ import annotations

import math

import numpy as np

from bridgeopt.workbook.plots import PALETTE, option_style
from bridgeopt.study.options import REFERENCE

__all__ = ["span_volume_figure", "ratio_figure", "height_figure", "pylon_figure",
           "COMMON_PRACTICE_BANDS"]

#: Span-to-height ratios common in practice (from memory, not from a code):
#: (label, low, high, colour key) with low/high as span / height above the deck.
COMMON_PRACTICE_BANDS = (
    ("cable-stayed pylon height above deck: span/5 to span/4 (common practice, from memory)",
     4.0, 5.0, "band"),
    ("suspension sag: span/12 to span/8 (common practice, from memory)", 8.0, 12.0, "band2"),
)


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
            mode="lines+markers", name=name, line=style,
            marker={"color": style["color"], "size": 6},
            hovertext=[hover.format(**r) for r in rows.to_dict("records")], hoverinfo="text"))


def _unavailable_note(fig, table) -> None:
    names = sorted({o for o, s in zip(table["option"], table["status"]) if s == "unavailable"})
    if names:
        fig.add_annotation(text="not yet available: " + ", ".join(names), showarrow=False,
                           xref="paper", yref="paper", x=0, y=1.02, xanchor="left",
                           yanchor="bottom", font={"size": 11})


def _own_support_references(fig, table, names) -> None:
    """Thin dotted lines: the reference optimum on the supports of forms that add their own.

    A form on extra piers (intermediate pylons) or with anchored pylon tops is set
    against the optimum with those supports (``reference_volume_m3``); drawn here
    so that no form ever seems to beat "the" least volume.  One line per distinct
    set of such references.
    """
    import plotly.graph_objects as go

    if "reference_volume_m3" not in table:
        return
    plain = table[table["option"] == REFERENCE].set_index("span_m")["volume_m3"]
    drawn: list[tuple] = []
    for i, name in enumerate(names):
        rows = table[(table["option"] == name) & (table["status"] == "optimal")]
        rows = rows.sort_values("normalised_span")
        if rows.empty or name == REFERENCE:
            continue
        ref = rows["reference_volume_m3"].to_numpy(float)
        same = np.isclose(ref, plain.reindex(rows["span_m"]).to_numpy(float), rtol=1e-9)
        if same.all():
            continue
        key = tuple(np.round(ref, 6))
        if key in drawn:
            continue
        drawn.append(key)
        scale = (rows["normalised_volume"] / rows["volume_m3"]).to_numpy(float)
        fig.add_trace(go.Scatter(
            x=list(rows["normalised_span"]), y=list(ref * scale), mode="lines",
            name=f"reference optimum on the supports of {name}",
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
                                     mode="lines+markers", name=f"{name}, {n} pylon(s)",
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
    for i, ((name, n), rows) in enumerate(forms.groupby(["option", "pylons"], sort=False)):
        rows = rows.sort_values("span_m")
        if not (rows["status"] == "optimal").any():
            continue
        fig.add_trace(go.Scatter(x=list(rows["span_m"]),
                                 y=list(rows["volume_m3"].where(rows["status"] == "optimal")),
                                 mode="lines+markers", name=f"{name}, {n} pylon(s)",
                                 line=option_style(1 + i)))
    _unavailable_note(fig, table)
    fig.update_xaxes(title_text="span [m]")
    fig.update_yaxes(title_text="volume [m3]", type="log")
    return fig

