"""Designs -> plotly figures.  Pure functions: nothing here solves.

Members are drawn along their centrelines (``Members.curves``, so an
equal-strength cable or arch shows its sag), line width in proportion to the
member force (or volume), tension and compression in two colours chosen to be
told apart with the common colour-vision deficiencies (a deep blue and an
amber orange, which differ in lightness as well as hue), and told apart again
in the legend and hover text.  Axes are drawn to equal scale.

A half-span model with a mirror line at its right end is drawn as the whole
span (its mirror image added), as reported.

Study charts (volume against span, height or pylon count) are in
:mod:`bridgeopt.workbook.charts`.
"""

from __future__ import annotations

import math
from typing import Mapping

import numpy as np

__all__ = ["PALETTE", "OPTION_COLOURS", "design_figure", "options_figure", "ratio_bar",
           "cases_figure", "option_style", "series_name"]

from bridgeopt.study.options import series_name  # noqa: E402  (re-exported for charts)

#: Colours of the workbook's drawings (own choice; blue/orange differ in hue and lightness).
PALETTE = {
    "tension": "#1f5c99",
    "compression": "#d9730d",
    "deck": "#6e6e6e",
    "support": "#222222",
    "node": "#8a8a8a",
    "impossible": "rgba(120, 120, 120, 0.18)",
    "band": "rgba(58, 158, 143, 0.16)",
    "band2": "rgba(176, 72, 154, 0.13)",
}

#: Line colours and dashes of options in charts (reference first), own choice.
OPTION_COLOURS = ("#1a1a1a", "#1f5c99", "#d9730d", "#3a9e8f", "#b0489a", "#8c6d1f", "#6b6bd6",
                  "#b83b3b", "#4f8a2e")
_DASHES = ("solid", "dash", "dot", "dashdot", "longdash", "longdashdot", "solid")

#: Line widths drawn, thinnest to thickest. [px]
_MIN_WIDTH, _MAX_WIDTH, _LEVELS = 1.0, 11.0, 8


def option_style(index: int) -> dict:
    """Colour and dash of the ``index``-th option in a chart (0 = the reference).

    Parameters
    ----------
    index : int
        Position of the option; colours and dashes repeat beyond the palette, but
        no form (index >= 1) is ever drawn in the reference's style. [-]

    Returns
    -------
    dict
        ``{"color": ..., "dash": ...}`` for a plotly line.
    """
    if index == 0:
        return {"color": OPTION_COLOURS[0], "dash": _DASHES[0]}
    # forms cycle through the other colours and dashes: never the reference's black line
    k = index - 1
    return {"color": OPTION_COLOURS[1 + k % (len(OPTION_COLOURS) - 1)],
            "dash": _DASHES[1 + k % (len(_DASHES) - 1)]}


def _mirror_x(design) -> float | None:
    """x of a mirror line at the right end of the model, if the drawing should be mirrored."""
    prob = design.problem
    lines = getattr(prob, "mirror_lines", ()) or ()
    if not lines or design.copies < 2:
        return None
    right = float(np.max(design.nodes[:, 0])) if len(design.nodes) else 0.0
    m = max(lines)
    return float(m) if m >= right - 1e-9 * max(1.0, abs(right)) else None


def _measure(design, width_by: str) -> np.ndarray:
    if width_by == "force":
        return np.asarray(design.members.axial_force, dtype=float)
    if width_by == "volume":
        return np.asarray(design.members.volume, dtype=float)
    raise ValueError(f"width_by = {width_by!r} is invalid: valid is 'force' or 'volume'")


def _polyline(curves, mirror: float | None):
    xs, zs = [], []
    for c in curves:
        xs += list(c[:, 0]) + [None]
        zs += list(c[:, 1]) + [None]
        if mirror is not None:
            xs += list(2 * mirror - c[:, 0]) + [None]
            zs += list(c[:, 1]) + [None]
    return xs, zs


def _add_design(fig, design, *, scale: float, width_by: str, legend: bool, row=None, col=None,
                full_span: bool = True) -> None:
    """Add one design's traces to ``fig`` (optionally in a subplot)."""
    import plotly.graph_objects as go

    where = {} if row is None else {"row": row, "col": col}
    m = design.members
    mirror = _mirror_x(design) if full_span else None
    value = _measure(design, width_by)
    level = np.clip(np.ceil(_LEVELS * value / scale).astype(int), 1, _LEVELS) if scale > 0 \
        else np.ones(len(m), dtype=int)
    sense = np.asarray(m.sense, dtype=str)
    unit = "MN" if width_by == "force" else "m3"
    for s in ("tension", "compression"):
        shown = False
        for lv in range(1, _LEVELS + 1):
            idx = np.nonzero((sense == s) & (level == lv))[0]
            if not len(idx):
                continue
            xs, zs = _polyline([m.curves[i] for i in idx], mirror)
            width = _MIN_WIDTH + (_MAX_WIDTH - _MIN_WIDTH) * (lv - 1) / (_LEVELS - 1)
            fig.add_trace(go.Scatter(x=xs, y=zs, mode="lines", name=s, legendgroup=s,
                                     showlegend=legend and not shown, hoverinfo="skip",
                                     line={"color": PALETTE[s], "width": width}), **where)
            shown = True
        idx = np.nonzero(sense == s)[0]
        if len(idx):
            mid = np.array([m.curves[i][len(m.curves[i]) // 2] for i in idx]).reshape(-1, 2)
            shown_value = value[idx] / (1e6 if width_by == "force" else 1.0)
            text = [f"{s} ({g})<br>force {f / 1e6:.4g} MN<br>volume {v:.4g} m3"
                    for g, f, v in zip(np.asarray(m.group)[idx], m.axial_force[idx],
                                       m.volume[idx])]
            fig.add_trace(go.Scatter(x=mid[:, 0], y=mid[:, 1], mode="markers", showlegend=False,
                                     legendgroup=s, hovertext=text, hoverinfo="text",
                                     marker={"size": 7, "color": PALETTE[s], "opacity": 0.0},
                                     customdata=shown_value, name=f"{s} [{unit}]"), **where)
    nodes = np.asarray(design.nodes, dtype=float).reshape(-1, 2)
    if mirror is not None:
        nodes = np.vstack([nodes, np.column_stack([2 * mirror - nodes[:, 0], nodes[:, 1]])])
    x_lo = float(nodes[:, 0].min()) if len(nodes) else 0.0
    x_hi = float(nodes[:, 0].max()) if len(nodes) else 1.0
    fig.add_trace(go.Scatter(x=[x_lo, x_hi], y=[0.0, 0.0], mode="lines", name="deck level",
                             legendgroup="deck", showlegend=legend, hoverinfo="skip",
                             line={"color": PALETTE["deck"], "width": 2, "dash": "dash"}),
                  **where)
    fig.add_trace(go.Scatter(x=nodes[:, 0], y=nodes[:, 1], mode="markers", name="nodes",
                             legendgroup="nodes", showlegend=legend, hoverinfo="skip",
                             marker={"size": 3, "color": PALETTE["node"]}), **where)
    sup = np.array([s.at for s in getattr(design.problem, "supports", ())], dtype=float)
    if sup.size:
        sup = sup.reshape(-1, 2)
        if mirror is not None:
            sup = np.vstack([sup, np.column_stack([2 * mirror - sup[:, 0], sup[:, 1]])])
        fig.add_trace(go.Scatter(x=sup[:, 0], y=sup[:, 1], mode="markers", name="supports",
                                 legendgroup="supports", showlegend=legend, hoverinfo="skip",
                                 marker={"symbol": "triangle-up", "size": 11,
                                         "color": PALETTE["support"]}), **where)


def _layout(fig, title: str | None, height: int) -> None:
    fig.update_layout(title=title, height=height, template="simple_white",
                      margin={"l": 60, "r": 20, "t": 60 if title else 30, "b": 95},
                      legend={"orientation": "h", "yref": "container", "y": 0.0,
                              "yanchor": "bottom", "x": 0.0},
                      hovermode="closest")


def design_figure(design, *, title: str | None = None, width_by: str = "force",
                  full_span: bool = True, height: int = 420):
    """A drawing of one design.

    Parameters
    ----------
    design : Design
        A solved design; curved members are drawn along their centrelines.
    title : str, optional
        Heading of the figure (default: none).
    width_by : {"force", "volume"}
        Line width in proportion to the member force or volume.
    full_span : bool
        Draw the mirror image of a half-span model too.
    height : int
        Figure height. [px]

    Returns
    -------
    plotly.graph_objects.Figure
    """
    import plotly.graph_objects as go

    fig = go.Figure()
    value = _measure(design, width_by)
    _add_design(fig, design, scale=float(value.max()) if len(value) else 0.0,
                width_by=width_by, legend=True, full_span=full_span)
    _layout(fig, title, height)
    fig.update_xaxes(title_text="x [m]")
    fig.update_yaxes(title_text="z [m]", scaleanchor="x", scaleratio=1)
    return fig


def options_figure(options: Mapping[str, object], *, width_by: str = "force",
                   height_per_panel: int = 300, title: str | None = None):
    """The options drawn at one scale, one panel each, reference first.

    Parameters
    ----------
    options : mapping of str to Option or Design or None
        An :class:`~bridgeopt.study.options.Option` without a design (or ``None``) is
        shown as an empty panel with its message.
    width_by : {"force", "volume"}
        Line widths share one scale over all panels.
    height_per_panel : int
        Height of each option's panel. [px]
    title : str, optional
        Heading of the figure (default: none).

    Returns
    -------
    plotly.graph_objects.Figure
    """
    from plotly.subplots import make_subplots

    designs = {n: getattr(o, "design", o) for n, o in options.items()}
    names = [n for n, d in designs.items() if d is not None]
    missing = [getattr(options[n], "message", "") or f"{n}: not available"
               for n, d in designs.items() if d is None]
    rows = max(1, len(names))
    fig = make_subplots(rows=rows, cols=1, shared_xaxes=True,
                        subplot_titles=[f"{n}: {designs[n].volume:,.4g} m3" for n in names],
                        vertical_spacing=0.12 / (rows - 1) if rows > 1 else 0.1)
    scale = max([float(_measure(designs[n], width_by).max()) for n in names
                 if len(designs[n].members)] or [0.0])
    for i, n in enumerate(names, start=1):
        _add_design(fig, designs[n], scale=scale, width_by=width_by, legend=i == 1, row=i, col=1)
        fig.update_yaxes(scaleanchor=f"x{i}" if i > 1 else "x", scaleratio=1, row=i, col=1,
                         title_text="z [m]")
    fig.update_xaxes(title_text="x [m]", row=rows, col=1)
    note = ""
    if missing:
        note = "<br><sup>" + _wrap("Not drawn: " + "; ".join(missing), 140).replace(
            "<br>", "</sup><br><sup>") + "</sup>"
    _layout(fig, (title or "") + note if (title or note) else None,
            max(320, height_per_panel * rows + 100))
    if missing:
        fig.update_layout(margin={"t": 80 + 16 * note.count("<br>")})
    return fig


def _wrap(text: str, width: int = 90) -> str:
    words, lines, line = text.split(), [], ""
    for w in words:
        if line and len(line) + len(w) + 1 > width:
            lines.append(line)
            line = w
        else:
            line = f"{line} {w}".strip()
    return "<br>".join(lines + [line])


def ratio_bar(table, *, title: str | None = "Volume against the reference optimum"):
    """Bar chart of each option's volume ratio to the reference optimum of its own crossing.

    An option on other supports than the scenario's is named with its crossing
    ("cable-stayed fan (1 pier)"); its ratio is to that crossing's optimum.

    Parameters
    ----------
    table : pandas.DataFrame
        :func:`bridgeopt.study.options.compare` output.
    title : str, optional
        Heading of the chart (None: none).

    Returns
    -------
    plotly.graph_objects.Figure
        One bar per solved option; options that did not solve are listed
        under the bars with their status.
    """
    import plotly.graph_objects as go

    ok = table[table["status"] == "optimal"]
    colours = [option_style(i)["color"] for i in range(len(table))]
    colour_of = dict(zip(table["option"], colours))
    crossings = ok["crossing"] if "crossing" in ok else [""] * len(ok)
    fig = go.Figure(go.Bar(
        x=[series_name(o, c if isinstance(c, str) else "") for o, c in zip(ok["option"],
                                                                          crossings)],
        y=list(ok["ratio_to_reference"]),
        marker_color=[colour_of[o] for o in ok["option"]],
        text=[f"{r:.3g}" if math.isfinite(r) else "" for r in ok["ratio_to_reference"]],
        textposition="outside", name="volume / reference volume", width=0.5,
        hovertext=[f"{v:,.5g} m3" for v in ok["volume_m3"]], hoverinfo="text+x"))
    fig.add_hline(y=1.0, line={"color": PALETTE["deck"], "dash": "dot"})
    missing = table[table["status"] != "optimal"]
    if len(missing):
        fig.add_annotation(text=_wrap("; ".join(f"{o}: {s}" for o, s in
                                                zip(missing["option"], missing["status"]))),
                           showarrow=False, xref="paper", yref="paper", x=0, y=-0.28,
                           xanchor="left", font={"size": 11})
    top = ok["ratio_to_reference"].max() if len(ok) else 1.0
    fig.update_yaxes(title_text="volume / reference [-]",
                     range=[0, 1.25 * (top if math.isfinite(top) else 1.0)])
    fig.update_layout(title=title, height=340, template="simple_white", showlegend=False,
                      margin={"l": 60, "r": 20, "t": 50, "b": 90})
    return fig


def cases_figure(design, *, title: str | None = None):
    """A several-load-case design: members coloured by the case that governs them.

    ``design`` is a :class:`~bridgeopt.solver.multicase.CaseDesign` (straight members,
    self-weight lumped at their ends); line width follows the member's area.
    Never solves.

    Parameters
    ----------
    design : CaseDesign
        A solved multi-case design (:func:`~bridgeopt.solver.multicase.optimize_cases`).
    title : str, optional
        Heading (default: the design's volume in m3).

    Returns
    -------
    plotly.graph_objects.Figure
    """
    import plotly.graph_objects as go

    fig = go.Figure()
    area = np.asarray(design.area, dtype=float)
    top = float(area.max()) if len(area) else 1.0
    p, q = design.nodes[design.start], design.nodes[design.end]
    for k, name in enumerate(design.case_names):
        sel = np.nonzero(design.governing == k)[0]
        for j, i in enumerate(sel):   # one trace per member: plotly widths are per trace
            fig.add_trace(go.Scatter(
                x=[p[i, 0], q[i, 0]], y=[p[i, 1], q[i, 1]], mode="lines",
                line={"color": option_style(k + 1)["color"],
                      "width": 0.8 + 6.0 * math.sqrt(area[i] / top)},
                name=f"governed by {name}", legendgroup=name, showlegend=j == 0,
                hovertext=f"{name}: area {area[i]:.4g} m2", hoverinfo="text"))
    fig.update_yaxes(scaleanchor="x", scaleratio=1, title_text="z [m]")
    fig.update_xaxes(title_text="x [m]")
    _layout(fig, title or f"Several load cases: {design.volume:,.5g} m3", 420)
    return fig
