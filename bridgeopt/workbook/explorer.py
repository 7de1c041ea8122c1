"""The span-and-form explorer: controls wired to :mod:`bridgeopt.study.options` and the plots.

Each control change (on release: ``continuous_update=False``) re-solves the
reference optimum and the chosen form and redraws them at one scale, with the
volume-ratio bar chart and the quantities tables.  Solves are cached on the
slider values (the sliders move in fixed steps, so the values are already
discrete).  A failed or invalid input shows a one-line message above the
drawing; the last good drawing stays visible.
"""

from __future__ import annotations

from typing import Any

from bridgeopt import study
from bridgeopt.workbook import plots
from bridgeopt.model.bridge import ARRANGEMENTS, BridgeScenario
from bridgeopt.errors import InputError, SolveError
from bridgeopt.model.materials import PRESETS
from bridgeopt.workbook.notebook import (cautions_html, error_text, message_html, number, report_mode,
                       scenario_html)

__all__ = ["Explorer"]


class Explorer:
    """Controls, outputs and the current results of one explorer.

    Parameters
    ----------
    span : float
        Span. [m]
    rise : float
        Height allowed above the deck. [m]
    depth : float
        Depth allowed below the deck. [m]
    deck_load : float
        Deck load. [N/m]
    material : str
        A key of :data:`bridgeopt.PRESETS`.
    arrangement : {"single", "repeating"}
        One span between anchored abutments, or the central span of a long run.
    form : str
        Form compared with the reference optimum.
    pylons : int
        Pylons per span, passed to the form. [-]
    divisions : int
        Grid divisions across the span (30 is the meeting grid). [-]
    traffic : str
        A key of :data:`bridgeopt.study.options.TRAFFIC`: traffic load cases carried on top of the
        deck load ("none": the deck load alone).
    traffic_load : float
        Traffic load on the loaded part of the deck in each case. [N/m]
    name : str
        Name of the crossing.

    Attributes
    ----------
    controls : dict of str to ipywidgets.Widget
    message : ipywidgets.HTML
        Empty, a note (form not available) or the error of the last change.
    results : dict of str to study.Option
    comparison : pandas.DataFrame
        :func:`bridgeopt.study.options.compare` table of the last good solve.
    figure, bar_figure : plotly.graph_objects.Figure
    error : str or None
        The last change's error line, if it failed.
    """

    def __init__(self, *, span: float = 1800.0, rise: float = 360.0, depth: float = 180.0,
                 deck_load: float = 2.0e5, material: str = "steel", arrangement: str = "single",
                 form: str = "suspension", pylons: int = 1, divisions: int = 30,
                 traffic: str = "none", traffic_load: float = 8.0e4,
                 name: str = "option study") -> None:
        import ipywidgets as w

        self.divisions, self.name = divisions, name
        style, wide = {"description_width": "170px"}, w.Layout(width="460px")

        def slider(cls, value, lo, hi, step, label, fmt=None):
            kw = {"readout_format": fmt} if fmt else {}
            return cls(value=value, min=min(lo, value), max=max(hi, value), step=step,
                       description=label, continuous_update=False, style=style, layout=wide,
                       **kw)

        forms = study.available_forms()
        self.controls: dict[str, Any] = {
            "span": slider(w.FloatSlider, span, 100.0, 10000.0, 50.0, "span [m]", ".0f"),
            "rise": slider(w.FloatSlider, rise, 0.0, 3000.0, 10.0, "rise above deck [m]", ".0f"),
            "depth": slider(w.FloatSlider, depth, 0.0, 1500.0, 10.0, "depth below deck [m]",
                            ".0f"),
            "deck_load": slider(w.FloatSlider, deck_load / 1e3, 10.0, 1000.0, 10.0,
                                "deck load [kN/m]", ".0f"),
            "material": w.Dropdown(options=list(PRESETS), value=material, description="material",
                                   style=style, layout=wide),
            "arrangement": w.Dropdown(options=list(ARRANGEMENTS), value=arrangement,
                                      description="arrangement", style=style, layout=wide),
            "form": w.Dropdown(options=list(forms) if form in forms else list(forms) + [form],
                               value=form, description="form", style=style, layout=wide),
            "pylons": slider(w.IntSlider, pylons, 1, 4, 1, "pylons per span (on piers)"),
            "traffic": w.Dropdown(options=list(study.TRAFFIC), value=traffic,
                                  description="traffic cases", style=style, layout=wide),
            "traffic_load": slider(w.FloatSlider, traffic_load / 1e3, 0.0, 1000.0, 10.0,
                                   "traffic load [kN/m]", ".0f"),
        }
        self.message = w.HTML()
        self.summary = w.HTML()
        self.drawing, self.bars, self.tables = w.Output(), w.Output(), w.Output()
        self.results: dict[str, study.Option] = {}
        self.comparison = None
        self.figure = self.bar_figure = self.cases_figure = None
        self.cases = None
        self.quantities: dict[str, Any] = {}
        self.error: str | None = None
        self._cache: dict[tuple, study.Option] = {}
        for c in self.controls.values():
            c.observe(self._changed, names="value")
        self.update()

    # ------------------------------------------------------------ model

    def scenario(self) -> BridgeScenario:
        """The scenario the controls describe (raises InputError when invalid)."""
        c = self.controls
        return BridgeScenario(span=float(c["span"].value), rise=float(c["rise"].value),
                              depth=float(c["depth"].value),
                              deck_load=float(c["deck_load"].value) * 1e3,
                              material=PRESETS[c["material"].value],
                              arrangement=c["arrangement"].value, divisions=self.divisions,
                              name=self.name)

    def _solve(self, bridge: BridgeScenario, name: str, pylons: int) -> study.Option:
        key = (bridge, name, pylons if name != study.REFERENCE else None)
        if key not in self._cache:
            if len(self._cache) > 512:
                self._cache.clear()
            self._cache[key] = study.solve_option(bridge, name, {"pylons": pylons})
        return self._cache[key]

    def update(self) -> bool:
        """Re-solve and redraw from the controls; return False (and show why) on failure."""
        try:
            self._update()
        except Exception as err:  # shown in the notebook, never only in a log console
            self.error = error_text(err)
            self.message.value = message_html(self.error)
            return False
        return self.error is None

    def _update(self) -> None:
        from IPython.display import clear_output, display

        bridge = self.scenario()
        form, pylons = self.controls["form"].value, int(self.controls["pylons"].value)
        if (bridge, study.REFERENCE, None) not in self._cache:
            self.message.value = message_html(f"Solving {bridge.span:,.0f} m ...", "note")
        ref = self._solve(bridge, study.REFERENCE, pylons)
        results = {study.REFERENCE: ref}
        # a form below the reference it is set against is refused, never drawn
        results[form] = study.bounded(self._solve(bridge, form, pylons), ref.design)
        if ref.status != "optimal":
            self.error = ref.message
            self.message.value = message_html(ref.message)
            return
        self.error = None
        other = results[form]
        self.message.value = "" if other.status == "optimal" else message_html(
            other.message + "; showing the reference optimum only.", "note")
        self.results = results
        self.comparison = study.comparison_table(bridge, results)
        drawn = study.options_by_series(results, self.comparison)
        self.quantities = {n: study.quantities(o.design) for n, o in drawn.items()
                           if o.design is not None}
        self.figure = plots.options_figure(drawn, title=f"{bridge.name}: {bridge.span:,.0f} m "
                                           f"span, {bridge.material.name}")
        self._traffic(bridge)
        self.bar_figure = plots.ratio_bar(self.comparison)
        self.summary.value = self._summary_html(bridge)
        drawings = [self.figure] + ([self.cases_figure] if self.cases_figure else [])
        for out, objs in ((self.drawing, drawings), (self.bars, [self.bar_figure]),
                          (self.tables, self._tables())):
            with out:
                clear_output(wait=True)
                for obj in objs:
                    display(obj)

    def _traffic(self, bridge: BridgeScenario) -> None:
        """Solve the traffic cases, if any; a failure becomes a note, the rest still shows."""
        traffic = self.controls["traffic"].value
        self.cases = self.cases_figure = None
        if traffic == "none":
            return
        load = float(self.controls["traffic_load"].value) * 1e3
        try:
            design, single = study.solve_traffic(bridge, traffic, load)
        except (InputError, SolveError) as err:
            note = f"traffic cases: {error_text(err)}"
            self.message.value = message_html(note, "note")
            return
        self.cases = (design, single)
        self.cases_figure = plots.cases_figure(
            design, title=f"Deck load plus traffic cases ({traffic}, {load / 1e3:,.0f} kN/m): "
            f"{design.volume:,.5g} m3 on a {study.TRAFFIC_DIVISIONS}-division whole-span grid")

    def _summary_html(self, bridge: BridgeScenario) -> str:
        parts = []
        for _, r in self.comparison.iterrows():
            if r["status"] == "optimal":
                parts.append(f"<b>{r['series']}</b>: {r['volume_m3']:,.5g} m3, "
                             f"{r['weight_N'] / 1e3:,.5g} kN, ratio {r['ratio_to_reference']:.3g}")
        if self.cases is not None:
            design, single = self.cases
            counts = ", ".join(f"{n} {c}" for n, c in design.governing_counts().items())
            parts.append(f"<b>with traffic cases</b>: {design.volume:,.5g} m3, "
                         f"{design.volume / single.volume:.3g} x the heaviest case alone "
                         f"(members governed: {counts})")
        return ("<div>" + " &nbsp;|&nbsp; ".join(parts)
                + f" &nbsp;|&nbsp; normalised span {bridge.normalised_span:.3g}</div>")

    def _tables(self) -> list:
        from IPython.display import HTML

        cols = ["series", "status", "volume_m3", "weight_N", "reference_volume_m3",
                "ratio_to_reference"]
        out = [HTML("<b>Options</b>"), self.comparison[cols].style.format(
            {"volume_m3": "{:,.5g}", "weight_N": "{:,.5g}", "reference_volume_m3": "{:,.5g}",
             "ratio_to_reference": "{:.3g}"},
            na_rep="-").hide(axis="index")]
        for name, q in self.quantities.items():
            # the data are in N; shown in kN and MN
            shown = q.assign(weight_N=q["weight_N"] / 1e3,
                             largest_force_N=q["largest_force_N"] / 1e6).rename(
                columns={"weight_N": "weight_kN", "largest_force_N": "largest_force_MN"})
            out += [HTML(f"<b>Quantities: {name}</b>"), shown.style.format(
                {"length_m": "{:,.0f}", "volume_m3": "{:,.5g}", "weight_kN": "{:,.5g}",
                 "largest_force_MN": "{:,.4g}"}).hide(axis="index")]
        return out

    def _changed(self, _change) -> None:
        self.update()

    # ------------------------------------------------------------ view

    def state(self) -> dict:
        """Numbers of the current view (for tests and logs)."""
        ref = self.results.get(study.REFERENCE)
        return {"error": self.error, "message": self.message.value,
                "reference_volume": ref.design.volume if ref and ref.design else None,
                "traces": len(self.figure.data) if self.figure is not None else 0,
                "title": self.figure.layout.title.text if self.figure is not None else "",
                "span": float(self.controls["span"].value),
                "traffic_volume": self.cases[0].volume if self.cases else None}

    def widget(self):
        """The explorer as one ipywidgets box: controls, message, drawing, bars and tables."""
        import ipywidgets as w

        c = self.controls
        left = w.VBox([c["span"], c["rise"], c["depth"], c["deck_load"]])
        right = w.VBox([c["material"], c["arrangement"], c["form"], c["pylons"]])
        traffic = w.HBox([c["traffic"], c["traffic_load"]])
        return w.VBox([w.HTML(cautions_html()), w.HBox([left, right]), traffic, self.message,
                       self.summary, self.drawing, self.bars, self.tables])

    def show(self) -> None:
        """Display the explorer (static figures and tables in report mode)."""
        from IPython.display import HTML, display

        if not report_mode():
            display(self.widget())
            return
        try:
            bridge = self.scenario()
        except Exception as err:  # shown, never raised from a report
            bridge = None
            display(HTML(message_html(error_text(err))))
        if self.figure is None:
            # nothing solved: a report whose body would only be this error is not written
            raise SolveError("report", self.error or "nothing could be solved for these inputs")
        if bridge is not None:
            display(HTML(scenario_html(bridge)))
        if self.message.value:
            display(HTML(self.message.value))
        if self.figure is not None:
            display(HTML(self.summary.value))
            display(self.figure)
            display(self.bar_figure)
        if bridge is not None:
            display(HTML("<b>Inputs</b>"))
            display(study.inputs_table(bridge).style.hide(axis="index").format(number))
        if self.figure is not None:
            for obj in self._tables():
                display(obj)
